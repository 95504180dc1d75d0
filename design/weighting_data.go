package design

import (
	"math"
	"strings"
)

// The standard weightings: their analog definitions and tables.
//
// IEC 61672-1:2013 (sound level meters), Annex E: the A and C
// weightings as analog filters with poles at f1 ... f4 and the
// normalisation constants A1000 and C1000; Table 3: the weightings'
// design goals and acceptance limits at the nominal one-third-octave
// frequencies 10 Hz ... 20 kHz.
//
// ISO 8041-1:2017 (human response to vibration, measuring
// instrumentation), Table 3 (the same parameters as ISO 2631-1:1997
// Annex A, ISO 2631-2:2003 Annex A, ISO 2631-4:2001 and ISO 5349-1:2001
// Annex A): each vibration weighting is a cascade of a band-limiting
// high-pass and low-pass (second-order, Q = 1/sqrt 2, at f1 and f2), an
// acceleration-velocity transition (f3, f4, Q4), an upward step (f5, Q5,
// f6, Q6) and a gain K.

// IEC 61672-1:2013, Annex E, eqs. E.1-E.6: the pole frequencies of the
// A and C weightings (quoted to the digits the standard prints) and the
// normalisation constants at 1 kHz.
const (
	iecF1    = 20.598997 // Hz
	iecF2    = 107.65265 // Hz
	iecF3    = 737.86223 // Hz
	iecF4    = 12194.217 // Hz
	iecA1000 = -2.000    // dB
	iecC1000 = -0.062    // dB
)

// iecRow is one row of IEC 61672-1:2013 Table 3: a nominal frequency,
// the design goals of the A and C weightings (Z is 0 dB throughout) and
// the acceptance limits of class 1 and class 2 (dB, relative to the
// design goal; -Inf for "no lower limit").
type iecRow struct {
	n                  int    // the frequency is 1000 * 10^(n/10) Hz exactly (base-10 series)
	label              string // nominal frequency
	a, c               float64
	up1, lo1, up2, lo2 float64
}

var inf = math.Inf(1)

// iecTable is IEC 61672-1:2013, Table 3, "Frequency weightings and
// acceptance limits". The A and C columns agree with the transcription in
// the open python-acoustics package (acoustics/standards/
// iec_61672_1_2013.py, WEIGHTING_A and WEIGHTING_C) and with the Annex E
// formula rounded to 0.1 dB (checked by TestIECTableAgainstAnnexE). The
// acceptance limits are quoted from memory of the 2013 edition's table
// (no open transcription was found): each is the 2002 edition's tolerance
// limit reduced by that edition's allowance for measurement uncertainty.
var iecTable = []iecRow{
	{-20, "10", -70.4, -14.3, 3.0, -inf, 5.0, -inf},
	{-19, "12.5", -63.4, -11.2, 2.5, -inf, 5.0, -inf},
	{-18, "16", -56.7, -8.5, 2.0, -4.0, 5.0, -inf},
	{-17, "20", -50.5, -6.2, 2.0, -2.0, 3.0, -3.0},
	{-16, "25", -44.7, -4.4, 2.0, -1.5, 3.0, -3.0},
	{-15, "31.5", -39.4, -3.0, 1.5, -1.5, 3.0, -3.0},
	{-14, "40", -34.6, -2.0, 1.0, -1.0, 2.0, -2.0},
	{-13, "50", -30.2, -1.3, 1.0, -1.0, 2.0, -2.0},
	{-12, "63", -26.2, -0.8, 1.0, -1.0, 2.0, -2.0},
	{-11, "80", -22.5, -0.5, 1.0, -1.0, 2.0, -2.0},
	{-10, "100", -19.1, -0.3, 1.0, -1.0, 1.5, -1.5},
	{-9, "125", -16.1, -0.2, 1.0, -1.0, 1.5, -1.5},
	{-8, "160", -13.4, -0.1, 1.0, -1.0, 1.5, -1.5},
	{-7, "200", -10.9, 0.0, 1.0, -1.0, 1.5, -1.5},
	{-6, "250", -8.6, 0.0, 1.0, -1.0, 1.5, -1.5},
	{-5, "315", -6.6, 0.0, 1.0, -1.0, 1.5, -1.5},
	{-4, "400", -4.8, 0.0, 1.0, -1.0, 1.5, -1.5},
	{-3, "500", -3.2, 0.0, 1.0, -1.0, 1.5, -1.5},
	{-2, "630", -1.9, 0.0, 1.0, -1.0, 1.5, -1.5},
	{-1, "800", -0.8, 0.0, 1.0, -1.0, 1.5, -1.5},
	{0, "1k", 0.0, 0.0, 0.7, -0.7, 1.0, -1.0},
	{1, "1.25k", 0.6, 0.0, 1.0, -1.0, 1.5, -1.5},
	{2, "1.6k", 1.0, -0.1, 1.0, -1.0, 2.0, -2.0},
	{3, "2k", 1.2, -0.2, 1.0, -1.0, 2.0, -2.0},
	{4, "2.5k", 1.3, -0.3, 1.0, -1.0, 2.5, -2.5},
	{5, "3.15k", 1.2, -0.5, 1.0, -1.0, 2.5, -2.5},
	{6, "4k", 1.0, -0.8, 1.0, -1.0, 3.0, -3.0},
	{7, "5k", 0.5, -1.3, 1.5, -1.5, 3.5, -3.5},
	{8, "6.3k", -0.1, -2.0, 1.5, -2.0, 4.5, -4.5},
	{9, "8k", -1.1, -3.0, 1.5, -2.5, 5.0, -5.0},
	{10, "10k", -2.5, -4.4, 2.0, -3.0, 5.0, -inf},
	{11, "12.5k", -4.3, -6.2, 2.0, -5.0, 5.0, -inf},
	{12, "16k", -6.6, -8.5, 2.5, -16.0, 5.0, -inf},
	{13, "20k", -9.3, -11.2, 3.0, -inf, 5.0, -inf},
}

