package pipeline

import "errors"

// ErrNoRecords means a training corpus held no record to learn from (an
// empty file, or every record rejected): bad input, not a failure.
var ErrNoRecords = errors.New("no records to learn from")
