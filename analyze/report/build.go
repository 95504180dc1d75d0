package report

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/analyze/plots"
	"github.com/wavsieve/wavsieve/analyze/verify"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/runrecord"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// Options bound the work of building a report.
type Options struct {
	// MaxSeconds of each file are read for its spectra; 0 means 120. The
	// report says when a file was longer.
	MaxSeconds float64
}

func (o Options) maxSeconds() float64 {
	if o.MaxSeconds > 0 {
		return o.MaxSeconds
	}
	return 120
}

// verifyDoc is the verification document of one file.
type verifyDoc struct {
	Pass        bool   `json:"pass"`
	Verdict     string `json:"verdict"`
	NotMeasured bool   `json:"not_measured"`
	Error       string `json:"error"`
	Checks      []struct {
		Channel     int      `json:"channel"`
		FrequencyHz float64  `json:"frequency_hz"`
		Kind        string   `json:"kind"`
		DesignedDB  *float64 `json:"designed_db"`
		// DesignRange is the design across the reading's resolution, the
		// range the verdict used.
		DesignRange *verify.Pair `json:"design_range_db"`
		MeasuredDB  *float64     `json:"measured_db"`
		LimitDB     *float64     `json:"limit_db"`
		MarginDB    *float64     `json:"margin_db"`
		Verdict     string       `json:"verdict"`
		Reason      string       `json:"reason"`
	} `json:"checks"`
}

// FromApply builds the report of an apply run from its JSON manifest.
// dir is the folder relative paths in the manifest are taken from.
func FromApply(manifest []byte, dir string, opt Options) (Report, error) {
	var m runrecord.Record
	if err := json.Unmarshal(manifest, &m); err != nil {
		if errors.Is(err, runrecord.ErrNotRecord) {
			return Report{}, fmt.Errorf("report: %w", err)
		}
		return Report{}, fmt.Errorf("report: the manifest is not valid JSON: %w", err)
	}
	return FromRecord(&m, dir, opt)
}

