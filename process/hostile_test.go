package process

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

var hp100 = design.Spec{Stages: []design.Stage{{Family: design.Butterworth, Response: design.Highpass, Order: 2, CutoffHz: design.Edges{100}}}}

var pcm16 = wavio.Format{Bits: 16, Encoding: wavio.PCM}

// TestRunFIFOInput: a FIFO among the inputs fails alone, at once, and
// the other files are done.
func TestRunFIFOInput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	os.Mkdir(in, 0o755)
	writeTone(t, filepath.Join(in, "a.wav"), 8000, 1, 0.5, pcm16, nil)
	if err := syscall.Mkfifo(filepath.Join(in, "x.wav"), 0o644); err != nil {
		t.Skipf("no FIFOs here: %v", err)
	}
	items, err := Plan([]string{in}, PlanOptions{OutputDir: filepath.Join(dir, "out")})
	if err != nil {
		t.Fatal(err)
	}
	done := make(chan []FileResult, 1)
	go func() { done <- Run(context.Background(), items, 2, FileJob{Spec: hp100}, Hooks{}) }()
	var res []FileResult
	select {
	case res = <-done:
	case <-time.After(30 * time.Second):
		t.Fatal("the run did not end")
	}
	var nr *wavio.NotRegularError
	for _, r := range res {
		switch filepath.Base(r.Input) {
		case "a.wav":
			if r.Status != StatusDone {
				t.Errorf("a.wav: %s %s", r.Status, r.Error)
			}
		case "x.wav":
			// Refused at planning (a Refuse message) or when opened (a
			// NotRegularError): either way failed, saying why.
			if r.Status != StatusFailed || !errors.As(r.Err, &nr) && !strings.Contains(r.Error, "not a regular file") {
				t.Errorf("x.wav: %s %q, want failed as not a regular file", r.Status, r.Error)
			}
		}
	}
}

