package runrecord

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
)

// shareName matches the file name of a share's record.
var shareName = regexp.MustCompile(`^` + regexp.QuoteMeta(BaseName) + `\.([0-9]+)-of-([0-9]+)\.json$`)

// shareRecord is a share's record as found in a folder.
type shareRecord struct {
	path string
	k, n int
	rec  *Record
}

// findShares reads the records of the shares in dir.
func findShares(dir string) ([]shareRecord, error) {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return nil, fmt.Errorf("runrecord: %w", err)
	}
	var out []shareRecord
	for _, e := range ents {
		m := shareName.FindStringSubmatch(e.Name())
		if m == nil || e.IsDir() {
			continue
		}
		k, _ := strconv.Atoi(m[1])
		n, _ := strconv.Atoi(m[2])
		p := filepath.Join(dir, e.Name())
		r, err := Read(p)
		if err != nil {
			return nil, err
		}
		out = append(out, shareRecord{p, k, n, r})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].k < out[j].k })
	return out, nil
}

// ReadDir reads the record of an output folder: its BaseName.json merged
// with the records of every share found beside it.
func ReadDir(dir string) (*Record, error) {
	shares, err := findShares(dir)
	if err != nil {
		return nil, err
	}
	main := filepath.Join(dir, BaseName+".json")
	var r *Record
	if _, err := os.Stat(main); err == nil {
		if r, err = Read(main); err != nil {
			return nil, err
		}
	} else if len(shares) == 0 {
		return nil, fmt.Errorf("runrecord: %s: no run record in this folder (%s.json or %s.K-of-N.json)", dir, BaseName, BaseName)
	} else {
		r = New()
		r.Files = []File{}
	}
	for _, s := range shares {
		if r.Spec == nil {
			r.Spec = s.rec.Spec
		}
		r.Merge(s.rec.Files)
	}
	return r, nil
}

// Failure is an input whose file failed.
type Failure struct {
	Input  string `json:"input"`
	Output string `json:"output"`
	Error  string `json:"error"`
}

// Shares says which shares were found.
type Shares struct {
	Total int   `json:"total"`
	Found []int `json:"found"`
}

// Gathered is the outcome of Gather.
type Gathered struct {
	// Record is the merged record, written to BaseName.json and .csv.
	Record *Record `json:"-"`
	// Missing are the inputs with no output done; Failed those of them
	// whose file failed.
	Missing []string  `json:"missing"`
	Failed  []Failure `json:"failed"`
	Shares  Shares    `json:"shares"`
	// Resubmit holds, for each share with inputs missing, the command
	// that redoes them (a share's run skips what it already did).
	Resubmit []Resubmit `json:"resubmit,omitempty"`
	// Twice are inputs that more than one share did.
	Twice []string `json:"done_twice,omitempty"`
}

// Resubmit is the command that redoes one share.
type Resubmit struct {
	Share      int      `json:"share"`
	WorkingDir string   `json:"working_dir,omitempty"`
	Command    []string `json:"command"`
}

// Complete reports whether every input is done, once.
func (g *Gathered) Complete() bool {
	return len(g.Missing) == 0 && len(g.Twice) == 0 && len(g.Shares.Found) == g.Shares.Total
}

// Gather merges the records of every share in dir into one record of
// the whole run, written to BaseName.json and BaseName.csv in dir (added
// to what that record already holds), and checks that the shares covered
// every input exactly once.
func Gather(ctx context.Context, dir string) (*Gathered, error) {
	shares, err := findShares(dir)
	if err != nil {
		return nil, err
	}
	if len(shares) == 0 {
		return nil, fmt.Errorf("runrecord: %s: no share records (%s.K-of-N.json) in this folder; were the runs given --shard K/N and this folder as --output?", dir, BaseName)
	}
	n := shares[0].n
	inputs := shares[0].rec.Inputs
	g := &Gathered{Shares: Shares{Total: n, Found: []int{}}, Missing: []string{}, Failed: []Failure{}}
	for _, s := range shares {
		if s.n != n || s.rec.Share == nil || s.rec.Share.Count != n || s.rec.Share.Index != s.k {
			return nil, fmt.Errorf("runrecord: %s is a share of %d, but %s one of %d: the folder holds the records of two runs cut differently; gather the records of one run at a time (move the other run's %s.K-of-N files away)", filepath.Base(s.path), s.n, filepath.Base(shares[0].path), n, BaseName)
		}
		if !sameList(s.rec.Inputs, inputs) {
			return nil, fmt.Errorf("runrecord: %s: its input list differs from %s's; the shares were not cut from the same inputs", s.path, filepath.Base(shares[0].path))
		}
		g.Shares.Found = append(g.Shares.Found, s.k)
	}
	// Which share did each input, by the rows that say done.
	doneBy := map[string][]int{}
	rows := map[string]File{}
	for _, s := range shares {
		for _, f := range s.rec.Files {
			if f.Status == StatusDone || f.Status == StatusSkipped {
				doneBy[f.Input] = append(doneBy[f.Input], s.k)
			}
			if old, ok := rows[f.Input]; !ok || old.Status != StatusDone {
				rows[f.Input] = f
			}
		}
	}
	missingShare := map[int]bool{}
	for i, in := range inputs {
		k := i%n + 1
		by := doneBy[in]
		switch {
		case len(by) == 0:
			g.Missing = append(g.Missing, in)
			missingShare[k] = true
			if f, ok := rows[in]; ok && f.Status == StatusFailed {
				g.Failed = append(g.Failed, Failure{Input: in, Output: f.Output, Error: f.Error})
			}
		case len(by) > 1:
			g.Twice = append(g.Twice, in)
		}
	}
	var merged *Record
	err = Update(ctx, Base(dir, 0, 0), func(r *Record) error {
		for _, s := range shares {
			r.Merge(s.rec.Files)
		}
		last := shares[len(shares)-1].rec
		r.Spec, r.Inputs, r.Share, r.Workers = last.Spec, inputs, nil, 0
		r.Command, r.WorkingDir = nil, ""
		merged = r
		return nil
	})
	if err != nil {
		return nil, err
	}
	g.Record = merged
	for k := 1; k <= n; k++ {
		if !missingShare[k] {
			continue
		}
		// Any share's command serves: they differ only in --shard.
		src := shares[0].rec
		for _, s := range shares {
			if s.k == k {
				src = s.rec
			}
		}
		if len(src.Command) == 0 {
			continue
		}
		g.Resubmit = append(g.Resubmit, Resubmit{Share: k, WorkingDir: src.WorkingDir, Command: withShard(src.Command, k, n)})
	}
	return g, nil
}

func sameList(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// withShard is cmd with its --shard value set to k/n.
func withShard(cmd []string, k, n int) []string {
	out := append([]string(nil), cmd...)
	v := fmt.Sprintf("%d/%d", k, n)
	for i, a := range out {
		switch {
		case a == "--shard" && i+1 < len(out):
			out[i+1] = v
			return out
		case strings.HasPrefix(a, "--shard="):
			out[i] = "--shard=" + v
			return out
		}
	}
	return append(out, "--shard", v)
}

// ShellQuote joins a command for a POSIX shell.
func ShellQuote(args []string) string {
	q := make([]string, len(args))
	for i, a := range args {
		if a != "" && strings.Trim(a, "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789-_./=,:%+@") == "" {
			q[i] = a
			continue
		}
		q[i] = "'" + strings.ReplaceAll(a, "'", `'\''`) + "'"
	}
	return strings.Join(q, " ")
}
