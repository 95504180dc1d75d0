package plots

import (
	"bytes"
	"math"
	"regexp"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/design"
)

func TestVerifyPlot(t *testing.T) {
	f, err := design.Design(design.Spec{Stages: []design.Stage{{Family: "elliptic", Response: "lowpass", PassbandHz: design.Edges{1000}, StopbandHz: design.Edges{1300}, RippleDB: 0.5, AttenuationDB: 60}}}, 8000)
	if err != nil {
		t.Fatal(err)
	}
	marks := []VerifyMark{
		{FrequencyHz: 990, MeasuredDB: -0.1, LowDB: -0.2, HighDB: 0, Verdict: "pass"},
		{FrequencyHz: 1310, MeasuredDB: -40, LowDB: -41, HighDB: -39, Verdict: "fail"},
		{FrequencyHz: 2500, MeasuredDB: -90, LowDB: math.Inf(-1), HighDB: -80, Verdict: "unmeasurable"},
	}
	var svg bytes.Buffer
	if err := Verify(&svg, "svg", f, marks, VerifyOptions{}); err != nil {
		t.Fatal(err)
	}
	// The heading wraps at the image width: read the text of all lines.
	var text []string
	for _, m := range regexp.MustCompile(`>([^<]*)</text>`).FindAllStringSubmatch(svg.String(), -1) {
		text = append(text, m[1])
	}
	all := strings.Join(text, " ")
	for _, want := range []string{"measured: pass", "measured: fail", "measured: unmeasurable", "not a calibrated certification"} {
		if !strings.Contains(all, want) {
			t.Errorf("the SVG lacks %q", want)
		}
	}
	var png bytes.Buffer
	if err := Verify(&png, "png", f, marks, VerifyOptions{}); err != nil || !bytes.HasPrefix(png.Bytes(), []byte("\x89PNG")) {
		t.Fatalf("png: %v", err)
	}
	if err := Verify(&png, "pdf", f, marks, VerifyOptions{}); err == nil {
		t.Fatal("pdf accepted")
	}
	if err := Verify(&png, "svg", nil, marks, VerifyOptions{}); err == nil {
		t.Fatal("nil filter accepted")
	}
}
