package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/wavio"
)

const surveyHelp = `Survey WAV files for mains hum and rumble, and suggest a filter for them.

Usage:
  wavsieve survey [flags] <file|folder|pattern>...

For each file: its format, and per channel the peak, RMS, DC offset and
the samples that were already clipped in the input (integer samples at or
within 1 LSB of full scale, float samples beyond +-1.0, with the number
of runs they form and the longest).

Mains hum: the fundamental near 50 or 60 Hz (whichever stands higher, or
as --mains says) is measured in consecutive blocks of about --block
seconds from all its harmonics at once, to a few mHz on a clean hum. The
report gives its mean over the blocks, the drift (largest minus smallest
block), the track, and each harmonic that stands at least --threshold dB
above its local noise floor. A file has no hum when neither the
fundamental nor two or more harmonics reach the threshold. Where there
is hum, the fine track a tracking notch (apply --track) would follow is
measured too, every 20 ms from the phase of all strong harmonics: the
report gives its range and its fastest change (over 0.1 s), --json
carries every point, and --track-csv writes it as time_s,fundamental_hz.

Rumble: the power below 20 Hz against the median floor of 200-2000 Hz.
Where it stands --threshold dB or more over that floor, a high-pass is
suggested at the frequency above which only 1% of the excess below
200 Hz lies, rounded up to 5 Hz, and never above 0.6245 of
--lowest-wanted (where an order-4 Butterworth costs 0.1 dB).

The suggested spec is an order-4 Butterworth high-pass at that corner,
then notches at the measured fundamental and its harmonics up to the
highest that stands above the floor (odd ones only when no even one
does), of one q chosen so that every harmonic stays 20 dB down over the
whole drift plus 0.02 Hz. It is designed at the file's rate before it is
shown or written; --write-spec saves it, ready for 'wavsieve apply --spec'.

Inputs are never modified. A file that cannot be read is reported and the
others go on. Exit codes: 0 every file surveyed, 1 some failed, 2 usage
error.

Examples:
  # survey the demo recordings
  wavsieve survey samples

  # one file, as JSON, and save the suggested filter for apply
  wavsieve survey --json --write-spec out/north-spec.json samples/reedmere-north-48k.wav
  wavsieve apply --spec out/north-spec.json --output out/clean samples/reedmere-north-48k.wav

  # a vibration logger on a 60 Hz generator set, machine tones from 25 Hz up
  wavsieve survey --mains 60 --lowest-wanted 25 logger/*.wav

Flags:
`

// surveyFile is one file of the survey document. The keys path,
// sample_rate_hz, channels, duration_s, hum and suggested_spec are the
// project's survey contract; the others are extra.
type surveyFile struct {
	Path          string                 `json:"path"`
	Format        string                 `json:"format,omitempty"`
	SampleRate    float64                `json:"sample_rate_hz"`
	Channels      int                    `json:"channels"`
	Frames        int64                  `json:"frames"`
	DurationS     float64                `json:"duration_s"`
	Stats         []analyze.ChannelStats `json:"channel_stats,omitempty"`
	Hum           *analyze.Hum           `json:"hum"`
	HumTrack      *humTrackDoc           `json:"hum_track,omitempty"`
	Rumble        []analyze.Rumble       `json:"rumble,omitempty"`
	SuggestedSpec *design.Spec           `json:"suggested_spec"`
	SpecError     string                 `json:"suggested_spec_error,omitempty"`
	Notes         []string               `json:"notes,omitempty"`
	Warnings      []string               `json:"warnings,omitempty"`
	Error         string                 `json:"error,omitempty"`
}

// humTrackDoc is the fine track of the hum's fundamental (the one a
// tracking notch follows): its range, its fastest change, and the
// fundamental every hop_s seconds from the start.
type humTrackDoc struct {
	HopS        float64   `json:"hop_s"`
	LowestHz    float64   `json:"lowest_hz"`
	HighestHz   float64   `json:"highest_hz"`
	MaxRateHzS  float64   `json:"max_rate_hz_per_s"`
	Harmonics   []int     `json:"harmonics_used"`
	Bridged     int       `json:"bridged_points"`
	LongestGapS float64   `json:"longest_gap_s"`
	Hz          []float64 `json:"fundamental_hz"`
}

