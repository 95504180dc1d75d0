package main

import (
	"fmt"
	"io"
	"strings"
)

// A help topic is text a user reads with 'wavsieve help TOPIC'. Each is
// built from paragraphs, so that adding a filter family to the spec topic
// is adding one entry to specFamilies.
type helpTopic struct {
	name, summary string
	text          func() string
}

func helpTopics() []helpTopic {
	return []helpTopic{
		{"spec", "the filter spec file: every key, its unit and an example", specHelp},
		{"json", "the JSON documents the commands print with --json", func() string { return jsonHelp }},
		{"exit-codes", "what each exit code means", func() string { return exitHelp }},
		{"weighting", "the standard weightings (A, C, Z; Wb..Wm) and their accuracy", func() string { return weightingHelp }},
	}
}

func runHelp(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprintf(stdout, topUsage, commandList())
		fmt.Fprintf(stdout, "\nHelp topics ('wavsieve help <topic>'):\n%s", topicList())
		return exitOK
	}
	name := strings.ToLower(args[0])
	if name == "exit" || name == "exit-code" || name == "exitcodes" {
		name = "exit-codes"
	}
	for _, t := range helpTopics() {
		if t.name == name {
			fmt.Fprint(stdout, t.text())
			return exitOK
		}
	}
	for _, c := range commands() {
		if c.name == name {
			return c.run([]string{"--help"}, stdin, stdout, stderr)
		}
	}
	fmt.Fprintf(stderr, "wavsieve help: no topic %q\nTopics:\n%sor a command name, for its --help.\n", args[0], topicList())
	return exitUsage
}

func topicList() string {
	var b strings.Builder
	for _, t := range helpTopics() {
		fmt.Fprintf(&b, "  %-10s %s\n", t.name, t.summary)
	}
	return b.String()
}

// specFamily is one paragraph of 'wavsieve help spec': a stage family,
// the keys it takes and an example stage.
type specFamily struct {
	family string // as in "family": "..."
	text   string
}

// specFamilies describes each family a stage may have. A new family is a
// new entry here (and a row in the README's spec table).
var specFamilies = []specFamily{
	{"butterworth", `butterworth: maximally flat passband. Order form: order and cutoff_hz
  (the -3 dB point). Tolerance form: passband_hz, stopband_hz, ripple_db,
  attenuation_db.
    {"family": "butterworth", "response": "highpass", "order": 4, "cutoff_hz": 25}`},
	{"chebyshev1", `chebyshev1: equal ripple in the passband. Order form: order, cutoff_hz
  (the passband edge, where the response leaves the ripple band) and
  ripple_db. Tolerance form as for butterworth.
    {"family": "chebyshev1", "response": "lowpass", "order": 6, "cutoff_hz": 3000, "ripple_db": 0.5}`},
	{"chebyshev2", `chebyshev2: flat passband, equal ripple in the stopband. Order form:
  order, cutoff_hz (the stopband edge, where the attenuation first reaches
  attenuation_db) and attenuation_db. Tolerance form as for butterworth.
    {"family": "chebyshev2", "response": "lowpass", "order": 6, "cutoff_hz": 4000, "attenuation_db": 60}`},
	{"elliptic", `elliptic: equal ripple in both bands, the lowest order for given
  tolerances. Order form: order, cutoff_hz (the passband edge), ripple_db
  and attenuation_db. Tolerance form as for butterworth.
    {"family": "elliptic", "response": "lowpass", "passband_hz": 1000, "stopband_hz": 1600, "ripple_db": 0.1, "attenuation_db": 60}`},
	{"bessel", `bessel: nearly constant group delay in the passband; order form only
  (order up to 25). bessel_norm says what cutoff_hz means: "phase" (the
  default; the magnitude asymptotes meet at the cutoff, as a Butterworth's
  do), "delay" (the group delay at 0 Hz is 1/(2 pi cutoff_hz) seconds) or
  "magnitude" (-3 dB at the cutoff).
    {"family": "bessel", "response": "lowpass", "order": 4, "cutoff_hz": 2000, "bessel_norm": "magnitude"}`},
	{"notch", `notch: a second-order notch at fundamental_hz and at its harmonics
  (mains hum). No response, order, cutoff or tolerance keys. Give the width
  of every notch as bandwidth_hz (Hz between its -3 dB edges) or as a
  constant quality factor q (each notch centre/q Hz wide, so the higher
  harmonics get wider notches, which follows a drifting mains frequency).
  harmonics is the highest harmonic number notched (1 = the fundamental
  only); without it, every harmonic below 1000 Hz is notched (and below the
  Nyquist frequency), since hum power above that is rarely above the floor
  and each notch costs signal. odd_harmonics_only keeps harmonics 1, 3, 5...
  A comb that takes out more than 5% of the power of white noise gets a
  warning: it also removes much of the signal. With "tracking": true the
  notches follow the hum as its frequency drifts (measured in each file
  first), so they can stay narrow: 0.5 Hz takes 40 dB off every harmonic
  of a supply that wanders.
    {"family": "notch", "fundamental_hz": 50, "harmonics": 7, "bandwidth_hz": 2}
    {"family": "notch", "fundamental_hz": 50, "harmonics": 9, "bandwidth_hz": 0.5, "tracking": true}
    {"family": "notch", "fundamental_hz": 60, "harmonics": 7, "odd_harmonics_only": true, "q": 50}`},
	{"weighting", `weighting: a curve a standard defines, at the file's rate: curve "A",
  "C" or "Z" (IEC 61672-1) or "Wb", "Wc", "Wd", "We", "Wf", "Wh", "Wj",
  "Wk", "Wm" (ISO 8041-1). No other keys; causal only. See 'wavsieve help
  weighting'. Weighted levels from a file are no sound level meter reading.
    {"family": "weighting", "curve": "A"}`},
	{"band", `band: one fractional-octave band filter of IEC 61260-1 (base 10):
  fraction b (1, 2, 3, 6, 12 or 24: 1/b-octave bands) and midband_hz, the
  nominal (1000, 31.5, 12500) or exact mid-band frequency. A Butterworth
  band-pass with its -3 dB points on the band edges, of the lowest order
  whose response at the file's rate lies inside the class 1 mask of
  IEC 61260-1:2014 (Table 1); 'verify' checks it against that mask. No
  other keys; causal only. 'wavsieve bands' measures whole banks of them.
    {"family": "band", "fraction": 3, "midband_hz": 1000}`},
}

