package pipeline

import "errors"

// ErrNoRecords means a training corpus held no record to learn from (an
// empty file, or every record rejected): bad input, not a failure.
var ErrNoRecords = errors.New("no records to learn from")

// Add records one skipped record: err says why, raw is the record as
// stored in the file. Commands that read corpora outside Learn and Encode
// (drift, sweep) use it for --on-error skip.
func (rj *Rejects) Add(err error, raw []byte) error { return rj.add(err, raw) }
