package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/analyze/plots"
	"github.com/wavsieve/wavsieve/process/wavio"
)

const spectrumHelp = `Estimate the power spectrum of a WAV file, or compare two.

Usage:
  wavsieve spectrum [flags] <file> [<file2>]

The spectrum is a Welch estimate: the file is cut into segments of
--segment samples overlapping by --overlap, each is detrended, windowed and
transformed, and the periodograms are averaged (by the mean, or with
--median by the per-bin median, which resists bursts). Windows are
periodic: hann (default), hamming, blackman-harris, flat-top, rectangular
or kaiser:BETA. --scaling density gives FS²/Hz (FS: digital full scale),
spectrum gives FS², where a sinusoid's bin reads its power.

Each channel gets its own spectrum, or with --average-channels one
spectrum, the mean over the channels. The file is read in chunks, so its
length does not matter; median averaging needs every segment at once and
is limited to files of 32 Mi samples (all channels).

The table goes to stdout as CSV: frequency_hz, then one column per channel
(of the second file too, when given), in the scaling's units, or in dB
with --db. --json prints one JSON document instead.

--plot draws the level in dB over a logarithmic frequency axis with its
confidence band (mean averaging only); with two files, the first is
"before" and the second "after", drawn together, with their difference
(after minus before) below. The plot shows the channel mean with
--average-channels, channel 1 otherwise.

Exit codes: 0 done, 1 failed (an unreadable file, a file shorter than a
segment), 2 usage error.

Examples:
  # the spectrum of a recording as CSV
  wavsieve spectrum samples/reedmere-north-48k.wav > north.csv

  # before and after a filter, one curve per file, with the difference
  wavsieve spectrum --average-channels --segment 16384 --plot compare.svg \
      samples/reedmere-north-48k.wav out/reedmere-north-48k.wav

  # a tone level reading: flat-top window, power scaling, JSON
  wavsieve spectrum --window flat-top --scaling spectrum --json logger.wav

Flags:
`

// spectrumMedianLimit is the most samples (all channels) median averaging
// holds in memory: 32 Mi float64 values, 256 MiB.
const spectrumMedianLimit = 1 << 25

// spectrumLevel is the confidence level of the plot's band.
const spectrumLevel = 0.95

type spectrumDoc struct {
	*analyze.Result
	File           string       `json:"file"`
	ChannelNames   []string     `json:"channel_names"`
	ConfidenceLow  float64      `json:"confidence_low_factor,omitempty"`
	ConfidenceHigh float64      `json:"confidence_high_factor,omitempty"`
	Compare        *spectrumDoc `json:"compare,omitempty"`
}

