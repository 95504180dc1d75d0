package main

import (
	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
)

// humTracker adapts analyze.Tracker to process.HumTracker.
type humTracker struct{ t *analyze.Tracker }

func (h humTracker) Write(frames []float64) { h.t.Write(frames) }

func (h humTracker) Tracks() ([]process.FrequencyTrack, error) {
	tr, err := h.t.Result()
	if err != nil {
		return nil, err
	}
	out := make([]process.FrequencyTrack, len(tr))
	for i, t := range tr {
		out[i] = t
	}
	return out, nil
}

// newHumTracker is the process.NewHumTracker of the command: the search
// is centred on the stage's fundamental, over the harmonics it notches
// (at most analyze's limit).
func newHumTracker(rate float64, channels int, st design.Stage, perChannel bool) (process.HumTracker, error) {
	k := st.Harmonics
	if k == 0 || k > 40 {
		k = 40
	}
	t, err := analyze.NewTracker(analyze.TrackOptions{SampleRate: rate, Channels: channels, NominalHz: st.FundamentalHz, Harmonics: k, PerChannel: perChannel})
	if err != nil {
		return nil, err
	}
	return humTracker{t}, nil
}
