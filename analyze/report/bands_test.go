package report

import (
	"bytes"
	"strings"
	"testing"
)

func TestFromBands(t *testing.T) {
	doc := []byte(`{"files": [
	 {"path": "a.wav", "sample_rate_hz": 48000, "fraction": 1, "duration_s": 2, "reference": "dB re 20 uPa", "weighting": "Z",
	  "channels": [{"channel": 1, "overall_db": 94.01, "bands": [
	    {"midband_hz": 500, "exact_midband_hz": 501.187, "level_db": 60.2},
	    {"midband_hz": 1000, "exact_midband_hz": 1000, "level_db": 94.0},
	    {"midband_hz": 2000, "exact_midband_hz": 1995.26, "level_db": null}]}]},
	 {"path": "bad.wav", "fraction": 1, "channels": [], "error": "bad.wav: invalid RIFF header"}],
	 "caution": "..."}`)
	if !IsBands(doc) {
		t.Fatal("a bands document not recognised")
	}
	if IsBands([]byte(`{"files": [{"path": "x.wav", "hum": null}]}`)) {
		t.Fatal("a survey document taken for a bands document")
	}
	r, err := FromBands(doc)
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Files) != 2 || r.Files[1].Status != "failed" || len(r.Files[0].Plots) != 1 {
		t.Fatalf("files %d, second %q, plots %d", len(r.Files), r.Files[1].Status, len(r.Files[0].Plots))
	}
	lt := r.Files[0].Tables[0]
	if got := strings.Join(lt.Rows[1], " "); got != "1000 1000 94.0" {
		t.Errorf("1 kHz row %q", got)
	}
	if got := strings.Join(lt.Rows[2], " "); got != "2000 1995.26 -" {
		t.Errorf("silent band row %q", got)
	}
	var b bytes.Buffer
	if err := Write(&b, r); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "not the reading of a class 1 instrument") {
		t.Errorf("the report does not carry the caution")
	}
	// The count is a run of the report, like "survey of 4 files", not a
	// bare subtitle that reads as the whole report's count.
	if r.Subtitle != "" || len(r.Runs) != 1 || r.Runs[0] != "band levels of 2 files, octave bands" {
		t.Errorf("subtitle %q, runs %q; want the one run \"band levels of 2 files, octave bands\"", r.Subtitle, r.Runs)
	}
}
