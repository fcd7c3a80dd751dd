package beam

import (
	"context"
	"crypto/rand"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"reflect"
	"sort"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/svmlight"
	"github.com/bowline/bowline/weight"
)

// EncodeOptions control an encode pipeline.
type EncodeOptions struct {
	// Out is the prefix of the row shards' names (see ShardName).
	Out string
	// ShardLines is how many input lines of one file a shard covers
	// (0: DefaultShardLines).
	ShardLines int64
	// Base is the index of the first column, 1 or 0.
	Base int
	// WithIDs appends "# id" to every row whose record has an id.
	WithIDs bool
	// LabelFallback, when not nil, is the label of rows whose string
	// label the spec has not seen (else such a row fails the job).
	LabelFallback *float64
}

// DefaultShardLines is the number of input lines a row shard covers by
// default.
const DefaultShardLines = 100000

// Row is one encoded record: its SVMlight line, with the file and line of
// the record it came from.
type Row struct {
	File int
	Line int64
	Data []byte // the row, ending in a newline
}

func init() {
	beam.RegisterType(reflect.TypeOf((*Row)(nil)).Elem())
	register.DoFn4x1[context.Context, Doc, []byte, func(string, Row), error](&encodeFn{})
	register.Emitter2[string, Row]()
	register.DoFn4x1[context.Context, string, func(*Row) bool, func(string), error](&writeShardFn{})
	register.Iter1[Row]()
}

// ShardName is the name of the row shard holding the rows of file number
// file (0-based, in the job's file order) whose records start in input
// lines [block*shardLines+1, (block+1)*shardLines]: prefix, then the file
// and block numbers zero-padded, so that the shards' names sort in record
// order and concatenating them in name order gives bowline encode's output
// on the files concatenated.
func ShardName(prefix string, file int, block int64) string {
	return fmt.Sprintf("%s-%05d-%08d", prefix, file, block)
}

// Encode adds to s the encode pipeline: the spec (specData, a spec file's
// bytes) goes to every worker as a side input, each record read from files
// with in becomes one SVMlight row, and the rows are written as shards
// named by ShardName, each in record order. It returns a PCollection<string>
// of the shard names written. A record whose label the spec cannot map
// fails the job, as in bowline encode, unless o.LabelFallback is set.
func Encode(s beam.Scope, files []string, in corpus.Options, specData []byte, o EncodeOptions) (beam.PCollection, error) {
	if len(files) == 0 {
		return beam.PCollection{}, errors.New("no corpus files to encode")
	}
	if o.Out == "" {
		return beam.PCollection{}, errors.New("no prefix for the row shards")
	}
	if o.Base != 0 && o.Base != 1 {
		return beam.PCollection{}, fmt.Errorf("index base %d is not 1 or 0", o.Base)
	}
	if o.ShardLines <= 0 {
		o.ShardLines = DefaultShardLines
	}
	if _, err := spec.Read(bytesReader(specData), "spec"); err != nil {
		return beam.PCollection{}, err
	}
	s = s.Scope("bowline.Encode")
	docs := Read(s, files, in)
	sp := beam.Create(s, specData)
	rows := beam.ParDo(s, &encodeFn{Options: o, Files: files}, docs, beam.SideInput{Input: sp})
	return beam.ParDo(s, &writeShardFn{}, beam.GroupByKey(s, rows)), nil
}

// encodeFn encodes records with the spec side input, keyed by the name of
// the shard each row goes to.
type encodeFn struct {
	Options EncodeOptions
	Files   []string

	enc *encode.Encoder
	w   *encode.Worker
	row weight.Row
}

func (f *encodeFn) ProcessElement(ctx context.Context, d Doc, specData []byte, emit func(string, Row)) error {
	if f.enc == nil {
		sp, err := spec.Read(bytesReader(specData), "spec side input")
		if err != nil {
			return err
		}
		if f.enc, err = encode.New(sp); err != nil {
			return err
		}
		f.w = f.enc.NewWorker(false)
	}
	if n := len(f.enc.Spec().Content.Input.Text); len(d.Text) != n {
		return fmt.Errorf("%s:%d: %d text fields, the spec was learned on %d", f.Files[d.File], d.Line, len(d.Text), n)
	}
	f.w.Encode(d.Text, &f.row)
	label, err := f.enc.Label(d.Label, f.Options.LabelFallback)
	if err != nil {
		return fmt.Errorf("%s:%d: %v", f.Files[d.File], d.Line, err)
	}
	out := svmlight.AppendRow(nil, label, f.row.Indices, f.row.Values, f.Options.Base)
	if f.Options.WithIDs && d.HasID {
		out = append(out, " # "...)
		for _, c := range d.ID {
			if c < 0x20 || c == 0x7f {
				c = ' ' // the row stays on one line, as in bowline encode
			}
			out = append(out, c)
		}
	}
	out = append(out, '\n')
	block := (d.Line - 1) / f.Options.ShardLines
	emit(ShardName(f.Options.Out, d.File, block), Row{File: d.File, Line: d.Line, Data: out})
	return nil
}

// writeShardFn writes one shard's rows in line order.
type writeShardFn struct{}

func (f *writeShardFn) ProcessElement(ctx context.Context, name string, rows func(*Row) bool, emit func(string)) error {
	var all []Row
	var r Row
	for rows(&r) {
		all = append(all, r)
	}
	sort.Slice(all, func(i, j int) bool { return all[i].Line < all[j].Line })
	err := writeFile(ctx, name, func(w io.Writer) error {
		for _, r := range all {
			if _, err := w.Write(r.Data); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return err
	}
	emit(name)
	return nil
}

// uniq returns a random number for temporary file names.
func uniq() uint64 {
	var b [8]byte
	rand.Read(b[:])
	return binary.LittleEndian.Uint64(b[:])
}
