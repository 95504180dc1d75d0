package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/analyze/plots"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// bandsCaution is printed by --help and carried in every bands document.
const bandsCaution = `Band levels computed from a file are not the reading of a class 1
instrument. The band filters meet the class 1 mask of IEC 61260-1, but
the transducer, the recorder, the calibration and everything the file went
through are outside what wavsieve can check: the levels are class 1 only
if the whole chain is. Use them as engineering estimates, and rely on a
calibrated instrument and local rules wherever a measurement counts.`

const bandsHelp = `Measure octave or fractional-octave band levels of WAV files.

Usage:
  wavsieve bands [flags] <file|folder|pattern>...

For each file and channel: the equivalent level over the whole file in
every band of the IEC 61260-1 base-10 series (G = 10^(3/10), mid-bands
1000 G^(x/b) Hz), and the overall level of the channel. The bands run
from --from (default 16 Hz for octaves, 12.5 Hz otherwise) up to the
highest band whose upper edge lies below 0.45 of the file's rate, or to
--to. Each band filter is a Butterworth band-pass, in second-order
sections, of the lowest order whose response at the file's rate lies
inside the class 1 mask of IEC 61260-1:2014 (Table 1). The lower bands
run on the signal decimated by octaves, behind an anti-alias low-pass.

With --interval SECONDS the levels are also given over consecutive
stretches of that length, as rows (the last may be shorter). The band
filters delay and smear what they pass (the 25 Hz third by about a tenth
of a second), so a short event shows in the low bands a little later than
in the high ones.

Units: by default levels are in dB re full scale, where a full-scale sine
reads -3.01 dB. A calibration turns them into physical levels, re the
ISO 1683 references (20 uPa for sound pressure, 1e-6 m/s^2 for
acceleration, 1e-9 m/s for velocity, 1e-12 m for displacement):
  --full-scale 94dB       a full-scale sine is 94 dB SPL (a 94 dB
                          calibrator recorded to peak at full scale)
  --full-scale 3.5Pa      a sample of 1.0 is 3.5 Pa (also m/s^2, m/s, m)
  --sensitivity 10.2mV/Pa --full-scale-volts 1.0
                          a transducer of that sensitivity (also per g or
                          per (m/s^2)) into a recorder where 1.0 V is a
                          sample of 1.0
  --units m/s^2           a float file whose samples are in m/s^2 (also
                          Pa, m/s, m); such files are never reported as
                          over full scale
Samples at full scale (PCM) or beyond it (float, without --units) are
counted and reported: levels of a clipped recording read low.

--weighting A or C weights the signal (IEC 61672-1, designed at the
file's rate, as the weighting family of 'wavsieve help spec') before the
bands and the overall level; Z, the default, weights nothing.

Output: a table per file; --json prints one JSON document, --csv one
row per file, channel, stretch and band. --plot DIR writes a bar chart
of each file's levels there (PNG, or SVG with --plot-format svg).

` + bandsCaution + `

Inputs are never modified. A file that cannot be read is reported and the
others go on. Exit codes: 0 every file measured (and charted), 1 some file
failed or its chart could not be written, 2 usage error.

Examples:
  # third-octave levels of the demo recordings, re full scale
  wavsieve bands samples

  # octave bands in dB SPL: the recorder was set so that a 94 dB
  # calibrator peaked at full scale
  wavsieve bands --fraction 1 --full-scale 94dB field/*.wav

  # an accelerometer of 10.2 mV/(m/s^2) into a 1.0 V full-scale logger,
  # levels per second as JSON
  wavsieve bands --sensitivity '10.2mV/(m/s^2)' --full-scale-volts 1.0 --interval 1 --json logger.wav

  # a float file already in pascals, 25 Hz to 20 kHz, A-weighted, with
  # bar charts
  wavsieve bands --units Pa --weighting A --from 25 --to 20000 --plot out/bands probe.wav

Flags:
`

// bandLevel is one band of a channel. The keys are the project's bands
// contract.
type bandLevel struct {
	MidbandHz      float64  `json:"midband_hz"`
	ExactMidbandHz float64  `json:"exact_midband_hz"`
	LevelDB        *float64 `json:"level_db"`
}

type bandsChannel struct {
	Channel   int         `json:"channel"`
	OverallDB *float64    `json:"overall_db"`
	Bands     []bandLevel `json:"bands"`
	// AtFullScale counts samples at full scale (PCM) or beyond it (float).
	AtFullScale int64 `json:"samples_at_full_scale,omitempty"`
}