// TestShortInput: an input shortened while it is read fails (no output)
// by default, and with AllowShort is written as far as it was read, with
// a warning and the frame count actually read.
func TestShortInput(t *testing.T) {
	for _, allow := range []bool{false, true} {
		t.Run(map[bool]string{false: "fails", true: "allowed"}[allow], func(t *testing.T) {
			dir := t.TempDir()
			in := filepath.Join(dir, "in.wav")
			out := filepath.Join(dir, "out.wav")
			writeTone(t, in, 8000, 2, 20, pcm16, nil) // 640 kB of data
			var once sync.Once
			job := FileJob{Input: in, Output: out, Spec: hp100, AllowShort: allow, BlockFrames: 256}
			job.Progress = func(done, total int64) {
				// Cut the file to a quarter while the first blocks are read.
				once.Do(func() { os.Truncate(in, 44+4*40000) })
			}
			res, err := FilterFile(context.Background(), job)
			var se *ShortInputError
			if !allow {
				if !errors.As(err, &se) || se.Declared != 160000 || se.Read >= se.Declared {
					t.Fatalf("error %v, want a ShortInputError", err)
				}
				if _, err := os.Stat(out); !errors.Is(err, os.ErrNotExist) {
					t.Fatal("an output was written")
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if res.Frames >= 160000 || res.Frames < 30000 {
				t.Fatalf("recorded %d frames", res.Frames)
			}
			if !strings.Contains(strings.Join(res.Warnings, "\n"), "ended after") {
				t.Errorf("warnings %q", res.Warnings)
			}
			x, _, _ := readAll(t, out)
			if int64(len(x)/2) != res.Frames {
				t.Errorf("output of %d frames, recorded %d", len(x)/2, res.Frames)
			}
		})
	}
}

// TestPlanOutputInsideInput: with the output folder inside a folder
// input, a recursive run leaves it out of the walk, so the second run
// finds its outputs complete instead of refusing them as inputs.
func TestPlanOutputInsideInput(t *testing.T) {
	in := t.TempDir()
	writeTone(t, filepath.Join(in, "a.wav"), 8000, 1, 0.2, pcm16, nil)
	out := filepath.Join(in, "filtered")
	for round := 1; round <= 2; round++ {
		items, err := Plan([]string{in}, PlanOptions{OutputDir: out, Recursive: true})
		if err != nil {
			t.Fatalf("round %d: %v", round, err)
		}
		if len(items) != 1 || filepath.Base(items[0].Input) != "a.wav" {
			t.Fatalf("round %d: items %+v", round, items)
		}
		if round == 2 {
			break // planned with the output folder left out: enough
		}
		for _, r := range Run(context.Background(), items, 1, FileJob{Spec: hp100}, Hooks{}) {
			if r.Status == StatusFailed {
				t.Fatalf("round %d: %s", round, r.Error)
			}
		}
	}
}

// TestShortOnDisk: a file cut short before the run (its data chunk
// claims more than the file holds) fails like one that shrinks while it
// is read, and AllowShort writes what it holds with a warning.
func TestShortOnDisk(t *testing.T) {
	for _, allow := range []bool{false, true} {
		t.Run(map[bool]string{false: "fails", true: "allowed"}[allow], func(t *testing.T) {
			dir := t.TempDir()
			in := filepath.Join(dir, "in.wav")
			out := filepath.Join(dir, "out.wav")
			writeTone(t, in, 8000, 2, 2, pcm16, nil) // 16000 frames of 4 bytes
			if err := os.Truncate(in, 44+4*4000); err != nil {
				t.Fatal(err)
			}
			res, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: hp100, AllowShort: allow})
			var se *ShortInputError
			if !allow {
				// The header is longer than 44 bytes, so a few less than 4000.
				if !errors.As(err, &se) || se.Declared != 16000 || se.Read > 4000 || se.Read < 3900 {
					t.Fatalf("error %v, want a ShortInputError of about 4000 of 16000 frames", err)
				}
				if _, err := os.Stat(out); !errors.Is(err, os.ErrNotExist) {
					t.Fatal("an output was written")
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if res.Frames > 4000 || res.Frames < 3900 || !strings.Contains(strings.Join(res.Warnings, "\n"), "claims") {
				t.Fatalf("recorded %d frames, warnings %q", res.Frames, res.Warnings)
			}
		})
	}
}

// TestSymlinkAtOutput: a symbolic link at the output name, to a file of
// the same shape, is not counted as a complete output; the file fails
// (refused at planning, or with a NotRegularError when the writer meets
// the link) and the link's target is untouched.
func TestSymlinkAtOutput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	out := filepath.Join(dir, "out")
	os.Mkdir(in, 0o755)
	os.Mkdir(out, 0o755)
	writeTone(t, filepath.Join(in, "a.wav"), 8000, 1, 0.2, pcm16, nil)
	other := filepath.Join(dir, "someone-elses.wav")
	writeTone(t, other, 8000, 1, 0.2, pcm16, nil)
	before := hashFile(t, other)
	if err := os.Symlink(other, filepath.Join(out, "a.wav")); err != nil {
		t.Skip(err)
	}
	items, err := Plan([]string{in}, PlanOptions{OutputDir: out})
	if err != nil {
		t.Fatal(err)
	}
	if items[0].Skip != "" {
		t.Fatalf("skipped: %s", items[0].Skip)
	}
	r := Run(context.Background(), items, 1, FileJob{Spec: hp100}, Hooks{})[0]
	var nr *wavio.NotRegularError
	refused := r.Err != nil && strings.Contains(r.Err.Error(), "symbolic link")
	if r.Status != StatusFailed || !(errors.As(r.Err, &nr) || refused) {
		t.Fatalf("%s %v, want failed, refused as a link or with a NotRegularError", r.Status, r.Err)
	}
	if hashFile(t, other) != before {
		t.Fatal("the link's target changed")
	}
}

// TestNonFiniteReplaced: with AllowNonFinite, NaN and infinite input
// samples become zero, are counted per channel, and the output is
// written and finite.
func TestNonFiniteReplaced(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeTone(t, in, 8000, 2, 0.5, f64, nil)
	b, _ := os.ReadFile(in)
	x, _, _ := readAll(t, in)
	data := len(b) - 8*len(x)
	put := func(frame, ch int, v float64) {
		binary.LittleEndian.PutUint64(b[data+8*(2*frame+ch):], math.Float64bits(v))
	}
	put(100, 0, math.NaN())
	put(200, 1, math.Inf(1))
	put(300, 1, math.Inf(-1))
	os.WriteFile(in, b, 0o644)
	out := filepath.Join(dir, "out.wav")
	res, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: hp100, AllowNonFinite: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.NonFinite) != 2 || res.NonFinite[0] != 1 || res.NonFinite[1] != 2 {
		t.Fatalf("non-finite per channel %v, want [1 2]", res.NonFinite)
	}
	y, _, _ := readAll(t, out)
	for i, v := range y {
		if v-v != 0 {
			t.Fatalf("output sample %d is %v", i, v)
		}
	}
	if _, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: hp100}); err == nil {
		t.Fatal("without AllowNonFinite the file was accepted")
	}
}

