package wavio

import (
	"bytes"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"syscall"
	"testing"
	"time"
)

// TestOpenRefusesNonRegular: a FIFO (with no writer, which a blocking
// open would wait on for ever) and a folder are refused at once with a
// *NotRegularError; a regular file opens.
func TestOpenRefusesNonRegular(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "x.wav")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("no FIFOs here: %v", err)
	}
	good := filepath.Join(dir, "good.wav")
	if err := os.WriteFile(good, riff(chunks(ck("fmt ", fmt16), ck("data", pcm16))), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, path string
		wantErr    bool
	}{
		{"fifo", fifo, true},
		{"folder", dir, true},
		{"regular file", good, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			done := make(chan error, 1)
			go func() {
				r, err := Open(tc.path, nil)
				if err == nil {
					r.Close()
				}
				done <- err
			}()
			select {
			case err := <-done:
				var nr *NotRegularError
				if tc.wantErr != errors.As(err, &nr) {
					t.Fatalf("error %v, want a NotRegularError: %v", err, tc.wantErr)
				}
			case <-time.After(10 * time.Second):
				t.Fatal("Open blocked")
			}
		})
	}
}

// TestCheckOutputPath: a symbolic link or a FIFO at an output name is
// not replaced; a regular file or no file is.
func TestCheckOutputPath(t *testing.T) {
	dir := t.TempDir()
	reg := filepath.Join(dir, "reg.wav")
	os.WriteFile(reg, []byte("x"), 0o644)
	link := filepath.Join(dir, "link.wav")
	if err := os.Symlink(reg, link); err != nil {
		t.Skip(err)
	}
	fifo := filepath.Join(dir, "fifo.wav")
	syscall.Mkfifo(fifo, 0o644)
	for _, tc := range []struct {
		name, path string
		refused    bool
	}{
		{"missing", filepath.Join(dir, "none.wav"), false},
		{"regular", reg, false},
		{"symlink", link, true},
		{"fifo", fifo, true},
		{"folder", dir, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := CheckOutputPath(tc.path)
			var nr *NotRegularError
			if errors.As(err, &nr) != tc.refused {
				t.Fatalf("CheckOutputPath(%s) = %v, refused want %v", tc.name, err, tc.refused)
			}
		})
	}
}

// TestRemoveStale: temporary files whose owner is gone (or that are old
// and unlocked) are removed, those locked by a live owner and other
// files are kept, and a 0-byte one (a manifest killed before its first
// write) goes too.
func TestRemoveStale(t *testing.T) {
	dir := t.TempDir()
	// A process id that is not running: a child that has exited.
	cmd := os_exec_true(t)
	dead := strconv.Itoa(cmd)
	live := strconv.Itoa(os.Getppid())
	write := func(name string, size int, age time.Duration) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, make([]byte, size), 0o600); err != nil {
			t.Fatal(err)
		}
		old := time.Now().Add(-age)
		os.Chtimes(p, old, old)
		return p
	}
	deadOut := write(".a.wav"+tempMark+dead+"-1", 1000, 0)
	deadManifest := write(".wavsieve-manifest.json"+tempMark+dead+"-2", 0, 0)
	liveFresh := write(".b.wav"+tempMark+live+"-3", 10, 0)
	liveOldUnlocked := write(".c.wav"+tempMark+live+"-4", 10, time.Hour)
	liveOldLocked := write(".d.wav"+tempMark+live+"-5", 10, time.Hour)
	other := write(".e.wav.tmp-6", 10, time.Hour)
	output := write("a.wav", 10, time.Hour)
	f, err := os.Open(liveOldLocked)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := lockFile(f); err != nil {
		t.Fatal(err)
	}
	own, err := CreateTemp(dir, "f.wav")
	if err != nil {
		t.Fatal(err)
	}
	defer own.Close()

	gone, err := RemoveStale(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, path string
		removed    bool
	}{
		{"dead owner", deadOut, true},
		{"dead owner, empty manifest", deadManifest, true},
		{"live owner, fresh", liveFresh, false},
		{"live owner, old, unlocked", liveOldUnlocked, true},
		{"live owner, old, locked", liveOldLocked, false},
		{"not ours", other, false},
		{"an output", output, false},
		{"this process's own", own.Name(), false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := os.Stat(tc.path)
			if gotRemoved := errors.Is(err, os.ErrNotExist); gotRemoved != tc.removed {
				t.Errorf("%s: removed %v, want %v (removed: %v)", filepath.Base(tc.path), gotRemoved, tc.removed, gone)
			}
		})
	}
}