// bandFilter says how one band was filtered: the order of its
// Butterworth prototype and the rate it ran at after decimation.
type bandFilter struct {
	MidbandHz float64 `json:"midband_hz"`
	Order     int     `json:"order"`
	RateHz    float64 `json:"rate_hz"`
}

type bandsInterval struct {
	StartS   float64        `json:"start_s"`
	EndS     float64        `json:"end_s"`
	Channels []bandsChannel `json:"channels"`
}

type bandsFile struct {
	Path       string          `json:"path"`
	SampleRate float64         `json:"sample_rate_hz"`
	Fraction   int             `json:"fraction"`
	Channels   []bandsChannel  `json:"channels"`
	Frames     int64           `json:"frames"`
	DurationS  float64         `json:"duration_s"`
	Reference  string          `json:"reference"`
	Weighting  string          `json:"weighting"`
	Intervals  []bandsInterval `json:"intervals,omitempty"`
	Filters    []bandFilter    `json:"filters,omitempty"`
	Plot       string          `json:"plot,omitempty"`
	Warnings   []string        `json:"warnings,omitempty"`
	Error      string          `json:"error,omitempty"`

	labels  []string // nominal labels of the bands, for the table
	plotErr bool     // the bar chart asked for could not be written
}

type bandsDoc struct {
	Files   []bandsFile `json:"files"`
	Caution string      `json:"caution"`
}

// bandsOptions is the parsed command line.
type bandsOptions struct {
	fraction   int
	fromHz     float64
	toHz       float64
	intervalS  float64
	weighting  string
	cal        analyze.Calibration
	plotDir    string
	plotFormat string
}

