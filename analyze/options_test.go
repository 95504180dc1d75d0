package analyze

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"
)

func TestOptionErrors(t *testing.T) {
	good := DefaultOptions(48000)
	cases := []struct {
		name string
		edit func(*Options)
		want error
	}{
		{"zero-rate", func(o *Options) { o.SampleRate = 0 }, ErrInvalidOption},
		{"nan-rate", func(o *Options) { o.SampleRate = nan }, ErrInvalidOption},
		{"short-segment", func(o *Options) { o.Segment = 3; o.Overlap = 0 }, ErrInvalidOption},
		{"negative-overlap", func(o *Options) { o.Overlap = -1 }, ErrInvalidOption},
		{"overlap-equals-segment", func(o *Options) { o.Overlap = o.Segment }, ErrInvalidOption},
		{"overlap-above-segment", func(o *Options) { o.Overlap = o.Segment + 1 }, ErrInvalidOption},
		{"negative-kaiser-beta", func(o *Options) { o.Window = Window{Kind: Kaiser, Beta: -1} }, ErrInvalidOption},
		{"unknown-window-kind", func(o *Options) { o.Window = Window{Kind: 99} }, ErrUnsupported},
		{"unknown-detrend", func(o *Options) { o.Detrend = 7 }, ErrUnsupported},
		{"unknown-scaling", func(o *Options) { o.Scaling = -1 }, ErrUnsupported},
		{"unknown-average", func(o *Options) { o.Average = 3 }, ErrUnsupported},
		{"negative-workers", func(o *Options) { o.Workers = -2 }, ErrInvalidOption},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			o := good
			c.edit(&o)
			e, err := NewEstimator(o)
			checkErr(t, err, c.want)
			if e != nil {
				t.Error("estimator returned with an error")
			}
		})
	}
}

// checkErr asks for an error wrapping want, in the package's style.
func checkErr(t *testing.T, err, want error) {
	t.Helper()
	if !errors.Is(err, want) {
		t.Fatalf("error %v, want one wrapping %v", err, want)
	}
	msg := err.Error()
	if !strings.HasPrefix(msg, "analyze: ") || strings.HasSuffix(msg, ".") || msg != strings.ToLower(msg[:1])+msg[1:] {
		t.Errorf("error %q: want an \"analyze: \" prefix, a lower-case start and no final period", msg)
	}
}

func TestParseErrors(t *testing.T) {
	cases := []struct {
		name  string
		parse func() error
		want  error
	}{
		{"window-unknown", func() error { _, err := ParseWindow("triangle"); return err }, ErrUnsupported},
		{"window-kaiser-without-beta", func() error { _, err := ParseWindow("kaiser"); return err }, ErrInvalidOption},
		{"window-kaiser-bad-beta", func() error { _, err := ParseWindow("kaiser:x"); return err }, ErrInvalidOption},
		{"window-hann-with-parameter", func() error { _, err := ParseWindow("hann:2"); return err }, ErrInvalidOption},
		{"detrend", func() error { _, err := ParseDetrend("quadratic"); return err }, ErrUnsupported},
		{"scaling", func() error { _, err := ParseScaling("psd"); return err }, ErrUnsupported},
		{"average", func() error { _, err := ParseAverage("mode"); return err }, ErrUnsupported},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) { checkErr(t, c.parse(), c.want) })
	}
}

func TestNamesRoundTrip(t *testing.T) {
	for _, w := range []Window{{Kind: Hann}, {Kind: Hamming}, {Kind: BlackmanHarris}, {Kind: FlatTop}, {Kind: Rectangular}, {Kind: Kaiser, Beta: 8.6}} {
		t.Run(w.String(), func(t *testing.T) {
			got, err := ParseWindow(w.String())
			if err != nil || got != w {
				t.Errorf("ParseWindow(%q) = %v, %v", w.String(), got, err)
			}
		})
	}
	for _, s := range []string{"none", "mean", "linear"} {
		if d, err := ParseDetrend(s); err != nil || d.String() != s {
			t.Errorf("detrend %q: %v %v", s, d, err)
		}
	}
}

func TestSignalErrors(t *testing.T) {
	e := mustEstimator(t, Options{SampleRate: 1000, Segment: 64, Overlap: 32})
	short := make([]float64, 63)
	long := make([]float64, 200)
	cases := []struct {
		name string
		call func() error
		want error
	}{
		{"psd-short", func() error { _, err := e.PSD(nil, short); return err }, ErrShortSignal},
		{"csd-short", func() error { _, err := e.CSD(nil, short, short); return err }, ErrShortSignal},
		{"csd-length-mismatch", func() error { _, err := e.CSD(nil, long, long[:100]); return err }, ErrInvalidOption},
		{"coherence-length-mismatch", func() error { _, err := e.Coherence(nil, long, long[:100]); return err }, ErrInvalidOption},
		{"transfer-short", func() error { _, err := e.Transfer(short, short); return err }, ErrShortSignal},
		{"spectra-none", func() error { _, err := e.Spectra(nil); return err }, ErrInvalidOption},
		{"spectra-ragged", func() error { _, err := e.Spectra([][]float64{long, long[:150]}); return err }, ErrInvalidOption},
		{"confidence-level", func() error { _, err := e.Confidence(200, 3, 1.5); return err }, ErrInvalidOption},
		{"confidence-bin", func() error { _, err := e.Confidence(200, 33, 0.9); return err }, ErrInvalidOption},
		{"confidence-short", func() error { _, err := e.Confidence(10, 3, 0.9); return err }, ErrShortSignal},
		{"tone-above-nyquist", func() error { _, err := e.Tone(make([]float64, e.Bins()), 600); return err }, ErrInvalidOption},
		{"transfer-at-negative-frequency", func() error {
			tr, err := e.Transfer(whiteNoise(1, 200, 1), whiteNoise(2, 200, 1))
			if err != nil {
				return err
			}
			_, err = tr.At(-1, 0.9)
			return err
		}, ErrInvalidOption},
		{"transfer-at-median", func() error {
			m := mustEstimator(t, Options{SampleRate: 1000, Segment: 64, Overlap: 32, Average: Median})
			tr, err := m.Transfer(whiteNoise(1, 200, 1), whiteNoise(2, 200, 1))
			if err != nil {
				return err
			}
			_, err = tr.At(100, 0.9)
			return err
		}, ErrUnsupported},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) { checkErr(t, c.call(), c.want) })
	}
}