type surveyDoc struct {
	Files       []surveyFile `json:"files"`
	ThresholdDB float64      `json:"threshold_db"`
	BlockS      float64      `json:"block_s"`
}

func runSurvey(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("survey", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	asJSON := fs.Bool("json", false, "print the survey as one JSON document on stdout")
	writeSpec := fs.String("write-spec", "", "write the suggested spec of the one input to this `file`")
	trackCSV := fs.String("track-csv", "", "write the hum's fine track of the one input to this CSV `file` (time_s,fundamental_hz)")
	mains := fs.String("mains", "auto", "mains frequency to look for: 50, 60 or auto")
	block := fs.Float64("block", analyze.DefaultSurveyBlockSeconds, "length in `seconds` of the blocks the fundamental is tracked in")
	threshold := fs.Float64("threshold", analyze.DefaultSurveyThresholdDB, "`dB` above the local floor for a harmonic or rumble to count")
	harmonics := fs.Int("harmonics", analyze.DefaultSurveyMaxHarmonics, "highest harmonic `number` examined")
	search := fs.Float64("search", analyze.DefaultSurveySearchHz, "how far in `Hz` from 50 or 60 the fundamental may lie")
	wanted := fs.Float64("lowest-wanted", 0, "lowest frequency in `Hz` of wanted content, which the high-pass must keep")
	recursive := fs.BoolP("recursive", "r", false, "descend into sub-folders of folder inputs")
	help := fs.BoolP("help", "h", false, "show this help")
	if err := fs.Parse(args); err != nil {
		return report(stderr, "survey", usagef("%v", err), "")
	}
	if *help {
		fmt.Fprint(stdout, surveyHelp)
		fmt.Fprint(stdout, fs.FlagUsages())
		return exitOK
	}
	if fs.NArg() == 0 {
		return report(stderr, "survey", usagef("no input files or folders given"), "")
	}
	opt := analyze.SurveyOptions{BlockSeconds: *block, ThresholdDB: *threshold, MaxHarmonics: *harmonics, SearchHz: *search, LowestWantedHz: *wanted}
	switch strings.ToLower(*mains) {
	case "auto":
	case "50", "60":
		opt.MainsHz, _ = strconv.ParseFloat(*mains, 64)
	default:
		return report(stderr, "survey", usagef("--mains %q: use 50, 60 or auto", *mains), "")
	}
	// The options are checked once here, so that a bad value is a usage
	// error rather than a failure of every file.
	probe := opt
	probe.SampleRate, probe.Channels, probe.Frames = 48000, 1, -1
	if _, err := analyze.NewSurveyor(probe); err != nil {
		return report(stderr, "survey", usagef("%v", strings.TrimPrefix(err.Error(), "analyze: ")), "")
	}

	// From here on Ctrl-C and SIGTERM stop the survey between blocks;
	// nothing is written after it.
	ctx, stop := signalContext()
	defer stop()
	var doc surveyDoc
	doc.ThresholdDB, doc.BlockS = *threshold, *block
	for _, arg := range fs.Args() {
		if ctx.Err() != nil {
			break
		}
		paths, err := expandInputs(arg, *recursive)
		if err != nil {
			doc.Files = append(doc.Files, surveyFile{Path: arg, Error: err.Error()})
			continue
		}
		for _, p := range paths {
			if ctx.Err() != nil {
				break
			}
			doc.Files = append(doc.Files, surveyOne(ctx, p, opt))
		}
	}
	if ctx.Err() != nil {
		fmt.Fprintln(stderr, "wavsieve survey: interrupted; nothing was written")
		return exitFail
	}
	if *writeSpec != "" && len(doc.Files) != 1 {
		return report(stderr, "survey", usagef("--write-spec takes exactly one input file, got %d", len(doc.Files)), "")
	}
	if *trackCSV != "" && len(doc.Files) != 1 {
		return report(stderr, "survey", usagef("--track-csv takes exactly one input file, got %d", len(doc.Files)), "")
	}

	failed := 0
	for _, f := range doc.Files {
		if f.Error != "" {
			failed++
			fmt.Fprintf(stderr, "wavsieve survey: %s\n", userMessage(f.Error))
		}
	}
	if *writeSpec != "" {
		if err := saveSpec(*writeSpec, doc.Files[0]); err != nil {
			fmt.Fprintf(stderr, "wavsieve survey: %v\n", err)
			failed++
		} else {
			fmt.Fprintf(stderr, "wavsieve survey: suggested spec written to %s\n", *writeSpec)
		}
	}
	if *trackCSV != "" {
		if err := saveTrackCSV(*trackCSV, doc.Files[0]); err != nil {
			fmt.Fprintf(stderr, "wavsieve survey: %v\n", err)
			failed++
		} else {
			fmt.Fprintf(stderr, "wavsieve survey: hum track written to %s\n", *trackCSV)
		}
	}
	if *asJSON {
		if err := writeJSON(stdout, doc, true); err != nil {
			return report(stderr, "survey", err, "")
		}
	} else {
		for i, f := range doc.Files {
			if i > 0 {
				fmt.Fprintln(stdout)
			}
			printSurvey(stdout, f)
		}
	}
	if failed > 0 {
		return exitFail
	}
	return exitOK
}

// expandInputs lists the WAV files an argument names, with the input
// discovery that apply uses, so that both commands take the same files,
// folders and patterns.
func expandInputs(arg string, recursive bool) ([]string, error) {
	items, err := process.Discover([]string{arg}, recursive)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, wavio.PathError(arg, err)
	}
	if err != nil {
		msg := strings.TrimPrefix(err.Error(), "process: ")
		if !strings.Contains(msg, arg) {
			msg = arg + ": " + msg
		}
		return nil, errors.New(msg)
	}
	var out []string
	for _, it := range items {
		out = append(out, it.Path)
	}
	return out, nil
}

