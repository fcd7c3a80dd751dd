package tokenize

import (
	"bufio"
	"bytes"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/blevesearch/segment"
)

var updateUAX29 = flag.Bool("update-uax29", false, "rewrite testdata/uax29/differences.txt (scripts/gen-uax29.sh)")

const (
	uax29Dir    = "../testdata/uax29"
	uax29System = "/usr/share/unicode/auxiliary/WordBreakTest.txt"
)

// uax29Agree is the number of WordBreakTest.txt (Unicode 15.0) cases on
// which github.com/blevesearch/segment v0.9.1, built from the Unicode 8.0
// rules and properties, places every boundary as the test file says. The
// others are listed in testdata/uax29/differences.txt.
const (
	uax29Cases = 1823
	uax29Agree = 1773
)

type uax29Case struct {
	line     int
	text     string
	breaks   []int    // byte offsets of the boundaries, 0 and len(text) included
	rules    []string // rule deciding after the i-th code point, e.g. "WB4"
	offsets  []int    // byte offset after the i-th code point
	original string
}

// parseUAX29 reads the test file format: hex code points separated by ÷
// (boundary) and × (no boundary), then a comment naming the rule at each
// position as [N.M] (N.1 = WBNa, N.2 = WBNb and so on).
func parseUAX29(t *testing.T, path string) []uax29Case {
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var cases []uax29Case
	sc := bufio.NewScanner(f)
	for n := 1; sc.Scan(); n++ {
		line := sc.Text()
		data, comment, _ := strings.Cut(line, "#")
		data = strings.TrimSpace(data)
		if data == "" {
			continue
		}
		c := uax29Case{line: n, original: data, breaks: []int{0}}
		var b strings.Builder
		for _, f := range strings.Fields(data) {
			switch f {
			case "÷":
				if b.Len() > 0 {
					c.breaks = append(c.breaks, b.Len())
				}
			case "×":
			default:
				r, err := strconv.ParseUint(f, 16, 32)
				if err != nil {
					t.Fatalf("%s:%d: bad code point %q", path, n, f)
				}
				b.WriteRune(rune(r))
				c.offsets = append(c.offsets, b.Len())
			}
		}
		c.text = b.String()
		// Rules: the first [x] is for the start of text, the last for
		// the end; the ones between follow each code point but the last.
		for _, part := range strings.Split(comment, "[")[1:] {
			num, _, _ := strings.Cut(part, "]")
			c.rules = append(c.rules, ruleName(num))
		}
		if len(c.rules) != len(c.offsets)+1 {
			t.Fatalf("%s:%d: %d rules for %d code points", path, n, len(c.rules), len(c.offsets))
		}
		cases = append(cases, c)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return cases
}

// ruleName turns the test file's "3.3" into "WB3c" and "999.0" into "WB999".
func ruleName(num string) string {
	major, minor, _ := strings.Cut(num, ".")
	switch {
	case major == "0" && minor == "2":
		return "sot"
	case major == "0" && minor == "3":
		return "eot"
	case minor == "0" || minor == "":
		return "WB" + major
	}
	m, _ := strconv.Atoi(minor)
	return "WB" + major + string(rune('a'+m-1))
}

// segmentBoundaries returns the boundaries of a plain pass of the segmenter,
// the same way BenchmarkSegmentFloor uses it.
func segmentBoundaries(text []byte) ([]int, error) {
	s := segment.NewWordSegmenterDirect(text)
	b := []int{0}
	end := 0
	for s.Segment() {
		end += len(s.Bytes())
		b = append(b, end)
	}
	if err := s.Err(); err != nil {
		return b, err
	}
	if end != len(text) {
		return b, fmt.Errorf("segments cover %d of %d bytes", end, len(text))
	}
	return b, nil
}

func formatBreaks(c uax29Case, breaks []int) string {
	at := map[int]bool{}
	for _, b := range breaks {
		at[b] = true
	}
	var s strings.Builder
	s.WriteString("÷")
	prev := 0
	for _, off := range c.offsets {
		r := []rune(c.text[prev:off])[0]
		fmt.Fprintf(&s, " %04X ", r)
		if at[off] {
			s.WriteString("÷")
		} else {
			s.WriteString("×")
		}
		prev = off
	}
	return s.String()
}

// TestUAX29WordBreak runs every case of the Unicode 15.0 WordBreakTest.txt
// (Unicode, Inc.; Debian package unicode-data 15.0.0; copied to
// testdata/uax29) against the raw boundaries of the segmenter bowline uses.
func TestUAX29WordBreak(t *testing.T) {
	path := filepath.Join(uax29Dir, "WordBreakTest.txt")
	if _, err := os.Stat(uax29System); err == nil {
		// The committed copy must be the file of the Debian package.
		a, _ := os.ReadFile(uax29System)
		b, err := os.ReadFile(path)
		if err != nil || !bytes.Equal(a, b) {
			t.Errorf("%s differs from %s; run scripts/gen-uax29.sh", path, uax29System)
		}
	}
	cases := parseUAX29(t, path)
	var diffs strings.Builder
	fmt.Fprintf(&diffs, "# WordBreakTest.txt (Unicode 15.0) cases where github.com/blevesearch/segment v0.9.1\n")
	fmt.Fprintf(&diffs, "# (Unicode 8.0 rules) places boundaries differently. Made by scripts/gen-uax29.sh.\n")
	fmt.Fprintf(&diffs, "# line<TAB>rules at the differing positions<TAB>expected<TAB>segmenter\n")
	agree := 0
	for _, c := range cases {
		got, err := segmentBoundaries([]byte(c.text))
		if err == nil && equalInts(got, c.breaks) {
			agree++
			continue
		}
		rules := differingRules(c, got)
		gotText := formatBreaks(c, got)
		if err != nil {
			gotText = "error: " + err.Error()
		}
		fmt.Fprintf(&diffs, "%d\t%s\t%s\t%s\n", c.line, strings.Join(rules, " "), c.original, gotText)
	}
	if len(cases) != uax29Cases {
		t.Errorf("parsed %d cases, want %d", len(cases), uax29Cases)
	}
	if agree != uax29Agree {
		t.Errorf("segmenter agrees on %d of %d cases, want %d", agree, len(cases), uax29Agree)
	}
	file := filepath.Join(uax29Dir, "differences.txt")
	if *updateUAX29 {
		if err := os.WriteFile(file, []byte(diffs.String()), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	if string(want) != diffs.String() {
		t.Errorf("%s is out of date; run scripts/gen-uax29.sh and review the change", file)
	}
}

// differingRules names the rules of the test file at each position where
// the segmenter's boundary decision differs, without repeats.
func differingRules(c uax29Case, got []int) []string {
	in := func(xs []int, x int) bool {
		for _, v := range xs {
			if v == x {
				return true
			}
		}
		return false
	}
	var rules []string
	seen := map[string]bool{}
	for i, off := range c.offsets[:len(c.offsets)-1] {
		if in(got, off) != in(c.breaks, off) {
			r := c.rules[i+1]
			if !seen[r] {
				seen[r] = true
				rules = append(rules, r)
			}
		}
	}
	if len(rules) == 0 {
		rules = append(rules, "-")
	}
	return rules
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
