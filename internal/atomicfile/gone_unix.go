//go:build unix

package atomicfile

import (
	"errors"
	"syscall"
)

// processGone reports whether no process with this id runs: kill(pid, 0)
// fails with ESRCH. A process of another user (EPERM) runs.
func processGone(pid int) bool {
	return errors.Is(syscall.Kill(pid, 0), syscall.ESRCH)
}