// TestWidePCMInput: a 36-bit (in 40) input is filtered and written in
// its own format, and agrees with a 64-bit float run to within one step
// of 36 bits plus the dither-free rounding.
func TestWidePCMInput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeTone(t, in, 8000, 1, 0.5, wavio.Format{Bits: 40, ValidBits: 36, Encoding: wavio.PCM}, nil)
	out := filepath.Join(dir, "out.wav")
	ref := filepath.Join(dir, "ref.wav")
	if _, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: hp100, NoDither: true}); err != nil {
		t.Fatal(err)
	}
	if _, err := FilterFile(context.Background(), FileJob{Input: in, Output: ref, Spec: hp100, Encoding: wavio.Float, Bits: 64}); err != nil {
		t.Fatal(err)
	}
	y, f, _ := readAll(t, out)
	z, _, _ := readAll(t, ref)
	if f.Bits != 40 || f.ValidBits != 36 {
		t.Fatalf("output format %v", f)
	}
	step := math.Ldexp(1, -35)
	if d, at := maxAbsDiff(y, z); d > step {
		t.Fatalf("differs from the float run by %g at %d, more than one step %g", d, at, step)
	}
}

// TestFormatErrorNamesInput: an input whose rate gives a byte rate past
// 32 bits cannot be written; the error is a FormatError naming the
// input, and nothing is created.
func TestFormatErrorNamesInput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "fast.wav")
	var h bytes.Buffer
	le := binary.LittleEndian
	h.WriteString("RIFF")
	binary.Write(&h, le, uint32(4+24+8+400))
	h.WriteString("WAVEfmt ")
	for _, v := range []any{uint32(16), uint16(1), uint16(2), uint32(4_000_000_000), uint32(0), uint16(4), uint16(16)} {
		binary.Write(&h, le, v)
	}
	h.WriteString("data")
	binary.Write(&h, le, uint32(400))
	h.Write(make([]byte, 400))
	os.WriteFile(in, h.Bytes(), 0o644)
	out := filepath.Join(dir, "out.wav")
	_, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: hp100})
	var fe *FormatError
	if !errors.As(err, &fe) || fe.Input != in || !strings.HasPrefix(err.Error(), in+": ") {
		t.Fatalf("error %v, want a FormatError naming %s", err, in)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Fatalf("folder holds %d entries", len(ents))
	}
}

