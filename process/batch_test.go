package process

import (
	"bytes"
	"context"
	"crypto/sha256"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// writeTone writes a test file: a 50 Hz hum of amplitude 0.1 plus a
// 1 kHz tone of amplitude 0.2 on every channel, seconds long.
func writeTone(t *testing.T, name string, rate, ch int, seconds float64, f wavio.Format, chunks []wavio.Chunk) {
	t.Helper()
	f.SampleRate, f.Channels = rate, ch
	w, err := wavio.Create(name, wavio.WriterOptions{Format: f, NoDither: true, Chunks: chunks})
	if err != nil {
		t.Fatal(err)
	}
	n := int(seconds * float64(rate))
	buf := make([]float64, n*ch)
	for i := 0; i < n; i++ {
		tt := float64(i) / float64(rate)
		v := 0.1*math.Sin(2*math.Pi*50*tt) + 0.2*math.Sin(2*math.Pi*1000*tt)
		for c := 0; c < ch; c++ {
			buf[i*ch+c] = v
		}
	}
	if err := w.WriteFrames(buf); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

var f64 = wavio.Format{Bits: 64, Encoding: wavio.Float}

func readAll(t *testing.T, name string) ([]float64, wavio.Format, []wavio.Chunk) {
	t.Helper()
	r, err := wavio.Open(name, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	out := make([]float64, int(r.Frames())*r.Format().Channels)
	got := 0
	for got < len(out) {
		n, err := r.ReadFrames(out[got:])
		got += n * r.Format().Channels
		if err != nil {
			break
		}
	}
	return out[:got], r.Format(), r.Chunks()
}

func hashFile(t *testing.T, name string) [32]byte {
	b, err := os.ReadFile(name)
	if err != nil {
		t.Fatal(err)
	}
	return sha256.Sum256(b)
}

var humSpec = design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: 50, BandwidthHz: 2, Harmonics: 3}}}

func TestFilterFileMatchesCascade(t *testing.T) {
	// The file path is the engine plus I/O: the output equals running the
	// cascade of the design at the file's rate over the same samples.
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeTone(t, in, 44100, 2, 1, f64, nil)
	before := hashFile(t, in)
	out := filepath.Join(dir, "out.wav")
	res, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: humSpec, BlockFrames: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if hashFile(t, in) != before {
		t.Fatal("input modified")
	}
	if res.Status != StatusDone || res.SampleRate != 44100 || res.Channels != 2 || res.Frames != 44100 {
		t.Errorf("result %+v", res)
	}
	x, _, _ := readAll(t, in)
	y, _, _ := readAll(t, out)
	f, _ := design.Design(humSpec, 44100)
	c, _ := NewCascade(f.Sections(), Config{Channels: 2})
	want := c.Process(nil, x)
	for i := range want {
		if want[i] != y[i] {
			t.Fatalf("sample %d: file %v, cascade %v", i, y[i], want[i])
		}
	}
}

func TestFilterFileEachAtItsRate(t *testing.T) {
	// The same spec removes 50 Hz and keeps 1 kHz at every rate: measured
	// by correlating the last half second with each tone.
	dir := t.TempDir()
	for _, rate := range []int{8000, 44100, 96000, 37800} {
		in := filepath.Join(dir, "in.wav")
		out := filepath.Join(dir, "out.wav")
		writeTone(t, in, rate, 1, 2, f64, nil)
		spec := humSpec
		spec.ZeroPhase = true
		if _, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: spec}); err != nil {
			t.Fatal(err)
		}
		y, _, _ := readAll(t, out)
		a50 := toneAmp(y, rate, 50)
		a1k := toneAmp(y, rate, 1000)
		// Zero-phase notch with fitted-hum ends: 50 Hz gone everywhere,
		// 1 kHz untouched. The bounds are ours: 1e-3 is 40 dB under the 0.1
		// hum, where a notch (by definition a zero on the unit circle at
		// its centre) leaves only what its transient has not yet lost;
		// 2e-3 is 1% of the 0.2 tone, where the nearest notch (150 Hz,
		// 2 Hz wide, 850 Hz away) takes about (1/850)^2, under 1e-5 (the
		// Lorentzian skirt of a second-order notch, NoiseShareRemoved's doc).
		if a50 > 1e-3 || math.Abs(a1k-0.2) > 2e-3 {
			t.Errorf("%d Hz: 50 Hz amplitude %.2g (want < 1e-3), 1 kHz %.4f (want 0.2)", rate, a50, a1k)
		}
		os.Remove(out)
	}
}

