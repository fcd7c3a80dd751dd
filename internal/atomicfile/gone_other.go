//go:build !unix

package atomicfile

// processGone reports false where a process cannot be looked up: no
// leftover is removed there.
func processGone(pid int) bool { return false }
