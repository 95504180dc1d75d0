package report

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"path/filepath"
	"strconv"

	"github.com/wavsieve/wavsieve/analyze/plots"
	"github.com/wavsieve/wavsieve/design"
)

// BandsCaution is the report's note on band levels.
const BandsCaution = "Band levels computed from a file are not the reading of a class 1 instrument: " +
	"the band filters meet the class 1 mask of IEC 61260-1, but the transducer, the recorder, the calibration " +
	"and everything the file went through are outside what wavsieve can check. The levels are class 1 only if " +
	"the whole chain is; use them as engineering estimates."

// bandsDoc is the part of a bands document (wavsieve bands --json) a
// report uses.
type bandsDoc struct {
	Files []struct {
		Path       string   `json:"path"`
		SampleRate float64  `json:"sample_rate_hz"`
		Fraction   *int     `json:"fraction"`
		DurationS  float64  `json:"duration_s"`
		Reference  string   `json:"reference"`
		Weighting  string   `json:"weighting"`
		Error      string   `json:"error"`
		Warnings   []string `json:"warnings"`
		Channels   []struct {
			Channel   int      `json:"channel"`
			OverallDB *float64 `json:"overall_db"`
			Bands     []struct {
				MidbandHz      float64  `json:"midband_hz"`
				ExactMidbandHz float64  `json:"exact_midband_hz"`
				LevelDB        *float64 `json:"level_db"`
			} `json:"bands"`
		} `json:"channels"`
	} `json:"files"`
}

// IsBands reports whether doc is a bands document: its files carry a
// fraction.
func IsBands(doc []byte) bool {
	var d bandsDoc
	if json.Unmarshal(doc, &d) != nil || len(d.Files) == 0 {
		return false
	}
	return d.Files[0].Fraction != nil
}

// FromBands builds the report of a bands document: per file the bar
// chart and the table of band levels, and a table of the files' overall
// levels.
func FromBands(doc []byte) (Report, error) {
	var d bandsDoc
	if err := json.Unmarshal(doc, &d); err != nil {
		return Report{}, fmt.Errorf("report: the bands document is not valid JSON: %w", err)
	}
	// The count goes in the list of runs, as an apply record's and a
	// survey's do: a bare "6 files" under the title of a merged report
	// reads as the count of the whole report.
	fracs := map[int]bool{}
	for _, f := range d.Files {
		if f.Fraction != nil {
			fracs[*f.Fraction] = true
		}
	}
	what := "bands of several fractions"
	if len(fracs) == 1 {
		for b := range fracs {
			what = map[int]string{1: "octave bands", 3: "third-octave bands"}[b]
			if what == "" {
				what = fmt.Sprintf("1/%d-octave bands", b)
			}
		}
	}
	r := Report{Title: "wavsieve band levels", Runs: []string{fmt.Sprintf("band levels of %s, %s", plural(len(d.Files), "file"), what)}, Notes: []string{BandsCaution}}
	t := Table{Caption: "Files measured (click a heading to sort)",
		Columns: []string{"file", "rate (Hz)", "bands", "duration (s)", "channel", "overall (dB)", "reference", "weighting", "error"},
		Numeric: []bool{false, true, false, true, true, true, false, false, false}}
	for _, f := range d.Files {
		frac := 0
		if f.Fraction != nil {
			frac = *f.Fraction
		}
		status := "done"
		if f.Error != "" {
			status = "failed"
			t.Rows = append(t.Rows, []string{f.Path, fmtHz(f.SampleRate), fmt.Sprintf("1/%d octave", frac), "", "", "", "", "", f.Error})
			t.RowClass = append(t.RowClass, status)
			r.Files = append(r.Files, File{Heading: filepath.Base(f.Path), Status: status, Error: f.Error})
			continue
		}
		sec := File{Heading: filepath.Base(f.Path), Status: status, Facts: [][2]string{
			{"file", f.Path}, {"rate", fmtHz(f.SampleRate) + " Hz"}, {"duration", fmt.Sprintf("%.3f s", f.DurationS)},
			{"bands", fmt.Sprintf("1/%d octave, IEC 61260-1 base 10, class 1 filters", frac)},
			{"levels", f.Reference}, {"weighting", f.Weighting},
		}}
		bp := plots.BandsPlot{Title: f.Path, Reference: f.Reference, Weighting: f.Weighting, Fraction: frac}
		lt := Table{Caption: "Band levels (" + f.Reference + ")", Columns: []string{"band (Hz)", "exact mid-band (Hz)"}, Numeric: []bool{true, true}}
		for ci, c := range f.Channels {
			lt.Columns = append(lt.Columns, fmt.Sprintf("channel %d (dB)", c.Channel))
			lt.Numeric = append(lt.Numeric, true)
			var lv []float64
			for bi, b := range c.Bands {
				if ci == 0 {
					bp.Labels = append(bp.Labels, design.BandLabel(b.MidbandHz))
					lt.Rows = append(lt.Rows, []string{strconv.FormatFloat(b.MidbandHz, 'g', -1, 64), strconv.FormatFloat(b.ExactMidbandHz, 'g', 6, 64)})
				}
				lv = append(lv, levelOr(b.LevelDB))
				if bi < len(lt.Rows) {
					lt.Rows[bi] = append(lt.Rows[bi], fmtPtr1(b.LevelDB))
				}
			}
			bp.Channels = append(bp.Channels, lv)
			bp.Overall = append(bp.Overall, levelOr(c.OverallDB))
			t.Rows = append(t.Rows, []string{f.Path, fmtHz(f.SampleRate), fmt.Sprintf("1/%d octave", frac), fmt.Sprintf("%.3f", f.DurationS), strconv.Itoa(c.Channel), fmtPtr1(c.OverallDB), f.Reference, f.Weighting, ""})
			t.RowClass = append(t.RowClass, status)
		}
		overall := []string{"overall", ""}
		for _, c := range f.Channels {
			overall = append(overall, fmtPtr1(c.OverallDB))
		}
		lt.Rows = append(lt.Rows, overall)
		var b bytes.Buffer
		if err := plots.Bands(&b, "svg", bp); err == nil {
			sec.Plots = append(sec.Plots, Plot{Caption: "Band levels over the whole file, channels side by side. Not a class 1 instrument reading unless the whole measurement chain is.", SVG: b.Bytes()})
		}
		sec.Tables = append(sec.Tables, lt)
		r.Files = append(r.Files, sec)
	}
	r.Tables = []Table{t}
	return r, nil
}

func levelOr(v *float64) float64 {
	if v == nil {
		return math.Inf(-1)
	}
	return *v
}

func fmtPtr1(v *float64) string {
	if v == nil {
		return "-"
	}
	return fmt.Sprintf("%.1f", *v)
}
