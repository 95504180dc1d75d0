package main

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

// TestDeterministic generates the demo files twice and checks that the
// bytes are the same, and on amd64, where the committed files were
// generated, the same as those. Elsewhere the last bits of the float
// arithmetic may differ (fused multiply-add, other math routines), so the
// committed bytes are not expected there.
func TestDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("writes about 5 MB twice")
	}
	a, b := t.TempDir(), t.TempDir()
	for _, dir := range []string{a, b} {
		if err := run(dir, io.Discard); err != nil {
			t.Fatal(err)
		}
	}
	names, err := filepath.Glob(filepath.Join(a, "*.wav"))
	if err != nil || len(names) != 4 {
		t.Fatalf("generated %d files, want 4 (%v)", len(names), err)
	}
	for _, na := range names {
		base := filepath.Base(na)
		x, _ := os.ReadFile(na)
		y, _ := os.ReadFile(filepath.Join(b, base))
		if !bytes.Equal(x, y) {
			t.Errorf("%s: two runs differ", base)
		}
		if runtime.GOARCH != "amd64" {
			continue
		}
		committed, err := os.ReadFile(filepath.Join("..", base))
		if err != nil {
			t.Errorf("%s: %v", base, err)
			continue
		}
		if !bytes.Equal(x, committed) {
			t.Errorf("%s: differs from samples/%s; run go run ./samples/generate", base, base)
		}
	}
}

func TestBextChunk(t *testing.T) {
	body, err := bextChunk(bextFields{
		description: "d", originator: "o", reference: "r",
		date: "2024-05-17", time: "05:42:10", timeReference: 0x0102030405,
	}, "A=PCM,F=96000,W=32,M=mono,T=x\r\n")
	if err != nil {
		t.Fatal(err)
	}
	// EBU Tech 3285: CodingHistory starts at byte 602; OriginationDate at
	// 320, OriginationTime at 330, TimeReference at 338, Version at 346.
	if got := string(body[602:]); got != "A=PCM,F=96000,W=32,M=mono,T=x\r\n" {
		t.Errorf("CodingHistory = %q", got)
	}
	if got := string(body[320:338]); got != "2024-05-1705:42:10" {
		t.Errorf("date and time = %q", got)
	}
	if body[338] != 0x05 || body[342] != 0x01 || body[346] != 1 || body[347] != 0 {
		t.Errorf("TimeReference or Version bytes wrong: % x", body[338:348])
	}
	if _, err := bextChunk(bextFields{reference: string(make([]byte, 33))}, ""); err == nil {
		t.Error("a 33-byte OriginatorReference was accepted")
	}
}