// FromRecord builds the report of an apply run from its record (read by
// package runrecord). dir is the folder relative paths in the record are
// taken from.
func FromRecord(m *runrecord.Record, dir string, opt Options) (Report, error) {
	spec, err := design.ParseSpec(m.Spec)
	if err != nil && len(m.Files) > 0 && len(m.Files[0].Spec) > 0 {
		spec, err = design.ParseSpec(m.Files[0].Spec)
	}
	if err != nil {
		return Report{}, fmt.Errorf("report: the manifest's spec: %w", err)
	}
	r := Report{Title: "wavsieve filtering report", Runs: []string{fmt.Sprintf("%s filtered with %s", plural(len(m.Files), "file"), specSummary(spec))}}
	for _, st := range spec.Stages {
		if st.Curve != "" {
			r.Notes = append(r.Notes, "These files are weighted ("+st.Curve+"): a weighted level computed from a file is not a sound level meter's or a vibration meter's reading; the microphone or accelerometer, its calibration and the measuring chain are unknown to wavsieve.")
			break
		}
	}
	t := Table{
		Caption: "Run manifest (click a heading to sort)",
		Columns: []string{"input", "output", "status", "rate (Hz)", "channels", "duration (s)", "peak in (dBFS)", "peak out (dBFS)", "clipped", "verified", "seconds", "error"},
		Numeric: []bool{false, false, false, true, true, true, true, true, true, false, true, false},
	}
	for _, f := range m.Files {
		verdict := ""
		var vd verifyDoc
		if len(f.Verify) > 0 && string(f.Verify) != "null" && json.Unmarshal(f.Verify, &vd) == nil {
			// The three words of verification: pass (every edge measured
			// and passed), fail, inconclusive. A document without a
			// verdict (older manifests) is judged from its checks, so that
			// no pass is shown over unmeasured edges.
			switch {
			case vd.Verdict != "":
				verdict = vd.Verdict
			case vd.NotMeasured:
				verdict = verify.Inconclusive
			default:
				cs := make([]verify.Check, len(vd.Checks))
				for i, c := range vd.Checks {
					cs[i] = verify.Check{Kind: c.Kind, Verdict: c.Verdict}
				}
				verdict = verify.RunVerdict(cs)
			}
		}
		t.Rows = append(t.Rows, []string{
			f.Input, f.Output, f.Status, strconv.Itoa(f.SampleRate), strconv.Itoa(f.Channels), fmt.Sprintf("%.3f", f.DurationS),
			fmtMax(f.PeakInDBFS), fmtMax(f.PeakOutDBFS), strconv.FormatInt(sumInts(f.Clipped), 10), verdict, fmt.Sprintf("%.2f", f.Seconds), f.Error,
		})
		t.RowClass = append(t.RowClass, f.Status)

		sec := File{Heading: filepath.Base(f.Input), Status: f.Status}
		if f.Status != "done" {
			sec.Error = f.Error
			if sec.Error == "" {
				sec.Error = "no output"
			}
			r.Files = append(r.Files, sec)
			continue
		}
		mode := "causal"
		if f.ZeroPhase {
			mode = "zero-phase (forward-backward)"
		}
		sec.Facts = [][2]string{
			{"input", f.Input}, {"output", f.Output}, {"format", f.Format + " → " + f.OutFormat},
			{"duration", fmt.Sprintf("%.3f s (%d frames)", f.DurationS, f.Frames)}, {"filtering", mode},
			{"peak in / out", fmtList(f.PeakInDBFS) + " / " + fmtList(f.PeakOutDBFS) + " dBFS"},
			{"clipped samples", fmtCounts(f.Clipped)}, {"time taken", fmt.Sprintf("%.2f s", f.Seconds)},
		}
		if f.ZeroPhase {
			sec.Facts = append(sec.Facts, [2]string{"end padding", fmt.Sprintf("%d frames at each end; %d frames of transient may remain", f.PadFrames, f.EdgeTransient)})
		}
		for _, w := range f.Warnings {
			sec.Facts = append(sec.Facts, [2]string{"warning", w})
		}
		if sumInts(f.Clipped) > 0 {
			sec.Facts = append(sec.Facts, [2]string{"caution", "the output clipped; lower the level or write float"})
		}
		in, out := resolve(dir, f.Input), resolve(dir, f.Output)
		if svg, note, err := beforeAfter(in, out, opt); err != nil {
			sec.Facts = append(sec.Facts, [2]string{"spectra", "not drawn: " + err.Error()})
		} else {
			sec.Plots = append(sec.Plots, Plot{Caption: "Welch PSD averaged over channels, input and output, with 95% confidence bands; the lower panel is output minus input. " + note, SVG: svg})
		}
		fileSpec := spec
		if len(f.Spec) > 0 {
			if sp, err := design.ParseSpec(f.Spec); err == nil {
				fileSpec = sp
			}
		}
		if len(f.TrackRangeHz) == 2 {
			fact := fmt.Sprintf("the notches followed %.3f-%.3f Hz", f.TrackRangeHz[0], f.TrackRangeHz[1])
			if f.TrackPerChannel {
				fact += ", each channel along its own track"
			}
			sec.Facts = append(sec.Facts, [2]string{"hum track", fact})
			if svg, note, err := humTrackPlot(in, out, fileSpec, opt); err != nil {
				sec.Facts = append(sec.Facts, [2]string{"hum track plot", "not drawn: " + err.Error()})
			} else {
				if f.TrackPerChannel {
					note += " The run tracked each channel on its own; this plot shows one track measured from all channels."
				}
				sec.Plots = append(sec.Plots, Plot{Caption: note, SVG: svg})
			}
		}
		if filt, err := design.Design(fileSpec, float64(f.SampleRate)); err == nil {
			var b bytes.Buffer
			if err := plots.Design(filt, &b, "svg", plots.DesignOptions{}); err == nil {
				key, _ := json.Marshal(fileSpec)
				sec.Plots = append(sec.Plots, Plot{Caption: fmt.Sprintf("The filter as designed at this file's %d Hz rate: magnitude with the spec's forbidden areas, phase, group delay and poles and zeros.", f.SampleRate), SVG: b.Bytes(),
					Key: fmt.Sprintf("design %s at %d Hz", key, f.SampleRate)})
			}
		}
		if vd.Error != "" {
			sec.Facts = append(sec.Facts, [2]string{"verification", vd.Error})
		}
		if verdict != "" && len(vd.Checks) > 0 {
			t := Table{Caption: "Verification (measured transfer magnitude against the design and the spec): " + verdict,
				Columns: []string{"channel", "frequency (Hz)", "check", "designed (dB)", "measured (dB)", "limit (dB)", "margin (dB)", "verdict", "note"},
				Numeric: []bool{true, true, false, true, true, true, true, false, false}}
			seen := map[string]bool{}
			for _, c := range vd.Checks {
				ch := ""
				if c.Channel > 0 {
					ch = strconv.Itoa(c.Channel)
				}
				row := []string{ch, fmtHz(c.FrequencyHz), c.Kind, designedCell(c.DesignedDB, c.DesignRange), fmtPtr(c.MeasuredDB), fmtPtr(c.LimitDB), fmtPtr(c.MarginDB), c.Verdict, unitSpelling.Replace(c.Reason)}
				if k := strings.Join(row, "\x00"); seen[k] {
					continue
				} else {
					seen[k] = true
				}
				t.Rows = append(t.Rows, row)
				t.RowClass = append(t.RowClass, c.Verdict)
			}
			sec.Tables = append(sec.Tables, t)
		}
		r.Files = append(r.Files, sec)
	}
	r.Tables = []Table{t}
	return r, nil
}

