package analyze

import (
	"context"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
)

// NewHumTracker is the process.NewHumTracker of a tracking notch stage:
// the Tracker, its search centred on the stage's fundamental, over the
// harmonics the stage notches (at most 40). The command, the verification
// and the test scenes all filter with it, so they follow one track.
func NewHumTracker(rate float64, channels int, st design.Stage, perChannel bool) (process.HumTracker, error) {
	k := st.Harmonics
	if k == 0 || k > 40 {
		k = 40
	}
	t, err := NewTracker(TrackOptions{SampleRate: rate, Channels: channels, NominalHz: st.FundamentalHz, Harmonics: k, PerChannel: perChannel})
	if err != nil {
		return nil, err
	}
	return humTracker{t}, nil
}

// humTracker adapts a Tracker to process.HumTracker. Its Close frees
// the Tracker's temporary file when the track is not asked for (a pass
// that stops early); after Tracks it does nothing.
type humTracker struct{ t *Tracker }

func (h humTracker) Write(frames []float64) { h.t.Write(frames) }

func (h humTracker) Close() { h.t.Close() }

func (h humTracker) Tracks() ([]process.FrequencyTrack, error) {
	return h.TracksContext(context.Background())
}

// TracksContext is Tracks, stopped when ctx is done (Tracker.ResultContext).
func (h humTracker) TracksContext(ctx context.Context) ([]process.FrequencyTrack, error) {
	tr, err := h.t.ResultContext(ctx)
	if err != nil {
		return nil, err
	}
	out := make([]process.FrequencyTrack, len(tr))
	for i, t := range tr {
		out[i] = t
	}
	return out, nil
}
