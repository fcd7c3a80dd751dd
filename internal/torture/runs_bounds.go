package torture

import (
	"bytes"
	"compress/gzip"
)

// Runs about bounds on hostile input.
func init() {
	train := []byte("team\ttext\nbikes\tflat tyre\napp\tcrash on unlock\n")
	learnSpec := []string{"learn", "{dir}/train.tsv", "--label", "team", "-o", "{dir}/spec.json", "--progress", "never"}
	addRuns(
		Run{Name: "record-endless", About: "an endless line (/dev/zero as a lines corpus) stops at the record bound with a positioned error",
			Files: map[string][]byte{"train.tsv": train}, Setup: [][]string{learnSpec},
			Args: []string{"encode", "--spec", "{dir}/spec.json", "--format", "lines", "/dev/zero", "-o", "{dir}/out.svm", "--record-limit", "1MiB"},
			Exit: ExitData, Absent: []string{"out.svm"}, Stderr: []string{"/dev/zero:1: record too long: over 1 MiB"}},
		Run{Name: "record-endless-learn", About: "learn over an endless line stops at the record bound and writes no spec",
			Args: []string{"learn", "--format", "lines", "/dev/zero", "-o", "{dir}/spec.json", "--record-limit", "1MiB"},
			Exit: ExitData, Absent: []string{"spec.json"}, Stderr: []string{"record too long"}},
		Run{Name: "spec-gzip-bomb", About: "a small gzipped spec that inflates past the spec bound is refused without inflating it all",
			Files: map[string][]byte{"in.tsv": []byte("text\ndock\n"), "bomb.json.gz": gzipBomb(64 << 20)},
			Args:  []string{"encode", "--spec", "{dir}/bomb.json.gz", "{dir}/in.tsv", "-o", "{dir}/out.svm", "--spec-limit", "16MiB"},
			Exit:  ExitSpec, Absent: []string{"out.svm"}, Unchanged: []string{"bomb.json.gz"}, Stderr: []string{"too large"}},
	)
}

// gzipBomb is a gzipped file that inflates to n bytes of white space after
// the start of a JSON object.
func gzipBomb(n int) []byte {
	var b bytes.Buffer
	zw, _ := gzip.NewWriterLevel(&b, gzip.BestCompression)
	zw.Write([]byte(`{"schema": 1, "content": `))
	chunk := bytes.Repeat([]byte(" "), 1<<16)
	for w := 0; w < n; w += len(chunk) {
		zw.Write(chunk)
	}
	zw.Close()
	return b.Bytes()
}
