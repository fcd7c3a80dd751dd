package beam

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"reflect"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem/local" // local paths
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"

	"github.com/bowline/bowline/corpus"
)

// FileRef names one corpus file of a job and its place in the job's file
// list, which orders the records of different files.
type FileRef struct {
	Index int
	Path  string
}

// Doc is one corpus record travelling through a pipeline: its text fields,
// label and id, with the file and line it came from so that record order
// can be restored after the engine has shuffled it.
type Doc struct {
	// File is the index of the record's file in the job's file list.
	File int
	// Line is the 1-based line where the record starts.
	Line int64
	// Text holds one value per text field, in field order.
	Text [][]byte
	// Label is the label field ("" when there is none).
	Label []byte
	// ID is the id field; HasID says whether the record had one.
	ID    []byte
	HasID bool
}

func init() {
	beam.RegisterType(reflect.TypeOf((*FileRef)(nil)).Elem())
	beam.RegisterType(reflect.TypeOf((*Doc)(nil)).Elem())
	register.DoFn3x1[context.Context, FileRef, func(Doc), error](&readFn{})
	register.Emitter1[Doc]()
}

// Read adds to s a transform that reads the corpus files, in the order
// given, with package corpus, and returns a PCollection<Doc> with one
// element per record. Paths may name any file system registered with the
// Beam SDK (local paths always work). The records are redistributed
// across workers after reading, so that a large file is analysed by many.
func Read(s beam.Scope, files []string, in corpus.Options) beam.PCollection {
	s = s.Scope("bowline.Read")
	refs := make([]FileRef, len(files))
	for i, f := range files {
		refs[i] = FileRef{Index: i, Path: f}
	}
	docs := beam.ParDo(s, &readFn{Options: in}, beam.CreateList(s, refs))
	return beam.Reshuffle(s, docs)
}

// readFn reads one corpus file and emits its records.
type readFn struct {
	Options corpus.Options
}

func (f *readFn) ProcessElement(ctx context.Context, ref FileRef, emit func(Doc)) error {
	fs, err := filesystem.New(ctx, ref.Path)
	if err != nil {
		return err
	}
	defer fs.Close()
	rc, err := fs.OpenRead(ctx, ref.Path)
	if err != nil {
		return fmt.Errorf("cannot read %s: %v", ref.Path, err)
	}
	defer rc.Close()
	r, err := corpus.NewReader(rc, ref.Path, f.Options)
	if err != nil {
		return err
	}
	defer r.Close()
	for r.Scan() {
		rec := r.Record()
		d := Doc{File: ref.Index, Line: rec.Line, Text: make([][]byte, len(rec.Text)),
			Label: clone(rec.Label), ID: clone(rec.ID), HasID: rec.ID != nil}
		for i, t := range rec.Text {
			d.Text[i] = clone(t)
		}
		emit(d)
	}
	return r.Err()
}

func clone(b []byte) []byte {
	if b == nil {
		return nil
	}
	return append(make([]byte, 0, len(b)), b...)
}

func bytesReader(b []byte) io.Reader { return bytes.NewReader(b) }
