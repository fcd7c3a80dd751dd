// Package sweep measures a vocabulary against a range of hashing widths on one corpus: collisions, memory and held-out accuracy.
//
// One pass over the training text collects every distinct feature key with
// its occurrence and document counts, and each document's keys; a second
// pass does the same for the held-out text. Every width's rows, and the
// vocabulary's, are then built from those lists without reading the text
// again: they are the rows bowline encode would write with a spec learned
// with --hash WIDTH (or without it), up to a renumbering of columns that
// keeps their order.
package sweep
