package report

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"math"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

func writeWAV(t *testing.T, name string, rate int, hum float64) {
	t.Helper()
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: rate, Channels: 2, Bits: 32, Encoding: wavio.Float}})
	if err != nil {
		t.Fatal(err)
	}
	n := rate / 2
	buf := make([]float64, 2*n)
	for i := 0; i < n; i++ {
		v := hum*math.Sin(2*math.Pi*50*float64(i)/float64(rate)) + 0.1*math.Sin(2*math.Pi*1000*float64(i)/float64(rate))
		buf[2*i], buf[2*i+1] = v, v
	}
	w.WriteFrames(buf)
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

func TestFromApply(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "in.wav"), filepath.Join(dir, "out.wav")
	writeWAV(t, in, 8000, 0.1)
	writeWAV(t, out, 8000, 0)
	v := -45.5
	man := map[string]any{
		"spec": map[string]any{"stages": []any{map[string]any{"family": "notch", "fundamental_hz": 50, "bandwidth_hz": 2, "harmonics": 3}}},
		"files": []any{
			map[string]any{"input": in, "output": out, "sample_rate_hz": 8000, "channels": 2, "frames": 4000, "status": "done", "error": "",
				"peak_in_dbfs": []float64{-14, -14}, "peak_out_dbfs": []float64{-20, -20}, "clipped_samples": []int64{0, 12},
				"verify": map[string]any{"pass": true, "checks": []any{map[string]any{"frequency_hz": 50, "kind": "notch", "designed_db": -300.0, "measured_db": v, "limit_db": -40.0, "margin_db": 5.5, "verdict": "pass"}}}},
			map[string]any{"input": filepath.Join(dir, "bad.wav"), "output": "", "status": "failed", "error": "bad.wav: at this file's 8000 Hz rate: design: something"},
		},
	}
	b, _ := json.Marshal(man)
	r, err := FromApply(b, "", Options{})
	if err != nil {
		t.Fatal(err)
	}
	var html bytes.Buffer
	if err := Write(&html, r); err != nil {
		t.Fatal(err)
	}
	s := html.String()
	// Two plots for the done file (spectra, design), none for the failed one.
	if n := strings.Count(s, "<svg"); n != 2 {
		t.Errorf("%d inline SVG plots, want 2", n)
	}
	// Clipped samples per channel, written as the peaks are ("0, 12"), not
	// as a Go slice ("[0 12]").
	if strings.Contains(s, "[0 12]") || !strings.Contains(s, "0, 12") {
		t.Error("clipped samples not written as a per-channel list \"0, 12\"")
	}
	for _, want := range []string{"in.wav", "bad.wav", "failed: bad.wav", "Verification", "-45.50", `class="pass"`, `class="failed"`, "class=\"sortable", "no calibrated certification"} {
		if !strings.Contains(s, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	// Nothing fetched: no src or href to another host, no CSS url() (the
	// xmlns URIs of SVG are names, not fetches).
	if m := regexp.MustCompile(`(src|href)="(https?:)?//|url\((https?:)?//|@import`).FindString(s); m != "" {
		t.Errorf("report references the network: %q", m)
	}
	// Each embedded SVG is well-formed XML.
	for i, part := range strings.Split(s, "<svg")[1:] {
		end := strings.Index(part, "</svg>")
		if end < 0 {
			t.Fatalf("svg %d not closed", i)
		}
		if err := xml.Unmarshal([]byte("<svg"+part[:end]+"</svg>"), new(struct{})); err != nil {
			t.Errorf("svg %d: %v", i, err)
		}
	}
}

func TestFromSurvey(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "field.wav")
	writeWAV(t, in, 8000, 0.1)
	doc := `{"files":[{"path":"` + in + `","sample_rate_hz":8000,"channels":2,"duration_s":0.5,
	  "hum":{"fundamental_hz":50.01,"drift_hz":0.02,"harmonics":[{"frequency_hz":50.01,"above_floor_db":60.5}]},
	  "suggested_spec":{"stages":[{"family":"notch","fundamental_hz":50.01,"q":30,"harmonics":1}]}},
	  {"path":"` + filepath.Join(dir, "gone.wav") + `","error":"gone.wav: no such file"}]}`
	r, err := FromSurvey([]byte(doc), "", Options{})
	if err != nil {
		t.Fatal(err)
	}
	var html bytes.Buffer
	Write(&html, r)
	s := html.String()
	for _, want := range []string{"50.010", "60.5", "Suggested spec", "&#34;family&#34;: &#34;notch&#34;", "gone.wav: no such file"} {
		if !strings.Contains(s, want) {
			t.Errorf("survey report lacks %q", want)
		}
	}
	if n := strings.Count(s, "<svg"); n != 2 {
		t.Errorf("%d plots, want the spectrum and the suggested design", n)
	}
}

func TestBadDocuments(t *testing.T) {
	if _, err := FromApply([]byte("{"), "", Options{}); err == nil {
		t.Error("broken JSON accepted")
	}
	if _, err := FromApply([]byte(`{"x":1}`), "", Options{}); err == nil || !strings.Contains(err.Error(), "manifest") {
		t.Errorf("no files: %v", err)
	}
}