func TestNoAllocationsPerCall(t *testing.T) {
	for _, avg := range []Average{Mean, Median} {
		t.Run(avg.String(), func(t *testing.T) {
			e := mustEstimator(t, Options{SampleRate: 1000, Segment: 256, Overlap: 128, Workers: 1, Average: avg})
			x := whiteNoise(1, 256*40, 1)
			dst := make([]float64, e.Bins())
			e.PSD(dst, x) // grows the median buffers once
			if n := testing.AllocsPerRun(10, func() { e.PSD(dst, x) }); n != 0 {
				t.Errorf("%g allocations per PSD call, want 0", n)
			}
		})
	}
	t.Run("two-workers", func(t *testing.T) {
		// Starting the goroutines allocates a little per call, never per
		// segment: the count must not grow with the signal.
		e := mustEstimator(t, Options{SampleRate: 1000, Segment: 256, Overlap: 128, Workers: 2})
		dst := make([]float64, e.Bins())
		short, long := whiteNoise(1, 256*40, 1), whiteNoise(2, 256*400, 1)
		a := testing.AllocsPerRun(10, func() { e.PSD(dst, short) })
		b := testing.AllocsPerRun(10, func() { e.PSD(dst, long) })
		if b > a || a > 8 {
			t.Errorf("%g allocations per call for 79 segments, %g for 799", a, b)
		}
	})
}

func TestWorkersAgree(t *testing.T) {
	// The segment split over goroutines changes only the order of the sums.
	x, y := whiteNoise(1, 30000, 1), whiteNoise(2, 30000, 1)
	var ref []complex128
	for _, w := range []int{1, 2, 3, 5} {
		e := mustEstimator(t, Options{SampleRate: 1000, Segment: 512, Overlap: 256, Workers: w})
		got, err := e.CSD(nil, x, y)
		if err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = got
			continue
		}
		for k := range got {
			if d := got[k] - ref[k]; real(d)*real(d)+imag(d)*imag(d) > 1e-24 {
				t.Fatalf("workers %d bin %d: %v, one worker %v", w, k, got[k], ref[k])
			}
		}
	}
}

func TestResultJSON(t *testing.T) {
	x := [][]float64{whiteNoise(1, 2000, 1), whiteNoise(2, 2000, 0.5)}
	e := mustEstimator(t, Options{SampleRate: 8000, Segment: 256, Overlap: 128, Window: Window{Kind: Kaiser, Beta: 5}})
	r, err := e.Spectra(x)
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	// The keys of the spectrum document that 'wavsieve help json' lists.
	for _, k := range []string{"sample_rate_hz", "window", "segment", "overlap", "scaling", "units", "frequencies_hz", "channels"} {
		if _, ok := m[k]; !ok {
			t.Errorf("key %q missing from %s", k, b[:200])
		}
	}
	if r.Window != "kaiser:5" || r.Units != "FS^2/Hz" || r.Scaling != "density" || len(r.Channels) != 2 {
		t.Errorf("result %+v", r)
	}
	for c := range x {
		p, _ := e.PSD(nil, x[c])
		for k := range p {
			if p[k] != r.Channels[c][k] {
				t.Fatalf("channel %d bin %d: %g, PSD %g", c, k, r.Channels[c][k], p[k])
			}
		}
	}
}

func TestToneScalingsAgree(t *testing.T) {
	// The same tone read from a density and from a power spectrum: the two
	// differ by the ENBW in Hz (Harris 1978, eq. (11)), which Tone undoes.
	x := sine(40000, 48000, 1234.5, 0.3, 0)
	noise := whiteNoise(3, len(x), 1e-4)
	for i := range x {
		x[i] += noise[i]
	}
	var tones [2]Tone
	for i, s := range []Scaling{Density, Spectrum} {
		e := mustEstimator(t, Options{SampleRate: 48000, Segment: 2048, Overlap: 1024, Window: Window{Kind: FlatTop}, Scaling: s})
		p, _ := e.PSD(nil, x)
		var err error
		if tones[i], err = e.Tone(p, 1234.5); err != nil {
			t.Fatal(err)
		}
	}
	if d := tones[0].LevelDB - tones[1].LevelDB; math.Abs(d) > 1e-9 {
		t.Errorf("density %.6f dBFS, spectrum %.6f dBFS", tones[0].LevelDB, tones[1].LevelDB)
	}
	if d := tones[0].FloorDB - tones[1].FloorDB; math.Abs(d) > 1e-9 {
		t.Errorf("floors %.6f and %.6f dBFS^2/Hz", tones[0].FloorDB, tones[1].FloorDB)
	}
}
