package process

import (
	"context"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// writeBenchWAV writes the signal of testdata/apply/gen (the file of
// testdata/apply/bench_apply.sh): 48 kHz 24-bit stereo, a DC offset,
// mains-like tones and seeded noise per channel, no dither.
func writeBenchWAV(tb testing.TB, name string, frames int) {
	tb.Helper()
	w, err := wavio.Create(name, wavio.WriterOptions{
		Format:   wavio.Format{SampleRate: 48000, Channels: 2, Bits: 24, Encoding: wavio.PCM},
		NoDither: true,
	})
	if err != nil {
		tb.Fatal(err)
	}
	defer w.Abort()
	rng := rand.New(rand.NewPCG(1, 2))
	buf := make([]float64, 2*8192)
	for at := 0; at < frames; {
		n := min(8192, frames-at)
		for i := 0; i < n; i++ {
			t := float64(at+i) / 48000
			buf[2*i] = 0.1 + 0.5*math.Sin(2*math.Pi*60*t) + 0.2*math.Sin(2*math.Pi*3000*t) + 0.01*rng.NormFloat64()
			buf[2*i+1] = -0.1 + 0.4*math.Sin(2*math.Pi*50*t+1) + 0.2*math.Sin(2*math.Pi*7000*t) + 0.01*rng.NormFloat64()
		}
		if err := w.WriteFrames(buf[:2*n]); err != nil {
			tb.Fatal(err)
		}
		at += n
	}
	if err := w.Close(); err != nil {
		tb.Fatal(err)
	}
}

// benchSpec is the order-8 elliptic high-pass of the engine benchmarks,
// designed by package design at the file's rate (4 sections).
func benchSpec(zeroPhase bool) design.Spec {
	return design.Spec{ZeroPhase: zeroPhase, Stages: []design.Stage{{
		Family: design.Elliptic, Response: "highpass", Order: 8,
		CutoffHz: design.Edges{100}, RippleDB: 0.5, AttenuationDB: 80,
	}}}
}

// BenchmarkFilterFile10MinStereo24 runs FilterFile, as `wavsieve apply`
// does, over 10 minutes of 48 kHz 24-bit stereo: read, decode, filter
// (causal, or zero-phase with its spill), encode to 24-bit, write,
// sync and rename. "nodither" is the work of
// testdata/apply/bench_apply.py; "dither" adds the default TPDF dither.
// The MB/s are of the input file.
func BenchmarkFilterFile10MinStereo24(b *testing.B) {
	dir := b.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeBenchWAV(b, in, 10*60*48000)
	st, err := os.Stat(in)
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		zeroPhase bool
		noDither  bool
	}{
		{"causal/nodither", false, true},
		{"causal/dither", false, false},
		{"zerophase/nodither", true, true},
		{"zerophase/dither", true, false},
	} {
		b.Run(c.name, func(b *testing.B) {
			job := FileJob{Input: in, Output: filepath.Join(dir, "out.wav"), Spec: benchSpec(c.zeroPhase), NoDither: c.noDither, DitherSeed: 1}
			b.SetBytes(st.Size())
			for b.Loop() {
				if _, err := FilterFile(context.Background(), job); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