func specHelp() string {
	var b strings.Builder
	b.WriteString(specHelpHead)
	fams := make([]string, len(specFamilies))
	for i, f := range specFamilies {
		fams[i] = f.family
	}
	fmt.Fprintf(&b, "\nFamilies (%s):\n\n", strings.Join(fams, ", "))
	for _, f := range specFamilies {
		b.WriteString(f.text)
		b.WriteString("\n\n")
	}
	b.WriteString(specHelpTail)
	return b.String()
}

const specHelpHead = `The filter spec

A spec describes a filter without a sample rate, in Hz and dB; wavsieve
designs it at each file's own rate. Give it as a JSON file (--spec FILE) or
with the command's flags (--family, --response, --order, --cutoff, ...; see
a command's --help). A spec file is one stage object, or an object with a
"stages" array whose stages run in order. Unknown keys are errors, so a
misspelt key is never ignored.

  {"stages": [
    {"family": "butterworth", "response": "highpass", "order": 4, "cutoff_hz": 25},
    {"family": "notch", "fundamental_hz": 50, "harmonics": 7, "bandwidth_hz": 2}
  ], "zero_phase": true}

Top-level keys:
  stages          array of stage objects, run in order
  zero_phase      true or false (default false): run forward and backward;
                  the squared (forward-backward) response then meets every
                  tolerance, and the tolerance form designs each pass for
                  half the ripple and half the attenuation; --zero-phase
                  sets it too

Stage keys (units in brackets):
  family          name of the family, see below
  response        lowpass, highpass, bandpass or bandstop (not for notch)
  order           prototype order, 1 to 32 (bessel: 25); a bandpass or
                  bandstop of order N has 2N poles. Omit it for the
                  tolerance form, which computes the minimum order
  cutoff_hz       [Hz] with order: one frequency, or [lo, hi] for a band
                  response; what it means depends on the family
  passband_hz     [Hz] tolerance form: the passband edge(s), 200 or [300, 3400]
  stopband_hz     [Hz] tolerance form: the stopband edge(s)
  ripple_db       [dB] largest passband ripple, above 0, e.g. 0.1
  attenuation_db  [dB] smallest stopband attenuation, above ripple_db, e.g. 60
  bessel_norm     bessel only: phase (default), delay or magnitude
  fundamental_hz  [Hz] notch only: the mains fundamental, e.g. 50 or 60
  harmonics       [count] notch only: highest harmonic number to notch
                  (default: every harmonic below 1000 Hz)
  bandwidth_hz    [Hz] notch only: -3 dB width of each notch, e.g. 2
  q               [ratio] notch only: constant quality factor instead of
                  bandwidth_hz (width = centre / q), e.g. 30
  odd_harmonics_only  true or false, notch only: notch harmonics 1, 3, 5...
  tracking        true or false, notch only: the notches follow the hum
                  measured in each file (fundamental_hz is then where it is
                  looked for, within 2 Hz); flag --track
  curve           weighting only: A, C, Z, Wb, Wc, Wd, We, Wf, Wh, Wj, Wk or Wm
  fraction        [count] band only: b of a 1/b-octave band, 1, 2, 3, 6, 12 or 24
  midband_hz      [Hz] band only: the band's nominal or exact mid-band
                  frequency, e.g. 1000 or 31.5

A frequency is a number, or an array of one or two numbers. Every edge must
lie below the Nyquist frequency (half the sample rate) of each file the spec
is used on; an edge at or above it fails that file, it is never clamped.
`