// surveyDoc is the part of a survey document a report uses.
type surveyDoc struct {
	Files []struct {
		Path       string  `json:"path"`
		SampleRate float64 `json:"sample_rate_hz"`
		Channels   int     `json:"channels"`
		DurationS  float64 `json:"duration_s"`
		Error      string  `json:"error"`
		Hum        *struct {
			Fundamental float64 `json:"fundamental_hz"`
			Drift       float64 `json:"drift_hz"`
			Harmonics   []struct {
				FrequencyHz  float64 `json:"frequency_hz"`
				AboveFloorDB float64 `json:"above_floor_db"`
			} `json:"harmonics"`
		} `json:"hum"`
		Spec json.RawMessage `json:"suggested_spec"`
	} `json:"files"`
}

// FromSurvey builds the report of a survey from its JSON document.
func FromSurvey(doc []byte, dir string, opt Options) (Report, error) {
	var s surveyDoc
	if err := json.Unmarshal(doc, &s); err != nil {
		return Report{}, fmt.Errorf("report: the survey is not valid JSON: %w", err)
	}
	r := Report{Title: "wavsieve hum and rumble survey", Runs: []string{"survey of " + plural(len(s.Files), "file")}}
	t := Table{Caption: "Files surveyed (click a heading to sort)",
		Columns: []string{"file", "rate (Hz)", "channels", "duration (s)", "hum (Hz)", "drift (Hz)", "harmonics above floor", "error"},
		Numeric: []bool{false, true, true, true, true, true, true, false}}
	for _, f := range s.Files {
		hum, drift, nh := "none", "", "0"
		if f.Hum != nil {
			hum, drift, nh = fmt.Sprintf("%.3f", f.Hum.Fundamental), fmt.Sprintf("%.3f", f.Hum.Drift), strconv.Itoa(len(f.Hum.Harmonics))
		}
		t.Rows = append(t.Rows, []string{f.Path, fmtHz(f.SampleRate), strconv.Itoa(f.Channels), fmt.Sprintf("%.3f", f.DurationS), hum, drift, nh, f.Error})
		status := "done"
		if f.Error != "" {
			status = "failed"
		}
		t.RowClass = append(t.RowClass, status)
		sec := File{Heading: filepath.Base(f.Path), Status: status, Error: f.Error}
		if f.Error != "" {
			r.Files = append(r.Files, sec)
			continue
		}
		sec.Facts = [][2]string{{"file", f.Path}, {"rate", fmtHz(f.SampleRate) + " Hz"}, {"channels", strconv.Itoa(f.Channels)}, {"duration", fmt.Sprintf("%.3f s", f.DurationS)}, {"mains hum", hum + " Hz"}}
		if f.Hum != nil {
			sec.Facts = append(sec.Facts, [2]string{"drift", drift + " Hz"})
			t := Table{Caption: "Hum harmonics standing above the local noise floor", Columns: []string{"frequency (Hz)", "above floor (dB)"}, Numeric: []bool{true, true}}
			for _, h := range f.Hum.Harmonics {
				t.Rows = append(t.Rows, []string{fmt.Sprintf("%.3f", h.FrequencyHz), fmt.Sprintf("%.1f", h.AboveFloorDB)})
			}
			sec.Tables = append(sec.Tables, t)
		}
		path := resolve(dir, f.Path)
		if svg, note, err := beforeAfter(path, "", opt); err == nil {
			sec.Plots = append(sec.Plots, Plot{Caption: "Welch PSD averaged over channels with its 95% confidence band. " + note, SVG: svg})
		}
		if len(f.Spec) > 0 && string(f.Spec) != "null" {
			var pretty bytes.Buffer
			json.Indent(&pretty, f.Spec, "", "  ")
			sec.Code, sec.CodeName = pretty.String(), "Suggested spec, ready for wavsieve apply --spec"
			if spec, err := design.ParseSpec(f.Spec); err == nil {
				if filt, err := design.Design(spec, f.SampleRate); err == nil {
					var b bytes.Buffer
					if plots.Design(filt, &b, "svg", plots.DesignOptions{}) == nil {
						sec.Plots = append(sec.Plots, Plot{Caption: "The suggested filter as designed at this file's rate.", SVG: b.Bytes()})
					}
				}
			}
		}
		r.Files = append(r.Files, sec)
	}
	r.Tables = []Table{t}
	return r, nil
}

