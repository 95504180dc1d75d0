// Command gen writes the test file of testdata/apply/bench_apply.sh: a
// 24-bit stereo WAV at 48 kHz, by default 10 minutes long, with a DC
// offset, mains-like tones and seeded noise in each channel; the signal
// of process.BenchmarkFilterFile10MinStereo24.
//
//	go run ./testdata/apply/gen -o /tmp/bench-10min.wav [-minutes 10]
package main

import (
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"

	"github.com/wavsieve/wavsieve/process/wavio"
)

func main() {
	out := flag.String("o", "", "output `file`")
	minutes := flag.Float64("minutes", 10, "length in `minutes`")
	flag.Parse()
	if *out == "" {
		fmt.Fprintln(os.Stderr, "gen: -o is required")
		os.Exit(2)
	}
	if err := write(*out, int(*minutes*60*48000)); err != nil {
		fmt.Fprintln(os.Stderr, "gen:", err)
		os.Exit(1)
	}
}

func write(name string, frames int) error {
	w, err := wavio.Create(name, wavio.WriterOptions{
		Format:   wavio.Format{SampleRate: 48000, Channels: 2, Bits: 24, Encoding: wavio.PCM},
		NoDither: true,
	})
	if err != nil {
		return err
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
			return err
		}
		at += n
	}
	return w.Close()
}