const specHelpTail = `Examples are in samples/specs/. 'wavsieve survey --write-spec FILE'
writes a spec for the hum and rumble it finds, and 'wavsieve design --spec
FILE --rate HZ' shows what a spec becomes at a rate.
`

const jsonHelp = `JSON documents

Every command that reports takes --json and then prints one JSON document on
stdout; progress and messages go to stderr. Every document has "version",
the wavsieve version that made it. Keys beyond those listed here may be
added; these stay. Frequencies are in Hz, levels in dB (dBFS: relative to
full scale), times in seconds, channels counted from 1.

wavsieve design --json
  {"version", "sample_rate_hz", "zero_phase",
   "stages": [{"family", "response", "form", "order",
               "zeros": [[re, im], ...], "poles": [[re, im], ...], "gain",
               "sections": [[b0, b1, b2, a0, a1, a2], ...],
               "design_edges_hz", "notch_hz",
               "weighting": {"curve", "standard", "method",
                 "max_deviation_from_analog_db", "max_deviation_from_table_db",
                 "class", "class1_up_to_hz", "caution", ...} (weighting only),
               "mask": [{"nominal", "frequency_hz", "table_db", "lower_db",
                 "upper_db", "designed_db", "within", "source"}] (A, C, Z),
               "checks": [{"frequency_hz", "kind", "designed_db", "limit_db",
                           "margin_db", "exact"}],
               "spec": {the stage as given}}],
   "sections": [[b0, b1, b2, a0, a1, a2], ...],
   "summary": {"minus_3db_hz", "passband_group_delay_min_s",
               "passband_group_delay_max_s", "max_pole_radius",
               "decay_60db_samples", "decay_60db_s"}}
  The top-level "sections" is the whole chain in the order it runs, each
  row normalised to a0 = 1; zeros and poles are in the z plane.

wavsieve apply --json (and the run record wavsieve-manifest.json)
  {"kind", "version", "spec": {the spec}, "command", "working_dir",
   "workers",
   "files": [{"input", "output", "status": "done" | "skipped" | "failed",
              "error", "sample_rate_hz", "channels", "frames", "duration_s",
              "format", "output_format", "zero_phase",
              "design": [{"family", "response", "order", "sections",
                          "edges_hz"}],
              "design_digest", "peak_in_dbfs", "peak_out_dbfs",
              "clipped_samples", "dither_seed", "track_range_hz",
              "track_per_channel", "seconds"}]}
  The same rows are written as wavsieve-manifest.csv; runs into one
  folder add to one record, keyed by output.

wavsieve bands --json
  {"version", "caution",
   "files": [{"path", "sample_rate_hz", "fraction", "frames", "duration_s",
              "reference", "weighting", "filters",
              "channels": [{"channel", "overall_db",
                            "bands": [{"midband_hz", "exact_midband_hz",
                                       "level_db"}]}]}]}

wavsieve gather --json
  {"version", "files": [the merged record's rows, as apply's],
   "missing": [inputs no share did], "failed", "shares", "resubmit",
   "done_twice", "record": the merged record's file}

wavsieve spectrum --json
  {"version", "file", "sample_rate_hz", "window", "segment", "overlap",
   "scaling": "density" | "spectrum", "units", "detrend", "average",
   "segments", "enbw_bins", "enbw_hz", "degrees_of_freedom",
   "confidence_low_factor", "confidence_high_factor",
   "frequencies_hz": [...], "channel_names": [...],
   "channels": [[one value per frequency], ...],
   "compare": {the same for a second file, when two are given}}
  Density values are in FS²/Hz (full scale squared per Hz; "units" says
  "FS^2/Hz" in plain ASCII), spectrum values in FS² ("FS^2"); in dB they
  are dBFS²/Hz and dBFS.

wavsieve survey --json
  {"version", "threshold_db", "block_s",
   "files": [{"path", "format", "sample_rate_hz", "channels", "frames",
              "duration_s",
              "channel_stats": [{"channel", "peak_dbfs", "rms_dbfs",
                                 "dc_offset", "clipped_samples", ...}],
              "hum": null | {"fundamental_hz", "drift_hz",
                             "harmonics": [{"number", "frequency_hz",
                                            "above_floor_db", "level_dbfs"}]},
              "rumble": [{"channel", "below_hz", "level_dbfs", "excess_db",
                          "present", "suggested_highpass_hz"}],
              "suggested_spec": {a spec} | null, "notes", "warnings",
              "error"}]}

wavsieve bands --json
  {"version", "caution",
   "files": [{"path", "sample_rate_hz", "fraction", "frames", "duration_s",
              "reference", "weighting",
              "channels": [{"channel", "overall_db",
                            "samples_at_full_scale" (when any),
                            "bands": [{"midband_hz", "exact_midband_hz",
                                       "level_db"}]}],
              "intervals": [{"start_s", "end_s", "channels": [as above]}],
              "filters": [{"midband_hz", "order", "rate_hz"}], "plot",
              "warnings", "error"}]}
  midband_hz is the nominal mid-band frequency, level_db null for a band
  with no energy at all; levels are in dB re "reference".

wavsieve verify --json
  {"version", "pass", "verdict": "pass" | "fail" | "inconclusive", "note",
   "checks": [{"channel", "stage", "kind", "frequency_hz", "designed_db",
               "design_range_db": [lo, hi], "measured_db",
               "interval_db": [lo, hi], "limit_db", "margin_db",
               "coherence", "random_error",
               "verdict": "pass" | "fail" | "unmeasurable", "reason",
               "lower_limit_db", "upper_limit_db", "label", "segment",
               "averages", "resolution_hz", "track_range_hz"}, ... every
              check of every file],
   "files": [{"input", "output", "method", "sample_rate_hz", "zero_phase",
              "channels_checked", "frames", "skipped_frames_each_end",
              "window", "confidence_level", "passed", "failed",
              "unmeasurable", "pass", "verdict", "error",
              "track_per_channel", "checks": [the file's checks]}]}
  "pass" is true exactly when "verdict" is "pass": every passband-edge,
  stopband-edge, cutoff, notch and mask check measured and passed. "kind" is
  passband-edge, stopband-edge, cutoff, notch, notch-edge, passband,
  stopband or mask (a row of a standard's tolerance table, named by
  "label"). A value that does not apply is null; an interval open below
  is [null, hi]. apply --verify puts each file's document (as in "files")
  under "verify" in the run record. A tracking notch's centre is read
  along the hum's track: its "frequency_hz" is the track's mean times the
  harmonic, "track_range_hz" the range of the fundamental;
  "track_per_channel" (apply's and verify's) is true when each channel
  followed its own track (--track-per-channel).
`

const exitHelp = `Exit codes

  0  done: every file was done or skipped (apply), surveyed (survey),
     measured (bands); every input done exactly once (gather);
     (verify) pass: every edge, cutoff, notch and mask check was measured
     and passed
  1  failed: a file could not be read, designed or written, a spec is
     invalid, or (verify, apply --verify) a check failed; (gather) an
     input missing or done twice; in a batch the other files are still
     done, and the summary and the manifest say which failed
  2  usage error: an unknown command or flag, a missing argument, or a flag
     value that cannot work (such as --cutoff at or above the Nyquist
     frequency of --rate); nothing was done
  3  (verify) inconclusive: no check failed, but some edge, cutoff, notch or
     mask check could not be measured (each says why); apply --verify
     prints "inconclusive" and exits 0

Messages go to stderr and data to stdout, so a script can test the code
and still read the data.
`
