package main

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"

	"github.com/bowline/bowline/internal/atomicfile"
	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/demo"
)

func runDemo(args []string, stdout, stderr io.Writer) error {
	c := newCommand("demo", "[--dir DIR]", "Runs learn and encode on the invented Pellwick Bike Share corpus, writes every output into DIR,\nand trains and tests liblinear on the rows when liblinear-train is installed.")
	var dir string
	var docs int
	c.Flags.StringVar(&dir, "dir", "bowline-demo", "folder for the demo's files")
	c.Flags.IntVar(&docs, "docs", demo.DefaultOptions().Docs, "documents to generate")
	var rf runFlags
	rf.register(c.Flags)
	if err := c.parse(args); err != nil {
		return err
	}
	if len(c.Args) != 0 {
		return cli.Usagef("bowline demo takes no file arguments")
	}
	if docs < 10 {
		return cli.Usagef("--docs: %d is too few (at least 10)", docs)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return &ioError{err}
	}
	fmt.Fprintln(stderr, demo.Notice)
	p := func(name string) string { return filepath.Join(dir, name) }

	// The corpus, then its train/held-out split.
	var all bytes.Buffer
	o := demo.DefaultOptions()
	o.Docs = docs
	if err := demo.WriteTSV(&all, o); err != nil {
		return err // a bytes.Buffer: an unexpected failure
	}
	lines := strings.SplitAfter(strings.TrimSuffix(all.String(), "\n"), "\n")
	header, body := lines[0], lines[1:]
	ntrain, _ := demo.Split(len(body))
	for _, f := range []struct {
		name string
		rows []string
	}{{"pellwick.tsv", body}, {"train.tsv", body[:ntrain]}, {"test.tsv", body[ntrain:]}} {
		err := atomicfile.WriteFile(p(f.name), func(w io.Writer) error {
			bw := bufio.NewWriter(w)
			bw.WriteString(header)
			for _, r := range f.rows {
				bw.WriteString(strings.TrimSuffix(r, "\n") + "\n")
			}
			return bw.Flush()
		})
		if err != nil {
			return &ioError{err}
		}
	}
	workers := strconv.Itoa(rf.workers)
	common := []string{"--text", "text", "--label", "team", "--id", "id", "--workers", workers, "--progress", "never",
		// The table columns of the ticket export beside the text.
		"--category", "zone", "--category", "plan", "--number", "age:standard", "--missing-value", "unknown", "--time", "created"}
	steps := []struct {
		title string
		args  []string
		show  bool
	}{
		{"learn a vocabulary on the training split", append([]string{"learn", p("train.tsv"), "-o", p("spec.json"),
			"--stop", "en", "--words", "1-2", "--min-docs", "2", "--idf", "smooth", "--norm", "l2",
			"--feature-map", p("features.tsv"), "--report", p("learn.json")}, common...), true},
		{"encode the training split", []string{"encode", "--spec", p("spec.json"), p("train.tsv"), "-o", p("train.svm"), "--workers", workers, "--progress", "never"}, false},
		{"encode the held-out split with the frozen spec", []string{"encode", "--spec", p("spec.json"), p("test.tsv"), "-o", p("test.svm"), "--with-ids",
			"--report", p("encode.html"), "--workers", workers, "--progress", "never"}, true},
		{"learn a hashing spec (2^18 buckets) on the same split", append([]string{"learn", p("train.tsv"), "-o", p("spec-hash.json"),
			"--stop", "en", "--words", "1-2", "--hash", "2^18", "--signed", "--report", p("learn-hash.json")}, common...), false},
		{"encode the held-out split in hashing mode", []string{"encode", "--spec", p("spec-hash.json"), p("test.tsv"), "-o", p("test-hash.svm"),
			"--report", p("encode-hash.json"), "--workers", workers, "--progress", "never"}, true},
	}
	for i, st := range steps {
		fmt.Fprintf(stderr, "\n== step %d: %s\n$ bowline %s\n", i+1, st.title, strings.Join(st.args, " "))
		var buf bytes.Buffer
		var sink io.Writer = &buf
		if code := run(st.args, stdout, sink); code != 0 {
			stderr.Write(buf.Bytes())
			fmt.Fprintf(stderr, "bowline: demo step %d failed (exit %d)\n", i+1, code)
			return &codeError{code, fmt.Errorf("demo step %d failed", i+1)}
		}
		if st.show {
			stderr.Write(buf.Bytes())
		}
	}
	fmt.Fprintf(stderr, "\n== liblinear on the demo rows\n")
	if acc, err := liblinearCheck(dir, p("train.svm"), p("test.svm")); err != nil {
		fmt.Fprintf(stderr, "skipped: %v\n", err)
	} else {
		fmt.Fprint(stderr, acc)
	}
	fmt.Fprintf(stderr, "\nfiles in %s/: pellwick.tsv train.tsv test.tsv spec.json features.tsv train.svm test.svm encode.html learn.json spec-hash.json learn-hash.json test-hash.svm encode-hash.json (and team.model, test.predicted when liblinear ran)\n", dir)
	return nil
}

var accuracyRe = regexp.MustCompile(`Accuracy = ([0-9.]+)%`)

// liblinearCheck trains L2-regularized logistic regression with liblinear
// (when installed) on the training rows and reports held-out accuracy next
// to the majority-class rate.
func liblinearCheck(dir, train, test string) (string, error) {
	trainBin, err := exec.LookPath("liblinear-train")
	if err != nil {
		return "", fmt.Errorf("liblinear-train not found (Debian package liblinear-tools)")
	}
	predictBin, err := exec.LookPath("liblinear-predict")
	if err != nil {
		return "", fmt.Errorf("liblinear-predict not found (Debian package liblinear-tools)")
	}
	model := filepath.Join(dir, "team.model")
	if out, err := exec.Command(trainBin, "-s", "0", "-q", train, model).CombinedOutput(); err != nil {
		return "", fmt.Errorf("liblinear-train: %v: %s", err, out)
	}
	pred := filepath.Join(dir, "test.predicted")
	out, err := exec.Command(predictBin, test, model, pred).CombinedOutput()
	if err != nil {
		return "", fmt.Errorf("liblinear-predict: %v: %s", err, out)
	}
	m := accuracyRe.FindSubmatch(out)
	if m == nil {
		return "", fmt.Errorf("liblinear-predict printed no accuracy: %s", out)
	}
	maj, n, err := majorityRate(test)
	if err != nil {
		return "", err
	}
	return fmt.Sprintf("held-out accuracy %s%% on %d rows (liblinear-train -s 0); majority-class rate %.2f%%\n", m[1], n, 100*maj), nil
}

func majorityRate(path string) (float64, int, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return 0, 0, err
	}
	counts := map[string]int{}
	n := 0
	for _, line := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		label, _, _ := strings.Cut(line, " ")
		counts[label]++
		n++
	}
	best := 0
	for _, c := range counts {
		if c > best {
			best = c
		}
	}
	if n == 0 {
		return 0, 0, nil
	}
	return float64(best) / float64(n), n, nil
}