func runBands(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("bands", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fraction := fs.Int("fraction", 3, "bands per octave `b` of the 1/b-octave bands: 1, 2, 3, 6, 12 or 24")
	from := fs.Float64("from", 0, "lowest mid-band `Hz` (nominal or exact); default 16 for octaves, 12.5 otherwise")
	to := fs.Float64("to", 0, "highest mid-band `Hz`; default: the highest band whose upper edge lies below 0.45 of the rate")
	interval := fs.Float64("interval", 0, "also give levels over consecutive stretches of this many `seconds`")
	weighting := fs.String("weighting", "Z", "frequency `weighting` of the band and overall levels: A, C or Z (none), IEC 61672-1")
	fullScale := fs.String("full-scale", "", "what full scale means: the `level` of a full-scale sine (94dB, in dB SPL) or the value of a sample of 1.0 (3.5Pa, 10m/s^2)")
	sensitivity := fs.String("sensitivity", "", "transducer `sensitivity` such as 10.2mV/Pa, 100mV/g or 1.02mV/(m/s^2); needs --full-scale-volts")
	fsVolts := fs.Float64("full-scale-volts", 0, "the `volts` a sample of 1.0 stands for, with --sensitivity")
	units := fs.String("units", "", "float files whose samples are in this `unit`: Pa, m/s^2, m/s or m")
	asJSON := fs.Bool("json", false, "print one JSON document on stdout")
	asCSV := fs.Bool("csv", false, "print CSV on stdout: one row per file, channel, stretch and band")
	plotDir := fs.String("plot", "", "write a bar chart of each file's band levels into this `folder`")
	plotFormat := fs.String("plot-format", "png", "`format` of the charts: png or svg")
	recursive := fs.BoolP("recursive", "r", false, "descend into sub-folders of folder inputs")
	help := fs.BoolP("help", "h", false, "show this help")
	if code, done := parseOrHelp(fs, args, "bands", bandsHelp, help, stdout, stderr); done {
		return code
	}
	if fs.NArg() == 0 {
		return report(stderr, "bands", usagef("no input files or folders given"), "")
	}
	opt := bandsOptions{fraction: *fraction, fromHz: *from, toHz: *to, intervalS: *interval, plotDir: *plotDir, plotFormat: strings.ToLower(*plotFormat)}
	if !design.ValidFraction(opt.fraction) {
		return report(stderr, "bands", usagef("--fraction %d: use 1, 2, 3, 6, 12 or 24", opt.fraction), "")
	}
	if *from < 0 || *to < 0 || (*to > 0 && *to < *from) || math.IsInf(*to, 0) {
		return report(stderr, "bands", usagef("--from %g --to %g: give positive mid-band frequencies with --from below --to", *from, *to), "")
	}
	if *interval < 0 || math.IsInf(*interval, 0) || math.IsNaN(*interval) {
		return report(stderr, "bands", usagef("--interval %g: give a positive number of seconds", *interval), "")
	}
	if *asJSON && *asCSV {
		return report(stderr, "bands", usagef("--json and --csv both print on stdout: choose one"), "")
	}
	switch strings.ToUpper(*weighting) {
	case "Z", "":
		opt.weighting = "Z"
	case "A", "C":
		opt.weighting = strings.ToUpper(*weighting)
	default:
		return report(stderr, "bands", usagef("--weighting %q: use A, C or Z (IEC 61672-1)", *weighting), "")
	}
	if opt.plotDir != "" && opt.plotFormat != "png" && opt.plotFormat != "svg" {
		return report(stderr, "bands", usagef("--plot-format %q: use png or svg", *plotFormat), "")
	}
	cal, err := bandsCalibration(*fullScale, *sensitivity, *fsVolts, *units, fs.Changed("full-scale-volts"))
	if err != nil {
		return report(stderr, "bands", err, "")
	}
	opt.cal = cal

	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	banks := map[[2]int]*analyze.BandBank{}
	var doc bandsDoc
	doc.Caution = strings.Join(strings.Fields(bandsCaution), " ")
	for _, arg := range fs.Args() {
		paths, err := expandInputs(arg, *recursive)
		if err != nil {
			doc.Files = append(doc.Files, bandsFile{Path: arg, Fraction: opt.fraction, Channels: []bandsChannel{}, Error: err.Error()})
			continue
		}
		for _, p := range paths {
			if ctx.Err() != nil {
				break
			}
			doc.Files = append(doc.Files, bandsOne(ctx, p, opt, banks))
		}
	}
	failed := 0
	for _, f := range doc.Files {
		if f.Error != "" || f.plotErr {
			failed++
		}
		if f.Error != "" {
			fmt.Fprintf(stderr, "wavsieve bands: %s\n", userMessage(f.Error))
		}
		for _, w := range f.Warnings {
			fmt.Fprintf(stderr, "wavsieve bands: %s: %s\n", f.Path, w)
		}
	}
	if ctx.Err() != nil {
		fmt.Fprintln(stderr, "wavsieve bands: interrupted")
		return exitFail
	}
	switch {
	case *asJSON:
		if err := writeJSON(stdout, doc, true); err != nil {
			return report(stderr, "bands", err, "")
		}
	case *asCSV:
		if err := writeBandsCSV(stdout, doc.Files); err != nil {
			return report(stderr, "bands", err, "")
		}
	default:
		for i, f := range doc.Files {
			if f.Error != "" {
				continue
			}
			if i > 0 {
				fmt.Fprintln(stdout)
			}
			printBands(stdout, f)
		}
		fmt.Fprintf(stdout, "\nnote: %s\n", strings.Join(strings.Fields(bandsCaution), " "))
	}
	if failed > 0 {
		return exitFail
	}
	return exitOK
}

// bandsCalibration turns the calibration flags into one calibration:
// at most one of --full-scale, --sensitivity and --units.
func bandsCalibration(fullScale, sensitivity string, volts float64, units string, voltsGiven bool) (analyze.Calibration, error) {
	n := 0
	for _, s := range []string{fullScale, sensitivity, units} {
		if s != "" {
			n++
		}
	}
	if n > 1 {
		return analyze.Calibration{}, usagef("give one of --full-scale, --sensitivity and --units")
	}
	if voltsGiven && sensitivity == "" {
		return analyze.Calibration{}, usagef("--full-scale-volts goes with --sensitivity")
	}
	var cal analyze.Calibration
	var err error
	switch {
	case fullScale != "":
		cal, err = analyze.ParseFullScale(fullScale)
	case sensitivity != "":
		cal, err = analyze.ParseSensitivity(sensitivity, volts)
	case units != "":
		cal, err = analyze.ParseUnits(units)
	default:
		cal = analyze.FullScale
	}
	if err != nil {
		return cal, usagef("%s", plainMessage(err))
	}
	return cal, nil
}

// bandsOne measures one file. banks caches a bank per rate and channel
// count: its design is the costly part for short files.
func bandsOne(ctx context.Context, path string, opt bandsOptions, banks map[[2]int]*analyze.BandBank) bandsFile {
	bf := bandsFile{Path: path, Fraction: opt.fraction, Channels: []bandsChannel{}, Reference: opt.cal.Describe(), Weighting: opt.weighting}
	r, err := wavio.Open(path, nil)
	if err != nil {
		bf.Error = fmt.Sprintf("%s: %v", path, err)
		return bf
	}
	defer r.Close()
	f := r.Format()
	bf.SampleRate = float64(f.SampleRate)
	if opt.cal.Engineering && f.Encoding != wavio.Float {
		bf.Error = fmt.Sprintf("%s: --units applies to float files, whose samples can hold engineering units, and this file is %s; use --full-scale or --sensitivity for it", path, f)
		return bf
	}
	bo := analyze.BankOptions{SampleRate: bf.SampleRate, Channels: f.Channels, Fraction: opt.fraction, FromHz: opt.fromHz, ToHz: opt.toHz}
	if opt.intervalS > 0 {
		bo.IntervalFrames = max(1, int64(math.Round(opt.intervalS*bf.SampleRate)))
	}
	switch {
	case opt.cal.Engineering:
	case f.Encoding == wavio.Float:
		bo.ClipAt = math.Nextafter(1, 2) // beyond full scale
	default:
		bits := f.ValidBits
		if bits == 0 {
			bits = f.Bits
		}
		bo.ClipAt = 1 - math.Ldexp(1, -(bits-1)) // the largest positive code
	}
	if opt.weighting != "Z" {
		wf, err := design.Design(design.Spec{Stages: []design.Stage{{Family: design.Weighting, Curve: opt.weighting}}}, bf.SampleRate)
		if err != nil {
			bf.Error = fmt.Sprintf("%s: %s-weighting: %v", path, opt.weighting, plainMessage(err))
			return bf
		}
		bo.Prefilter = wf.Sections()
	}
	key := [2]int{f.SampleRate, f.Channels}
	bank := banks[key]
	if bank == nil {
		bank, err = analyze.NewBandBank(bo)
		if err != nil {
			if errors.Is(err, analyze.ErrNoBands) {
				bf.Error = fmt.Sprintf("%s: no 1/%d-octave band lies between --from and --to below the Nyquist frequency of this %d Hz file; widen the range", path, opt.fraction, f.SampleRate)
			} else if errors.Is(err, design.ErrAboveNyquist) && opt.toHz > 0 {
				// Name the flag that set the upper end of the range.
				bf.Error = fmt.Sprintf("%s: %s (--to %g)", path, plainMessage(err), opt.toHz)
			} else {
				bf.Error = fmt.Sprintf("%s: %v", path, plainMessage(err))
			}
			return bf
		}
		banks[key] = bank
	}
	bank.Reset()
	bank.SetClipAt(bo.ClipAt)
	buf := make([]float64, 8192*f.Channels)
	for {
		if ctx.Err() != nil {
			bf.Error = fmt.Sprintf("%s: interrupted", path)
			return bf
		}
		n, err := r.ReadFrames(buf)
		bank.Write(buf[:n*f.Channels])
		if err == io.EOF {
			break
		}
		if err != nil {
			bf.Error = fmt.Sprintf("%s: %v", path, err)
			return bf
		}
	}
	for _, w := range r.Warnings() {
		bf.Warnings = append(bf.Warnings, w.String())
	}
	whole, ivs := bank.Result()
	bands := bank.Bands()
	rates := bank.Rates()
	for i, b := range bands {
		bf.labels = append(bf.labels, b.Label)
		bf.Filters = append(bf.Filters, bandFilter{MidbandHz: b.NominalHz, Order: bank.Filters()[i].Order, RateHz: rates[i]})
	}
	if whole.Frames == 0 {
		bf.Warnings = append(bf.Warnings, "the file holds no samples: no level to give")
	}
	bf.Frames = whole.Frames
	bf.DurationS = float64(whole.Frames) / bf.SampleRate
	bf.Channels = channelLevels(whole, bands, opt.cal)
	for c, n := range whole.AtClip {
		if n > 0 {
			what := "at full scale"
			if f.Encoding == wavio.Float {
				what = "beyond full scale"
			}
			bf.Warnings = append(bf.Warnings, fmt.Sprintf("channel %d: %d samples %s: the recording may be clipped and its levels read low", c+1, n, what))
		}
	}
	for _, iv := range ivs {
		bf.Intervals = append(bf.Intervals, bandsInterval{
			StartS:   float64(iv.StartFrame) / bf.SampleRate,
			EndS:     float64(iv.StartFrame+iv.Frames) / bf.SampleRate,
			Channels: channelLevels(iv, bands, opt.cal),
		})
	}
	silent := true
	for _, c := range bf.Channels {
		for _, b := range c.Bands {
			silent = silent && b.LevelDB == nil
		}
	}
	if opt.plotDir != "" && silent {
		bf.Warnings = append(bf.Warnings, "no bar chart: every band is silent")
	} else if opt.plotDir != "" {
		name, err := writeBandsPlot(bf, bands, opt)
		if err != nil {
			bf.Warnings = append(bf.Warnings, fmt.Sprintf("bar chart not written: %v", err))
			bf.plotErr = true
		} else {
			bf.Plot = name
		}
	}
	return bf
}

// channelLevels converts the mean squares of lv to levels.
func channelLevels(lv analyze.BankLevels, bands []design.Band, cal analyze.Calibration) []bandsChannel {
	out := make([]bandsChannel, len(lv.Overall))
	for c := range out {
		ch := bandsChannel{Channel: c + 1, OverallDB: finiteDB(cal.Level(lv.Overall[c]))}
		if c < len(lv.AtClip) {
			ch.AtFullScale = lv.AtClip[c]
		}
		for i, b := range bands {
			ch.Bands = append(ch.Bands, bandLevel{MidbandHz: b.NominalHz, ExactMidbandHz: round6(b.ExactHz), LevelDB: finiteDB(cal.Level(lv.Bands[c][i]))})
		}
		out[c] = ch
	}
	return out
}

// finiteDB rounds a level to 0.01 dB, or gives nil (JSON null) for a
// band with no energy at all.
func finiteDB(v float64) *float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return nil
	}
	r := math.Round(v*100) / 100
	return &r
}

