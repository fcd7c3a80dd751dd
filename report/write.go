package report

import (
	"fmt"
	"io"
	"path/filepath"
	"strings"
)

// A Renderer is a run's result that renders itself as text for people,
// JSON for machines and an HTML page: the Figures of learn and encode, and
// the results of drift and sweep.
type Renderer interface {
	WriteText(io.Writer) error
	WriteJSON(io.Writer) error
	WriteHTML(io.Writer) error
}

// Write renders f to w in the named format: "text", "json" or "html".
func Write(w io.Writer, format string, f Renderer) error {
	switch format {
	case "text":
		return f.WriteText(w)
	case "json":
		return f.WriteJSON(w)
	case "html":
		return f.WriteHTML(w)
	}
	return fmt.Errorf("report: unknown format %q (want text, json or html)", format)
}

// FormatFromPath picks the report format from a file name's extension:
// ".json" gives "json", ".html" or ".htm" gives "html". Any other name is
// an error that names the path.
func FormatFromPath(path string) (string, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".json":
		return "json", nil
	case ".html", ".htm":
		return "html", nil
	}
	return "", fmt.Errorf("report: cannot tell the report format of %q: the name must end in .json, .html or .htm", path)
}
