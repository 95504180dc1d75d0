package main

import (
	"fmt"
	"io"
	"math"

	"github.com/wavsieve/wavsieve/design"
)

// weightingCaution is said wherever weighted levels can come out of the
// tool.
const weightingCaution = `A weighted level computed from a file is not a sound level meter's or a
vibration meter's reading: wavsieve does not know the microphone or
accelerometer, its calibration or the rest of the measuring chain, and it
certifies nothing. Use a calibrated instrument, and follow the local codes
and the licensed practice of the field, where the result matters.`

// weightingJSON is the report of a weighting stage in design --json.
type weightingJSON struct {
	Curve              string    `json:"curve"`
	Standard           string    `json:"standard"`
	Method             string    `json:"method"`
	FittedPoles        int       `json:"fitted_poles"`
	GoalBandHz         []float64 `json:"goal_band_hz,omitempty"`
	AnalogDevDB        float64   `json:"max_deviation_from_analog_db"`
	AnalogDevHz        float64   `json:"max_deviation_from_analog_at_hz,omitempty"`
	PlainBilinearDevDB float64   `json:"plain_bilinear_deviation_db"`
	TableDevDB         *float64  `json:"max_deviation_from_table_db"`
	Class              *int      `json:"class"`
	Class1UpToHz       float64   `json:"class1_up_to_hz,omitempty"`
	Caution            string    `json:"caution"`
}

// maskJSON is one row of a standard's table in design --json. A missing
// limit is null.
type maskJSON struct {
	Label       string   `json:"nominal"`
	FrequencyHz float64  `json:"frequency_hz"`
	TargetDB    *float64 `json:"table_db"`
	LowerDB     *float64 `json:"lower_db"`
	UpperDB     *float64 `json:"upper_db"`
	DesignedDB  float64  `json:"designed_db"`
	Within      bool     `json:"within"`
	Source      string   `json:"source"`
}

func finitePtr(v float64) *float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return nil
	}
	return &v
}

// weightingDocument fills the weighting parts of a stage's JSON.
func weightingDocument(f *design.Filter, st design.Designed) (*weightingJSON, []maskJSON) {
	w := st.Weighting
	if w == nil {
		return nil, nil
	}
	wj := &weightingJSON{
		Curve: w.Curve, Standard: w.Standard, Method: w.Method, FittedPoles: w.FittedPoles,
		AnalogDevDB: w.AnalogDevDB, AnalogDevHz: w.AnalogDevHz, PlainBilinearDevDB: w.PlainBilinearDevDB,
		TableDevDB: finitePtr(w.TableDevDB), Class1UpToHz: w.Class1UpToHz,
		Caution: weightingCaution,
	}
	if w.GoalHiHz > 0 {
		wj.GoalBandHz = []float64{w.GoalLoHz, w.GoalHiHz}
	}
	if w.Class >= 0 {
		c := w.Class
		wj.Class = &c
	}
	return wj, maskRows(f, st)
}

// printWeighting prints the report of a weighting stage.
func printWeighting(w io.Writer, f *design.Filter, i int, st design.Designed) {
	info := st.Weighting
	fmt.Fprintf(w, "\nStage %d: %s (%s), %d sections, %d poles\n", i+1, info.Name(), info.Standard, len(st.Sections), len(st.ZPK.Poles))
	fmt.Fprintf(w, "  method: %s", info.Method)
	if info.FittedPoles > 0 {
		fmt.Fprintf(w, " (%d poles)", info.FittedPoles)
	}
	fmt.Fprintln(w)
	if info.GoalHiHz > 0 {
		fmt.Fprintf(w, "  deviation from the analog definition: at most %.4f dB from %s to %s Hz (at %s Hz); a plain bilinear transform: %.4f dB\n",
			info.AnalogDevDB, fmtHz(info.GoalLoHz), fmtHz(info.GoalHiHz), fmtHz(info.AnalogDevHz), info.PlainBilinearDevDB)
	}
	if len(st.Mask) > 0 && info.Standard == design.StandardISO8041 {
		one := &design.Filter{SampleRate: f.SampleRate, Stages: []design.Designed{st}}
		within := 0
		for _, m := range st.Mask {
			if m.Within(one.MagnitudeDB(m.FrequencyHz)) {
				within++
			}
		}
		fmt.Fprintf(w, "  tolerance (%s Tables 4 and 5, goal: the analog definition): %d of %d one-third-octave rows below %s Hz (0.45 of the rate) within\n",
			info.Standard, within, len(st.Mask), fmtHz(0.45*f.SampleRate))
		fmt.Fprintf(w, "  %-8s %12s %9s %12s %16s\n", "nominal", "exact (Hz)", "goal dB", "designed dB", "limits")
		for _, m := range st.Mask {
			v, lo, ok := maskCells(one, m)
			fmt.Fprintf(w, "  %-8s %12.4f %9.2f %12.3f %7s..%-7.1f %s\n", m.Label, m.FrequencyHz, m.TargetDB, v, lo, m.UpperDB, ok)
		}
	} else if len(st.Mask) > 0 {
		fmt.Fprintf(w, "  deviation from %s Table 3: at most %.3f dB (the table is rounded to 0.1 dB)\n", info.Standard, info.TableDevDB)
		switch info.Class {
		case 1, 2:
			fmt.Fprintf(w, "  meets class %d at every table frequency below %s Hz (0.45 of the rate)", info.Class, fmtHz(0.45*f.SampleRate))
		default:
			fmt.Fprintf(w, "  meets neither class 1 nor class 2 at every table frequency below %s Hz", fmtHz(0.45*f.SampleRate))
		}
		if info.Class1UpToHz > 0 {
			fmt.Fprintf(w, "; class 1 holds up to %s Hz", fmtHz(info.Class1UpToHz))
		}
		fmt.Fprintln(w)
		one := &design.Filter{SampleRate: f.SampleRate, Stages: []design.Designed{st}}
		fmt.Fprintf(w, "  %-8s %12s %9s %12s %16s\n", "nominal", "exact (Hz)", "table dB", "designed dB", "class 1 limits")
		for _, m := range st.Mask {
			v, lo, ok := maskCells(one, m)
			fmt.Fprintf(w, "  %-8s %12.4f %9.1f %12.3f %7s..%-7.1f %s\n", m.Label, m.FrequencyHz, m.TargetDB, v, lo, m.UpperDB, ok)
		}
	}
	fmt.Fprintf(w, "  caution: %s\n", "weighted levels from a file are no sound level meter or vibration meter reading (see 'wavsieve help weighting')")
}

// maskCells gives the cells of one mask point's row in a stage report:
// the designed response v (dB) of the one-stage filter at the point, the
// lower limit as text ("-inf" when the mask has none) and "ok" or
// "OUTSIDE". The band and weighting reports share it.
func maskCells(one *design.Filter, m design.MaskPoint) (v float64, lo, ok string) {
	v = one.MagnitudeDB(m.FrequencyHz)
	lo = "-inf"
	if !math.IsInf(m.LowerDB, -1) {
		lo = fmt.Sprintf("%.1f", m.LowerDB)
	}
	ok = "ok"
	if !m.Within(v) {
		ok = "OUTSIDE"
	}
	return v, lo, ok
}
