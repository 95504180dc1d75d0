package design

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"reflect"
	"sort"
	"strings"
	"unicode/utf8"
)

// SpecError is a spec file that is not valid JSON or holds a key of the
// wrong type or an unknown key. Line and Column (from 1, in characters)
// say where; Key names the key at fault, when there is one.
type SpecError struct {
	Line, Column int
	Key          string
	Msg          string
}

func (e *SpecError) Error() string {
	return fmt.Sprintf("design: invalid spec at line %d, column %d: %s", e.Line, e.Column, e.Msg)
}

// utf8BOM is the byte-order mark some editors put first in a UTF-8 file.
var utf8BOM = []byte{0xEF, 0xBB, 0xBF}

// keyKind is what a spec key's value must be.
type keyKind int

const (
	kindBool keyKind = iota
	kindInt
	kindNumber
	kindString
	kindEdges
	kindStages
)

func (k keyKind) String() string {
	return [...]string{"true or false", "a whole number", "a number", "a string", "a number or an array of one or two numbers", "an array of stage objects"}[k]
}

// stageKeys maps each key of a Stage to its kind, from the struct tags,
// so that a key added to Stage is known here without more code.
var stageKeys = func() map[string]keyKind {
	m := map[string]keyKind{}
	edges := reflect.TypeOf(Edges{})
	t := reflect.TypeOf(Stage{})
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
		if name == "" || name == "-" {
			continue
		}
		switch {
		case f.Type == edges:
			m[name] = kindEdges
		case f.Type.Kind() == reflect.Bool:
			m[name] = kindBool
		case f.Type.Kind() >= reflect.Int && f.Type.Kind() <= reflect.Uint64:
			m[name] = kindInt
		case f.Type.Kind() == reflect.Float64 || f.Type.Kind() == reflect.Float32:
			m[name] = kindNumber
		default:
			m[name] = kindString
		}
	}
	return m
}()

// locateSpecError walks a spec's JSON and returns a *SpecError for the
// first syntax error, unknown key or value of the wrong kind, with its
// line and column; nil when there is none.
func locateSpecError(data []byte) error {
	w := &specWalker{data: data, dec: json.NewDecoder(bytes.NewReader(data))}
	w.dec.UseNumber()
	start := w.pos()
	tok, err := w.dec.Token()
	if err != nil {
		return w.syntax(err)
	}
	if d, ok := tok.(json.Delim); !ok || d != '{' {
		return w.at(start, "", "a spec is a JSON object, {...}, holding one stage or \"stages\": [...]")
	}
	top := map[string]keyKind{"zero_phase": kindBool}
	if bytes.Contains(data, []byte(`"stages"`)) {
		top["stages"] = kindStages
	} else {
		for k, v := range stageKeys {
			top[k] = v
		}
	}
	if err := w.object(top, "the top level of a spec"); err != nil {
		return err
	}
	if _, err := w.dec.Token(); err != io.EOF {
		return w.at(w.pos(), "", "more text after the spec's closing }")
	}
	return nil
}

type specWalker struct {
	data []byte
	dec  *json.Decoder
}

// pos is the offset where the next token starts.
func (w *specWalker) pos() int {
	off := int(w.dec.InputOffset())
	for off < len(w.data) && strings.IndexByte(" \t\r\n:,", w.data[off]) >= 0 {
		off++
	}
	return off
}

func (w *specWalker) at(off int, key, msg string) *SpecError {
	if off > len(w.data) {
		off = len(w.data)
	}
	line := 1 + bytes.Count(w.data[:off], []byte("\n"))
	ls := bytes.LastIndexByte(w.data[:off], '\n') + 1
	return &SpecError{Line: line, Column: 1 + utf8.RuneCount(w.data[ls:off]), Key: key, Msg: msg}
}

func (w *specWalker) syntax(err error) error {
	var se *json.SyntaxError
	switch {
	case errors.As(err, &se):
		// The decoder reports some syntax errors at the offending
		// character and others just after it: take the one that is it.
		off := int(se.Offset)
		if q := strings.Index(se.Error(), "character '"); q >= 0 && off > 0 {
			c := se.Error()[q+len("character '")]
			if (off >= len(w.data) || w.data[off] != c) && w.data[off-1] == c {
				off--
			}
		}
		msg := "not valid JSON: " + strings.TrimPrefix(se.Error(), "json: ")
		if off >= 0 && off < len(w.data) && (w.data[off] == ']' || w.data[off] == '}') {
			msg += " (a comma before a closing bracket is not allowed in JSON)"
		}
		return w.at(min(off, len(w.data)), "", msg)
	case errors.Is(err, io.EOF), errors.Is(err, io.ErrUnexpectedEOF):
		return w.at(len(w.data), "", "the file ends before the JSON is complete (a missing } or ]?)")
	}
	return w.at(w.pos(), "", err.Error())
}