func round6(v float64) float64 {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 6, 64), 64)
	return r
}

func levelText(v *float64) string {
	if v == nil {
		return "-"
	}
	return strconv.FormatFloat(*v, 'f', 1, 64)
}

// printBands prints one file as a table: a row per band, a column per
// channel, then the overall level; with intervals, a table per channel
// with a row per stretch.
func printBands(w io.Writer, f bandsFile) {
	fmt.Fprintf(w, "%s  %g Hz  %.1f s  1/%d-octave bands  %s  %s-weighted\n", f.Path, f.SampleRate, f.DurationS, f.Fraction, f.Reference, f.Weighting)
	fmt.Fprintf(w, "  %8s %10s", "band Hz", "exact Hz")
	for _, c := range f.Channels {
		fmt.Fprintf(w, " %8s", fmt.Sprintf("ch%d", c.Channel))
	}
	fmt.Fprintln(w)
	if len(f.Channels) == 0 {
		return
	}
	for i := range f.Channels[0].Bands {
		b := f.Channels[0].Bands[i]
		fmt.Fprintf(w, "  %8s %10.6g", f.labels[i], b.ExactMidbandHz)
		for _, c := range f.Channels {
			fmt.Fprintf(w, " %8s", levelText(c.Bands[i].LevelDB))
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintf(w, "  %8s %10s", "overall", "")
	for _, c := range f.Channels {
		fmt.Fprintf(w, " %8s", levelText(c.OverallDB))
	}
	fmt.Fprintln(w)
	if len(f.Intervals) == 0 {
		return
	}
	for ci := range f.Channels {
		fmt.Fprintf(w, "\n  channel %d by stretch (%s):\n  %13s %8s", ci+1, f.Reference, "seconds", "overall")
		for _, l := range f.labels {
			fmt.Fprintf(w, " %6s", l)
		}
		fmt.Fprintln(w)
		for _, iv := range f.Intervals {
			c := iv.Channels[ci]
			fmt.Fprintf(w, "  %13s %8s", fmt.Sprintf("%g-%g", round6(iv.StartS), round6(iv.EndS)), levelText(c.OverallDB))
			for _, b := range c.Bands {
				fmt.Fprintf(w, " %6s", levelText(b.LevelDB))
			}
			fmt.Fprintln(w)
		}
	}
}

// writeBandsCSV writes one row per file, channel, stretch and band; the
// whole file is the stretch from 0 to its duration, and the overall
// level is the band "overall".
func writeBandsCSV(w io.Writer, files []bandsFile) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"path", "channel", "start_s", "end_s", "band", "midband_hz", "exact_midband_hz", "level_db", "reference", "weighting"})
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	lv := func(v *float64) string {
		if v == nil {
			return ""
		}
		return num(*v)
	}
	rows := func(f bandsFile, start, end float64, chans []bandsChannel) {
		for _, c := range chans {
			for i, b := range c.Bands {
				cw.Write([]string{f.Path, strconv.Itoa(c.Channel), num(start), num(end), f.labels[i], num(b.MidbandHz), num(b.ExactMidbandHz), lv(b.LevelDB), f.Reference, f.Weighting})
			}
			cw.Write([]string{f.Path, strconv.Itoa(c.Channel), num(start), num(end), "overall", "", "", lv(c.OverallDB), f.Reference, f.Weighting})
		}
	}
	for _, f := range files {
		if f.Error != "" {
			continue
		}
		rows(f, 0, round6(f.DurationS), f.Channels)
		for _, iv := range f.Intervals {
			rows(f, round6(iv.StartS), round6(iv.EndS), iv.Channels)
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeBandsPlot draws the file's bar chart into the plot folder, named
// after the file (its folder path joined with '_' for files of the same
// name in different folders), atomically.
func writeBandsPlot(f bandsFile, bands []design.Band, opt bandsOptions) (string, error) {
	base := strings.TrimSuffix(filepath.Base(f.Path), filepath.Ext(f.Path))
	if dir := filepath.Dir(f.Path); dir != "." {
		base = strings.NewReplacer(string(filepath.Separator), "_", ":", "_").Replace(strings.TrimLeft(dir, string(filepath.Separator)+".")) + "_" + base
		base = strings.TrimLeft(base, "_")
	}
	name := filepath.Join(opt.plotDir, base+".bands."+opt.plotFormat)
	bp := plots.BandsPlot{Title: f.Path, Reference: f.Reference, Weighting: f.Weighting, Fraction: f.Fraction, Caution: "Not a class 1 instrument reading unless the whole measurement chain is."}
	for _, b := range bands {
		bp.Labels = append(bp.Labels, b.Label)
	}
	for _, c := range f.Channels {
		var lv []float64
		for _, b := range c.Bands {
			if b.LevelDB == nil {
				lv = append(lv, math.Inf(-1))
			} else {
				lv = append(lv, *b.LevelDB)
			}
		}
		bp.Channels = append(bp.Channels, lv)
		if c.OverallDB != nil {
			bp.Overall = append(bp.Overall, *c.OverallDB)
		} else {
			bp.Overall = append(bp.Overall, math.Inf(-1))
		}
	}
	var buf bytes.Buffer
	if err := plots.Bands(&buf, opt.plotFormat, bp); err != nil {
		return "", err
	}
	if err := writeFileAtomic(name, buf.Bytes()); err != nil {
		return "", err
	}
	return name, nil
}

// printBandStage prints the report of a band stage: its band, its order
// and its response at each point of the class 1 mask.
func printBandStage(w io.Writer, f *design.Filter, i int, st design.Designed) {
	fmt.Fprintf(w, "\nStage %d: 1/%d-octave band %s Hz (IEC 61260-1), Butterworth band-pass of order %d, edges %s Hz, %d sections, %d poles\n",
		i+1, st.Spec.Fraction, design.BandLabel(st.Spec.MidbandHz), st.Order, joinHz(st.EdgesHz, 2), len(st.Sections), len(st.ZPK.Poles))
	one := &design.Filter{SampleRate: f.SampleRate, Stages: []design.Designed{st}}
	fmt.Fprintf(w, "  %-36s %12s %12s %16s\n", "mask point", "at (Hz)", "designed dB", "class 1 limits")
	for _, m := range st.Mask {
		v, lo, ok := maskCells(one, m)
		fmt.Fprintf(w, "  %-36s %12.4f %12.3f %7s..%-7.1f %s\n", m.Label, m.FrequencyHz, v, lo, m.UpperDB, ok)
	}
	fmt.Fprintf(w, "  mask: %s; points above the Nyquist frequency are left out\n", st.Mask[0].Source)
}

// maskRows gives the JSON rows of a stage's tolerance mask (a band
// stage's class 1 mask, a weighting's table) with the designed response
// at each; nil when the stage has none.
func maskRows(f *design.Filter, st design.Designed) []maskJSON {
	one := &design.Filter{SampleRate: f.SampleRate, Stages: []design.Designed{st}}
	var rows []maskJSON
	for _, m := range st.Mask {
		v := one.MagnitudeDB(m.FrequencyHz)
		rows = append(rows, maskJSON{
			Label: m.Label, FrequencyHz: m.FrequencyHz, TargetDB: finitePtr(m.TargetDB),
			LowerDB: finitePtr(m.LowerDB), UpperDB: finitePtr(m.UpperDB),
			DesignedDB: v, Within: m.Within(v), Source: m.Source,
		})
	}
	return rows
}
