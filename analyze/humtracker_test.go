package analyze

import (
	"testing"

	"github.com/wavsieve/wavsieve/design"
)

// TestHumTrackerClose: the tracker a tracking notch is filtered with can
// be closed through the process.HumTracker it is handed out as (a pass
// that stops before asking for the track frees the temporary file at
// once), and closing after Tracks changes nothing.
func TestHumTrackerClose(t *testing.T) {
	const rate = 8000
	st := design.Stage{Family: design.Notch, FundamentalHz: 50, Harmonics: 3, BandwidthHz: 0.5, Tracking: true}
	for _, tc := range []struct {
		name   string
		tracks bool // ask for the track before closing
	}{
		{"closed early", false},
		{"closed after the track", true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			h, err := NewHumTracker(rate, 1, st, false)
			if err != nil {
				t.Fatal(err)
			}
			tk := h.(humTracker).t
			// 40 s: past the first write of the reduced-rate copy to its
			// file where it spills (16384 samples at about 530 Hz for 3
			// harmonics of 50 Hz: 31 s), and long enough to track.
			i := 0
			writeTone(tk, rate, 40, &i, make([]float64, 8192))
			if spillLow && tk.store.files == nil {
				t.Fatal("the tracker has no temporary file yet: nothing to close")
			}
			if tc.tracks {
				if _, err := h.Tracks(); err != nil {
					t.Fatal(err)
				}
			}
			c, ok := h.(interface{ Close() })
			if !ok {
				t.Fatal("the hum tracker cannot be closed")
			}
			c.Close()
			if tk.store.files != nil || tk.store.mem != nil {
				t.Error("closing left the temporary file or the buffers held")
			}
			_, err = h.Tracks()
			if tc.tracks != (err == nil) {
				t.Errorf("Tracks after Close: %v; want the earlier track kept: %v", err, tc.tracks)
			}
		})
	}
}