// object reads the keys of an object whose { has been read, up to its }.
func (w *specWalker) object(keys map[string]keyKind, where string) error {
	for w.dec.More() {
		koff := w.pos()
		tok, err := w.dec.Token()
		if err != nil {
			return w.syntax(err)
		}
		key, _ := tok.(string)
		kind, ok := keys[key]
		if !ok {
			names := make([]string, 0, len(keys))
			for k := range keys {
				names = append(names, k)
			}
			sort.Strings(names)
			return w.at(koff, key, fmt.Sprintf("unknown key %q in %s; the keys are %s ('wavsieve help spec')", key, where, strings.Join(names, ", ")))
		}
		if err := w.value(key, kind); err != nil {
			return err
		}
	}
	if _, err := w.dec.Token(); err != nil {
		return w.syntax(err)
	}
	return nil
}

// value reads the value of key and checks it is of the given kind.
func (w *specWalker) value(key string, kind keyKind) error {
	voff := w.pos()
	tok, err := w.dec.Token()
	if err != nil {
		return w.syntax(err)
	}
	wrong := func(got string) error {
		return w.at(voff, key, fmt.Sprintf("%q must be %s, not %s", key, kind, got))
	}
	switch v := tok.(type) {
	case json.Delim:
		if v == '{' {
			if err := w.skip(); err != nil {
				return err
			}
			return wrong("an object")
		}
		// An array.
		switch kind {
		case kindStages:
			n := 0
			for w.dec.More() {
				soff := w.pos()
				t, err := w.dec.Token()
				if err != nil {
					return w.syntax(err)
				}
				if d, ok := t.(json.Delim); !ok || d != '{' {
					return w.at(soff, key, fmt.Sprintf("each of \"stages\" must be a stage object {...}, not %s", describeToken(t)))
				}
				n++
				if err := w.object(stageKeys, fmt.Sprintf("stage %d", n)); err != nil {
					return err
				}
			}
			_, err := w.dec.Token()
			if err != nil {
				return w.syntax(err)
			}
			return nil
		case kindEdges:
			n := 0
			for w.dec.More() {
				eoff := w.pos()
				t, err := w.dec.Token()
				if err != nil {
					return w.syntax(err)
				}
				if _, ok := t.(json.Number); !ok {
					if d, ok := t.(json.Delim); ok && (d == '[' || d == '{') {
						w.skip()
					}
					return w.at(eoff, key, fmt.Sprintf("%q must be %s, not an array holding %s", key, kind, describeToken(t)))
				}
				n++
			}
			if _, err := w.dec.Token(); err != nil {
				return w.syntax(err)
			}
			if n < 1 || n > 2 {
				return w.at(voff, key, fmt.Sprintf("%q must be %s, not an array of %d", key, kind, n))
			}
			return nil
		}
		if err := w.skip(); err != nil {
			return err
		}
		return wrong("an array")
	case json.Number:
		switch kind {
		case kindNumber, kindEdges:
			return nil
		case kindInt:
			if _, err := v.Int64(); err == nil {
				return nil
			}
			return wrong("the number " + v.String())
		}
		return wrong("a number")
	case bool:
		if kind == kindBool {
			return nil
		}
		return wrong(fmt.Sprintf("%v", v))
	case string:
		if kind == kindString {
			return nil
		}
		return wrong(fmt.Sprintf("a string (%q)", v))
	case nil:
		return wrong("null")
	}
	return nil
}

// skip reads the rest of an object or array whose opening delimiter has
// been read.
func (w *specWalker) skip() error {
	for depth := 1; depth > 0; {
		t, err := w.dec.Token()
		if err != nil {
			return w.syntax(err)
		}
		if d, ok := t.(json.Delim); ok {
			if d == '{' || d == '[' {
				depth++
			} else {
				depth--
			}
		}
	}
	return nil
}

func describeToken(t json.Token) string {
	switch v := t.(type) {
	case json.Delim:
		if v == '[' {
			return "an array"
		}
		return "an object"
	case json.Number:
		return "a number"
	case bool:
		return "true or false"
	case string:
		return fmt.Sprintf("a string (%q)", v)
	}
	return "null"
}

// ValueError is a spec value that cannot be designed (at this rate, or
// at all). Key names the spec key, so that a front end that took the
// value from a flag can name the flag instead. It comes wrapped in an
// *Error of its kind; find it with ValueOf.
type ValueError struct {
	Kind   ErrorKind
	Key    string
	Value  float64
	Unit   string // "Hz", or "" for a count
	Detail string // what is wrong and what would work
}

func (e *ValueError) Error() string {
	p := ""
	if e.Kind == ErrInvalid {
		p = "invalid spec: "
	}
	return p + e.Key + " value " + e.Quantity() + " " + e.Detail
}

// Quantity is the value with its unit, e.g. "30000 Hz".
func (e *ValueError) Quantity() string {
	if e.Unit == "" {
		return fmt.Sprintf("%g", e.Value)
	}
	return fmt.Sprintf("%g %s", e.Value, e.Unit)
}

// valueError is a design error of a kind about one key's value.
func valueError(kind ErrorKind, key string, v float64, unit, detail string) error {
	return &Error{Kind: kind, err: &ValueError{Kind: kind, Key: key, Value: v, Unit: unit, Detail: detail}}
}

// ValueOf returns the ValueError in err's chain, if the design error
// there is about one key's value.
func ValueOf(err error) (*ValueError, bool) {
	var e *Error
	if !errors.As(err, &e) {
		return nil, false
	}
	ve, ok := e.err.(*ValueError)
	return ve, ok
}
