package runrecord

import (
	"bytes"
	"encoding/json"
	"fmt"
	"reflect"
	"strconv"
	"strings"

	"github.com/wavsieve/wavsieve/process"
)

// File is one row of the record: the outcome of one output (a
// process.FileResult), the spec it was made with and its verification.
// A column is a field here or in process.FileResult, and an entry of
// columns.
type File struct {
	process.FileResult
	// Spec is the spec of the run that made the output (JSON).
	Spec json.RawMessage
	// Verify is apply --verify's verification of the output (a JSON
	// document of its own), or nil.
	Verify json.RawMessage
}

// columns is the one table of the record's columns, in the order they
// are written. A key is the JSON key and the CSV heading.
var columns = []column{
	text("input", func(f *File) *string { return &f.Input }),
	text("output", func(f *File) *string { return &f.Output }),
	text("status", func(f *File) *string { return &f.Status }),
	text("error", func(f *File) *string { return &f.Error }),
	integer("sample_rate_hz", func(f *File) *int { return &f.SampleRate }),
	integer("channels", func(f *File) *int { return &f.Channels }),
	integer("frames", func(f *File) *int64 { return &f.Frames }),
	float("duration_s", func(f *File) *float64 { return &f.DurationS }),
	text("format", func(f *File) *string { return &f.Format }),
	optional(text("output_format", func(f *File) *string { return &f.OutFormat })),
	boolean("zero_phase", func(f *File) *bool { return &f.ZeroPhase }),
	optional(asJSON("design", func(f *File) *[]process.StageSummary { return &f.Design })),
	optional(text("design_digest", func(f *File) *string { return &f.DesignDigest })),
	optional(raw("spec", func(f *File) *json.RawMessage { return &f.Spec })),
	optional(list("peak_in_dbfs", func(f *File) *[]float64 { return &f.PeakInDBFS })),
	optional(list("peak_out_dbfs", func(f *File) *[]float64 { return &f.PeakOutDBFS })),
	optional(list("clipped_samples", func(f *File) *[]int64 { return &f.Clipped })),
	optional(integer("dither_seed", func(f *File) *uint64 { return &f.DitherSeed })),
	optional(integer("zero_phase_pad_frames", func(f *File) *int { return &f.PadFrames })),
	optional(integer("edge_transient_frames", func(f *File) *int { return &f.EdgeTransient })),
	optional(list("track_range_hz", func(f *File) *[]float64 { return &f.TrackRangeHz })),
	optional(boolean("track_per_channel", func(f *File) *bool { return &f.TrackPerChannel })),
	optional(asJSON("warnings", func(f *File) *[]string { return &f.Warnings })),
	optional(list("nonfinite_samples", func(f *File) *[]int64 { return &f.NonFinite })),
	float("seconds", func(f *File) *float64 { return &f.Seconds }),
	optional(raw("verify", func(f *File) *json.RawMessage { return &f.Verify })),
}

// FromResult is the row of a file's result; spec is the run's spec
// (JSON) and verify its verification (JSON, or nil).
func FromResult(r process.FileResult, spec, verify json.RawMessage) File {
	return File{FileResult: r, Spec: spec, Verify: verify}
}

// column is one entry of the table.
type column struct {
	key      string
	optional bool // left out of JSON when empty
	value    func(f *File) any
	setJSON  func(f *File, v json.RawMessage) error
	cell     func(f *File) string
	setCell  func(f *File, s string) error
}

func optional(c column) column { c.optional = true; return c }

// typed builds a column from a field pointer and its cell codec.
func typed[T any](key string, p func(*File) *T, format func(T) string, parse func(string) (T, error)) column {
	return column{
		key:     key,
		value:   func(f *File) any { return *p(f) },
		setJSON: func(f *File, v json.RawMessage) error { return json.Unmarshal(v, p(f)) },
		cell:    func(f *File) string { return format(*p(f)) },
		setCell: func(f *File, s string) error {
			if s == "" {
				var zero T
				*p(f) = zero
				return nil
			}
			v, err := parse(s)
			if err != nil {
				return err
			}
			*p(f) = v
			return nil
		},
	}
}

func text(key string, p func(*File) *string) column {
	return typed(key, p, func(s string) string { return s }, func(s string) (string, error) { return s, nil })
}

