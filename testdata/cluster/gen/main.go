// Command gen writes the recordings of testdata/cluster/slurm_check.sh: n
// short 24-bit WAV files at mixed sample rates (8 to 96 kHz, mono and
// stereo), each with a DC offset, a mains-like tone with harmonics,
// rumble and seeded noise, in the invented scenario of samples/README.md
// (the loggers of the Reedmere survey). The same flags give the same
// bytes. With -frames every file holds the same number of frames (its
// length in seconds then depends on its rate), so that shares of equal
// file count are equal work whatever rates they draw.
//
//	go run ./testdata/cluster/gen -dir /tmp/archive [-n 24] [-seconds 6 | -frames 1920000]
package main

import (
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"

	"github.com/wavsieve/wavsieve/process/wavio"
)

var rates = []int{48000, 44100, 96000, 16000, 22050, 32000, 8000, 24000}

func main() {
	dir := flag.String("dir", "", "output `folder`")
	n := flag.Int("n", 24, "number of files")
	seconds := flag.Float64("seconds", 6, "length of each file in `seconds`")
	frames := flag.Int("frames", 0, "length of each file in `frames`, whatever its rate (instead of -seconds)")
	flag.Parse()
	if *dir == "" || *n < 1 || *seconds <= 0 {
		fmt.Fprintln(os.Stderr, "gen: give -dir, and -n and -seconds above 0")
		os.Exit(2)
	}
	for i := 0; i < *n; i++ {
		rate := rates[i%len(rates)]
		// Files in two sub-folders, so that the outputs mirror a tree.
		name := filepath.Join(*dir, fmt.Sprintf("logger-%d", i%2+1), fmt.Sprintf("reedmere-%02d-%dk.wav", i, rate/1000))
		length := int(*seconds * float64(rate))
		if *frames > 0 {
			length = *frames
		}
		if err := write(name, rate, 1+i%2, length, uint64(i)); err != nil {
			fmt.Fprintln(os.Stderr, "gen:", err)
			os.Exit(1)
		}
	}
}

func write(name string, rate, ch, frames int, seed uint64) error {
	if err := os.MkdirAll(filepath.Dir(name), 0o755); err != nil {
		return err
	}
	w, err := wavio.Create(name, wavio.WriterOptions{
		Format:   wavio.Format{SampleRate: rate, Channels: ch, Bits: 24, Encoding: wavio.PCM},
		NoDither: true,
	})
	if err != nil {
		return err
	}
	defer w.Abort()
	rng := rand.New(rand.NewPCG(seed, 7))
	buf := make([]float64, ch*4096)
	hum := 50 + 0.02*float64(seed%5)
	for at := 0; at < frames; {
		m := min(4096, frames-at)
		for i := 0; i < m; i++ {
			t := float64(at+i) / float64(rate)
			for c := 0; c < ch; c++ {
				v := 0.05 + 0.2*math.Sin(2*math.Pi*hum*t+float64(c)) + 0.05*math.Sin(2*math.Pi*3*hum*t) +
					0.1*math.Sin(2*math.Pi*4*t) + 0.05*rng.NormFloat64()
				buf[ch*i+c] = v
			}
		}
		if err := w.WriteFrames(buf[:ch*m]); err != nil {
			return err
		}
		at += m
	}
	return w.Close()
}
