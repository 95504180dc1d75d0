package wavio_test

import (
	"fmt"
	"io"
	"log"
	"os"
	"path/filepath"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// Copy a WAV file block by block, halving the level, keeping its format
// and metadata, and noting the step in the bext coding history.
func Example() {
	dir, err := os.MkdirTemp("", "wavio-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	in, out := "../../testdata/wav/go-audio/bwf.wav", filepath.Join(dir, "out.wav")

	if same, err := wavio.SameFile(in, out); err != nil || same {
		log.Fatal("refusing to overwrite the input")
	}
	r, err := wavio.Open(in, nil)
	if err != nil {
		log.Fatal(err)
	}
	defer r.Close()
	w, err := wavio.Create(out, wavio.WriterOptions{Format: r.Format(), Chunks: r.Chunks(), DitherSeed: 1})
	if err != nil {
		log.Fatal(err)
	}
	defer w.Abort() // removes the temporary file unless Close succeeded
	if err := w.AppendCodingHistory(wavio.CodingHistoryLine(r.Format(), "wavsieve gain -6 dB")); err != nil {
		log.Fatal(err)
	}
	buf := make([]float64, 1024*r.Format().Channels)
	for {
		n, err := r.ReadFrames(buf)
		block := buf[:n*r.Format().Channels]
		for i := range block {
			block[i] *= 0.5
		}
		if werr := w.WriteFrames(block); werr != nil {
			log.Fatal(werr)
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			log.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		log.Fatal(err)
	}
	fmt.Println(r.Format(), w.Frames(), "frames, clipped", w.Clipped())
	// Output: 44100 Hz, 1 ch, 24-bit pcm 7287 frames, clipped [0]
}
