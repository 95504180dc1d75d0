package runrecord

import (
	"context"
	"fmt"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process"
)

// writeShare writes the record of share k of n over inputs, with a row
// per input of the share (status from st, "done" when st has none).
func writeShare(t *testing.T, dir string, k, n int, inputs []string, st map[string]string) {
	t.Helper()
	r := New()
	r.Share = &Share{Index: k, Count: n}
	r.Inputs = inputs
	r.Command = []string{"wavsieve", "apply", "--shard", fmt.Sprintf("%d/%d", k, n), "--output", dir, "in"}
	for i, in := range inputs {
		if i%n != k-1 {
			continue
		}
		s := st[in]
		if s == "" {
			s = StatusDone
		}
		f := row(process.FileResult{Input: in, Output: filepath.Join(dir, in), Status: s})
		if s == StatusFailed {
			f.Error = in + ": broken"
		}
		r.Files = append(r.Files, f)
	}
	if err := r.Write(Base(dir, k, n)); err != nil {
		t.Fatal(err)
	}
}

func TestGather(t *testing.T) {
	inputs := []string{"a.wav", "b.wav", "c.wav", "d.wav", "e.wav"}
	t.Run("complete", func(t *testing.T) {
		dir := t.TempDir()
		for k := 1; k <= 2; k++ {
			writeShare(t, dir, k, 2, inputs, nil)
		}
		g, err := Gather(context.Background(), dir)
		if err != nil {
			t.Fatal(err)
		}
		if !g.Complete() || len(g.Record.Files) != 5 || !reflect.DeepEqual(g.Shares, Shares{Total: 2, Found: []int{1, 2}}) {
			t.Errorf("%+v", g)
		}
		back, err := Read(filepath.Join(dir, BaseName+".csv"))
		if err != nil || len(back.Files) != 5 {
			t.Errorf("merged CSV: %v", err)
		}
	})
	t.Run("a share missing and a file failed", func(t *testing.T) {
		dir := t.TempDir()
		writeShare(t, dir, 1, 3, inputs, map[string]string{"d.wav": StatusFailed})
		writeShare(t, dir, 3, 3, inputs, nil)
		g, err := Gather(context.Background(), dir)
		if err != nil {
			t.Fatal(err)
		}
		// Share 2 of 3 is b and e; d (share 1) failed.
		if g.Complete() || !reflect.DeepEqual(g.Missing, []string{"b.wav", "d.wav", "e.wav"}) || len(g.Failed) != 1 || g.Failed[0].Input != "d.wav" {
			t.Errorf("missing %v failed %+v", g.Missing, g.Failed)
		}
		var shares []int
		for _, r := range g.Resubmit {
			shares = append(shares, r.Share)
			if !strings.Contains(strings.Join(r.Command, " "), fmt.Sprintf("--shard %d/3", r.Share)) {
				t.Errorf("resubmit %+v", r)
			}
		}
		if !reflect.DeepEqual(shares, []int{1, 2}) {
			t.Errorf("shares to resubmit %v, want [1 2]", shares)
		}
	})
	t.Run("input lists differ", func(t *testing.T) {
		dir := t.TempDir()
		writeShare(t, dir, 1, 2, inputs, nil)
		writeShare(t, dir, 2, 2, inputs[:4], nil)
		if _, err := Gather(context.Background(), dir); err == nil || !strings.Contains(err.Error(), "input list differs") {
			t.Errorf("err %v", err)
		}
	})
	t.Run("shares of different counts", func(t *testing.T) {
		dir := t.TempDir()
		writeShare(t, dir, 1, 2, inputs, nil)
		writeShare(t, dir, 1, 3, inputs, nil)
		if _, err := Gather(context.Background(), dir); err == nil || !strings.Contains(err.Error(), "one run at a time") {
			t.Errorf("err %v", err)
		}
	})
	t.Run("done twice", func(t *testing.T) {
		dir := t.TempDir()
		writeShare(t, dir, 1, 2, inputs, nil)
		writeShare(t, dir, 2, 2, inputs, nil)
		// Share 2's record also claims a, which is share 1's.
		r, err := Read(Base(dir, 2, 2) + ".json")
		if err != nil {
			t.Fatal(err)
		}
		r.Files = append(r.Files, row(process.FileResult{Input: "a.wav", Output: filepath.Join(dir, "a.wav"), Status: StatusDone}))
		if err := r.Write(Base(dir, 2, 2)); err != nil {
			t.Fatal(err)
		}
		g, err := Gather(context.Background(), dir)
		if err != nil {
			t.Fatal(err)
		}
		if g.Complete() || !reflect.DeepEqual(g.Twice, []string{"a.wav"}) {
			t.Errorf("twice %v", g.Twice)
		}
	})
}

func TestWithShard(t *testing.T) {
	cases := []struct {
		name string
		in   []string
		want string
	}{
		{"separate value", []string{"w", "--shard", "1/4", "x"}, "w --shard 3/4 x"},
		{"joined value", []string{"w", "--shard=1/4", "x"}, "w --shard=3/4 x"},
		{"no shard", []string{"w", "x"}, "w x --shard 3/4"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := strings.Join(withShard(c.in, 3, 4), " "); got != c.want {
				t.Errorf("got %q", got)
			}
		})
	}
	if got := ShellQuote([]string{"a b", "it's", "--x=1/2"}); got != `'a b' 'it'\''s' --x=1/2` {
		t.Errorf("quote: %s", got)
	}
}
