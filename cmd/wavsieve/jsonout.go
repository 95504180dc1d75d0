package main

import (
	"bytes"
	"encoding/json"
	"io"

	"github.com/wavsieve/wavsieve/process/buildinfo"
)

// writeJSON prints doc as one JSON document with a leading "version" key
// (the running wavsieve's, from the module's build information), so that
// every document a command prints says which program made it. A document
// that already carries a "version" key keeps its own.
func writeJSON(w io.Writer, doc any, indent bool) error {
	b, err := withVersion(doc)
	if err != nil {
		return err
	}
	if indent {
		var out bytes.Buffer
		if err := json.Indent(&out, b, "", " "); err != nil {
			return err
		}
		b = out.Bytes()
	}
	_, err = w.Write(append(b, '\n'))
	return err
}

// withVersion marshals doc and, when it is a JSON object without a
// "version" key, inserts one first.
func withVersion(doc any) ([]byte, error) {
	b, err := json.Marshal(doc)
	if err != nil {
		return nil, err
	}
	if len(b) < 2 || b[0] != '{' {
		return b, nil
	}
	var keys map[string]json.RawMessage
	if err := json.Unmarshal(b, &keys); err != nil {
		return nil, err
	}
	if _, ok := keys["version"]; ok {
		return b, nil
	}
	v, _ := json.Marshal(buildinfo.Version())
	var out bytes.Buffer
	out.WriteString(`{"version":`)
	out.Write(v)
	if len(keys) > 0 {
		out.WriteByte(',')
	}
	out.Write(b[1:])
	return out.Bytes(), nil
}