func runSpectrum(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("spectrum", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	segment := fs.Int("segment", 8192, "segment length in `samples`")
	overlap := fs.Int("overlap", 0, "`samples` shared by neighbouring segments, 0 or more (default: half the segment)")
	window := fs.String("window", "hann", "window `name`: hann, hamming, blackman-harris, flat-top, rectangular or kaiser:BETA")
	scaling := fs.String("scaling", "density", "`kind` of values: density (FS²/Hz) or spectrum (FS²)")
	detrend := fs.String("detrend", "mean", "`trend` removed from each segment: none, mean or linear")
	avgCh := fs.Bool("average-channels", false, "one spectrum, the mean over the channels")
	median := fs.Bool("median", false, "average the segments by the per-bin median instead of the mean")
	inDB := fs.Bool("db", false, "CSV values in dB (10 log10) instead of the scaling's units")
	asJSON := fs.Bool("json", false, "print one JSON document on stdout instead of CSV")
	plot := fs.String("plot", "", "draw the spectra to this `file` (.svg or .png)")
	help := fs.BoolP("help", "h", false, "show this help")
	if code, done := parseOrHelp(fs, args, "spectrum", spectrumHelp, help, stdout, stderr); done {
		return code
	}
	if fs.NArg() < 1 || fs.NArg() > 2 {
		return report(stderr, "spectrum", usagef("give one WAV file, or two to compare (got %d)", fs.NArg()), "")
	}
	opt := analyze.Options{Segment: *segment, Overlap: *overlap}
	if !fs.Changed("overlap") {
		opt.Overlap = *segment / 2
	} else if *overlap < 0 {
		return report(stderr, "spectrum", usagef("--overlap %d: give 0 or more samples, less than the segment; leave it out for half the segment", *overlap), "")
	}
	var err error
	if opt.Window, err = analyze.ParseWindow(*window); err != nil {
		return report(stderr, "spectrum", usagef("--window %q: use hann, hamming, blackman-harris, flat-top, rectangular or kaiser:BETA", *window), "")
	}
	if opt.Scaling, err = analyze.ParseScaling(*scaling); err != nil {
		return report(stderr, "spectrum", usagef("--scaling %q: use density or spectrum", *scaling), "")
	}
	if opt.Detrend, err = analyze.ParseDetrend(*detrend); err != nil {
		return report(stderr, "spectrum", usagef("--detrend %q: use none, mean or linear", *detrend), "")
	}
	if *median {
		opt.Average = analyze.Median
	}
	if *segment < 4 {
		return report(stderr, "spectrum", usagef("--segment %d: give at least 4 samples", *segment), "")
	}
	if opt.Overlap >= *segment {
		return report(stderr, "spectrum", usagef("--overlap %d: must be less than the segment (%d)", opt.Overlap, *segment), "")
	}
	if *plot != "" {
		if ext := strings.ToLower(filepath.Ext(*plot)); ext != ".svg" && ext != ".png" {
			return report(stderr, "spectrum", usagef("--plot %s: the file name must end in .svg or .png", *plot), "")
		}
	}
	// From here on Ctrl-C and SIGTERM stop the reading between blocks;
	// nothing is written after it.
	ctx, stop := signalContext()
	defer stop()
	var docs []*spectrumDoc
	for _, name := range fs.Args() {
		d, err := fileSpectrum(ctx, name, opt, *avgCh)
		if ctx.Err() != nil {
			fmt.Fprintln(stderr, "wavsieve spectrum: interrupted; nothing was written")
			return exitFail
		}
		if err != nil {
			return report(stderr, "spectrum", err, spectrumHint(err))
		}
		docs = append(docs, d)
	}
	if len(docs) == 2 && docs[0].SampleRate != docs[1].SampleRate {
		return report(stderr, "spectrum", fmt.Errorf("%s is at %g Hz and %s at %g Hz: spectra at different rates have different frequencies", docs[0].File, docs[0].SampleRate, docs[1].File, docs[1].SampleRate), "compare files of one rate")
	}
	if *plot != "" {
		if err := writeSpectrumPlot(*plot, docs); err != nil {
			return report(stderr, "spectrum", err, "")
		}
		fmt.Fprintf(stderr, "wavsieve spectrum: plot written to %s\n", *plot)
	}
	if *asJSON {
		doc := docs[0]
		if len(docs) == 2 {
			doc.Compare = docs[1]
		}
		if err := writeJSON(stdout, doc, false); err != nil {
			return report(stderr, "spectrum", err, "")
		}
		return exitOK
	}
	if err := writeSpectrumCSV(stdout, docs, *inDB); err != nil {
		return report(stderr, "spectrum", err, "")
	}
	return exitOK
}

func spectrumHint(err error) string {
	switch {
	case errors.Is(err, analyze.ErrShortSignal):
		return "give a smaller --segment"
	case errors.Is(err, analyze.ErrInvalidOption):
		return "check --segment, --overlap and --window"
	}
	return ""
}

// fileSpectrum estimates the spectra of the channels of a WAV file,
// streaming it (mean averaging) or holding it (median).
func fileSpectrum(ctx context.Context, name string, opt analyze.Options, avg bool) (*spectrumDoc, error) {
	r, err := wavio.Open(name, nil)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	defer r.Close()
	f := r.Format()
	opt.SampleRate = float64(f.SampleRate)
	est, err := analyze.NewEstimator(opt)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	nc := f.Channels
	if frames := r.Frames(); frames >= 0 && frames < int64(opt.Segment) {
		return nil, fmt.Errorf("%s: %d frames, shorter than one segment of %d: %w", name, frames, opt.Segment, analyze.ErrShortSignal)
	}
	const block = 1 << 16
	buf := make([]float64, block*nc)
	planar := make([][]float64, nc)
	var acc *analyze.Accumulator
	var whole [][]float64
	if opt.Average == analyze.Mean {
		if acc, err = est.NewAccumulator(nc, false, 0); err != nil {
			return nil, err
		}
		for c := range planar {
			planar[c] = make([]float64, 0, block)
		}
	} else {
		if fr := r.Frames(); fr < 0 || fr*int64(nc) > spectrumMedianLimit {
			return nil, fmt.Errorf("%s: median averaging holds the whole file, and %d frames of %d channels are more than %d samples; use mean averaging (no --median) for long files", name, fr, nc, spectrumMedianLimit)
		}
		whole = make([][]float64, nc)
		for c := range whole {
			whole[c] = make([]float64, 0, r.Frames())
		}
	}
	for {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		n, rerr := r.ReadFrames(buf)
		if n > 0 {
			dst := planar
			if acc == nil {
				dst = whole
			} else {
				for c := range dst {
					dst[c] = dst[c][:0]
				}
			}
			for t := 0; t < n; t++ {
				for c := 0; c < nc; c++ {
					dst[c] = append(dst[c], buf[t*nc+c])
				}
			}
			if acc != nil {
				if err := acc.Add(dst, nil); err != nil {
					return nil, err
				}
			}
		}
		if rerr != nil {
			if errors.Is(rerr, io.EOF) {
				break
			}
			return nil, fmt.Errorf("%s: %w", name, rerr)
		}
	}
	var res *analyze.Result
	samples := 0
	if acc != nil {
		res, err = acc.Result()
		samples = acc.Samples()
	} else {
		res, err = est.Spectra(whole)
	}
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	d := &spectrumDoc{Result: res, File: name}
	for c := 0; c < nc; c++ {
		d.ChannelNames = append(d.ChannelNames, "ch"+strconv.Itoa(c+1))
	}
	if avg && nc > 1 {
		m := make([]float64, len(res.Frequencies))
		for _, ch := range res.Channels {
			for k, v := range ch {
				m[k] += v / float64(nc)
			}
		}
		res.Channels = [][]float64{m}
		d.ChannelNames = []string{"mean"}
	}
	if acc != nil && len(res.Frequencies) > 2 {
		if iv, err := est.Confidence(samples, 1, spectrumLevel); err == nil {
			d.ConfidenceLow, d.ConfidenceHigh = iv.Low, iv.High
		}
	}
	return d, nil
}

func writeSpectrumCSV(w io.Writer, docs []*spectrumDoc, inDB bool) error {
	cw := csv.NewWriter(w)
	head := []string{"frequency_hz"}
	for i, d := range docs {
		for _, n := range d.ChannelNames {
			if len(docs) == 2 {
				n = fmt.Sprintf("%d:%s", i+1, n)
			}
			head = append(head, n)
		}
	}
	cw.Write(head)
	nb := len(docs[0].Frequencies)
	for _, d := range docs[1:] {
		nb = min(nb, len(d.Frequencies))
	}
	row := make([]string, len(head))
	for k := 0; k < nb; k++ {
		row = row[:0]
		row = append(row, strconv.FormatFloat(docs[0].Frequencies[k], 'g', 10, 64))
		for _, d := range docs {
			for _, ch := range d.Channels {
				v := ch[k]
				if inDB {
					v = 10 * math.Log10(v)
				}
				row = append(row, strconv.FormatFloat(v, 'g', 10, 64))
			}
		}
		cw.Write(row)
	}
	cw.Flush()
	return cw.Error()
}

func writeSpectrumPlot(name string, docs []*spectrumDoc) error {
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(name), "."))
	sp := plots.SpectrumPlot{FrequenciesHz: docs[0].Frequencies}
	if docs[0].Scaling == "density" {
		sp.YLabel = "density (dBFS²/Hz)"
	} else {
		sp.YLabel = "power (dBFS)"
	}
	labels := []string{filepath.Base(docs[0].File)}
	if len(docs) == 2 {
		labels = []string{"before: " + filepath.Base(docs[0].File), "after: " + filepath.Base(docs[1].File)}
		if len(docs[1].Frequencies) != len(docs[0].Frequencies) {
			return fmt.Errorf("%s and %s: the spectra have different frequencies", docs[0].File, docs[1].File)
		}
	}
	for i, d := range docs {
		s := plots.SpectrumSeries{Name: labels[i] + " (" + d.ChannelNames[0] + ")", DB: analyze.DB(d.Channels[0])}
		if d.ConfidenceHigh > 0 {
			s.LowerDB, s.UpperDB = make([]float64, len(s.DB)), make([]float64, len(s.DB))
			lo, hi := 10*math.Log10(d.ConfidenceLow), 10*math.Log10(d.ConfidenceHigh)
			for k, v := range s.DB {
				s.LowerDB[k], s.UpperDB[k] = v+lo, v+hi
			}
		}
		sp.Series = append(sp.Series, s)
	}
	d := docs[0]
	sp.Title = fmt.Sprintf("Welch spectrum: %s window, %d-sample segments, %d overlap, %s averaging", d.Window, d.Segment, d.Overlap, d.Average)
	if d.ConfidenceHigh > 0 {
		sp.Title += fmt.Sprintf("; %.0f%% band", 100*spectrumLevel)
	}
	var buf bytes.Buffer
	if err := plots.Spectrum(&buf, ext, sp); err != nil {
		return err
	}
	return writeFileAtomic(name, buf.Bytes())
}
