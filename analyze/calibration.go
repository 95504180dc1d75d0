package analyze

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Calibration says what a sample value means, so that mean squares
// become levels in dB re the reference of the quantity.
//
// Reference values of ISO 1683:2015 (Table 1, quoted from memory):
// sound pressure in air 20 uPa, acceleration 1 um/s^2 (1e-6 m/s^2),
// velocity 1 nm/s (1e-9 m/s), displacement 1 pm (1e-12 m).
type Calibration struct {
	// Scale is the physical value, in Unit, of a sample value of 1.0.
	Scale float64
	// Unit is the physical unit ("Pa", "m/s^2", "m/s", "m"), or "" for
	// levels re full scale.
	Unit string
	// Reference is the reference value of the level, in Unit (1 for
	// full scale).
	Reference float64
	// Engineering is set when the samples are themselves in Unit (float
	// files written in engineering units): no sample is then "over full
	// scale".
	Engineering bool
}

// FullScale is the default calibration: levels in dB re full scale,
// where a sample value of 1.0 held constant reads 0 dB and a full-scale
// sine reads 10 log10(1/2) = -3.01 dB.
var FullScale = Calibration{Scale: 1, Reference: 1}

// quantities maps the accepted unit spellings to the unit and its
// ISO 1683 reference value.
var quantities = map[string]struct {
	unit string
	ref  float64
}{
	"pa":      {"Pa", 20e-6},
	"m/s^2":   {"m/s^2", 1e-6},
	"m/s2":    {"m/s^2", 1e-6},
	"(m/s^2)": {"m/s^2", 1e-6},
	"m/s":     {"m/s", 1e-9},
	"m":       {"m", 1e-12},
}

// standardGravity is g_n = 9.80665 m/s^2 (the conventional value of the
// CGPM, 1901), for sensitivities given per g.
const standardGravity = 9.80665

// Level returns the level of a mean square ms (in squared sample units)
// in dB re the calibration's reference: 10 log10(ms Scale^2 / Ref^2).
// A mean square of 0 gives -Inf.
func (c Calibration) Level(ms float64) float64 {
	return 10*math.Log10(ms) + 20*math.Log10(c.Scale/c.Reference)
}

// Describe names the level's reference: "dB re full scale",
// "dB re 20 uPa", "dB re 1e-06 m/s^2".
func (c Calibration) Describe() string {
	switch {
	case c.Unit == "":
		return "dB re full scale"
	case c.Unit == "Pa":
		return "dB re 20 uPa"
	}
	return fmt.Sprintf("dB re %g %s", c.Reference, c.Unit)
}

// ParseFullScale reads what a full-scale sample means: either the level
// in dB SPL (re 20 uPa) that a full-scale sine represents ("94dB": a
// 94 dB calibrator recorded so that its sine peaks at full scale reads
// 94.0 dB), or the physical value of a sample of 1.0 ("3.5Pa",
// "10m/s^2").
func ParseFullScale(s string) (Calibration, error) {
	t := strings.TrimSpace(s)
	low := strings.ToLower(t)
	if strings.HasSuffix(low, "db") {
		v, err := strconv.ParseFloat(strings.TrimSpace(t[:len(t)-2]), 64)
		if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
			return Calibration{}, fmt.Errorf("analyze: invalid full scale %q: give a level such as 94dB or a value such as 3.5Pa", s)
		}
		// A sine of peak P reads P^2/2: P = sqrt(2) * 20 uPa * 10^(L/20).
		return Calibration{Scale: math.Sqrt2 * 20e-6 * math.Pow(10, v/20), Unit: "Pa", Reference: 20e-6}, nil
	}
	num, unit := splitNumber(t)
	v, err := strconv.ParseFloat(num, 64)
	q, ok := quantities[strings.ToLower(unit)]
	if err != nil || !ok || !(v > 0) || math.IsInf(v, 0) {
		return Calibration{}, fmt.Errorf("analyze: invalid full scale %q: give a level such as 94dB or a positive value with a unit (Pa, m/s^2, m/s, m) such as 3.5Pa", s)
	}
	return Calibration{Scale: v, Unit: q.unit, Reference: q.ref}, nil
}

// ParseSensitivity reads a transducer sensitivity such as "10.2mV/Pa",
// "100mV/g", "1.02mV/(m/s^2)" and, with the voltage of a full-scale
// sample (a sample value of 1.0), gives the calibration.
func ParseSensitivity(s string, fullScaleVolts float64) (Calibration, error) {
	if !(fullScaleVolts > 0) || math.IsInf(fullScaleVolts, 0) {
		return Calibration{}, fmt.Errorf("analyze: a sensitivity needs the voltage of a full-scale sample: give --full-scale-volts, such as 1.0")
	}
	bad := fmt.Errorf("analyze: invalid sensitivity %q: give a value, a voltage unit and a quantity, such as 10.2mV/Pa, 100mV/g or 1.02mV/(m/s^2)", s)
	t := strings.TrimSpace(s)
	slash := strings.Index(t, "/")
	if slash < 0 {
		return Calibration{}, bad
	}
	num, volt := splitNumber(t[:slash])
	per := strings.ToLower(strings.TrimSpace(t[slash+1:]))
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || !(v > 0) || math.IsInf(v, 0) {
		return Calibration{}, bad
	}
	switch strings.ToLower(volt) {
	case "v":
	case "mv":
		v *= 1e-3
	case "uv", "µv":
		v *= 1e-6
	default:
		return Calibration{}, bad
	}
	if per == "g" {
		// Volts per g to volts per m/s^2.
		return Calibration{Scale: fullScaleVolts / (v / standardGravity), Unit: "m/s^2", Reference: 1e-6}, nil
	}
	q, ok := quantities[per]
	if !ok {
		return Calibration{}, bad
	}
	return Calibration{Scale: fullScaleVolts / v, Unit: q.unit, Reference: q.ref}, nil
}

// ParseUnits reads the unit of a float file whose samples are in
// engineering units ("Pa", "m/s^2", "m/s", "m").
func ParseUnits(s string) (Calibration, error) {
	q, ok := quantities[strings.ToLower(strings.TrimSpace(s))]
	if !ok {
		return Calibration{}, fmt.Errorf("analyze: unsupported unit %q: use Pa, m/s^2, m/s or m", s)
	}
	return Calibration{Scale: 1, Unit: q.unit, Reference: q.ref, Engineering: true}, nil
}

// splitNumber splits "10.2mV" into "10.2" and "mV".
func splitNumber(s string) (num, unit string) {
	s = strings.TrimSpace(s)
	i := 0
	for i < len(s) && (s[i] >= '0' && s[i] <= '9' || s[i] == '.' || s[i] == '-' || s[i] == '+' || s[i] == 'e' && i > 0 && i+1 < len(s) && (s[i+1] >= '0' && s[i+1] <= '9' || s[i+1] == '-')) {
		i++
	}
	return s[:i], strings.TrimSpace(s[i:])
}
