package main

import (
	"flag"

	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/spec"
)

// specFlags are the flags of the commands that read a spec.
type specFlags struct {
	limit cli.SizeFlag
}

func (f *specFlags) register(fs *flag.FlagSet) {
	fs.Var(&f.limit, "spec-limit", "the most bytes a spec may hold after gzip decompression (a larger one is refused, exit 5) [256MiB]")
}

// options are the spec.LoadOptions the flags ask for.
func (f *specFlags) options() spec.LoadOptions {
	return spec.LoadOptions{MaxBytes: int64(f.limit)}
}

// load reads the spec at path with the flags' options.
func (f *specFlags) load(path string) (*spec.Spec, error) { return f.options().Load(path) }
