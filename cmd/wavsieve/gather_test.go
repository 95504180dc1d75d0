package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/runrecord"
)

func TestGatherShares(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	rates := []int{8000, 16000, 22050, 44100, 48000, 11025, 32000}
	for i, r := range rates {
		writeTestWAV(t, filepath.Join(in, fmt.Sprintf("f%d.wav", i)), r, 1+i%2, 0.1)
	}
	out := filepath.Join(dir, "shared")
	share := func(k int) {
		t.Helper()
		code, _, stderr := runCmd(t, applyArgs("--no-progress", "--dither-seed", "5", "--shard", fmt.Sprintf("%d/3", k), "--output", out, in)...)
		if code != exitOK {
			t.Fatalf("share %d: %s", k, stderr)
		}
	}
	share(1)
	share(3)
	// Share 2 never ran: gather says which inputs are missing and how to
	// redo them, and exits 1.
	code, stdout, stderr := runCmd(t, "gather", "--json", out)
	if code != exitFail {
		t.Fatalf("gather with a share missing: exit %d: %s", code, stderr)
	}
	var doc struct {
		Files   []map[string]any `json:"files"`
		Missing []string         `json:"missing"`
		Failed  []any            `json:"failed"`
		Shares  struct {
			Total int   `json:"total"`
			Found []int `json:"found"`
		} `json:"shares"`
		Resubmit []runrecord.Resubmit `json:"resubmit"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatalf("%v\n%s", err, stdout)
	}
	// Share 2 of 3 of the sorted inputs f0..f6 is f1 and f4.
	want := []string{filepath.Join(in, "f1.wav"), filepath.Join(in, "f4.wav")}
	if fmt.Sprint(doc.Missing) != fmt.Sprint(want) || doc.Shares.Total != 3 || fmt.Sprint(doc.Shares.Found) != "[1 3]" || len(doc.Files) != 5 || doc.Failed == nil {
		t.Errorf("gather: missing %v found %v of %d, %d files", doc.Missing, doc.Shares.Found, doc.Shares.Total, len(doc.Files))
	}
	if len(doc.Resubmit) != 1 || doc.Resubmit[0].Share != 2 || !strings.Contains(strings.Join(doc.Resubmit[0].Command, " "), "--shard 2/3") {
		t.Fatalf("resubmit: %+v", doc.Resubmit)
	}
	if !strings.Contains(stderr, "--array=1") {
		t.Errorf("no Slurm array index: %s", stderr)
	}
	// The command it gives redoes the missing share; then all is done.
	if code, _, stderr := runCmd(t, doc.Resubmit[0].Command[1:]...); code != exitOK {
		t.Fatalf("resubmitted share: %s", stderr)
	}
	code, stdout, stderr = runCmd(t, "gather", out)
	if code != exitOK || !strings.Contains(stdout, "7 of 7 inputs done; 3 of 3 shares found") {
		t.Fatalf("gather when complete: exit %d: %s %s", code, stdout, stderr)
	}
	rec, err := runrecord.Read(filepath.Join(out, "wavsieve-manifest.csv"))
	if err != nil || len(rec.Files) != 7 {
		t.Fatalf("merged record: %v, %d rows", err, len(rec.Files))
	}
	// Byte-identical to one run over all the inputs.
	whole := filepath.Join(dir, "whole")
	if code, _, stderr := runCmd(t, applyArgs("--no-progress", "--dither-seed", "5", "--output", whole, in)...); code != exitOK {
		t.Fatal(stderr)
	}
	var names []string
	for i := range rates {
		names = append(names, fmt.Sprintf("f%d.wav", i))
	}
	sort.Strings(names)
	for _, n := range names {
		a, _ := os.ReadFile(filepath.Join(out, n))
		b, _ := os.ReadFile(filepath.Join(whole, n))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs from the single run", n)
		}
	}
	// verify and report take the folder of shares.
	if code, stdout, stderr := runCmd(t, "verify", "--manifest", out, "--input", filepath.Join(in, "f4.wav"), "--json"); code == exitUsage || !strings.Contains(stdout, "f4.wav") {
		t.Errorf("verify --manifest DIR: exit %d %s", code, stderr)
	}
}

func TestGatherRefusals(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name string
		args []string
		code int
		msg  string
	}{
		{"no folder", []string{"gather", filepath.Join(dir, "nope")}, exitUsage, "no such folder"},
		{"no shares", []string{"gather", dir}, exitFail, "no share records"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, stderr := runCmd(t, c.args...)
			if code != c.code || !strings.Contains(stderr, c.msg) {
				t.Errorf("exit %d: %s", code, stderr)
			}
		})
	}
}
