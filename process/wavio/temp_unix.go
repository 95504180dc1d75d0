//go:build unix

package wavio

import (
	"errors"
	"os"
	"syscall"
)

// lockFile takes an exclusive advisory lock (flock) on f, held until f
// is closed or the process ends.
func lockFile(f *os.File) error {
	for {
		err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB)
		if !errors.Is(err, syscall.EINTR) {
			return err
		}
	}
}

// tryLockFile reports whether the lock on f could be taken: no other
// open file holds it. Where the file system has no locks, the answer is
// yes, and the owner's process id and the file's age decide alone.
func tryLockFile(f *os.File) bool {
	err := lockFile(f)
	return err == nil || !errors.Is(err, syscall.EWOULDBLOCK)
}

// processAlive reports whether a process with this id exists.
func processAlive(pid int) bool {
	if pid <= 0 {
		return false
	}
	err := syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM)
}