// surveyOne reads one file through an analyze.Surveyor.
func surveyOne(ctx context.Context, path string, opt analyze.SurveyOptions) surveyFile {
	sf := surveyFile{Path: path}
	r, err := wavio.Open(path, nil)
	if err != nil {
		sf.Error = fmt.Sprintf("%s: %v", path, err)
		return sf
	}
	defer r.Close()
	f := r.Format()
	sf.Format, sf.SampleRate, sf.Channels = f.String(), float64(f.SampleRate), f.Channels
	opt.SampleRate, opt.Channels, opt.Frames = float64(f.SampleRate), f.Channels, r.Frames()
	if f.Encoding == wavio.PCM {
		opt.PCMBits = f.ValidBits
		if opt.PCMBits == 0 {
			opt.PCMBits = f.Bits
		}
	}
	s, err := analyze.NewSurveyor(opt)
	if err != nil {
		sf.Error = fmt.Sprintf("%s: %v", path, err)
		return sf
	}
	// The fine track, measured in the same read (none for a file too
	// short or at too low a rate to track). It is looked for around the
	// nominal mains (or the one --mains names) within --search, and the
	// block track below must agree with it.
	tk, _ := analyze.NewTracker(analyze.TrackOptions{SampleRate: float64(f.SampleRate), Channels: f.Channels, MainsHz: opt.MainsHz, SearchHz: math.Min(opt.SearchHz, 4.9)})
	if tk != nil {
		// Every way out (an interruption, a read error, no hum to track)
		// frees the tracker's temporary file now, not when the collector
		// gets to it; after Result this does nothing.
		defer tk.Close()
	}
	buf := make([]float64, 8192*f.Channels)
	for {
		if ctx.Err() != nil {
			sf.Error = fmt.Sprintf("%s: interrupted", path)
			return sf
		}
		n, err := r.ReadFrames(buf)
		s.Write(buf[:n*f.Channels])
		if tk != nil {
			tk.Write(buf[:n*f.Channels])
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			var nf *wavio.NonFiniteError
			if errors.As(err, &nf) {
				sf.Error = fmt.Sprintf("%s: %v; the survey needs finite samples", path, err)
			} else {
				sf.Error = fmt.Sprintf("%s: %v", path, err)
			}
			return sf
		}
	}
	for _, w := range r.Warnings() {
		sf.Warnings = append(sf.Warnings, w.String())
	}
	sv := s.Result()
	sf.Frames, sf.DurationS = sv.Frames, sv.DurationS
	sf.Stats, sf.Hum, sf.Rumble = sv.Stats, sv.Hum, sv.Rumble
	sf.SuggestedSpec, sf.SpecError, sf.Notes = sv.Spec, sv.SpecError, sv.Notes
	if tk != nil && sv.Hum != nil {
		tracks, err := tk.ResultContext(ctx)
		switch {
		case err != nil:
			sf.Notes = append(sf.Notes, "no fine hum track: "+strings.TrimPrefix(err.Error(), "analyze: "))
		default:
			t := tracks[0]
			lo, hi := t.Range()
			// A steady comb of machine tones within the search range can
			// hold the tracker; the block track, fitted with outliers
			// rejected, is the check.
			if d := sv.Hum.DriftHz/2 + fineTrackAgreeHz; math.Abs((lo+hi)/2-sv.Hum.FundamentalHz) > d+(hi-lo)/2 {
				sf.Notes = append(sf.Notes, fmt.Sprintf("no fine hum track: the tracker followed %.3f-%.3f Hz, away from the hum the blocks measured (%.3f Hz); a steady tone comb beside the hum may have held it: narrow --search", lo, hi, sv.Hum.FundamentalHz))
				break
			}
			sf.HumTrack = &humTrackDoc{HopS: t.HopS, LowestHz: lo, HighestHz: hi, MaxRateHzS: t.MaxRate(), Harmonics: t.Harmonics, Bridged: t.Bridged, LongestGapS: t.LongestGapS, Hz: t.Hz}
		}
	}
	return sf
}

