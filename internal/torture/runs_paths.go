package torture

import (
	"bytes"
	"compress/gzip"
)

// Runs about outputs that would overwrite inputs or one another, about
// fields and headers the command line and the corpus disagree on, and
// about damaged corpora. Every refused run must leave the corpus byte for
// byte as it was and write nothing.
func init() {
	corpus := []byte("team\ttext\nbikes\tflat tyre\nbilling\tcharged twice\napp\tcrash on unlock\n")
	in := map[string][]byte{"in.tsv": corpus}
	withStop := map[string][]byte{"in.tsv": corpus, "words.txt": []byte("the\na\n")}
	learnSpec := [][]string{{"learn", "{dir}/in.tsv", "--label", "team", "-o", "{dir}/s.json", "--progress", "never"}}
	shard := [][]string{{"learn", "{dir}/in.tsv", "--counts-out", "{dir}/a.counts", "--progress", "never"}}
	encode := func(args ...string) []string {
		return append([]string{"encode", "--spec", "{dir}/s.json", "{dir}/in.tsv", "--progress", "never"}, args...)
	}
	learn := func(args ...string) []string {
		return append([]string{"learn", "{dir}/in.tsv", "--progress", "never"}, args...)
	}
	clash := "nothing was read or written"
	addRuns(
		// An output that is an input.
		Run{Name: "paths-encode-o-corpus", About: "encode -o names the corpus",
			Files: in, Setup: learnSpec, Args: encode("-o", "{dir}/in.tsv"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv", "s.json"},
			Stderr: []string{"-o {dir}/in.tsv is the same file as the corpus {dir}/in.tsv", clash}},
		Run{Name: "paths-encode-o-link-to-corpus", About: "encode -o names a symbolic link to the corpus",
			Files: in, Links: map[string]string{"rows.svm": "{dir}/in.tsv"}, Setup: learnSpec, Args: encode("-o", "{dir}/rows.svm"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv", "rows.svm"},
			Stderr: []string{"-o {dir}/rows.svm is the same file as the corpus {dir}/in.tsv", "both are"}},
		Run{Name: "paths-encode-corpus-link-o-target", About: "encode reads the corpus through a link and -o names the file it links to",
			Files: in, Links: map[string]string{"link.tsv": "in.tsv"}, Setup: learnSpec,
			Args: []string{"encode", "--spec", "{dir}/s.json", "{dir}/link.tsv", "-o", "{dir}/in.tsv"},
			Exit: ExitUsage, Unchanged: []string{"in.tsv"},
			Stderr: []string{"-o {dir}/in.tsv is the same file as the corpus {dir}/link.tsv"}},
		Run{Name: "paths-learn-o-corpus", About: "learn -o names the corpus",
			Files: in, Args: learn("-o", "{dir}/in.tsv"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"},
			Stderr: []string{"-o {dir}/in.tsv is the same file as the corpus", clash}},
		Run{Name: "paths-encode-report-spec", About: "encode --report names the spec",
			Files: in, Setup: [][]string{{"learn", "{dir}/in.tsv", "--label", "team", "-o", "{dir}/s.json"}},
			Args: []string{"encode", "--spec", "{dir}/s.json", "{dir}/in.tsv", "-o", "{dir}/rows.svm", "--report", "{dir}/s.json"},
			Exit: ExitUsage, Unchanged: []string{"in.tsv", "s.json"}, Absent: []string{"rows.svm"},
			Stderr: []string{"--report {dir}/s.json is the same file as --spec {dir}/s.json"}},
		Run{Name: "paths-learn-feature-map-corpus", About: "learn --feature-map names the corpus",
			Files: in, Args: learn("-o", "{dir}/s.json", "--feature-map", "{dir}/in.tsv"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"}, Absent: []string{"s.json"},
			Stderr: []string{"--feature-map {dir}/in.tsv is the same file as the corpus"}},
		Run{Name: "paths-encode-feature-map-corpus", About: "encode --feature-map names the corpus",
			Files: in, Setup: learnSpec, Args: encode("-o", "{dir}/rows.svm", "--feature-map", "{dir}/in.tsv"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv", "s.json"}, Absent: []string{"rows.svm"},
			Stderr: []string{"--feature-map {dir}/in.tsv is the same file as the corpus"}},
		Run{Name: "paths-encode-rejects-corpus", About: "encode --rejects names the corpus",
			Files: in, Setup: learnSpec, Args: encode("-o", "{dir}/rows.svm", "--on-error", "skip", "--rejects", "{dir}/in.tsv"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"}, Absent: []string{"rows.svm"},
			Stderr: []string{"--rejects {dir}/in.tsv is the same file as the corpus"}},
		Run{Name: "paths-learn-counts-out-corpus", About: "learn --counts-out names the corpus",
			Files: in, Args: learn("--counts-out", "{dir}/in.tsv"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"},
			Stderr: []string{"--counts-out {dir}/in.tsv is the same file as the corpus"}},
		Run{Name: "paths-encode-explain-out-spec", About: "encode --explain-out names the spec",
			Files: in, Setup: [][]string{{"learn", "{dir}/in.tsv", "--hash", "2^4", "-o", "{dir}/s.json"}},
			Args: encode("-o", "{dir}/rows.svm", "--explain-buckets", "2", "--explain-out", "{dir}/s.json"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv", "s.json"}, Absent: []string{"rows.svm"},
			Stderr: []string{"--explain-out {dir}/s.json is the same file as --spec {dir}/s.json"}},
		Run{Name: "paths-learn-extend-o-parent", About: "learn --extend refreshes a spec into the file of its parent",
			Files: in, Setup: learnSpec, Args: learn("--extend", "{dir}/s.json", "-o", "{dir}/s.json"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv", "s.json"},
			Stderr: []string{"-o {dir}/s.json is the same file as --extend {dir}/s.json"}},
		Run{Name: "paths-learn-report-stop-file", About: "learn --report names a --stop file",
			Files: withStop, Args: learn("-o", "{dir}/s.json", "--stop", "{dir}/words.txt", "--report", "{dir}/words.txt"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv", "words.txt"}, Absent: []string{"s.json"},
			Stderr: []string{"--report {dir}/words.txt is the same file as --stop {dir}/words.txt"}},
		Run{Name: "paths-drift-report-corpus", About: "drift --report names the corpus",
			Files: in, Setup: learnSpec,
			Args: []string{"drift", "--spec", "{dir}/s.json", "{dir}/in.tsv", "--report", "{dir}/in.tsv"},
			Exit: ExitUsage, Unchanged: []string{"in.tsv"},
			Stderr: []string{"--report {dir}/in.tsv is the same file as the corpus"}},
		Run{Name: "paths-sweep-report-holdout", About: "sweep --report names the held-out corpus",
			Files: map[string][]byte{"in.tsv": corpus, "test.tsv": corpus},
			Args:  []string{"sweep", "{dir}/in.tsv", "--label", "team", "--holdout", "{dir}/test.tsv", "--report", "{dir}/test.tsv"},
			Exit:  ExitUsage, Unchanged: []string{"in.tsv", "test.tsv"},
			Stderr: []string{"--report {dir}/test.tsv is the same file as --holdout {dir}/test.tsv"}},
		Run{Name: "paths-merge-o-shard", About: "merge -o names a count shard",
			Files: in, Setup: shard, Args: []string{"merge", "{dir}/a.counts", "-o", "{dir}/a.counts"},
			Exit: ExitUsage, Unchanged: []string{"a.counts"},
			Stderr: []string{"-o {dir}/a.counts is the same file as the count shard {dir}/a.counts"}},
		Run{Name: "paths-inspect-feature-map-spec", About: "inspect --feature-map names the spec",
			Files: in, Setup: learnSpec, Args: []string{"inspect", "{dir}/s.json", "--feature-map", "{dir}/s.json"},
			Exit: ExitUsage, Unchanged: []string{"s.json"},
			Stderr: []string{"--feature-map {dir}/s.json is the same file as the spec {dir}/s.json"}},

		// Two outputs that are one file.
		Run{Name: "paths-learn-o-report", About: "learn -o and --report name one new file",
			Files: in, Args: learn("-o", "{dir}/v.json", "--report", "{dir}/v.json"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"}, Absent: []string{"v.json"},
			Stderr: []string{"-o {dir}/v.json and --report {dir}/v.json are the same file", clash}},
		Run{Name: "paths-learn-o-report-linked-folder", About: "-o and --report name one new file through a linked folder",
			Files: in, Links: map[string]string{"alias": "{dir}"}, Args: learn("-o", "{dir}/v.json", "--report", "{dir}/alias/v.json"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"}, Absent: []string{"v.json"},
			Stderr: []string{"-o {dir}/v.json and --report {dir}/alias/v.json are the same file"}},
		Run{Name: "paths-encode-o-feature-map", About: "encode -o and --feature-map name one file",
			Files: in, Setup: learnSpec, Args: encode("-o", "{dir}/out.tsv", "--feature-map", "{dir}/out.tsv"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"}, Absent: []string{"out.tsv"},
			Stderr: []string{"-o {dir}/out.tsv and --feature-map {dir}/out.tsv are the same file"}},
		Run{Name: "paths-encode-two-on-stdout", About: "encode's rows and its rejects both on standard output",
			Files: in, Setup: learnSpec, Args: encode("--on-error", "skip", "--rejects", "-"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"},
			Stderr: []string{"--rejects and -o both write to standard output"}},
		Run{Name: "paths-drift-rejects-stdout", About: "drift's rejects on standard output, where its figures go",
			Files: in, Setup: learnSpec,
			Args: []string{"drift", "--spec", "{dir}/s.json", "{dir}/in.tsv", "--on-error", "skip", "--rejects", "-"},
			Exit: ExitUsage, Unchanged: []string{"in.tsv"},
			Stderr: []string{"--rejects and the figures both write to standard output"}},
		Run{Name: "paths-null-device-twice", About: "the null device as two outputs is no clash",
			Files: in, Setup: learnSpec, Args: encode("-o", "/dev/null", "--feature-map", "/dev/null"),
			Exit: ExitOK, Unchanged: []string{"in.tsv"}},

		// Fields the command line and the corpus disagree on.
		Run{Name: "fields-text-is-label", About: "--text names the --label field",
			Files: in, Args: learn("--text", "team", "--label", "team", "-o", "{dir}/s.json"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"}, Absent: []string{"s.json"},
			Stderr: []string{"--text team and --label team name the same field"}},
		Run{Name: "fields-text-is-spec-label", About: "encode --text names the spec's label field",
			Files: in, Setup: learnSpec, Args: encode("--text", "team", "-o", "{dir}/rows.svm"),
			Exit: ExitUsage, Unchanged: []string{"in.tsv"}, Absent: []string{"rows.svm"},
			Stderr: []string{`--text team and the spec's label field "team"`}},
		Run{Name: "fields-header-lacks-field", About: "the header has no field of the name --text gives",
			Files: in, Args: learn("--text", "body", "-o", "{dir}/s.json"),
			Exit: ExitData, Unchanged: []string{"in.tsv"}, Absent: []string{"s.json"},
			Stderr: []string{`field "body" not found in the header of {dir}/in.tsv`}},
		Run{Name: "fields-header-lacks-spec-field", About: "encode: the corpus lacks the spec's label field",
			Files: map[string][]byte{"in.tsv": corpus, "new.tsv": []byte("text\nflat tyre\n")}, Setup: learnSpec,
			Args: []string{"encode", "--spec", "{dir}/s.json", "{dir}/new.tsv", "-o", "{dir}/rows.svm"},
			Exit: ExitData, Unchanged: []string{"new.tsv"}, Absent: []string{"rows.svm"},
			Stderr: []string{`field "team" not found in the header of {dir}/new.tsv`}},
		Run{Name: "fields-header-name-not-utf8-learn", About: "learn: --label names a header cell that is not UTF-8",
			Files: map[string][]byte{"u.tsv": []byte("lab\xffel\ttext\nbikes\tflat tyre\n")},
			Args:  []string{"learn", "{dir}/u.tsv", "--label", "lab\xffel", "-o", "{dir}/s.json"},
			Exit:  ExitData, Unchanged: []string{"u.tsv"}, Absent: []string{"s.json"},
			Stderr: []string{"{dir}/u.tsv:1:1: field", "not valid UTF-8", "by its number, 1"}},
		Run{Name: "fields-header-name-not-utf8-encode", About: "encode: --label names a header cell that is not UTF-8, as learn refuses it",
			Files: map[string][]byte{"u.tsv": []byte("lab\xffel\ttext\nbikes\tflat tyre\n")},
			Setup: [][]string{{"learn", "{dir}/u.tsv", "--label", "1", "-o", "{dir}/s.json"}},
			Args:  []string{"encode", "--spec", "{dir}/s.json", "{dir}/u.tsv", "--label", "lab\xffel", "-o", "{dir}/rows.svm"},
			Exit:  ExitData, Unchanged: []string{"u.tsv"}, Absent: []string{"rows.svm"},
			Stderr: []string{"{dir}/u.tsv:1:1: field", "not valid UTF-8"}},
		Run{Name: "fields-header-name-not-utf8-by-number", About: "the same column named by its number is learned and encoded",
			Files: map[string][]byte{"u.tsv": []byte("lab\xffel\ttext\nbikes\tflat tyre\n")},
			Setup: [][]string{{"learn", "{dir}/u.tsv", "--label", "1", "-o", "{dir}/s.json"}},
			Args:  []string{"encode", "--spec", "{dir}/s.json", "{dir}/u.tsv", "-o", "{dir}/rows.svm"},
			Exit:  ExitOK, Unchanged: []string{"u.tsv"}},

		// Damaged or empty corpora.
		Run{Name: "corpus-empty", About: "an empty TSV corpus: not even a header row",
			Files: map[string][]byte{"empty.tsv": nil}, Args: []string{"learn", "{dir}/empty.tsv", "-o", "{dir}/s.json"},
			Exit: ExitData, Unchanged: []string{"empty.tsv"}, Absent: []string{"s.json"},
			Stderr: []string{"{dir}/empty.tsv: empty file, expected a header row"}},
		Run{Name: "corpus-header-only", About: "a TSV corpus with a header and no record",
			Files: map[string][]byte{"h.tsv": []byte("team\ttext\n")}, Args: []string{"learn", "{dir}/h.tsv", "-o", "{dir}/s.json"},
			Exit: ExitData, Unchanged: []string{"h.tsv"}, Absent: []string{"s.json"},
			Stderr: []string{"no records to learn from"}},
		Run{Name: "corpus-corrupt-gzip", About: "a gzip corpus whose compressed bytes are damaged",
			Files: map[string][]byte{"c.tsv.gz": corruptGzip(corpus)}, Args: []string{"learn", "{dir}/c.tsv.gz", "-o", "{dir}/s.json"},
			Exit: ExitData, Unchanged: []string{"c.tsv.gz"}, Absent: []string{"s.json"},
			Stderr: []string{"{dir}/c.tsv.gz: corrupt gzip stream"}},
		Run{Name: "corpus-truncated-gzip", About: "a gzip corpus cut short",
			Files: map[string][]byte{"t.tsv.gz": truncatedGzip()}, Args: []string{"learn", "{dir}/t.tsv.gz", "-o", "{dir}/s.json"},
			Exit: ExitData, Unchanged: []string{"t.tsv.gz"}, Absent: []string{"s.json"},
			Stderr: []string{"{dir}/t.tsv.gz: truncated gzip stream"}},
	)
}

// corruptGzip returns data gzipped, with bytes inside the compressed
// stream flipped: the header is intact, the stream is not.
func corruptGzip(data []byte) []byte {
	var b bytes.Buffer
	zw := gzip.NewWriter(&b)
	for i := 0; i < 50; i++ {
		zw.Write(data)
	}
	zw.Close()
	out := b.Bytes()
	for i := 12; i < 32 && i < len(out)-8; i++ {
		out[i] ^= 0x5a
	}
	return out
}
