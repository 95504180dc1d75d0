//go:build unix

package wavio

import (
	"os"
	"syscall"
)

// openNoBlock opens name read-only with O_NONBLOCK (a FIFO with no
// writer then opens at once instead of waiting) and O_NOCTTY, then puts
// the descriptor back in blocking mode for ordinary reads.
func openNoBlock(name string) (*os.File, error) {
	fd, err := syscall.Open(name, syscall.O_RDONLY|syscall.O_NONBLOCK|syscall.O_NOCTTY|syscall.O_CLOEXEC, 0)
	if err != nil {
		return nil, &os.PathError{Op: "open", Path: name, Err: err}
	}
	if err := syscall.SetNonblock(fd, false); err != nil {
		syscall.Close(fd)
		return nil, &os.PathError{Op: "open", Path: name, Err: err}
	}
	return os.NewFile(uintptr(fd), name), nil
}
