package runrecord

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"sync"
	"testing"

	"github.com/wavsieve/wavsieve/process"
)

func sampleRows() []File {
	return []File{
		{
			FileResult: process.FileResult{
				Input: "in/a.wav", Output: "out/a.wav", Status: StatusDone, SampleRate: 48000, Channels: 2, Frames: 48000,
				DurationS: 1, Format: "48000 Hz, 2 ch, 24-bit pcm", OutFormat: "48000 Hz, 2 ch, 32-bit float", ZeroPhase: true,
				Design:       []process.StageSummary{{Family: "elliptic", Response: "lowpass", Order: 6, Sections: 3, EdgesHz: []float64{2000, 2500}}},
				DesignDigest: "0123abcd",
				PeakInDBFS:   []float64{-3.25, -0.1}, PeakOutDBFS: []float64{-6.5, -1.0 / 3}, Clipped: []int64{0, 12},
				DitherSeed: 1 << 60, PadFrames: 100, EdgeTransient: 3, TrackRangeHz: []float64{49.8, 50.2}, TrackPerChannel: true, Warnings: []string{"one, \"quoted\"", "two"}, NonFinite: []int64{0, 2},
				Seconds: 0.125,
			},
			Spec:   json.RawMessage(`{"family":"elliptic","order":6}`),
			Verify: json.RawMessage(`{"pass":true}`),
		},
		row(process.FileResult{Input: "in/b,odd.wav", Output: "out/b,odd.wav", Status: StatusFailed, Error: "in/b,odd.wav: at this file's 8000 Hz rate: bad\nline"}),
	}
}

func TestRoundTrip(t *testing.T) {
	r := New()
	r.Spec = json.RawMessage(`{"family":"elliptic"}`)
	r.Files = sampleRows()
	base := filepath.Join(t.TempDir(), "sub", BaseName)
	if err := r.Write(base); err != nil {
		t.Fatal(err)
	}
	for _, ext := range []string{".json", ".csv"} {
		t.Run(ext, func(t *testing.T) {
			back, err := Read(base + ext)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(back.Files, r.Files) {
				t.Errorf("rows differ:\n got %+v\nwant %+v", back.Files, r.Files)
			}
		})
	}
	b, err := os.ReadFile(base + ".json")
	if err != nil {
		t.Fatal(err)
	}
	var head map[string]any
	if err := json.Unmarshal(b, &head); err != nil {
		t.Fatal(err)
	}
	if head["kind"] != Kind || head["version"] == "" || head["version"] == nil {
		t.Errorf("kind and version: %v %v", head["kind"], head["version"])
	}
	// The contract keys of every row (apply --json's manifest).
	var doc struct{ Files []map[string]any }
	json.Unmarshal(b, &doc)
	for _, k := range []string{"input", "output", "sample_rate_hz", "channels", "frames", "status", "error"} {
		if _, ok := doc.Files[1][k]; !ok {
			t.Errorf("row without %q: %v", k, doc.Files[1])
		}
	}
}

func TestHeaderFollowsTable(t *testing.T) {
	// Every column is in the CSV heading and in the JSON of a full row,
	// in table order: one table drives both.
	r := New()
	r.Files = sampleRows()[:1]
	var c bytes.Buffer
	r.WriteCSV(&c)
	first := strings.SplitN(c.String(), "\n", 2)[0]
	if first != strings.Join(Header(), ",") {
		t.Errorf("heading %q", first)
	}
	row, _ := r.Files[0].marshal()
	var m map[string]json.RawMessage
	json.Unmarshal(row, &m)
	if len(m) != len(columns) {
		t.Errorf("%d keys in a full row, %d columns", len(m), len(columns))
	}
}

func TestNotRecord(t *testing.T) {
	dir := t.TempDir()
	cases := map[string]string{
		"survey.json":  `{"files":[{"path":"a.wav","sample_rate_hz":48000}]}`,
		"other.json":   `{"kind":"something-else","files":[]}`,
		"nofiles.json": `{"x":1}`,
		"plain.csv":    "a,b\n1,2\n",
	}
	for name, body := range cases {
		t.Run(name, func(t *testing.T) {
			p := filepath.Join(dir, name)
			os.WriteFile(p, []byte(body), 0o644)
			if _, err := Read(p); err == nil || !strings.Contains(err.Error(), "not a run record") {
				t.Errorf("err %v", err)
			}
		})
	}
}

