// Package runrecord owns the record of an apply run (the manifest): one
// row per output, written as JSON and CSV from one column table and read
// back from either.
//
// # Columns
//
// Every column of a row is one entry of the table in columns.go: its
// key (the JSON key and the CSV heading), a pointer to its field of File,
// and how it is written and parsed. Adding a column is one field of File
// and one entry of the table; JSON, CSV and both readers follow.
//
// # One record per output folder
//
// Runs into one output folder add to one record, keyed by output: a file
// redone replaces its row, a file skipped keeps its earlier row, and rows
// of other files are never lost. Merge does this, and Update does it
// under a lock file so that concurrent runs do not lose each other's rows.
//
// # Shares
//
// A run given a share K of N of its inputs (apply --shard K/N) writes its
// own record, named after the share (wavsieve-manifest.K-of-N.json), that
// holds the whole input list and the share; Gather merges the records of
// every share of a folder and tells which inputs are missing.
package runrecord

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/wavsieve/wavsieve/process/buildinfo"
)

// Kind is the value of the record's "kind" key.
const Kind = "wavsieve-run-record"

// BaseName is the base of the record in an output folder; Update writes
// BaseName.json and BaseName.csv.
const BaseName = "wavsieve-manifest"

// Share is the part of the inputs a run was given: every Count-th input
// of the sorted list, starting with the Index-th (from 1).
type Share struct {
	Index int `json:"index"`
	Count int `json:"count"`
}

// Record is a run record.
type Record struct {
	// Kind is always Kind; Version is the wavsieve that last wrote it.
	Kind    string `json:"kind"`
	Version string `json:"version"`
	// Spec is the spec of the latest run (each row has its own).
	Spec json.RawMessage `json:"spec,omitempty"`
	// Share, Inputs: a share's record holds its share and the whole
	// sorted input list the shares were cut from.
	Share  *Share   `json:"share,omitempty"`
	Inputs []string `json:"inputs,omitempty"`
	// Command and WorkingDir are the latest run's command line and the
	// folder it ran in, so that a missing share can be resubmitted.
	Command    []string `json:"command,omitempty"`
	WorkingDir string   `json:"working_dir,omitempty"`
	Workers    int      `json:"workers,omitempty"`
	DryRun     bool     `json:"dry_run,omitempty"`
	// Files are the rows, one per output, sorted by output.
	Files []File `json:"-"`

	// index maps keys to rows for Lookup; Merge clears it.
	index map[string]int
}

// New returns an empty record of this version of wavsieve.
func New() *Record { return &Record{Kind: Kind, Version: buildinfo.Version()} }

// key is the identity of a row: its output path, cleaned.
func key(output string) string { return filepath.Clean(output) }

// Lookup returns the row of output, if any.
func (r *Record) Lookup(output string) (File, bool) {
	if r.index == nil || len(r.index) > len(r.Files) {
		r.index = make(map[string]int, len(r.Files))
		for i, f := range r.Files {
			r.index[key(f.Output)] = i
		}
	}
	i, ok := r.index[key(output)]
	if !ok || i >= len(r.Files) || key(r.Files[i].Output) != key(output) {
		return File{}, false
	}
	return r.Files[i], true
}

// Merge adds the rows of a run: a row replaces the row of its output,
// except that a skipped row never replaces an earlier one (the file on
// disk is still the one that row describes) and neither does a failed one
// while the earlier row is done and its output still exists (a failed
// file never touches its output). Rows are kept sorted by output.
func (r *Record) Merge(rows []File) {
	idx := map[string]int{}
	for i, f := range r.Files {
		idx[key(f.Output)] = i
	}
	for _, f := range rows {
		i, ok := idx[key(f.Output)]
		if !ok {
			idx[key(f.Output)] = len(r.Files)
			r.Files = append(r.Files, f)
			continue
		}
		old := r.Files[i]
		if f.Status == StatusSkipped {
			continue
		}
		if f.Status == StatusFailed && old.Status == StatusDone && exists(old.Output) {
			continue
		}
		r.Files[i] = f
	}
	sort.SliceStable(r.Files, func(i, j int) bool { return r.Files[i].Output < r.Files[j].Output })
	r.index = nil
}

func exists(name string) bool {
	_, err := os.Stat(name)
	return err == nil
}

// Statuses of a row (as process.FileResult's).
const (
	StatusDone    = "done"
	StatusSkipped = "skipped"
	StatusFailed  = "failed"
)

// MarshalJSON writes the record with its rows in column order.
func (r *Record) MarshalJSON() ([]byte, error) {
	type head Record
	h, err := json.Marshal((*head)(r))
	if err != nil {
		return nil, err
	}
	var b strings.Builder
	b.Write(h[:len(h)-1])
	b.WriteString(`,"files":[`)
	for i := range r.Files {
		if i > 0 {
			b.WriteByte(',')
		}
		row, err := r.Files[i].marshal()
		if err != nil {
			return nil, err
		}
		b.Write(row)
	}
	b.WriteString("]}")
	return []byte(b.String()), nil
}

// UnmarshalJSON reads a record through the column table. It refuses a
// document that is not a record: one with no "files", or of another kind.
func (r *Record) UnmarshalJSON(data []byte) error {
	type head Record
	var h struct {
		*head
		Files []map[string]json.RawMessage `json:"files"`
	}
	h.head = (*head)(r)
	if err := json.Unmarshal(data, &h); err != nil {
		return err
	}
	if h.Files == nil {
		return ErrNotRecord
	}
	// Records written before there was a kind have none; any other kind
	// is another document.
	if r.Kind != "" && r.Kind != Kind {
		return fmt.Errorf("%w (its kind is %q)", ErrNotRecord, r.Kind)
	}
	if r.Kind == "" {
		for _, m := range h.Files {
			if _, ok := m["output"]; !ok {
				return fmt.Errorf("%w (it has no kind, and its files no output)", ErrNotRecord)
			}
		}
	}
	r.Files = make([]File, len(h.Files))
	for i, m := range h.Files {
		if err := r.Files[i].unmarshal(m); err != nil {
			return fmt.Errorf("runrecord: row %d: %w", i+1, err)
		}
	}
	return nil
}

// ErrNotRecord: the document is valid but no run record.
var ErrNotRecord = errors.New("runrecord: not a run record (manifest) of wavsieve apply")

// JSON is the record as indented JSON, ending with a newline.
func (r *Record) JSON() ([]byte, error) {
	b, err := json.Marshal(r)
	if err != nil {
		return nil, err
	}
	var out strings.Builder
	if err := indent(&out, b); err != nil {
		return nil, err
	}
	out.WriteByte('\n')
	return []byte(out.String()), nil
}