// TestManyChannelBlocks: blocks are sized by bytes, so a file of 65535
// channels costs about what a stereo one does, not 8192 frames of
// 65535 samples (4 GiB a block).
func TestManyChannelBlocks(t *testing.T) {
	if got := blockFramesFor(65535); got != 1 {
		t.Errorf("block of %d frames for 65535 channels", got)
	}
	if got := blockFramesFor(2); got != defaultBlockFrames {
		t.Errorf("block of %d frames for stereo", got)
	}
	dir := t.TempDir()
	in := filepath.Join(dir, "wide.wav")
	writeTone(t, in, 8000, 65535, 8.0/8000, wavio.Format{Bits: 8, Encoding: wavio.PCM}, nil)
	for _, zp := range []bool{false, true} {
		spec := hp100
		spec.ZeroPhase = zp
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		before := ms.TotalAlloc
		if _, err := FilterFile(context.Background(), FileJob{Input: in, Output: filepath.Join(dir, "out.wav"), Spec: spec}); err != nil {
			t.Fatal(err)
		}
		runtime.ReadMemStats(&ms)
		// Blocks of one frame, the edge buffers of a few frames, the
		// filter state and per-channel figures: a few MB.
		const limit = 64 << 20
		if used := ms.TotalAlloc - before; used > limit {
			t.Errorf("zero-phase %v: allocated %d bytes, limit %d", zp, used, limit)
		}
	}
}

// TestFilterStateBound: a filter whose state over the channels passes
// the budget is refused with a clear error before anything is written.
func TestFilterStateBound(t *testing.T) {
	if err := checkState(1024, 65535); err == nil {
		t.Fatal("1024 sections on 65535 channels accepted")
	}
	if err := checkState(4, 65535); err != nil {
		t.Fatalf("4 sections on 65535 channels refused: %v", err)
	}
}

// TestDesignCancelled: a cancelled run stops in the design, with the
// context's error, and writes nothing.
func TestDesignCancelled(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeTone(t, in, 48000, 1, 0.1, pcm16, nil)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	notches := design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: 50, BandwidthHz: 1}}}
	_, err := FilterFile(ctx, FileJob{Input: in, Output: filepath.Join(dir, "out.wav"), Spec: notches})
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "design") {
		t.Fatalf("error %v, want the design stopped by the cancel", err)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Fatalf("folder holds %d entries", len(ents))
	}
}

// TestEdgePool: the shared edge pool lets runs through up to its size,
// makes the next one wait until memory is given back, and lets a
// waiting one go when its context is cancelled.
func TestEdgePool(t *testing.T) {
	p := newPool(100)
	r1, err := p.acquire(context.Background(), 60)
	if err != nil {
		t.Fatal(err)
	}
	got := make(chan error, 1)
	go func() {
		rel, err := p.acquire(context.Background(), 1000) // clamped to the pool's 100
		if err == nil {
			rel()
		}
		got <- err
	}()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := p.acquire(ctx, 50); !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled wait: %v", err)
	}
	select {
	case err := <-got:
		t.Fatalf("acquired while the pool was in use: %v", err)
	default:
	}
	r1()
	select {
	case err := <-got:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("still waiting after the memory was given back")
	}
}

// TestSpillShare: the spills of all workers stay within spillPool for
// every worker count, and the spill file is unlinked as soon as it is
// created.
func TestSpillShare(t *testing.T) {
	for _, n := range []int{1, 2, 4, 13, 32, 1000} {
		mem, io := spillShare(n)
		total := int64(n) * (max(mem, 0) + 2*int64(io))
		if total > spillPool && io > 64<<10 {
			t.Errorf("%d workers: %d bytes of spill, more than %d", n, total, spillPool)
		}
	}
}

// TestPlanCancelled: planning stops with the context's error once it is
// cancelled.
func TestPlanCancelled(t *testing.T) {
	in := t.TempDir()
	writeTone(t, filepath.Join(in, "a.wav"), 8000, 1, 0.1, pcm16, nil)
	found, err := Discover([]string{in}, false)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = PlanInputs(found, PlanOptions{OutputDir: filepath.Join(in, "out"), Context: ctx})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
}
