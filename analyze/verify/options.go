package verify

import (
	"fmt"

	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// Options are the settings of a verification. The zero value checks every
// channel with per-check segment lengths at Level.
type Options struct {
	// Channels lists the channels to check, counted from 0; nil checks
	// all of them.
	Channels []int
	// Segment, if not 0, is the segment length (a power of two of at least
	// 8) of every reading, instead of one chosen per check.
	Segment int
	// Level is the confidence level of the intervals (0: Level).
	Level float64
	// In and Out are the sample formats of the run's input and output,
	// whose quantisation floors bound what can be measured. A zero Format
	// (no bits) is taken as float64, whose floor is negligible.
	In, Out wavio.Format
	// Tone marks a session fed with a steady tone at each check's
	// frequency (see ToneProbe): the reading is then exactly at the tone,
	// and the resolution and leakage rules of broadband signals do not
	// apply.
	Tone bool
	// MaxSegments caps the segments averaged per check (0: MaxSegments).
	MaxSegments int
	// Tracks is the hum's track of a run with a tracking notch stage
	// (process.MeasureTrack: one shared by all channels, or one per
	// channel); its notch centres are read along it, each channel's
	// along its own when there is one per channel. When Tracks is nil,
	// Files measures it with NewTracker, one track per channel with
	// TrackPerChannel (as apply --track-per-channel filtered), and the
	// Observer takes the run's own (process.FileJob.MeasuredTracks, with
	// the job's TrackPerChannel); without a track the centres come out
	// unmeasurable. Result.TrackPerChannel says which was read.
	Tracks          []process.FrequencyTrack
	NewTracker      process.NewHumTracker
	TrackPerChannel bool
}

func (o Options) level() float64 {
	if o.Level > 0 && o.Level < 1 {
		return o.Level
	}
	return Level
}

func (o Options) maxSegments() int {
	if o.MaxSegments > 0 {
		return o.MaxSegments
	}
	return MaxSegments
}

func (o Options) validate(channels int) error {
	if o.Segment != 0 && (o.Segment < 8 || o.Segment&(o.Segment-1) != 0) {
		return fmt.Errorf("verify: %w: segment %d: give a power of two of at least 8", ErrInvalidOption, o.Segment)
	}
	if o.Level != 0 && !(o.Level > 0 && o.Level < 1) {
		return fmt.Errorf("verify: %w: confidence level %g outside (0, 1)", ErrInvalidOption, o.Level)
	}
	for _, c := range o.Channels {
		if c < 0 || c >= channels {
			return fmt.Errorf("verify: %w: channel %d: the file has %d channels", ErrInvalidOption, c+1, channels)
		}
	}
	return nil
}
