package main

import (
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
)

// chromiumFlags are the flags a headless Chromium needs on a machine with
// no network and no display (as root, hence --no-sandbox).
var chromiumFlags = []string{"--headless=old", "--single-process", "--no-zygote", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
	"--disable-background-networking", "--disable-component-update", "--disable-sync", "--hide-scrollbars"}

func chromium(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	testkit.Missing(t, "chromium not found (Debian package chromium)")
	return ""
}

var consoleError = regexp.MustCompile(`(?i)CONSOLE.*(error|uncaught)|Uncaught`)

// TestHTMLReportsInBrowser opens every HTML page bowline writes (learn,
// encode, drift and sweep reports) in headless Chromium: the page must
// render without console errors, every plot must have drawn marks, and the
// screenshot must not be blank.
func TestHTMLReportsInBrowser(t *testing.T) {
	bin := chromium(t)
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	mustRun(t, "demo", "--dir", dir, "--docs", "1500")
	mustRun(t, "learn", p("train.tsv"), "--label", "team", "--stop", "en", "--words", "1-2", "--min-docs", "2", "-o", p("s.json"), "--report", p("learn.html"))
	mustRun(t, "drift", "--spec", p("s.json"), p("test.tsv"), "--report", p("drift.html"))
	mustRun(t, "sweep", p("train.tsv"), "--holdout", p("test.tsv"), "--label", "team", "--widths", "2^8..2^12", "--report", p("sweep.html"))
	for _, page := range []string{"encode.html", "learn.html", "drift.html", "sweep.html"} {
		t.Run(page, func(t *testing.T) {
			t.Parallel()
			url := "file://" + p(page)
			prof := t.TempDir()
			// The pages carry no script, so the DOM Chromium builds is the
			// file's markup: check the plots there.
			dom, err := os.ReadFile(p(page))
			if err != nil {
				t.Fatal(err)
			}
			svgs := regexp.MustCompile(`(?s)<svg.*?</svg>`).FindAllString(string(dom), -1)
			if len(svgs) == 0 {
				t.Fatalf("%s has no plot", page)
			}
			for i, s := range svgs {
				if !strings.Contains(s, "<path") && !strings.Contains(s, "<rect") && !strings.Contains(s, "<polyline") {
					t.Fatalf("%s: plot %d draws nothing", page, i+1)
				}
			}
			shot := filepath.Join(prof, "shot.png")
			cmd := exec.Command(bin, append(chromiumFlags, "--user-data-dir="+prof, "--enable-logging=stderr", "--v=0",
				"--window-size=1280,2000", "--screenshot="+shot, url)...)
			out, err := cmd.CombinedOutput()
			if err != nil {
				t.Fatalf("chromium --screenshot: %v\n%s", err, out)
			}
			if m := consoleError.Find(out); m != nil {
				t.Fatalf("%s: console error: %s", page, m)
			}
			f, err := os.Open(shot)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			img, err := png.Decode(f)
			if err != nil {
				t.Fatal(err)
			}
			b := img.Bounds()
			var ink, all int
			for y := b.Min.Y; y < b.Max.Y; y += 4 {
				for x := b.Min.X; x < b.Max.X; x += 4 {
					r, g, bl, _ := img.At(x, y).RGBA()
					all++
					if r < 0xe000 || g < 0xe000 || bl < 0xe000 {
						ink++
					}
				}
			}
			if share := float64(ink) / float64(all); share < 0.01 {
				t.Fatalf("%s: the screenshot is almost blank (%.2f%% ink)", page, 100*share)
			} else {
				t.Logf("%s: %d plots, %.1f%% of the screenshot inked", page, len(svgs), 100*share)
			}
		})
	}
}
