package torture

// Runs about refused specs.
func init() {
	addRuns(
		Run{Name: "spec-missing", About: "encode with a spec file that does not exist: a file that cannot be read",
			Files: map[string][]byte{"in.tsv": []byte("text\ndock\n")},
			Args:  []string{"encode", "--spec", "{dir}/none.json", "{dir}/in.tsv", "-o", "{dir}/out.svm"},
			Exit:  ExitIO, Absent: []string{"out.svm"}, Stderr: []string{"{dir}/none.json"}},
		Run{Name: "spec-not-json", About: "encode with a spec file that is not a spec",
			Files: map[string][]byte{"in.tsv": []byte("text\ndock\n"), "s.json": []byte("hello")},
			Args:  []string{"encode", "--spec", "{dir}/s.json", "{dir}/in.tsv", "-o", "{dir}/out.svm"},
			Exit:  ExitSpec, Absent: []string{"out.svm"}, Unchanged: []string{"s.json"}, Stderr: []string{"not a spec"}},
	)
}
