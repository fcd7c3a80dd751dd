package sweep

import (
	"fmt"
	"math"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/vocab"
)

// keyTable holds every distinct feature key of the training text, then
// those found only in the held-out text (ids from train on).
type keyTable struct {
	ids    map[string]int32
	keys   []string
	orders []int
	sums   []uint64 // seeded XXH64 of the key (hashing.Hasher.Sum)
	count  []int64  // occurrences in the training text
	docs   []int64  // training documents holding the key
	train  int      // keys [0, train) occur in the training text
}

// docSet is one corpus's documents as lists of (key id, occurrences).
type docSet struct {
	name   string
	start  []int // document i is ids[start[i]:start[i+1]]
	ids    []int32
	counts []float64
	labels []string // raw label fields (nil without labels)
	lines  []int64  // line of each document, for errors
	occ    int64    // feature occurrences
}

func (d *docSet) len() int { return len(d.start) - 1 }

// collector reads documents into a docSet, adding keys to the table.
type collector struct {
	t      *keyTable
	z      *analysis.Analyzer
	h      *hashing.Hasher
	counts *vocab.Counts // training pass only: for the vocabulary's cutoffs
	last   []int32       // last document that saw each key
	pos    []int32       // index of the key's entry in that document
	cur    *docSet
	doc    int32
	train  bool
}

func (c *collector) add(key []byte, o ngram.Order) {
	code := int(o)
	t := c.t
	id, ok := t.ids[string(key)]
	if !ok {
		id = int32(len(t.keys))
		k := string(key)
		t.ids[k] = id
		t.keys = append(t.keys, k)
		t.orders = append(t.orders, code)
		t.sums = append(t.sums, c.h.Sum(key))
		t.count = append(t.count, 0)
		t.docs = append(t.docs, 0)
		c.last = append(c.last, -1)
		c.pos = append(c.pos, 0)
	}
	d := c.cur
	d.occ++
	if c.train {
		t.count[id]++
		c.counts.Add(key, code)
	}
	if c.last[id] == c.doc {
		d.counts[c.pos[id]]++
		return
	}
	c.last[id] = c.doc
	c.pos[id] = int32(len(d.ids))
	d.ids = append(d.ids, id)
	d.counts = append(d.counts, 1)
	if c.train {
		t.docs[id]++
	}
}

// read collects every record of r.
func (c *collector) read(r *corpus.Reader, name string, withLabels bool, rj *pipeline.Rejects, progress func(int64)) (*docSet, error) {
	d := &docSet{name: name, start: []int{0}}
	c.cur = d
	for {
		if !r.Scan() {
			if err := r.Err(); err != nil && rj != nil {
				raw := r.Raw()
				if r.Skip() {
					if werr := rj.Add(err, raw); werr != nil {
						return nil, werr
					}
					continue
				}
			}
			break
		}
		rec := r.Record()
		if progress != nil {
			progress(r.BytesRead())
		}
		if withLabels && len(rec.Label) == 0 && rj != nil {
			if err := rj.Add(&pipeline.RecordError{File: name, Line: rec.Line, Err: fmt.Errorf("label field is empty")}, r.Raw()); err != nil {
				return nil, err
			}
			continue
		}
		if c.doc == math.MaxInt32 {
			return nil, fmt.Errorf("%s: more than %d documents", name, math.MaxInt32)
		}
		c.z.Analyze(rec.Text, c.add)
		if c.train {
			c.counts.EndDoc()
		}
		if withLabels {
			if len(rec.Label) == 0 {
				return nil, &pipeline.RecordError{File: name, Line: rec.Line, Err: fmt.Errorf("label field is empty")}
			}
			d.labels = append(d.labels, string(rec.Label))
			d.lines = append(d.lines, rec.Line)
		}
		d.start = append(d.start, len(d.ids))
		c.doc++
		if len(c.t.keys) >= math.MaxInt32-1 {
			return nil, fmt.Errorf("%s: more than %d distinct keys", name, math.MaxInt32-1)
		}
	}
	if err := r.Err(); err != nil {
		return nil, err
	}
	return d, nil
}