// toneAmp is the amplitude of the tone at hz by least-squares projection
// over the whole signal (an integer number of cycles for the rates used).
func toneAmp(x []float64, rate int, hz float64) float64 {
	var s, c float64
	for i, v := range x {
		ph := 2 * math.Pi * hz * float64(i) / float64(rate)
		s += v * math.Sin(ph)
		c += v * math.Cos(ph)
	}
	return 2 * math.Hypot(s, c) / float64(len(x))
}

func TestFilterFileKeepsChunksAndAppendsHistory(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	bext := make([]byte, 602)
	copy(bext, "field recording")
	bext = append(bext, []byte("A=PCM,F=48000,W=24,M=mono,T=recorder\r\n")...)
	ixml := []byte("<BWFXML><PROJECT>test</PROJECT></BWFXML>")
	writeTone(t, in, 48000, 1, 0.2, wavio.Format{Bits: 24, Encoding: wavio.PCM}, []wavio.Chunk{{ID: "bext", Data: bext}, {ID: "iXML", Data: ixml}})
	out := filepath.Join(dir, "out.wav")
	if _, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: humSpec, DitherSeed: 5}); err != nil {
		t.Fatal(err)
	}
	_, f, chunks := readAll(t, out)
	if f.Bits != 24 || f.Encoding != wavio.PCM {
		t.Errorf("output format %v, want the input's", f)
	}
	if len(chunks) != 2 || chunks[0].ID != "bext" || chunks[1].ID != "iXML" || !bytes.Equal(chunks[1].Data, ixml) {
		t.Fatalf("chunks %v", chunks)
	}
	hist := string(chunks[0].Data[602:])
	if !strings.HasPrefix(hist, "A=PCM,F=48000,W=24,M=mono,T=recorder\r\n") || !strings.Contains(hist, "T=wavsieve filter causal: notch") {
		t.Errorf("coding history %q", hist)
	}
}

func TestFilterFileFailuresLeaveNothing(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeTone(t, in, 8000, 1, 0.5, f64, nil)
	outDir := filepath.Join(dir, "out")
	os.Mkdir(outDir, 0o755)
	out := filepath.Join(outDir, "o.wav")
	// An edge above this file's Nyquist frequency.
	bad := design.Spec{Stages: []design.Stage{{Family: design.Butterworth, Response: design.Lowpass, Order: 2, CutoffHz: design.Edges{5000}}}}
	res, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: bad})
	if err == nil || res.Status != StatusFailed || !strings.Contains(err.Error(), in) || !strings.Contains(err.Error(), "Nyquist") {
		t.Errorf("error %v, status %s", err, res.Status)
	}
	// Cancelled before the first block.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	for _, zp := range []bool{false, true} {
		s := humSpec
		s.ZeroPhase = zp
		if _, err := FilterFile(ctx, FileJob{Input: in, Output: out, Spec: s}); err == nil {
			t.Errorf("zero-phase=%v: no error after cancel", zp)
		}
	}
	// The input as its own output.
	if _, err := FilterFile(context.Background(), FileJob{Input: in, Output: in, Spec: humSpec}); err == nil {
		t.Error("input overwritten")
	}
	entries, _ := os.ReadDir(outDir)
	if len(entries) != 0 {
		t.Errorf("left behind: %v", entries)
	}
}

