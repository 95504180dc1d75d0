package wavio

import (
	"fmt"
	"io/fs"
	"os"
)

// NotRegularError reports a path that is not a regular file (a FIFO, a
// device, a socket, a folder or, where it matters, a symbolic link), so
// cannot be read or replaced as a WAV file.
type NotRegularError struct {
	Path string
	Mode fs.FileMode
}

func (e *NotRegularError) Error() string {
	return fmt.Sprintf("wavio: %s, not a regular file", describeMode(e.Mode))
}

func describeMode(m fs.FileMode) string {
	switch {
	case m&fs.ModeNamedPipe != 0:
		return "a FIFO (named pipe)"
	case m&fs.ModeSocket != 0:
		return "a socket"
	case m&fs.ModeCharDevice != 0:
		return "a character device"
	case m&fs.ModeDevice != 0:
		return "a block device"
	case m&fs.ModeDir != 0:
		return "a folder"
	case m&fs.ModeSymlink != 0:
		return "a symbolic link"
	}
	return fmt.Sprintf("of type %v", m.Type())
}

// OpenRegular opens name for reading if it is a regular file (following
// symbolic links), and refuses anything else with a *NotRegularError. It
// checks the path before opening it and the open file again after (the
// path may have been replaced in between), and opens without blocking,
// so that a FIFO never stalls the caller. The file is returned in
// blocking mode.
func OpenRegular(name string) (*os.File, error) {
	st, err := os.Stat(name)
	if err != nil {
		return nil, err
	}
	if !st.Mode().IsRegular() {
		return nil, &NotRegularError{Path: name, Mode: st.Mode()}
	}
	f, err := openNoBlock(name)
	if err != nil {
		return nil, err
	}
	st, err = f.Stat()
	if err != nil {
		f.Close()
		return nil, err
	}
	if !st.Mode().IsRegular() {
		f.Close()
		return nil, &NotRegularError{Path: name, Mode: st.Mode()}
	}
	return f, nil
}

// CheckOutputPath reports whether name may be replaced by an output: it
// must not exist, or be a regular file. A symbolic link, a FIFO, a device
// or a folder there is refused with a *NotRegularError: replacing a link
// would count someone else's file as ours, and opening a FIFO would block.
func CheckOutputPath(name string) error {
	st, err := os.Lstat(name)
	if err != nil {
		if os.IsNotExist(err) {
			return nil
		}
		return err
	}
	if !st.Mode().IsRegular() {
		return &NotRegularError{Path: name, Mode: st.Mode()}
	}
	return nil
}
