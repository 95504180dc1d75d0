package runrecord

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/wavsieve/wavsieve/process/wavio"
)

func indent(w *strings.Builder, b []byte) error {
	var out bytes.Buffer
	if err := json.Indent(&out, b, "", " "); err != nil {
		return err
	}
	w.Write(out.Bytes())
	return nil
}

// WriteCSV writes the rows as CSV, headed by Header.
func (r *Record) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	cw.Write(Header())
	row := make([]string, len(columns))
	for i := range r.Files {
		for j, c := range columns {
			row[j] = c.cell(&r.Files[i])
		}
		cw.Write(row)
	}
	cw.Flush()
	return cw.Error()
}

// ReadCSV reads the rows of a CSV record. Columns it does not know are
// ignored; a record read from CSV has rows only.
func ReadCSV(rd io.Reader) (*Record, error) {
	cr := csv.NewReader(rd)
	head, err := cr.Read()
	if err != nil {
		return nil, fmt.Errorf("runrecord: csv: %w", err)
	}
	at := make([]*column, len(head))
	found := false
	for i, h := range head {
		for j := range columns {
			if columns[j].key == h {
				at[i] = &columns[j]
				found = found || h == "output"
			}
		}
	}
	if !found {
		return nil, fmt.Errorf("%w: the CSV has no output column", ErrNotRecord)
	}
	r := New()
	r.Files = []File{}
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("runrecord: csv: %w", err)
		}
		var f File
		for i, cell := range rec {
			if i < len(at) && at[i] != nil {
				if err := at[i].setCell(&f, cell); err != nil {
					return nil, fmt.Errorf("runrecord: csv line %d, column %s: %w", line, at[i].key, err)
				}
			}
		}
		r.Files = append(r.Files, f)
	}
	return r, nil
}

// Read reads a record from a file: CSV when its name ends in .csv, JSON
// otherwise. A folder is read with ReadDir.
func Read(name string) (*Record, error) {
	if st, err := os.Stat(name); err == nil && st.IsDir() {
		return ReadDir(name)
	}
	b, err := os.ReadFile(name)
	if err != nil {
		return nil, err
	}
	if strings.EqualFold(filepath.Ext(name), ".csv") {
		r, err := ReadCSV(bytes.NewReader(b))
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		return r, nil
	}
	r := &Record{}
	if err := json.Unmarshal(b, r); err != nil {
		if errors.Is(err, ErrNotRecord) {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		return nil, fmt.Errorf("%s: %w: %v", name, ErrNotRecord, err)
	}
	return r, nil
}

// Write saves the record as base.json and base.csv, each written to a
// temporary file and renamed into place, so that a reader never sees
// half a record.
func (r *Record) Write(base string) error {
	if r.Kind == "" {
		r.Kind = Kind
	}
	j, err := r.JSON()
	if err != nil {
		return fmt.Errorf("runrecord: %w", err)
	}
	var c bytes.Buffer
	if err := r.WriteCSV(&c); err != nil {
		return fmt.Errorf("runrecord: %w", err)
	}
	if err := writeAtomic(base+".json", j); err != nil {
		return err
	}
	return writeAtomic(base+".csv", c.Bytes())
}

func writeAtomic(name string, data []byte) error {
	dir := filepath.Dir(name)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("runrecord: %w", err)
	}
	// A locked temporary file that a later run recognises and removes
	// (wavio.RemoveStale) if this one is killed before the rename.
	tmp, err := wavio.CreateTemp(dir, filepath.Base(name))
	if err != nil {
		return fmt.Errorf("runrecord: %w", err)
	}
	_, werr := tmp.Write(data)
	if werr == nil {
		werr = tmp.Chmod(0o644)
	}
	if werr == nil {
		werr = tmp.Sync()
	}
	if cerr := tmp.Close(); werr == nil {
		werr = cerr
	}
	if werr == nil {
		werr = os.Rename(tmp.Name(), name)
	}
	if werr != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("runrecord: %w", werr)
	}
	return nil
}

// Base is the base name (without .json) of the record of a run whose
// outputs go to dir: BaseName, or for share k of n BaseName.k-of-n.
func Base(dir string, k, n int) string {
	if n > 0 {
		return filepath.Join(dir, fmt.Sprintf("%s.%d-of-%d", BaseName, k, n))
	}
	return filepath.Join(dir, BaseName)
}

// Update reads the record at base.json (an empty one when there is
// none), lets fn change it and writes it back, all while holding the
// lock file of the record, so that runs at the same time never lose each
// other's rows. A record that exists but cannot be read is an error:
// it is never overwritten.
func Update(ctx context.Context, base string, fn func(*Record) error) error {
	unlock, err := Lock(ctx, base, nil)
	if err != nil && !errors.Is(err, ErrNoLocks) {
		return err
	}
	defer unlock()
	r, err := load(base)
	if err != nil {
		return err
	}
	if err := fn(r); err != nil {
		return err
	}
	return r.Write(base)
}

// Load reads the record at base.json, or returns an empty record when
// there is none yet.
func Load(base string) (*Record, error) { return load(base) }

func load(base string) (*Record, error) {
	r, err := Read(base + ".json")
	if errors.Is(err, fs.ErrNotExist) {
		r = New()
		r.Files = []File{}
		return r, nil
	}
	if err != nil {
		return nil, fmt.Errorf("%w; move it away to start a new record", err)
	}
	r.Kind, r.Version = Kind, New().Version
	return r, nil
}

// LockPath is the lock file of the record at base.
func LockPath(base string) string {
	return filepath.Join(filepath.Dir(base), "."+filepath.Base(base)+".lock")
}

// ErrNoLocks: the file system of the record offers no file locks. Lock
// then returns it with an unlock function that does nothing; the caller
// may go on without the lock, knowing that runs at the same time could
// lose each other's rows.
var ErrNoLocks = errors.New("the file system offers no file locks")

// Lock takes the lock of the record at base, waiting while another run
// holds it (until ctx is done). The lock is held until the returned
// function is called, or the process ends. onWait, if not nil, is
// called once when the lock is taken by another run.
func Lock(ctx context.Context, base string, onWait func()) (unlock func(), err error) {
	name := LockPath(base)
	if err := os.MkdirAll(filepath.Dir(name), 0o755); err != nil {
		return nil, fmt.Errorf("runrecord: %w", err)
	}
	f, err := os.OpenFile(name, os.O_CREATE|os.O_RDWR, 0o644)
	if err != nil {
		return nil, fmt.Errorf("runrecord: lock: %w", err)
	}
	for {
		ok, err := tryLock(f)
		if errors.Is(err, ErrNoLocks) {
			f.Close()
			return func() {}, fmt.Errorf("runrecord: lock %s: %w", name, err)
		}
		if err != nil {
			f.Close()
			return nil, fmt.Errorf("runrecord: lock %s: %w", name, err)
		}
		if ok {
			return func() { unlockFile(f); f.Close() }, nil
		}
		if onWait != nil {
			onWait()
			onWait = nil
		}
		select {
		case <-ctx.Done():
			f.Close()
			return nil, fmt.Errorf("runrecord: waiting for the lock %s: %w", name, ctx.Err())
		case <-time.After(50 * time.Millisecond):
		}
	}
}