func TestPlan(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	for _, p := range []string{"a.wav", "b.WAV", "notes.txt", "sub/c.wav", "sub/deeper/d.wav"} {
		os.MkdirAll(filepath.Dir(filepath.Join(in, p)), 0o755)
		if strings.HasSuffix(strings.ToLower(p), ".wav") {
			writeTone(t, filepath.Join(in, p), 8000, 1, 0.05, f64, nil)
		} else {
			os.WriteFile(filepath.Join(in, p), []byte("x"), 0o644)
		}
	}
	out := filepath.Join(dir, "out")
	outs := func(items []Item) []string {
		var s []string
		for _, it := range items {
			r, _ := filepath.Rel(out, it.Output)
			s = append(s, r)
		}
		sort.Strings(s)
		return s
	}
	items, err := Plan([]string{in}, PlanOptions{OutputDir: out})
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(outs(items), " "); got != "a.wav b.WAV" {
		t.Errorf("flat: %s", got)
	}
	items, _ = Plan([]string{in}, PlanOptions{OutputDir: out, Recursive: true})
	if got := strings.Join(outs(items), " "); got != "a.wav b.WAV sub/c.wav sub/deeper/d.wav" {
		t.Errorf("recursive: %s", got)
	}
	items, _ = Plan([]string{filepath.Join(in, "*.wav"), filepath.Join(in, "sub", "c.wav")}, PlanOptions{OutputDir: out})
	if got := strings.Join(outs(items), " "); got != "a.wav c.wav" {
		t.Errorf("glob: %s", got)
	}
	// Shards: disjoint, and together everything, whatever N.
	all, _ := Plan([]string{in}, PlanOptions{OutputDir: out, Recursive: true})
	for n := 1; n <= 5; n++ {
		seen := map[string]int{}
		for k := 1; k <= n; k++ {
			part, err := Plan([]string{in}, PlanOptions{OutputDir: out, Recursive: true, Shard: k, Shards: n})
			if err != nil {
				t.Fatal(err)
			}
			for _, it := range part {
				seen[it.Input]++
			}
		}
		if len(seen) != len(all) {
			t.Errorf("%d shards cover %d of %d", n, len(seen), len(all))
		}
		for k, v := range seen {
			if v != 1 {
				t.Errorf("%d shards: %s in %d shards", n, k, v)
			}
		}
	}
	if _, err := Plan([]string{in}, PlanOptions{OutputDir: out, Shard: 3, Shards: 2}); err == nil {
		t.Error("shard 3 of 2 accepted")
	}
	// Output folder = input folder: refused.
	if _, err := Plan([]string{in}, PlanOptions{OutputDir: in}); err == nil || !strings.Contains(err.Error(), "overwrite an input") {
		t.Errorf("in-place run: %v", err)
	}
	// Two inputs to one output.
	if _, err := Plan([]string{filepath.Join(in, "sub", "c.wav"), filepath.Join(in, "sub", "deeper", "d.wav"), filepath.Join(in, "sub", "c.wav")}, PlanOptions{OutputDir: out}); err == nil {
		t.Error("duplicate output accepted")
	}
	// A complete output is skipped only when the record says it was made
	// with the same design and settings; a broken one is redone, another
	// design or no record is refused, and Replace redoes all.
	os.MkdirAll(out, 0o755)
	writeTone(t, filepath.Join(out, "a.wav"), 8000, 1, 0.05, f64, nil)
	os.WriteFile(filepath.Join(out, "b.WAV"), []byte("RIFF...."), 0o644)
	job := FileJob{Spec: design.Spec{Stages: []design.Stage{{Family: design.Butterworth, Response: design.Lowpass, Order: 2, CutoffHz: design.Edges{1000}}}}}
	filt, err := design.Design(job.Spec, 8000)
	if err != nil {
		t.Fatal(err)
	}
	f64Format := wavio.Format{SampleRate: 8000, Channels: 1, Bits: 64, Encoding: wavio.Float}
	same := job.DesignDigest(filt, f64Format)
	other := job
	other.DitherSeed = 7
	cases := []struct {
		name       string
		recorded   string
		replace    bool
		skip, refu bool
	}{
		{"same design", same, false, true, false},
		{"other settings", other.DesignDigest(filt, f64Format), false, false, true},
		{"no record", "", false, false, true},
		{"replace", same, true, false, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rec := func(string) string { return c.recorded }
			items, err := Plan([]string{in}, PlanOptions{OutputDir: out, Job: &job, Recorded: rec, Replace: c.replace})
			if err != nil {
				t.Fatal(err)
			}
			if (items[0].Skip != "") != c.skip || (items[0].Refuse != "") != c.refu {
				t.Errorf("a.wav: skip %q refuse %q", items[0].Skip, items[0].Refuse)
			}
			if c.refu && !strings.Contains(items[0].Refuse, "--replace") {
				t.Errorf("refusal does not name --replace: %s", items[0].Refuse)
			}
			if items[1].Skip != "" || items[1].Refuse != "" {
				t.Errorf("broken output not redone: %+v", items[1])
			}
			// The header was read once, in planning, and travels with the item.
			if items[0].Source.Frames != 400 || items[0].Source.Format.SampleRate != 8000 {
				t.Errorf("source: %+v", items[0].Source)
			}
		})
	}
}