// os_exec_true starts and waits for a short-lived child and returns its
// process id, which no longer runs.
func os_exec_true(t *testing.T) int {
	t.Helper()
	p, err := os.StartProcess("/bin/true", []string{"true"}, &os.ProcAttr{})
	if err != nil {
		t.Skipf("cannot start a child: %v", err)
	}
	p.Wait()
	return p.Pid
}

// TestSecondDataChunk: a second data chunk is not silently dropped: the
// reader warns.
func TestSecondDataChunk(t *testing.T) {
	data := riff(chunks(ck("fmt ", fmt16), ck("data", pcm16), ck("data", pcm16)))
	r, err := NewReader(bytes.NewReader(data), nil)
	if err != nil {
		t.Fatal(err)
	}
	got := readAll(t, r, 16)
	if len(got) != len(pcm16Samples) {
		t.Fatalf("%d samples, want the first chunk's %d", len(got), len(pcm16Samples))
	}
	found := false
	for _, w := range r.Warnings() {
		found = found || w.Kind == WarnSecondData
	}
	if !found {
		t.Fatalf("no WarnSecondData warning: %v", r.Warnings())
	}
}

// TestMetadataBudget: countless empty chunks and chunks declaring huge
// sizes do not cost memory in proportion: at most maxChunks are kept, a
// large body is kept as a reference to the file, and the writer copies
// it from there byte for byte.
func TestMetadataBudget(t *testing.T) {
	t.Run("many empty chunks", func(t *testing.T) {
		const n = 200000
		many := bytes.Repeat([]byte("junk\x00\x00\x00\x00"), n)
		data := riff(chunks(ck("fmt ", fmt16), many, ck("data", pcm16)))
		var ms runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&ms)
		before := ms.HeapAlloc
		r, err := NewReader(bytes.NewReader(data), nil)
		if err != nil {
			t.Fatal(err)
		}
		runtime.GC()
		runtime.ReadMemStats(&ms)
		// What the Reader keeps: the kept chunks and its buffers; a
		// Chunk per empty chunk would be about 12 MB.
		const limit = 1 << 20
		if held := int64(ms.HeapAlloc) - int64(before); held > limit {
			t.Errorf("the reader holds %d bytes after %d empty chunks, limit %d", held, n, limit)
		}
		runtime.KeepAlive(r)
		if len(r.Chunks()) != maxChunks {
			t.Errorf("%d chunks kept, want %d", len(r.Chunks()), maxChunks)
		}
		if w := r.Warnings(); len(w) != 1 || w[0].Kind != WarnChunkDropped {
			t.Errorf("warnings %v, want one WarnChunkDropped", w)
		}
	})
	t.Run("large chunk by reference", func(t *testing.T) {
		big := make([]byte, 3*chunkInMemory+1)
		for i := range big {
			big[i] = byte(i * 7)
		}
		data := riff(chunks(ck("fmt ", fmt16), ck("LIST", big), ck("data", pcm16), ck("iXML", []byte("<a/>"))))
		r, err := NewReader(bytes.NewReader(data), nil)
		if err != nil {
			t.Fatal(err)
		}
		c := r.Chunks()
		if len(c) != 2 || c[0].Source == nil || c[0].Data != nil || c[0].Length != int64(len(big)) {
			t.Fatalf("chunks %+v: want LIST by reference", c)
		}
		out := encodeWAV(t, r.Format(), readAll(t, r, 16), c)
		r2, err := NewReader(bytes.NewReader(out), nil)
		if err != nil {
			t.Fatal(err)
		}
		got := chunkBody(t, r2.Chunks()[0])
		if !bytes.Equal(got, big) {
			t.Fatal("the LIST body changed in the copy")
		}
		if string(r2.Chunks()[1].Data) != "<a/>" {
			t.Fatalf("iXML after the data: %q", r2.Chunks()[1].Data)
		}
	})
	t.Run("warnings bounded", func(t *testing.T) {
		// Every odd chunk missing its pad byte gives a warning.
		var parts [][]byte
		parts = append(parts, ck("fmt ", fmt16))
		for range 3 * maxWarnings {
			parts = append(parts, []byte("odd \x01\x00\x00\x00x"))
		}
		parts = append(parts, ck("data", pcm16))
		r, err := NewReader(bytes.NewReader(riff(chunks(parts...))), nil)
		if err != nil {
			t.Fatal(err)
		}
		w := r.Warnings()
		if len(w) != maxWarnings+1 || w[maxWarnings].Kind != WarnOmitted {
			t.Fatalf("%d warnings, the last %v; want %d and a count of the rest", len(w), w[len(w)-1], maxWarnings+1)
		}
	})
}