func TestMerge(t *testing.T) {
	dir := t.TempDir()
	onDisk := filepath.Join(dir, "a.wav")
	os.WriteFile(onDisk, []byte("x"), 0o644)
	done := row(process.FileResult{Input: "a", Output: onDisk, Status: StatusDone, SampleRate: 48000, DesignDigest: "d1"})
	cases := []struct {
		name string
		next File
		want File
	}{
		{"skipped keeps the earlier row", row(process.FileResult{Input: "a", Output: onDisk, Status: StatusSkipped}), done},
		{"failed keeps a done row whose output exists", row(process.FileResult{Input: "a", Output: onDisk, Status: StatusFailed, Error: "x"}), done},
		{"redone replaces", row(process.FileResult{Input: "a", Output: onDisk, Status: StatusDone, DesignDigest: "d2"}), row(process.FileResult{Input: "a", Output: onDisk, Status: StatusDone, DesignDigest: "d2"})},
		{"same output by another spelling", row(process.FileResult{Input: "a", Output: filepath.Join(dir, ".", "a.wav"), Status: StatusDone, DesignDigest: "d3"}), row(process.FileResult{Input: "a", Output: filepath.Join(dir, ".", "a.wav"), Status: StatusDone, DesignDigest: "d3"})},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := New()
			r.Merge([]File{done, row(process.FileResult{Input: "b", Output: "b.wav", Status: StatusDone})})
			r.Merge([]File{c.next})
			if len(r.Files) != 2 {
				t.Fatalf("%d rows, want 2", len(r.Files))
			}
			got, _ := r.Lookup(onDisk)
			if !reflect.DeepEqual(got, c.want) {
				t.Errorf("got %+v, want %+v", got, c.want)
			}
		})
	}
}

func TestUpdateConcurrent(t *testing.T) {
	// Many writers adding rows at once through the lock lose none.
	base := filepath.Join(t.TempDir(), BaseName)
	const writers = 16
	var wg sync.WaitGroup
	for i := 0; i < writers; i++ {
		wg.Add(1)
		go func(i int) {
			defer wg.Done()
			err := Update(context.Background(), base, func(r *Record) error {
				r.Merge([]File{row(process.FileResult{Input: "in", Output: filepath.Join("out", string(rune('a'+i))+".wav"), Status: StatusDone})})
				return nil
			})
			if err != nil {
				t.Error(err)
			}
		}(i)
	}
	wg.Wait()
	r, err := Read(base + ".json")
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Files) != writers {
		t.Errorf("%d rows, want %d", len(r.Files), writers)
	}
}

func TestLockWaitsAndCancels(t *testing.T) {
	base := filepath.Join(t.TempDir(), BaseName)
	unlock, err := Lock(context.Background(), base, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	waited := false
	done := make(chan error)
	go func() {
		_, err := Lock(ctx, base, func() { waited = true; cancel() })
		done <- err
	}()
	if err := <-done; err == nil || !waited {
		t.Errorf("second lock: err %v, waited %v", err, waited)
	}
	unlock()
	u2, err := Lock(context.Background(), base, nil)
	if err != nil {
		t.Fatal(err)
	}
	u2()
}

func TestDamagedRecordIsKept(t *testing.T) {
	base := filepath.Join(t.TempDir(), BaseName)
	os.WriteFile(base+".json", []byte("{broken"), 0o644)
	err := Update(context.Background(), base, func(r *Record) error { return nil })
	if err == nil || !strings.Contains(err.Error(), "move it away") {
		t.Errorf("err %v", err)
	}
	if b, _ := os.ReadFile(base + ".json"); string(b) != "{broken" {
		t.Error("a damaged record was overwritten")
	}
}

// row is a row with no spec and no verification.
func row(r process.FileResult) File { return File{FileResult: r} }

func TestEveryFieldHasAColumn(t *testing.T) {
	// A field added to process.FileResult (or File) without its entry in
	// the table would silently be left out of the record: one column per
	// field of the result, plus the spec and the verification.
	want := reflect.TypeOf(process.FileResult{}).NumField() + 2
	want-- // FileResult.Err, the error behind Error, is not recorded
	if len(columns) != want {
		t.Errorf("%d columns for %d fields: give each field of process.FileResult and File one entry in columns", len(columns), want)
	}
	seen := map[string]bool{}
	for _, c := range columns {
		if seen[c.key] {
			t.Errorf("column %q twice", c.key)
		}
		seen[c.key] = true
	}
}