func TestRunWorkersSameOutput(t *testing.T) {
	// Worker count never changes the output bytes (fixed dither seed), and a
	// failing file does not stop the others.
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	os.Mkdir(in, 0o755)
	for i, rate := range []int{8000, 16000, 44100, 48000, 3000} {
		writeTone(t, filepath.Join(in, string(rune('a'+i))+".wav"), rate, 2, 0.3, wavio.Format{Bits: 16, Encoding: wavio.PCM}, nil)
	}
	// 2 kHz low-pass: impossible at 3000 Hz (Nyquist 1500 Hz) only.
	spec := design.Spec{Stages: []design.Stage{{Family: design.Elliptic, Response: design.Lowpass, Order: 6, CutoffHz: design.Edges{2000}, RippleDB: 0.5, AttenuationDB: 70}}, ZeroPhase: true}
	var sums [][]string
	for _, workers := range []int{1, 3} {
		out := filepath.Join(dir, "out", string(rune('0'+workers)))
		items, err := Plan([]string{in}, PlanOptions{OutputDir: out})
		if err != nil {
			t.Fatal(err)
		}
		res := Run(context.Background(), items, workers, FileJob{Spec: spec, DitherSeed: 99}, Hooks{})
		var s []string
		for _, r := range res {
			if strings.HasSuffix(r.Input, "e.wav") {
				if r.Status != StatusFailed || !strings.Contains(r.Error, "Nyquist") {
					t.Errorf("e.wav: %s %s", r.Status, r.Error)
				}
				continue
			}
			if r.Status != StatusDone {
				t.Fatalf("%s: %s", r.Input, r.Error)
			}
			s = append(s, string(hashFileBytes(t, r.Output)))
		}
		sums = append(sums, s)
	}
	if len(sums[0]) != 4 || strings.Join(sums[0], "") != strings.Join(sums[1], "") {
		t.Error("outputs differ between 1 and 3 workers")
	}
}

func hashFileBytes(t *testing.T, name string) []byte {
	h := hashFile(t, name)
	return h[:]
}

func TestFilterFileProgress(t *testing.T) {
	// Progress never goes back and ends at the file's length, causal or
	// zero-phase (where reading and writing are each half the work).
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeTone(t, in, 8000, 2, 3, f64, nil)
	for _, zp := range []bool{false, true} {
		var mu sync.Mutex
		var seen []int64
		spec := humSpec
		spec.ZeroPhase = zp
		job := FileJob{Input: in, Output: filepath.Join(dir, "out.wav"), Spec: spec, BlockFrames: 500,
			Progress: func(done, total int64) {
				mu.Lock()
				seen = append(seen, done)
				mu.Unlock()
				if total != 24000 {
					t.Errorf("total %d", total)
				}
			}}
		if _, err := FilterFile(context.Background(), job); err != nil {
			t.Fatal(err)
		}
		for i := 1; i < len(seen); i++ {
			if seen[i] < seen[i-1] {
				t.Fatalf("zero-phase=%v: progress went back from %d to %d: %v", zp, seen[i-1], seen[i], seen)
			}
		}
		if len(seen) < 2 || seen[len(seen)-1] != 24000 {
			t.Errorf("zero-phase=%v: progress ends at %v", zp, seen[len(seen)-1:])
		}
		if zp && seen[len(seen)/2] >= 24000 {
			t.Errorf("zero-phase progress reached the end halfway through: %v", seen)
		}
	}
}

