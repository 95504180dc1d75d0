package report

import (
	"bytes"
	"fmt"
	"math"
	"math/cmplx"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/analyze/plots"
	"github.com/wavsieve/wavsieve/design"
)

// humBlockS is the block in which the report measures the hum's level.
const humBlockS = 1.0

// humTrackPlot measures, for a run with a tracking notch, the hum's
// track in the input (as the run did) and the hum's level at the tracked
// harmonics in 1 s blocks of the input and the output (each harmonic
// mixed down along the track's phase, Hann window, the powers summed over
// the harmonics and averaged over the channels), and draws both.
func humTrackPlot(in, out string, spec design.Spec, opt Options) ([]byte, string, error) {
	hp, err := humTrackLevels(in, out, spec, opt)
	if err != nil {
		return nil, "", err
	}
	var buf bytes.Buffer
	if err := plots.HumTrack(&buf, "svg", hp); err != nil {
		return nil, "", err
	}
	return buf.Bytes(), hp.Note, nil
}

// humTrackLevels measures what humTrackPlot draws.
func humTrackLevels(in, out string, spec design.Spec, opt Options) (plots.HumTrackPlot, error) {
	var st *design.Stage
	for i := range spec.Stages {
		if spec.Stages[i].Tracking {
			st = &spec.Stages[i]
		}
	}
	if st == nil {
		return plots.HumTrackPlot{}, fmt.Errorf("the spec has no tracking notch")
	}
	x, rate, cut, err := readPlanar(in, opt.maxSeconds())
	if err != nil {
		return plots.HumTrackPlot{}, err
	}
	y, _, _, err := readPlanar(out, opt.maxSeconds())
	if err != nil {
		return plots.HumTrackPlot{}, err
	}
	ch, n := len(x), len(x[0])
	k := st.Harmonics
	if k == 0 || k > 40 {
		k = 40
	}
	tk, err := analyze.NewTracker(analyze.TrackOptions{SampleRate: rate, Channels: ch, NominalHz: st.FundamentalHz, Harmonics: k})
	if err != nil {
		return plots.HumTrackPlot{}, err
	}
	frame := make([]float64, 0, 4096*ch)
	for i := 0; i < n; i++ {
		for c := 0; c < ch; c++ {
			frame = append(frame, x[c][i])
		}
		if len(frame) == cap(frame) || i == n-1 {
			tk.Write(frame)
			frame = frame[:0]
		}
	}
	tracks, err := tk.Result()
	if err != nil {
		return plots.HumTrackPlot{}, err
	}
	tr := tracks[0]
	// The track's phase at every sample, in cycles.
	cyc := make([]float64, n)
	acc := 0.0
	for i := range cyc {
		cyc[i] = acc
		acc += tr.At((float64(i)+0.5)/rate) / rate
	}
	bl := int(humBlockS * rate)
	win := make([]float64, bl)
	wsum := 0.0
	for i := range win {
		win[i] = 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/float64(bl))
		wsum += win[i]
	}
	level := func(sig [][]float64, b int) float64 {
		p := 0.0
		for _, s := range sig {
			for _, h := range tr.Harmonics {
				var z complex128
				for j := 0; j < bl; j++ {
					i := b*bl + j
					z += complex(win[j]*s[i], 0) * cmplx.Rect(1, -2*math.Pi*float64(h)*cyc[i])
				}
				a := 2 * cmplx.Abs(z) / wsum // amplitude of the harmonic
				p += a * a / 2
			}
		}
		return 10 * math.Log10(math.Max(p/float64(len(sig)), 1e-30))
	}
	hp := plots.HumTrackPlot{Title: filepath.Base(in) + ": the tracked hum"}
	for i, hz := range tr.Hz {
		hp.TimesS = append(hp.TimesS, float64(i)*tr.HopS)
		hp.Hz = append(hp.Hz, hz)
	}
	for b := 0; (b+1)*bl <= n && (b+1)*bl <= len(y[0]); b++ {
		hp.BlockTimesS = append(hp.BlockTimesS, (float64(b)+0.5)*humBlockS)
		hp.InDB = append(hp.InDB, level(x, b))
		hp.OutDB = append(hp.OutDB, level(y, b))
	}
	lo, hi := tr.Range()
	harm := make([]string, len(tr.Harmonics))
	for i, h := range tr.Harmonics {
		harm[i] = strconv.Itoa(h)
	}
	// "harmonics 1,2,3", as survey prints them, never a Go slice.
	note := fmt.Sprintf("Track of the input measured again for the report (%.3f-%.3f Hz, harmonics %s); hum level in 1 s blocks at those harmonics along the track, input and output.", lo, hi, strings.Join(harm, ","))
	if cut {
		note += fmt.Sprintf(" Only the first %g s were analysed.", opt.maxSeconds())
	}
	hp.Note = note
	return hp, nil
}