// iecExactHz is the exact frequency of a Table 3 row: nominal
// frequencies are rounded from the base-10 series 1000 * 10^(n/10) Hz
// (IEC 61672-1:2013, Table 3 and the text before it).
func iecExactHz(n int) float64 { return 1000 * math.Pow(10, float64(n)/10) }

// isoParams are the parameters of one ISO 8041-1:2017 Table 3 weighting.
// A zero frequency means "infinite": the stage is absent.
type isoParams struct {
	f1, f2         float64 // band limits, Hz (Q1 = Q2 = 1/sqrt 2)
	f3, f4, q4     float64 // acceleration-velocity transition
	f5, q5, f6, q6 float64 // upward step
	k              float64 // gain
	use            string
}

// isoTable: ISO 8041-1:2017 Table 3. The values are quoted from memory of
// that table and of ISO 2631-1:1997 Table A.1, ISO 2631-2:2003 (Wm),
// ISO 2631-4:2001 (Wb) and ISO 5349-1:2001 (Wh); no open transcription
// of the 2017 table was found. The f1 ... f4 and Q values of Wb, Wc, Wd,
// We and Wf agree with an open transcription of BS 6841:1987's
// weightings (repository cseats/Footfall_app_data, bs6841bandlimit.m).
// The Wk and Wd curves this gives agree to 0.01 dB with the k-factors of
// ISO 2631-1:1997 Table 3 (TestISOWeightingTableValues).
var isoTable = map[string]isoParams{
	"Wb": {f1: 0.4, f2: 100, f3: 16, f4: 16, q4: 0.55, f5: 2.5, q5: 0.9, f6: 4, q6: 0.95, k: 1.024, use: "vertical whole-body vibration in rail vehicles (ISO 2631-4)"},
	"Wc": {f1: 0.4, f2: 100, f3: 8, f4: 8, q4: 0.63, k: 1, use: "seat-back horizontal whole-body vibration (ISO 2631-1)"},
	"Wd": {f1: 0.4, f2: 100, f3: 2, f4: 2, q4: 0.63, k: 1, use: "horizontal whole-body vibration (ISO 2631-1)"},
	"We": {f1: 0.4, f2: 100, f3: 1, f4: 1, q4: 0.63, k: 1, use: "rotational whole-body vibration (ISO 2631-1)"},
	"Wf": {f1: 0.08, f2: 0.63, f4: 0.25, q4: 0.86, f5: 0.0625, q5: 0.8, f6: 0.1, q6: 0.8, k: 1, use: "motion sickness (ISO 2631-1)"},
	"Wh": {f1: 6.310, f2: 1258.9, f3: 15.915, f4: 15.915, q4: 0.64, k: 1, use: "hand-transmitted vibration (ISO 5349-1)"},
	"Wj": {f1: 0.4, f2: 100, f5: 3.75, q5: 0.91, f6: 5.32, q6: 0.91, k: 1, use: "vertical head vibration, recumbent (ISO 2631-1)"},
	"Wk": {f1: 0.4, f2: 100, f3: 12.5, f4: 12.5, q4: 0.63, f5: 2.37, q5: 0.91, f6: 3.35, q6: 0.91, k: 1, use: "vertical whole-body vibration (ISO 2631-1)"},
	"Wm": {f1: 0.7943, f2: 100, f3: 5.684, f4: 5.684, q4: 0.5, k: 1, use: "vibration in buildings (ISO 2631-2)"},
}