func TestFilterFileObserve(t *testing.T) {
	// Observe sees every input frame with its float64 output before the
	// output is quantised: here the cascade's own result, while the 16-bit
	// file holds it rounded.
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeTone(t, in, 8000, 2, 1, f64, nil)
	x, _, _ := readAll(t, in)
	f, _ := design.Design(humSpec, 8000)
	c, _ := NewCascade(f.Sections(), Config{Channels: 2})
	want := c.Process(nil, x)
	var gotIn, gotOut []float64
	job := FileJob{Input: in, Output: filepath.Join(dir, "out.wav"), Spec: humSpec, Encoding: wavio.PCM, Bits: 16, NoDither: true, BlockFrames: 300,
		Observe: func(j *FileJob, fi wavio.Format, frames int64, filt *design.Filter) func(a, b []float64) error {
			if frames != 8000 || fi.Channels != 2 || len(filt.Stages) != 1 {
				t.Errorf("observe called with %d frames, %v, %d stages", frames, fi, len(filt.Stages))
			}
			return func(a, b []float64) error {
				gotIn = append(gotIn, a...)
				gotOut = append(gotOut, b...)
				return nil
			}
		}}
	if _, err := FilterFile(context.Background(), job); err != nil {
		t.Fatal(err)
	}
	if len(gotIn) != len(x) || len(gotOut) != len(want) {
		t.Fatalf("observed %d and %d samples of %d", len(gotIn), len(gotOut), len(x))
	}
	for i := range x {
		if gotIn[i] != x[i] || gotOut[i] != want[i] {
			t.Fatalf("sample %d: observed %v -> %v, want %v -> %v", i, gotIn[i], gotOut[i], x[i], want[i])
		}
	}
	y, _, _ := readAll(t, job.Output)
	differ := 0
	for i := range y {
		if y[i] != want[i] {
			differ++
		}
	}
	if differ == 0 {
		t.Error("the 16-bit file equals the float64 output: nothing shows that Observe saw it before quantisation")
	}
}

func TestZeroPhaseOptionsBounded(t *testing.T) {
	// A filter that rings far longer than the file is padded by at most the
	// file's length and the engine's edge budget, and the rest of its decay
	// is reported; too many tones for the fit fall back to reflection.
	ring, err := design.Design(design.Spec{Stages: []design.Stage{{Family: design.Elliptic, Response: design.Bandstop, Order: 32, CutoffHz: design.Edges{49.9, 50.1}, RippleDB: 0.01, AttenuationDB: 300}}}, 48000)
	if err != nil {
		t.Fatal(err)
	}
	opt := zeroPhaseOptions(ring, 288000, 2, 8192)
	if opt.PadFrames > 288000 || opt.DecayFrames <= opt.PadFrames {
		t.Errorf("pad %d, decay %d for a 288000-frame file", opt.PadFrames, opt.DecayFrames)
	}
	if edge := 4 * opt.PadFrames * 2 * 8; edge > memBudget/4 {
		t.Errorf("pads take %d bytes, over a quarter of %d", edge, memBudget)
	}
	many, err := design.Design(design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: 50, BandwidthHz: 0.5, Harmonics: 1000}}}, 48000)
	if err != nil {
		t.Fatal(err)
	}
	if o := zeroPhaseOptions(many, 2000, 1, 8192); o.Extension != ExtendOdd {
		t.Errorf("%d tones fitted on 1000 frames", len(o.ToneHz))
	}
	some, err := design.Design(design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: 50, BandwidthHz: 0.5, Harmonics: 20}}}, 48000)
	if err != nil {
		t.Fatal(err)
	}
	if o := zeroPhaseOptions(some, 480000, 1, 8192); o.Extension != ExtendTones || o.FitFrames < 2*(1+2*len(o.ToneHz)) {
		t.Errorf("tones %d, fit %d", len(o.ToneHz), o.FitFrames)
	}
}