// beforeAfter draws the channel-averaged PSD of in (and of out, if given).
func beforeAfter(in, out string, opt Options) ([]byte, string, error) {
	x, rate, cut, err := readPlanar(in, opt.maxSeconds())
	if err != nil {
		return nil, "", err
	}
	seg := 1 << 14
	for seg > 256 && float64(seg) > rate/2 {
		seg >>= 1 // about 2 Hz resolution or finer, but no longer than needed
	}
	for seg > 16 && seg > len(x[0])/4 {
		seg >>= 1
	}
	o := analyze.DefaultOptions(rate)
	o.Segment, o.Overlap = seg, seg/2
	est, err := analyze.NewEstimator(o)
	if err != nil {
		return nil, "", err
	}
	sp := plots.SpectrumPlot{Title: filepath.Base(in), YLabel: "PSD (dBFS²/Hz)"}
	add := func(name string, ch [][]float64) error {
		res, err := est.Spectra(ch)
		if err != nil {
			return err
		}
		mean := make([]float64, len(res.Frequencies))
		for _, c := range res.Channels {
			for i, v := range c {
				mean[i] += v / float64(len(res.Channels))
			}
		}
		s := plots.SpectrumSeries{Name: name, DB: make([]float64, len(mean)), LowerDB: make([]float64, len(mean)), UpperDB: make([]float64, len(mean))}
		for i, v := range mean {
			s.DB[i] = 10 * math.Log10(math.Max(v, 1e-30))
			if iv, err := est.Confidence(len(ch[0]), i, 0.95); err == nil {
				s.LowerDB[i], s.UpperDB[i] = s.DB[i]+iv.LowDB(), s.DB[i]+iv.HighDB()
			}
		}
		sp.FrequenciesHz = res.Frequencies
		sp.Series = append(sp.Series, s)
		return nil
	}
	if err := add("input", x); err != nil {
		return nil, "", err
	}
	if out != "" {
		y, _, _, err := readPlanar(out, opt.maxSeconds())
		if err != nil {
			return nil, "", err
		}
		if err := add("output", y); err != nil {
			return nil, "", err
		}
		sp.Title = filepath.Base(in) + ": before and after"
	}
	var b bytes.Buffer
	if err := plots.Spectrum(&b, "svg", sp); err != nil {
		return nil, "", err
	}
	note := fmt.Sprintf("Segments of %d samples (%.3g Hz resolution), Hann window, 50%% overlap.", seg, rate/float64(seg))
	if cut {
		note += fmt.Sprintf(" Only the first %g s were analysed.", opt.maxSeconds())
	}
	return b.Bytes(), note, nil
}

// readPlanar reads up to maxS seconds of a WAV file as planar channels.
func readPlanar(name string, maxS float64) ([][]float64, float64, bool, error) {
	r, err := wavio.Open(name, &wavio.ReaderOptions{AllowNonFinite: true})
	if err != nil {
		return nil, 0, false, err
	}
	defer r.Close()
	f := r.Format()
	limit := int64(maxS * float64(f.SampleRate))
	n := r.Frames()
	cut := n > limit
	if cut {
		n = limit
	}
	ch := make([][]float64, f.Channels)
	for c := range ch {
		ch[c] = make([]float64, 0, n)
	}
	buf := make([]float64, 8192*f.Channels)
	for int64(len(ch[0])) < n {
		k, err := r.ReadFrames(buf)
		for i := 0; i < k && int64(len(ch[0])) < n; i++ {
			for c := range ch {
				v := buf[i*f.Channels+c]
				if math.IsNaN(v) || math.IsInf(v, 0) {
					v = 0
				}
				ch[c] = append(ch[c], v)
			}
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, 0, false, err
		}
	}
	if len(ch[0]) < 64 {
		return nil, 0, false, fmt.Errorf("%s: too short for a spectrum (%d frames)", name, len(ch[0]))
	}
	return ch, float64(f.SampleRate), cut, nil
}