// isoTol is the tolerance table of one ISO 8041-1:2017 weighting: the
// one-third-octave band numbers its design-goal table covers and the four
// band numbers at which its tolerance changes. Band number n is the
// exact base-10 frequency 10^(n/10) Hz (IEC 61260-1:2014 series, 1 Hz
// reference), i.e. 1000 * 10^((n-30)/10) Hz.
type isoTol struct {
	lo, hi         int // first and last band of the curve's Annex B table
	t1, t2, t3, t4 int // Table 4 tolerance transition frequencies ft1 ... ft4
}

// isoTolerance: ISO 8041-1:2017 Table 4 (transition frequencies ft1 ...
// ft4, exact powers of 10^(1/10) Hz) and the band range of Annex B,
// Tables B.1-B.9 (0.1 Hz to 400 Hz for most curves, 0.02 Hz to 2 Hz for Wf,
// 0.8 Hz to 4 kHz for Wh), as transcribed in the open repository
// jmrplens/phonometry, tests/reference_data/vibration.py
// (ISO8041_1_TABLE4_TRANSITIONS, ISO8041_1_ANNEX_B_FACTORS; read at
// commit 2bcd6ea6accf88bc5a0addaf5c68f44d4f44e60a). The transitions sit
// an octave and a third above and below the band-limiting corners: an
// octave and a third inside them for ft2 and ft3.
var isoTolerance = map[string]isoTol{
	"Wb": {-10, 26, -6, -2, 18, 22},
	"Wc": {-10, 26, -6, -2, 18, 22},
	"Wd": {-10, 26, -6, -2, 18, 22},
	"We": {-10, 26, -6, -2, 18, 22},
	"Wf": {-17, 3, -13, -9, -4, 0},
	"Wh": {-1, 36, 6, 10, 29, 33},
	"Wj": {-10, 26, -6, -2, 18, 22},
	"Wk": {-10, 26, -6, -2, 18, 22},
	"Wm": {-10, 26, -3, 1, 18, 22},
}

// ISO 8041-1:2017 Table 5, the tolerances of a frequency weighting, as
// factors on the design goal (same transcription as isoTolerance,
// ISO8041_1_TABLE5_TOLERANCES): +12 %/-11 % from ft2 to ft3, +26 %/-21 %
// between ft1 and ft2 and between ft3 and ft4, and +26 %/-100 % (no lower
// limit) at and beyond ft1 and ft4.
const (
	isoTolInnerUp   = 1.12
	isoTolInnerDown = 0.89
	isoTolOuterUp   = 1.26
	isoTolOuterDown = 0.79
)

// limitsDB returns the Table 5 limits (dB, relative to the design
// goal) of band n.
func (t isoTol) limitsDB(n int) (lo, up float64) {
	dB := func(f float64) float64 { return 20 * math.Log10(f) }
	switch {
	case n <= t.t1 || n >= t.t4:
		return math.Inf(-1), dB(isoTolOuterUp)
	case n < t.t2 || n > t.t3:
		return dB(isoTolOuterDown), dB(isoTolOuterUp)
	default:
		return dB(isoTolInnerDown), dB(isoTolInnerUp)
	}
}

// thirdOctaveLabel is the nominal frequency of band n (10^(n/10) Hz):
// the IEC 61260-1 nominal mantissas 1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5,
// 6.3, 8 times a power of ten, in kHz ("1.25k") from 1 kHz up.
func thirdOctaveLabel(n int) string {
	mant := []string{"1", "1.25", "1.6", "2", "2.5", "3.15", "4", "5", "6.3", "8"}
	i := ((n % 10) + 10) % 10
	dec := (n - i) / 10 // power of ten
	m := mant[i]
	suffix := ""
	if dec >= 3 {
		dec -= 3
		suffix = "k"
	}
	// Shift the decimal point of m by dec places.
	intPart, frac := m, ""
	if j := strings.IndexByte(m, '.'); j >= 0 {
		intPart, frac = m[:j], m[j+1:]
	}
	digits := intPart + frac
	point := len(intPart) + dec
	for point > len(digits) {
		digits += "0"
	}
	for point <= 0 {
		digits = "0" + digits
		point++
	}
	out := digits[:point]
	if rest := strings.TrimRight(digits[point:], "0"); rest != "" {
		out += "." + rest
	}
	return out + suffix
}
