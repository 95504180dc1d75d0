package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/buildinfo"
)

// specKeys lists every JSON key a spec file may hold, from the struct tags
// of design.Spec and design.Stage, so that a key added there and not
// documented fails the tests below.
func specKeys(t *testing.T) []string {
	t.Helper()
	var keys []string
	for _, typ := range []reflect.Type{reflect.TypeOf(design.Spec{}), reflect.TypeOf(design.Stage{})} {
		for i := 0; i < typ.NumField(); i++ {
			tag := typ.Field(i).Tag.Get("json")
			name, _, _ := strings.Cut(tag, ",")
			if name != "" && name != "-" {
				keys = append(keys, name)
			}
		}
	}
	if len(keys) < 15 {
		t.Fatalf("only %d spec keys found: %v", len(keys), keys)
	}
	return keys
}

func TestHelpSpecNamesEveryKey(t *testing.T) {
	code, out, errs := runCmd(t, "help", "spec")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range specKeys(t) {
		t.Run(k, func(t *testing.T) {
			if !strings.Contains(out, "  "+k+" ") {
				t.Errorf("'wavsieve help spec' has no line for the key %q", k)
			}
			if !strings.Contains(string(readme), "`"+k+"`") {
				t.Errorf("README.md does not name the spec key `%s`", k)
			}
		})
	}
	for _, f := range specFamilies {
		if !strings.Contains(out, `"family": "`+f.family+`"`) {
			t.Errorf("help spec has no example for the family %s", f.family)
		}
	}
}

func TestHelpTopics(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"list", []string{"help"}, exitOK, "Help topics"},
		{"json", []string{"help", "json"}, exitOK, `"version"`},
		{"exit codes", []string{"help", "exit-codes"}, exitOK, "2  usage error"},
		{"command", []string{"help", "apply"}, exitOK, "Usage:\n  wavsieve apply"},
		{"unknown", []string{"help", "nosuch"}, exitUsage, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, _ := runCmd(t, c.args...)
			if code != c.code {
				t.Fatalf("exit %d, want %d", code, c.code)
			}
			if !strings.Contains(out, c.want) {
				t.Errorf("output lacks %q:\n%s", c.want, out)
			}
		})
	}
}

func TestVersion(t *testing.T) {
	for _, arg := range []string{"--version", "version"} {
		code, out, _ := runCmd(t, arg)
		if code != exitOK || out != "wavsieve "+buildinfo.Version()+"\n" {
			t.Errorf("%s: exit %d, %q", arg, code, out)
		}
	}
	// Every JSON document a command prints carries the version first.
	docs := [][]string{
		{"design", "--spec", "../../samples/specs/rumble-highpass.json", "--rate", "48000", "--json"},
		{"spectrum", "--json", "../../samples/pumphouse-vibration-12800.wav"},
		{"survey", "--json", "../../samples/pumphouse-vibration-12800.wav"},
	}
	for _, args := range docs {
		t.Run(args[0], func(t *testing.T) {
			code, out, errs := runCmd(t, args...)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			var doc struct {
				Version string `json:"version"`
			}
			if err := json.Unmarshal([]byte(out), &doc); err != nil {
				t.Fatal(err)
			}
			if doc.Version != buildinfo.Version() {
				t.Errorf("version %q, want %q", doc.Version, buildinfo.Version())
			}
		})
	}
}

// TestJSONGoesThroughWriteJSON: every JSON document a command prints on
// stdout goes through writeJSON, which adds the version; a command that
// encodes to stdout by itself would print a document without it.
func TestJSONGoesThroughWriteJSON(t *testing.T) {
	files, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if strings.HasSuffix(f, "_test.go") {
			continue
		}
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		for _, bad := range []string{"json.NewEncoder(stdout)", "json.NewEncoder(os.Stdout)"} {
			if strings.Contains(string(b), bad) {
				t.Errorf("%s prints JSON with %s; use writeJSON so the document carries its version", f, bad)
			}
		}
	}
}

// TestFlagPlaceholders: a flag's placeholder in --help (the back-quoted
// word of its usage) must not be one of the values it takes, or the line
// reads as if that value were the default ("--probe noise[="tones"]",
// "--detrend none ... (default "mean")"); and the command list names
// every kind of document report takes.
func TestFlagPlaceholders(t *testing.T) {
	cases := []struct {
		name    string
		args    []string
		want    string
		notWant string
	}{
		{"verify probe", []string{"verify", "--help"}, "--probe kind[=", "--probe noise"},
		{"spectrum detrend", []string{"spectrum", "--help"}, "--detrend trend", "--detrend none  "},
		{"spectrum scaling", []string{"spectrum", "--help"}, "--scaling kind", "--scaling density  "},
		{"report in the command list", []string{"--help"}, "a survey or band levels", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := runCmd(t, c.args...)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			if !strings.Contains(out, c.want) {
				t.Errorf("help lacks %q", c.want)
			}
			if c.notWant != "" && strings.Contains(out, c.notWant) {
				t.Errorf("help still shows %q", c.notWant)
			}
		})
	}
}

// TestHelpExitCodesEveryCommand: the exit-code topic says what 0 and 1
// mean for bands and gather too, not only for apply, survey and verify.
func TestHelpExitCodesEveryCommand(t *testing.T) {
	code, out, errs := runCmd(t, "help", "exit-codes")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"measured (bands)", "every input done exactly once (gather)", "(gather) an\n     input missing or done twice"} {
		if !strings.Contains(out, want) {
			t.Errorf("exit-codes help lacks %q", want)
		}
	}
}
