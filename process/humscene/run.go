package humscene

import (
	"context"
	"errors"
	"io"
	"path/filepath"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// WriteWAV writes mono samples as a float WAV file of 32 or 64 bits.
func WriteWAV(name string, x []float64, rate float64, bits int) error {
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: int(rate), Channels: 1, Bits: bits, Encoding: wavio.Float}})
	if err != nil {
		return err
	}
	if err := w.WriteFrames(x); err != nil {
		w.Abort()
		return err
	}
	return w.Close()
}

// ReadWAV reads a mono WAV file.
func ReadWAV(name string) ([]float64, error) {
	r, err := wavio.Open(name, nil)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	x := make([]float64, r.Frames()*int64(r.Format().Channels))
	n := 0
	for n < len(x) {
		m, err := r.ReadFrames(x[n:])
		n += m * r.Format().Channels
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, err
		}
	}
	return x[:n], nil
}

// Filter runs the spec over x through process.FilterFile (files in dir,
// 64-bit float output) and returns the output and the file's result.
func Filter(dir, name string, x []float64, rate float64, spec design.Spec, tracker process.NewHumTracker) ([]float64, process.FileResult, error) {
	in := filepath.Join(dir, name+".wav")
	out := filepath.Join(dir, name+"-out.wav")
	if err := WriteWAV(in, x, rate, 64); err != nil {
		return nil, process.FileResult{}, err
	}
	res, err := process.FilterFile(context.Background(), process.FileJob{Input: in, Output: out, Spec: spec, NewTracker: tracker})
	if err != nil {
		return nil, res, err
	}
	y, err := ReadWAV(out)
	return y, res, err
}

// Tracker is the process.NewHumTracker the command filters with.
var Tracker process.NewHumTracker = analyze.NewHumTracker

// Recorder wraps Tracker and keeps the tracks it measured, so that the
// twin can be filtered with the very same track (Replay): the two runs
// are then one linear time-varying filter, and half their sum and half
// their difference separate exactly what the hum and what the wanted
// sound drive.
type Recorder struct{ Tracks []process.FrequencyTrack }

// New is the process.NewHumTracker that records.
func (r *Recorder) New(rate float64, channels int, st design.Stage, perChannel bool) (process.HumTracker, error) {
	t, err := Tracker(rate, channels, st, perChannel)
	if err != nil {
		return nil, err
	}
	return recording{t, r}, nil
}

type recording struct {
	process.HumTracker
	r *Recorder
}

func (h recording) Tracks() ([]process.FrequencyTrack, error) {
	tr, err := h.HumTracker.Tracks()
	h.r.Tracks = tr
	return tr, err
}

// Replay is the process.NewHumTracker that returns the recorded tracks.
func (r *Recorder) Replay(float64, int, design.Stage, bool) (process.HumTracker, error) {
	return replay{r.Tracks}, nil
}

type replay struct{ t []process.FrequencyTrack }

func (replay) Write([]float64)                             {}
func (r replay) Tracks() ([]process.FrequencyTrack, error) { return r.t, nil }
