package design

import (
	"encoding/json"
	"os"
	"testing"
)

type extraFile struct {
	Notches []struct {
		Call    string    `json:"call"`
		F0      float64   `json:"f0_hz"`
		Q       float64   `json:"q"`
		Rate    float64   `json:"rate_hz"`
		B       []float64 `json:"b"`
		A       []float64 `json:"a"`
		FreqsHz []float64 `json:"freqs_hz"`
		MagDB   []float64 `json:"mag_db"`
	} `json:"notches"`
	GroupDelay []struct {
		Call    string          `json:"call"`
		Rate    float64         `json:"rate_hz"`
		Spec    json.RawMessage `json:"spec"`
		FreqsHz []float64       `json:"freqs_hz"`
		Delay   []float64       `json:"delay_samples"`
	} `json:"group_delay"`
}

func loadExtra(t testing.TB) *extraFile {
	t.Helper()
	b, err := os.ReadFile("../testdata/design/scipy_extra.json")
	if err != nil {
		t.Fatal(err)
	}
	var r extraFile
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return &r
}