// surveyTrackShown is the most block frequencies the text output lists.
const surveyTrackShown = 20

// fineTrackAgreeHz is how far the fine track's middle may stray from the
// block track's mean beyond their half-ranges.
const fineTrackAgreeHz = 0.1

// saveTrackCSV writes f's fine hum track as CSV, atomically.
func saveTrackCSV(name string, f surveyFile) error {
	if f.HumTrack == nil {
		return fmt.Errorf("%s: no track written for %s: no hum could be tracked in it", name, f.Path)
	}
	if same, err := wavio.SameFile(name, f.Path); err == nil && same {
		return fmt.Errorf("%s: this is the input file; choose another name for the track", name)
	}
	var b strings.Builder
	b.WriteString("time_s,fundamental_hz\n")
	for i, hz := range f.HumTrack.Hz {
		fmt.Fprintf(&b, "%.4f,%.5f\n", float64(i)*f.HumTrack.HopS, hz)
	}
	if err := writeFileAtomic(name, []byte(b.String())); err != nil {
		return fmt.Errorf("writing the track: %w", err)
	}
	return nil
}

// saveSpec writes f's suggested spec to name, atomically, refusing to
// overwrite the input.
func saveSpec(name string, f surveyFile) error {
	if f.Error != "" {
		return fmt.Errorf("%s: no spec written: the file could not be surveyed", name)
	}
	if f.SuggestedSpec == nil {
		why := "neither hum nor rumble stands above the floor, so there is nothing to filter"
		if f.SpecError != "" {
			why = "the suggested filter does not design: " + f.SpecError
		}
		return fmt.Errorf("%s: no spec written for %s: %s", name, f.Path, why)
	}
	if same, err := wavio.SameFile(name, f.Path); err == nil && same {
		return fmt.Errorf("%s: this is the input file; choose another name for the spec", name)
	}
	b, err := json.MarshalIndent(f.SuggestedSpec, "", "  ")
	if err != nil {
		return err
	}
	if err := writeFileAtomic(name, append(b, '\n')); err != nil {
		return fmt.Errorf("writing the spec: %w", err)
	}
	return nil
}