// TestDrawOnceAndTables: two files at one rate with one spec draw their
// design once (the second links to the first), the verification table has
// a channel column and no repeated row, and the runs are listed once each.
func TestDrawOnceAndTables(t *testing.T) {
	dir := t.TempDir()
	spec := map[string]any{"family": "notch", "fundamental_hz": 50, "bandwidth_hz": 2, "harmonics": 3}
	check := func(ch int) map[string]any {
		return map[string]any{"channel": ch, "frequency_hz": 50, "kind": "notch", "designed_db": -300.0, "measured_db": -45.5, "limit_db": -40.0, "margin_db": 5.5, "verdict": "pass"}
	}
	var files []any
	for _, name := range []string{"a", "b"} {
		in, out := filepath.Join(dir, name+"-in.wav"), filepath.Join(dir, name+"-out.wav")
		writeWAV(t, in, 8000, 0.1)
		writeWAV(t, out, 8000, 0)
		files = append(files, map[string]any{"input": in, "output": out, "sample_rate_hz": 8000, "channels": 2, "frames": 4000, "status": "done",
			"verify": map[string]any{"pass": true, "checks": []any{check(1), check(2), check(2)}}})
	}
	b, _ := json.Marshal(map[string]any{"spec": spec, "files": files})
	r, err := FromApply(b, "", Options{})
	if err != nil {
		t.Fatal(err)
	}
	again, _ := FromApply(b, "", Options{})
	r.Merge(again)
	if len(r.Runs) != 1 {
		t.Errorf("runs %q, want the one run once", r.Runs)
	}
	var html bytes.Buffer
	if err := Write(&html, r); err != nil {
		t.Fatal(err)
	}
	s := html.String()
	// Four file sections: four spectra, one design figure, three links.
	if n, links := strings.Count(s, "<svg"), strings.Count(s, "The same figure as for <a href=\"#plot-0-1\">a-in.wav</a>"); n != 5 || links != 3 {
		t.Errorf("%d SVG plots and %d links to the first design, want 5 and 3", n, links)
	}
	sec := s[strings.Index(s, `id="file-0"`):strings.Index(s, `id="file-1"`)]
	if !strings.Contains(sec, "<th data-numeric=\"1\">channel</th>") {
		t.Error("the verification table has no channel column")
	}
	if n := strings.Count(sec, `<tr class="pass">`); n != 2 {
		t.Errorf("%d verification rows for channels 1, 2 and a repeat of 2; want 2", n)
	}
}

// TestVerdictWords: the report shows the verification's own verdict, and
// a document without one (an older manifest whose "pass" was true over
// unmeasured edges) is judged from its checks: never a pass headline over
// an unmeasured edge.
func TestVerdictWords(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "in.wav"), filepath.Join(dir, "out.wav")
	writeWAV(t, in, 8000, 0.1)
	writeWAV(t, out, 8000, 0)
	edge := map[string]any{"frequency_hz": 1000, "kind": "passband-edge", "verdict": "pass", "designed_db": -0.1, "design_range_db": []any{-0.2, 0.0}}
	open := map[string]any{"frequency_hz": 50, "kind": "notch", "verdict": "unmeasurable", "reason": "too short"}
	cases := []struct {
		name   string
		verify map[string]any
		want   string
	}{
		{"verdict given", map[string]any{"pass": false, "verdict": "inconclusive", "checks": []any{edge, open}}, "inconclusive"},
		{"old document over an unmeasured notch", map[string]any{"pass": true, "checks": []any{edge, open}}, "inconclusive"},
		{"every edge passed", map[string]any{"pass": true, "verdict": "pass", "checks": []any{edge}}, "pass"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			man := map[string]any{
				"spec":  map[string]any{"stages": []any{map[string]any{"family": "notch", "fundamental_hz": 50, "bandwidth_hz": 2, "harmonics": 3}}},
				"files": []any{map[string]any{"input": in, "output": out, "sample_rate_hz": 8000, "channels": 1, "frames": 4000, "status": "done", "verify": c.verify}},
			}
			b, _ := json.Marshal(man)
			r, err := FromApply(b, "", Options{})
			if err != nil {
				t.Fatal(err)
			}
			row := r.Tables[0].Rows[0]
			if got := row[9]; got != c.want {
				t.Fatalf("verified column %q, want %q", got, c.want)
			}
			// The design range the verdict used is shown with the design.
			for _, tb := range r.Files[0].Tables {
				if len(tb.Rows) > 0 && tb.Rows[0][1] == "passband-edge" && tb.Rows[0][2] != "-0.10 (-0.20..0.00)" {
					t.Errorf("designed cell %q, want the value and its range", tb.Rows[0][2])
				}
			}
			caption := "the spec): " + c.want
			found := false
			for _, tb := range r.Files[0].Tables {
				found = found || strings.HasSuffix(tb.Caption, caption)
			}
			if !found {
				t.Fatalf("no verification table captioned %q", caption)
			}
		})
	}
}
