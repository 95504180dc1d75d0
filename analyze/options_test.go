package analyze

import (
	"errors"
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
