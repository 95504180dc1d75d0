//go:build unix

package runrecord

import (
	"errors"
	"fmt"
	"os"
	"syscall"
)

// tryLock takes an exclusive advisory lock (flock) on f without waiting.
// The kernel drops it when the process ends, however it ends, so a
// killed run never leaves a folder locked.
func tryLock(f *os.File) (bool, error) {
	err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB)
	switch {
	case errors.Is(err, syscall.EWOULDBLOCK):
		return false, nil
	case errors.Is(err, syscall.ENOSYS), errors.Is(err, syscall.EOPNOTSUPP), errors.Is(err, syscall.ENOLCK):
		// Some network file systems offer no locks (or have them turned
		// off): say so, and let the caller go on without.
		return false, fmt.Errorf("%w: %v", ErrNoLocks, err)
	}
	return err == nil, err
}

func unlockFile(f *os.File) { syscall.Flock(int(f.Fd()), syscall.LOCK_UN) }