func printSurvey(w io.Writer, f surveyFile) {
	if f.Error != "" {
		fmt.Fprintf(w, "%s\n  not surveyed: %s\n", f.Path, f.Error)
		return
	}
	fmt.Fprintf(w, "%s\n  %s, %.3f s (%d frames)\n", f.Path, f.Format, f.DurationS, f.Frames)
	fmt.Fprintf(w, "  %-8s %10s %10s %12s  %s\n", "channel", "peak dBFS", "RMS dBFS", "DC offset", "clipped in the input")
	for _, c := range f.Stats {
		clip := "none"
		if c.Clipped > 0 {
			clip = fmt.Sprintf("%d samples in %d runs, longest %d", c.Clipped, c.ClipRuns, c.LongestRun)
		}
		fmt.Fprintf(w, "  %-8d %10s %10s %12.3g  %s\n", c.Channel, dbText(c.PeakDBFS), dbText(c.RMSDBFS), c.DCOffset, clip)
	}
	if h := f.Hum; h != nil {
		fmt.Fprintf(w, "  mains hum %.3f Hz (%g Hz mains), drift %.3f Hz over %d blocks of %.2f s\n", h.FundamentalHz, h.MainsHz, h.DriftHz, len(h.Track), h.BlockS)
		var tr []string
		for i, t := range h.Track {
			// A long recording's blocks would fill screens: the first and
			// last surveyTrackShown/2, the rest in --json.
			if n := len(h.Track); n > surveyTrackShown && i >= surveyTrackShown/2 && i < n-surveyTrackShown/2 {
				if i == surveyTrackShown/2 {
					tr = append(tr, fmt.Sprintf("... %d more (all in --json) ...", n-surveyTrackShown))
				}
				continue
			}
			tr = append(tr, fmt.Sprintf("%.3f", t.FundamentalHz))
		}
		fmt.Fprintf(w, "    track (Hz): %s\n", strings.Join(tr, " "))
		fmt.Fprintf(w, "    %-9s %10s %16s %12s\n", "harmonic", "Hz", "above floor dB", "power dBFS")
		for _, hm := range h.Harmonics {
			fmt.Fprintf(w, "    %-9d %10.2f %16.1f %12.1f\n", hm.Number, hm.FrequencyHz, hm.AboveFloorDB, hm.LevelDB)
		}
		if h.OddOnly {
			fmt.Fprintln(w, "    odd harmonics only: electrical pickup rather than a transformer")
		}
		if t := f.HumTrack; t != nil {
			fmt.Fprintf(w, "    fine track: %.3f to %.3f Hz, fastest change %.2f Hz/s, every %.0f ms from harmonics %s", t.LowestHz, t.HighestHz, t.MaxRateHzS, 1000*t.HopS, intList(t.Harmonics))
			if t.Bridged > 0 {
				fmt.Fprintf(w, "; %d points bridged where the hum was masked (longest %.2f s)", t.Bridged, t.LongestGapS)
			}
			fmt.Fprintln(w)
		}
	} else if f.Rumble != nil {
		fmt.Fprintln(w, "  mains hum: none above the floor")
	}
	for _, r := range f.Rumble {
		fmt.Fprintf(w, "  rumble, channel %d: %.1f dBFS below %.0f Hz, %.1f dB over the 200-2000 Hz floor", r.Channel, r.LevelDB, r.BelowHz, r.ExcessDB)
		if r.ToneHz > 0 {
			fmt.Fprintf(w, "; a steady %.1f Hz tone at %.1f dBFS", r.ToneHz, r.ToneDBFS)
		}
		if r.Present {
			fmt.Fprintf(w, "; high-pass at %g Hz", r.CornerHz)
		}
		fmt.Fprintln(w)
	}
	for _, n := range f.Notes {
		fmt.Fprintf(w, "  note: %s\n", n)
	}
	for _, n := range f.Warnings {
		fmt.Fprintf(w, "  warning: %s\n", n)
	}
	switch {
	case f.SuggestedSpec != nil:
		b, _ := json.Marshal(f.SuggestedSpec)
		fmt.Fprintf(w, "  suggested spec: %s\n", b)
	case f.SpecError != "":
		fmt.Fprintf(w, "  no suggested spec: %s\n", f.SpecError)
	default:
		fmt.Fprintln(w, "  suggested spec: none (nothing to take out)")
	}
}

func intList(v []int) string {
	var s []string
	for _, x := range v {
		s = append(s, strconv.Itoa(x))
	}
	return strings.Join(s, ",")
}

func dbText(v *float64) string {
	if v == nil {
		return "-inf"
	}
	return fmt.Sprintf("%.2f", *v)
}