// chunkBody returns a chunk's body, read from its source if need be.
func chunkBody(t *testing.T, c Chunk) []byte {
	t.Helper()
	if c.Source == nil {
		return c.Data
	}
	b := make([]byte, c.Length)
	if _, err := c.Source.ReadAt(b, c.Offset); err != nil && err != io.EOF {
		t.Fatal(err)
	}
	return b
}

// TestWidePCMRoundTrip: 40- to 64-bit containers (and 36 valid bits in
// 40) are written and read back to within half a step of their valid
// bits (the scale of codec.go; float64 holds 53 bits, so wider words
// round trip to float64 precision).
func TestWidePCMRoundTrip(t *testing.T) {
	for _, tc := range []struct{ bits, valid int }{{40, 36}, {40, 40}, {48, 48}, {56, 53}, {56, 56}, {64, 64}} {
		t.Run(strconv.Itoa(tc.valid)+"-in-"+strconv.Itoa(tc.bits), func(t *testing.T) {
			f := Format{SampleRate: 8000, Channels: 2, Bits: tc.bits, ValidBits: tc.valid, Encoding: PCM}
			x := signal(500, 2)
			x[3] = 1 // clips to the top code
			data := encodeWAV(t, f, x, nil)
			r, err := NewReader(bytes.NewReader(data), nil)
			if err != nil {
				t.Fatal(err)
			}
			if g := r.Format(); g.Bits != tc.bits || g.ValidBits != tc.valid {
				t.Fatalf("read back as %v", g)
			}
			y := readAll(t, r, 64)
			step := math.Ldexp(1, 1-tc.valid) // one LSB of the valid bits
			tol := math.Max(step/2, 0x1p-53)
			for i := range x {
				want := x[i]
				if i == 3 {
					want = 1 - step // saturated
				}
				if d := math.Abs(y[i] - want); d > tol {
					t.Fatalf("sample %d: %v, want %v (tolerance %g)", i, y[i], want, tol)
				}
			}
		})
	}
}

// TestZeroNonFinite: NaN and infinite samples become 0 with
// ZeroNonFinite, counted per channel.
func TestZeroNonFinite(t *testing.T) {
	x := []float64{0.5, math.NaN(), math.Inf(1), 0.25, -0.5, math.Inf(-1), math.NaN(), math.NaN()}
	var b wavBuilder
	for _, v := range x {
		b.u32(math.Float32bits(float32(v)))
	}
	data := riff(chunks(ck("fmt ", fmtBody(tagFloat, 2, 8000, 8, 32)), ck("fact", []byte{4, 0, 0, 0}), ck("data", b.buf.Bytes())))
	r, err := NewReader(bytes.NewReader(data), &ReaderOptions{ZeroNonFinite: true})
	if err != nil {
		t.Fatal(err)
	}
	y := readAll(t, r, 2)
	want := []float64{0.5, 0, 0, 0.25, -0.5, 0, 0, 0}
	for i := range want {
		if y[i] != want[i] {
			t.Fatalf("sample %d: %v, want %v", i, y[i], want[i])
		}
	}
	if got := r.NonFiniteByChannel(); len(got) != 2 || got[0] != 2 || got[1] != 3 {
		t.Fatalf("per channel %v, want [2 3]", got)
	}
}