func resolve(dir, p string) string {
	if filepath.IsAbs(p) || dir == "" {
		return p
	}
	return filepath.Join(dir, p)
}

func specSummary(s design.Spec) string {
	hz := func(e design.Edges) string {
		v := make([]string, len(e))
		for i, x := range e {
			v[i] = strconv.FormatFloat(x, 'g', 6, 64)
		}
		return strings.Join(v, "-") + " Hz"
	}
	var parts []string
	for _, st := range s.Stages {
		switch {
		case st.Curve != "":
			parts = append(parts, "weighting "+st.Curve)
		case st.Family == design.Notch:
			width := fmt.Sprintf("%g Hz wide", st.BandwidthHz)
			if st.Q > 0 {
				width = fmt.Sprintf("q %g", st.Q)
			}
			which := "harmonics"
			if st.OddOnly {
				which = "odd harmonics"
			}
			upTo := fmt.Sprintf("up to number %d", st.Harmonics)
			if st.Harmonics == 0 {
				upTo = fmt.Sprintf("below %g Hz", float64(design.DefaultNotchLimitHz))
			}
			parts = append(parts, fmt.Sprintf("notches at %g Hz and its %s %s, %s", st.FundamentalHz, which, upTo, width))
		case st.Order > 0:
			parts = append(parts, fmt.Sprintf("%s %s of order %d at %s", st.Family, st.Response, st.Order, hz(st.CutoffHz)))
		case len(st.PassbandHz) > 0:
			parts = append(parts, fmt.Sprintf("%s %s: passband %s within %g dB, stopband %s down %g dB", st.Family, st.Response, hz(st.PassbandHz), st.RippleDB, hz(st.StopbandHz), st.AttenuationDB))
		default:
			parts = append(parts, st.Family)
		}
	}
	out := strings.Join(parts, ", then ")
	if s.ZeroPhase {
		out += ", zero-phase"
	}
	return out
}

func sumInts(v []int64) int64 {
	var s int64
	for _, x := range v {
		s += x
	}
	return s
}

func fmtMax(v []float64) string {
	if len(v) == 0 {
		return ""
	}
	m := v[0]
	for _, x := range v {
		m = math.Max(m, x)
	}
	return fmt.Sprintf("%.2f", m)
}

func fmtList(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = fmt.Sprintf("%.2f", x)
	}
	return strings.Join(s, ", ")
}

// fmtCounts writes per-channel counts as "0, 12" (one per channel, like
// the peaks beside them), never as a Go slice.
func fmtCounts(v []int64) string {
	if len(v) == 0 {
		return "0"
	}
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatInt(x, 10)
	}
	return strings.Join(s, ", ")
}

func fmtPtr(v *float64) string {
	if v == nil {
		return "—"
	}
	return fmt.Sprintf("%.2f", *v)
}

// unitSpelling writes the units of levels one way on the page: dBFS²/Hz
// for a density level, FS²/Hz for a density.
var unitSpelling = strings.NewReplacer("dB re FS^2/Hz", "dBFS²/Hz", "dBFS^2/Hz", "dBFS²/Hz", "FS^2/Hz", "FS²/Hz", "FS^2", "FS²")

func fmtHz(v float64) string { return strconv.FormatFloat(v, 'g', 7, 64) }

// plural writes a count with its noun: "1 file", "3 files".
func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// designedCell is the designed response with the design range the
// verdict used, when that range is wider than the printed value.
func designedCell(d *float64, r *verify.Pair) string {
	v := fmtPtr(d)
	if r == nil || math.IsInf(r[0], 0) && math.IsInf(r[1], 0) {
		return v
	}
	lo, hi := fmt.Sprintf("%.2f", r[0]), fmt.Sprintf("%.2f", r[1])
	if math.IsInf(r[0], -1) {
		lo = "-inf"
	}
	if lo == hi {
		return v
	}
	return v + " (" + lo + ".." + hi + ")"
}
