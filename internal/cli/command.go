package cli

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"sort"
	"strconv"
	"strings"
)

// UsageError is a problem with the command line: an unknown flag, a
// missing argument or an impossible value.
type UsageError struct {
	Msg string // the message, without the program name
}

func (e *UsageError) Error() string { return e.Msg }

// Usagef returns a *UsageError with the formatted message.
func Usagef(format string, a ...any) error {
	return &UsageError{fmt.Sprintf(format, a...)}
}

// AsUsage returns err as a *UsageError (nil for nil; err itself if it
// already is one).
func AsUsage(err error) error {
	if err == nil {
		return nil
	}
	var u *UsageError
	if errors.As(err, &u) {
		return err
	}
	return &UsageError{err.Error()}
}

// ListFlag is a repeatable string flag: each use appends its value.
type ListFlag []string

func (l *ListFlag) String() string { return strings.Join(*l, ",") }

// Set appends s.
func (l *ListFlag) Set(s string) error {
	*l = append(*l, s)
	return nil
}

// Command is one subcommand's flag set and, after Parse, its positional
// arguments and the flags given.
type Command struct {
	Name     string          // subcommand name, such as "learn"
	Synopsis string          // positional synopsis for the usage line
	About    string          // one paragraph on what the command does
	Flags    *flag.FlagSet   // the command's flags; errors are not printed
	Args     []string        // positional arguments, in order
	Given    map[string]bool // names of the flags given

	files []fileArg // the files its flags and arguments name (files.go)
}

// NewCommand returns a command with an empty flag set that returns its
// errors instead of printing them.
func NewCommand(name, synopsis, about string) *Command {
	c := &Command{Name: name, Synopsis: synopsis, About: about, Flags: flag.NewFlagSet(name, flag.ContinueOnError), Given: map[string]bool{}}
	c.Flags.SetOutput(io.Discard)
	return c
}

// Parse parses flags and positional arguments in any order: flags may come
// before, between or after the file arguments, and "--" ends flags. It
// appends positional arguments to c.Args and records the flags given in
// c.Given. An error is the flag package's, unchanged (flag.ErrHelp for -h
// or --help).
func (c *Command) Parse(args []string) error {
	for {
		if err := c.Flags.Parse(args); err != nil {
			return err
		}
		rest := c.Flags.Args()
		if len(rest) == 0 {
			break
		}
		if len(args) > 0 && len(rest) < len(args) && args[len(args)-len(rest)-1] == "--" {
			c.Args = append(c.Args, rest...)
			break
		}
		c.Args = append(c.Args, rest[0])
		args = rest[1:]
	}
	c.Flags.Visit(func(f *flag.Flag) { c.Given[f.Name] = true })
	return nil
}

// PrintFlags writes one line per flag of c, sorted by name, with its help
// text and default; keep, when not nil, chooses the flags listed. A
// repeatable flag shows no default: its help text says what happens
// without it.
func (c *Command) PrintFlags(w io.Writer, keep func(name string) bool) {
	var names []string
	c.Flags.VisitAll(func(f *flag.Flag) {
		if keep == nil || keep(f.Name) {
			names = append(names, f.Name)
		}
	})
	sort.Strings(names)
	for _, n := range names {
		f := c.Flags.Lookup(n)
		name := "--" + n
		if len(n) == 1 {
			name = "-" + n
		}
		def := " [" + f.DefValue + "]"
		if f.DefValue == "" {
			def = " [none]"
		}
		if _, list := f.Value.(*ListFlag); list {
			def = ""
		}
		fmt.Fprintf(w, "  %-18s %s%s\n", name, f.Usage, def)
	}
}

// ParseFloat parses the value s of flag --name; an empty s gives nil.
func ParseFloat(name, s string) (*float64, error) {
	if s == "" {
		return nil, nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return nil, Usagef("--%s: %q is not a number", name, s)
	}
	return &v, nil
}
