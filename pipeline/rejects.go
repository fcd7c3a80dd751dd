package pipeline

// Add records one skipped record: err says why, raw is the record as
// stored in the file. Commands that read corpora outside Learn and Encode
// (drift, sweep) use it for --on-error skip.
func (rj *Rejects) Add(err error, raw []byte) error { return rj.add(err, raw) }