func integer[T int | int64 | uint64](key string, p func(*File) *T) column {
	return typed(key, p,
		func(v T) string { return fmt.Sprint(v) },
		func(s string) (T, error) {
			var v T
			_, err := fmt.Sscan(s, &v)
			return v, err
		})
}

// float cells are written with the fewest digits that read back the
// same float64.
func float(key string, p func(*File) *float64) column {
	return typed(key, p,
		func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) },
		func(s string) (float64, error) { return strconv.ParseFloat(s, 64) })
}

func boolean(key string, p func(*File) *bool) column {
	return typed(key, p, strconv.FormatBool, strconv.ParseBool)
}

// list cells hold numbers separated by spaces (one per channel).
func list[T float64 | int64](key string, p func(*File) *[]T) column {
	return typed(key, p,
		func(v []T) string {
			s := make([]string, len(v))
			for i, x := range v {
				switch x := any(x).(type) {
				case float64:
					s[i] = strconv.FormatFloat(x, 'g', -1, 64)
				default:
					s[i] = fmt.Sprint(x)
				}
			}
			return strings.Join(s, " ")
		},
		func(s string) ([]T, error) {
			var out []T
			for _, w := range strings.Fields(s) {
				var v T
				if _, err := fmt.Sscan(w, &v); err != nil {
					return nil, err
				}
				out = append(out, v)
			}
			return out, nil
		})
}

// asJSON cells hold the value as compact JSON.
func asJSON[T any](key string, p func(*File) *[]T) column {
	return typed(key, p,
		func(v []T) string {
			if len(v) == 0 {
				return ""
			}
			b, _ := json.Marshal(v)
			return string(b)
		},
		func(s string) ([]T, error) {
			var v []T
			err := json.Unmarshal([]byte(s), &v)
			return v, err
		})
}

// raw cells hold a JSON document as it is.
func raw(key string, p func(*File) *json.RawMessage) column {
	c := typed(key, p,
		func(v json.RawMessage) string { return string(v) },
		func(s string) (json.RawMessage, error) {
			if !json.Valid([]byte(s)) {
				return nil, fmt.Errorf("not valid JSON")
			}
			return json.RawMessage(s), nil
		})
	c.setJSON = func(f *File, v json.RawMessage) error {
		if string(v) == "null" {
			*p(f) = nil
			return nil
		}
		var b bytes.Buffer
		if err := json.Compact(&b, v); err != nil {
			return err
		}
		*p(f) = json.RawMessage(b.Bytes())
		return nil
	}
	return c
}

func empty(v any) bool {
	rv := reflect.ValueOf(v)
	switch rv.Kind() {
	case reflect.Slice, reflect.Map:
		return rv.Len() == 0
	}
	return rv.IsZero()
}

// marshal writes a row as a JSON object, its keys in column order.
func (f *File) marshal() ([]byte, error) {
	var b strings.Builder
	b.WriteByte('{')
	n := 0
	for _, c := range columns {
		v := c.value(f)
		if c.optional && empty(v) {
			continue
		}
		var val []byte
		if r, ok := v.(json.RawMessage); ok && len(r) == 0 {
			val = []byte("null")
		} else {
			var err error
			if val, err = json.Marshal(v); err != nil {
				return nil, fmt.Errorf("runrecord: %s: %w", c.key, err)
			}
		}
		if n > 0 {
			b.WriteByte(',')
		}
		n++
		k, _ := json.Marshal(c.key)
		b.Write(k)
		b.WriteByte(':')
		b.Write(val)
	}
	b.WriteByte('}')
	return []byte(b.String()), nil
}

// unmarshal reads a row from its JSON object; keys it does not know are
// ignored, so that older programs read newer records.
func (f *File) unmarshal(m map[string]json.RawMessage) error {
	for _, c := range columns {
		v, ok := m[c.key]
		if !ok {
			continue
		}
		if err := c.setJSON(f, v); err != nil {
			return fmt.Errorf("%q: %w", c.key, err)
		}
	}
	return nil
}

// Header is the CSV heading row.
func Header() []string {
	h := make([]string, len(columns))
	for i, c := range columns {
		h[i] = c.key
	}
	return h
}
