package main

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// spectrumTol: the command streams the file through analyze's
// Accumulator, which sums the same segment periodograms in another order
// than one Estimator call; float64 rounding of sums of tens of terms.
const spectrumTol = 1e-12

// readPlanar reads a WAV file's samples as the command sees them.
func readPlanar(t *testing.T, name string) (int, [][]float64) {
	t.Helper()
	r, err := wavio.Open(name, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	nc := r.Format().Channels
	out := make([][]float64, nc)
	buf := make([]float64, 4096*nc)
	for {
		n, err := r.ReadFrames(buf)
		for i := 0; i < n*nc; i++ {
			out[i%nc] = append(out[i%nc], buf[i])
		}
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
	}
	return r.Format().SampleRate, out
}

func closeTo(a, b float64) bool {
	return math.Abs(a-b) <= spectrumTol*math.Max(math.Abs(a), math.Abs(b))
}

func TestSpectrumJSONMatchesAnalyze(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "stereo.wav")
	writeNoiseWAV(t, in, 8000, 2, 3, 31)
	rate, x := readPlanar(t, in)
	cases := []struct {
		name string
		args []string
		opt  analyze.Options
	}{
		{"defaults", nil, analyze.Options{Segment: 8192, Overlap: 4096}},
		{"flags", []string{"--segment", "1000", "--overlap", "250", "--window", "blackman-harris", "--scaling", "spectrum", "--detrend", "linear"},
			analyze.Options{Segment: 1000, Overlap: 250, Window: analyze.Window{Kind: analyze.BlackmanHarris}, Scaling: analyze.Spectrum, Detrend: analyze.DetrendLinear}},
		{"median", []string{"--segment", "512", "--median"}, analyze.Options{Segment: 512, Overlap: 256, Average: analyze.Median}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, stdout, stderr := runCmd(t, append(append([]string{"spectrum", "--json"}, c.args...), in)...)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			var raw map[string]json.RawMessage
			if err := json.Unmarshal([]byte(stdout), &raw); err != nil {
				t.Fatal(err)
			}
			// The keys of the spectrum document in the design notes.
			for _, k := range []string{"sample_rate_hz", "window", "segment", "overlap", "scaling", "units", "frequencies_hz", "channels"} {
				if _, ok := raw[k]; !ok {
					t.Fatalf("no %q key", k)
				}
			}
			var got analyze.Result
			json.Unmarshal([]byte(stdout), &got)
			c.opt.SampleRate = float64(rate)
			e, err := analyze.NewEstimator(c.opt)
			if err != nil {
				t.Fatal(err)
			}
			want, err := e.Spectra(x)
			if err != nil {
				t.Fatal(err)
			}
			if got.SampleRate != 8000 || got.Segment != c.opt.Segment || got.Overlap != c.opt.Overlap || got.Window != want.Window || got.Scaling != want.Scaling || got.Units != want.Units {
				t.Fatalf("header %+v, want %+v", got, want)
			}
			if len(got.Channels) != 2 || len(got.Frequencies) != e.Bins() {
				t.Fatalf("%d channels of %d values, want 2 of %d", len(got.Channels), len(got.Frequencies), e.Bins())
			}
			for ch := range want.Channels {
				for k, v := range want.Channels[ch] {
					if !closeTo(got.Channels[ch][k], v) {
						t.Fatalf("channel %d bin %d: %g, analyze gives %g", ch, k, got.Channels[ch][k], v)
					}
				}
			}
		})
	}
}

