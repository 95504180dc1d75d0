//go:build unix

package runrecord

import (
	"errors"
	"os"
	"syscall"
)

// tryLock takes an exclusive advisory lock (flock) on f without waiting.
// The kernel drops it when the process ends, however it ends, so a
// killed run never leaves a folder locked.
func tryLock(f *os.File) (bool, error) {
	err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB)
	if errors.Is(err, syscall.EWOULDBLOCK) {
		return false, nil
	}
	return err == nil, err
}

func unlockFile(f *os.File) { syscall.Flock(int(f.Fd()), syscall.LOCK_UN) }
