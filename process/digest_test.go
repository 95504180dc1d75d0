package process

import (
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// TestDesignDigestTrackPerChannel: a tracking notch that follows each
// channel's own track makes other samples than one shared track, so an
// output made one way is not skipped as done by a run asked for the
// other; where it changes nothing (one channel, no tracking stage) the
// digest stays the same.
func TestDesignDigestTrackPerChannel(t *testing.T) {
	notch := design.Stage{Family: design.Notch, FundamentalHz: 50, Harmonics: 3, BandwidthHz: 0.5}
	tracking := notch
	tracking.Tracking = true
	for _, tc := range []struct {
		name     string
		stage    design.Stage
		channels int
		differ   bool
	}{
		{"tracking, two channels", tracking, 2, true},
		{"tracking, one channel", tracking, 1, false},
		{"fixed notch, two channels", notch, 2, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			spec := design.Spec{Stages: []design.Stage{tc.stage}}
			f, err := design.Design(spec, 8000)
			if err != nil {
				t.Fatal(err)
			}
			out := wavio.Format{SampleRate: 8000, Channels: tc.channels, Bits: 32, Encoding: wavio.Float}
			shared := FileJob{Spec: spec}
			own := FileJob{Spec: spec, TrackPerChannel: true}
			if d1, d2 := shared.DesignDigest(f, out), own.DesignDigest(f, out); (d1 != d2) != tc.differ {
				t.Errorf("shared %s, per channel %s: want them to differ: %v", d1, d2, tc.differ)
			}
		})
	}
}
