package wavio

import (
	"errors"
	"fmt"
	"io/fs"
)

// NotFoundError is a path that does not exist. Its message is the one
// wording every command uses for a missing file or folder; the caller
// puts the path in front of it ("nosuch.wav: no such file or folder;
// check the path"). It matches fs.ErrNotExist with errors.Is.
type NotFoundError struct {
	Path string
}

func (e *NotFoundError) Error() string { return "no such file or folder; check the path" }

// Is reports whether target is fs.ErrNotExist.
func (e *NotFoundError) Is(target error) bool { return target == fs.ErrNotExist }

// PathError names path in err: a path that does not exist becomes
// "path: no such file or folder; check the path" (a NotFoundError), any
// other error "path: err" unless err already begins with the path's
// *fs.PathError. A nil err stays nil.
func PathError(path string, err error) error {
	if err == nil {
		return nil
	}
	if errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("%s: %w", path, &NotFoundError{Path: path})
	}
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return err
	}
	return fmt.Errorf("%s: %w", path, err)
}
