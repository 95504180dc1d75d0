package wavio

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"
)

// Temporary files are named ".BASE.wavsieve-tmp-PID-RANDOM": BASE is the
// name they will take (or what they hold), PID the process that owns
// them. The owner holds an exclusive advisory lock on the open file for
// as long as it lives (the system drops the lock when the process ends,
// however it ends), so a later run can tell a temporary file left by a
// killed run from one being written right now.
const tempMark = ".wavsieve-tmp-"

// staleAge is how old a temporary file of a live process must be before
// RemoveStale takes it for stale: the owner takes its lock a moment after
// creating the file, and a file younger than this may be between the two.
const staleAge = 10 * time.Second

// CreateTemp creates a new temporary file in dir for base (see
// RemoveStale), locked by this process where the file system allows it,
// with mode 0600.
func CreateTemp(dir, base string) (*os.File, error) {
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+tempMark+strconv.Itoa(os.Getpid())+"-*")
	if err != nil {
		return nil, err
	}
	// Best effort: on a file system without locks the file goes on
	// unlocked, and RemoveStale judges it by its owner and age alone.
	lockFile(f)
	return f, nil
}

// IsTempName reports whether a file name has the form CreateTemp gives.
func IsTempName(name string) bool {
	return strings.HasPrefix(name, ".") && strings.Contains(name, tempMark)
}

// tempOwner returns the process id in a temporary file's name, or 0.
func tempOwner(name string) int {
	i := strings.LastIndex(name, tempMark)
	if i < 0 {
		return 0
	}
	rest := name[i+len(tempMark):]
	j := strings.IndexByte(rest, '-')
	if j < 0 {
		return 0
	}
	pid, err := strconv.Atoi(rest[:j])
	if err != nil || pid <= 0 {
		return 0
	}
	return pid
}

// RemoveStale removes the temporary files in dir (not its sub-folders)
// that a run which ended without cleaning up left behind: those whose
// lock no process holds, and whose owner is gone or which are older than
// a few seconds. It returns the names removed. A folder that does not
// exist has nothing to clean.
func RemoveStale(dir string) ([]string, error) {
	ents, err := os.ReadDir(dir)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, nil
		}
		return nil, fmt.Errorf("wavio: %w", err)
	}
	var removed []string
	for _, e := range ents {
		if !e.Type().IsRegular() || !IsTempName(e.Name()) {
			continue
		}
		p := filepath.Join(dir, e.Name())
		info, err := e.Info()
		if err != nil {
			continue
		}
		pid := tempOwner(e.Name())
		if pid == os.Getpid() {
			continue
		}
		if processAlive(pid) && time.Since(info.ModTime()) < staleAge {
			continue
		}
		f, err := os.OpenFile(p, os.O_RDWR, 0)
		if err != nil {
			continue
		}
		if !tryLockFile(f) {
			f.Close() // in use by its owner
			continue
		}
		err = os.Remove(p)
		f.Close()
		if err == nil {
			removed = append(removed, p)
		}
	}
	return removed, nil
}
