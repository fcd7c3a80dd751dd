package cli

import (
	"os"
	"path/filepath"
	"strings"
)

// fileArg is one flag or argument of a command that names files.
type fileArg struct {
	name   string          // how messages call it: "-o", "--spec", "the corpus"
	output bool            // the command writes the files (else it reads them)
	paths  func() []string // its paths once the command line is parsed; "" is none
}

// Inputs declares files the command reads, named name in messages ("--stop",
// "the corpus"); paths is called after parsing and may return "" for none.
// CheckFiles compares them with the outputs.
func (c *Command) Inputs(name string, paths func() []string) {
	c.files = append(c.files, fileArg{name, false, paths})
}

// Outputs declares files the command writes, as Inputs does; "-" is
// standard output.
func (c *Command) Outputs(name string, paths func() []string) {
	c.files = append(c.files, fileArg{name, true, paths})
}

// InputFlag defines a string flag that names a file the command reads
// ("" when not given).
func (c *Command) InputFlag(p *string, name, value, usage string) {
	c.Flags.StringVar(p, name, value, usage)
	c.Inputs(flagName(name), func() []string { return []string{*p} })
}

// InputListFlag defines a repeatable flag whose every value names a file
// the command reads.
func (c *Command) InputListFlag(p *ListFlag, name, usage string) {
	c.Flags.Var(p, name, usage)
	c.Inputs(flagName(name), func() []string { return *p })
}

// OutputFlag defines a string flag that names a file the command writes
// ("" when not given, "-" for standard output).
func (c *Command) OutputFlag(p *string, name, value, usage string) {
	c.Flags.StringVar(p, name, value, usage)
	c.Outputs(flagName(name), func() []string { return []string{*p} })
}

// InputArgs declares that the positional arguments are files the command
// reads, called name in messages ("the corpus").
func (c *Command) InputArgs(name string) {
	c.Inputs(name, func() []string { return c.Args })
}

// flagName is a flag as the command line writes it: -o, --spec.
func flagName(name string) string {
	if len(name) == 1 {
		return "-" + name
	}
	return "--" + name
}

// CheckFiles refuses a command line whose outputs would overwrite one of
// its inputs or one another, before anything is read or written. Each
// output is compared with every input and every other output as a file:
// paths that exist are the same file when os.SameFile says so after
// symbolic links are followed (so a link or a hard link to the corpus is
// the corpus); a path that does not exist yet is its folder with links
// resolved, plus its name. "-" is standard input or output, compared as
// the file it is (standard input redirected from the corpus is the
// corpus). A character device (/dev/null, a terminal) is never a clash:
// writing to it destroys no file. Two outputs that are both "-" are
// refused, because their lines would mix in one stream. Inputs are not
// compared with one another: reading a file twice loses nothing.
//
// The error is a *UsageError naming both flags and the file.
func (c *Command) CheckFiles() error {
	type file struct {
		arg  *fileArg
		path string
		id   fileID
	}
	var files []file
	for i := range c.files {
		a := &c.files[i]
		for _, p := range a.paths() {
			if p != "" {
				files = append(files, file{a, p, identify(p, a.output)})
			}
		}
	}
	for i, out := range files {
		if !out.arg.output {
			continue
		}
		// Inputs first, then the outputs declared before this one.
		for _, pass := range []bool{false, true} {
			for j, other := range files {
				if j == i || other.arg.output != pass || (pass && j > i) {
					continue
				}
				if pass && out.path == "-" && other.path == "-" {
					return Usagef("%s and %s both write to standard output, where their lines would mix; send one of them to a file (nothing was read or written)", other.arg.name, out.arg.name)
				}
				if !out.id.same(other.id) {
					continue
				}
				both := ""
				if out.path != other.path {
					both = sameNames(out.id.name, other.id.name)
				}
				if pass {
					return Usagef("%s and %s are the same file%s: one output would overwrite the other; give each its own file (nothing was read or written)", name(other.arg, other.path), name(out.arg, out.path), both)
				}
				return Usagef("%s is the same file as %s%s: writing it would destroy what bowline reads; choose another output (nothing was read or written)", name(out.arg, out.path), name(other.arg, other.path), both)
			}
		}
	}
	return nil
}

// sameNames says how two paths given differently are one file, from
// their resolved names ("" for standard input or output).
func sameNames(a, b string) string {
	switch {
	case a == "" && b == "":
		return ""
	case a == "" || a == b:
		return " (both are " + b + ")"
	case b == "":
		return " (both are " + a + ")"
	}
	return " (one file under two names, " + b + " and " + a + ")"
}

// name is a flag or argument with its path: "-o in.tsv", "the corpus
// in.tsv", "the corpus (standard input)".
func name(a *fileArg, path string) string {
	switch {
	case path != "-" || strings.HasPrefix(a.name, "-"):
		return a.name + " " + path
	case a.output:
		return a.name + " (standard output)"
	}
	return a.name + " (standard input)"
}

// fileID is what a path names, for comparing paths as files.
type fileID struct {
	info   os.FileInfo // nil when the path does not exist (or cannot be looked at)
	name   string      // the absolute name with symbolic links resolved; "" for "-"
	device bool        // a character device: /dev/null, a terminal
}

// identify looks at path as a file; "-" is standard output for an output
// and standard input for an input.
func identify(path string, output bool) fileID {
	if path == "-" {
		f := os.Stdin
		if output {
			f = os.Stdout
		}
		var id fileID
		if st, err := f.Stat(); err == nil {
			id.info, id.device = st, st.Mode()&os.ModeCharDevice != 0
		}
		return id
	}
	var id fileID
	if st, err := os.Stat(path); err == nil {
		id.info, id.device = st, st.Mode()&os.ModeCharDevice != 0
		if r, err := filepath.EvalSymlinks(path); err == nil {
			id.name = absolute(r)
		}
		return id
	}
	// Not there yet: the file will be made in the folder, whatever path
	// leads to it, under the name given (a dangling link is replaced).
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	if r, err := filepath.EvalSymlinks(dir); err == nil {
		id.name = filepath.Join(absolute(r), base)
	} else {
		id.name = absolute(path)
	}
	return id
}

func absolute(p string) string {
	if a, err := filepath.Abs(p); err == nil {
		return a
	}
	return filepath.Clean(p)
}

// same reports whether a and b are one file that writing would destroy.
func (a fileID) same(b fileID) bool {
	switch {
	case a.device || b.device:
		return false
	case a.info != nil && b.info != nil:
		return os.SameFile(a.info, b.info)
	case a.info == nil && b.info == nil:
		return a.name != "" && a.name == b.name
	}
	return false
}