func TestSpectrumCSVAndAverage(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "stereo.wav")
	writeNoiseWAV(t, in, 8000, 2, 1, 32)
	code, stdout, stderr := runCmd(t, "spectrum", "--segment", "256", in)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	rows, err := csv.NewReader(strings.NewReader(stdout)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	// 256/2 + 1 one-sided bins and the header.
	if len(rows) != 129+1 || strings.Join(rows[0], ",") != "frequency_hz,ch1,ch2" {
		t.Fatalf("%d rows, header %v", len(rows), rows[0])
	}
	_, avgOut, _ := runCmd(t, "spectrum", "--segment", "256", "--average-channels", "--json", in)
	_, sepOut, _ := runCmd(t, "spectrum", "--segment", "256", "--json", in)
	var avg, sep analyze.Result
	json.Unmarshal([]byte(avgOut), &avg)
	json.Unmarshal([]byte(sepOut), &sep)
	if len(avg.Channels) != 1 {
		t.Fatalf("--average-channels gave %d channels", len(avg.Channels))
	}
	for k, v := range avg.Channels[0] {
		if want := (sep.Channels[0][k] + sep.Channels[1][k]) / 2; !closeTo(v, want) {
			t.Fatalf("bin %d: mean %g, want %g", k, v, want)
		}
	}
	code, two, _ := runCmd(t, "spectrum", "--segment", "256", "--db", in, in)
	rows, _ = csv.NewReader(strings.NewReader(two)).ReadAll()
	if code != exitOK || strings.Join(rows[0], ",") != "frequency_hz,1:ch1,1:ch2,2:ch1,2:ch2" || len(rows) != 130 {
		t.Fatalf("two files: exit %d, header %v, %d rows", code, rows[0], len(rows))
	}
}

func TestSpectrumTwoFilePlot(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "in.wav"), filepath.Join(dir, "out.wav")
	writeNoiseWAV(t, in, 8000, 1, 2, 33)
	applyTo(t, in, out, lowpassSpec...)
	for _, name := range []string{"cmp.svg", "cmp.png"} {
		p := filepath.Join(dir, name)
		code, _, stderr := runCmd(t, "spectrum", "--segment", "1024", "--plot", p, in, out)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", name, code, stderr)
		}
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if strings.HasSuffix(name, ".svg") && !strings.Contains(string(b), "<svg") || strings.HasSuffix(name, ".png") && !strings.HasPrefix(string(b), "\x89PNG") {
			t.Fatalf("%s is not an image of its kind (%d bytes)", name, len(b))
		}
		// The difference panel's axis label names both curves.
		if strings.HasSuffix(name, ".svg") && !strings.Contains(string(b), "minus") {
			t.Fatalf("%s has no difference panel", name)
		}
	}
}

func TestSpectrumErrors(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "short.wav")
	writeNoiseWAV(t, in, 8000, 1, 0.01, 34)
	other := filepath.Join(dir, "other.wav")
	writeNoiseWAV(t, other, 16000, 1, 1, 35)
	cases := []struct {
		name   string
		args   []string
		code   int
		stderr string
	}{
		{"no file", nil, exitUsage, "Run 'wavsieve spectrum --help'"},
		{"bad scaling", []string{"--scaling", "power", in}, exitUsage, "--scaling"},
		{"bad detrend", []string{"--detrend", "cubic", in}, exitUsage, "--detrend"},
		{"bad window", []string{"--window", "triangle", in}, exitUsage, "--window"},
		{"overlap too long", []string{"--segment", "256", "--overlap", "256", in}, exitUsage, "--overlap"},
		{"shorter than a segment", []string{in}, exitFail, "short.wav"},
		{"missing file", []string{filepath.Join(dir, "none.wav")}, exitFail, "none.wav"},
		{"rates differ", []string{"--segment", "64", in, other}, exitFail, "different rates"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, stderr := runCmd(t, append([]string{"spectrum"}, c.args...)...)
			if code != c.code || !strings.Contains(stderr, c.stderr) {
				t.Fatalf("exit %d, stderr %q; want %d and %q", code, stderr, c.code, c.stderr)
			}
		})
	}
	if code, stdout, _ := runCmd(t, "spectrum", "--help"); code != exitOK || !strings.Contains(stdout, "--scaling") {
		t.Fatalf("help: exit %d", code)
	}
}
