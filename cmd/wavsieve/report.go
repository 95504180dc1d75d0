package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"
	htmlreport "github.com/wavsieve/wavsieve/analyze/report"
	"github.com/wavsieve/wavsieve/process/runrecord"
	"github.com/wavsieve/wavsieve/process/wavio"
)

const reportHelp = `Make a self-contained HTML report of an apply run, a survey or band levels.

Usage:
  wavsieve report --from <manifest.json|output folder|survey.json|bands.json> --output <report.html> [flags]

The report is one HTML file with every plot embedded as SVG; it fetches
nothing and opens offline in any browser. From an apply manifest it shows,
per file, the before/after spectra, the filter as designed at the file's
rate with its pole/zero diagram, the verification table when the run was
verified (apply --verify), for a tracking notch (apply --track) the hum's
track over time with its level before and after, and the whole manifest
as a table that sorts by any column. From a survey document (survey --json) it shows each file's
spectrum, its hum and its suggested spec. From a bands document (bands
--json) it shows each file's band levels as a bar chart and a table, with
the caution that they are no class 1 instrument reading unless the whole
measurement chain is.

Examples:
  wavsieve apply --spec samples/specs/rumble-and-hum.json --verify --output out/clean samples
  wavsieve report --from out/clean/wavsieve-manifest.json --output out/clean/report.html

  wavsieve survey --json samples > out/survey.json
  wavsieve report --from out/survey.json --output out/survey.html

  wavsieve bands --json samples > out/bands.json
  wavsieve report --from out/bands.json --output out/bands.html

Flags:
`

func runReport(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("report", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	from := fs.StringArray("from", nil, "the apply manifest, survey or bands `document` (JSON); repeat it to gather several runs in one report")
	output := fs.StringP("output", "o", "", "the HTML `file` to write (- for standard output)")
	maxS := fs.Float64("max-seconds", 120, "analyse at most this many `seconds` of each file")
	help := fs.BoolP("help", "h", false, "show this help")
	if code, done := parseOrHelp(fs, args, "report", reportHelp, help, stdout, stderr); done {
		return code
	}
	if len(*from) == 0 || *output == "" {
		return report(stderr, "report", usagef("give --from and --output"), "")
	}
	if fs.NArg() > 0 {
		return report(stderr, "report", usagef("unexpected argument %q", fs.Arg(0)), "")
	}
	if isDir(*output) {
		return report(stderr, "report", usagef("--output %s is a folder; give the report's file name, for example --output %s", *output, filepath.Join(*output, "report.html")), "")
	}
	// From here on Ctrl-C and SIGTERM stop the report before its file is
	// written; a second one ends the process at once.
	ctx, stop := signalContext()
	defer stop()
	opt := htmlreport.Options{MaxSeconds: *maxS}
	var r htmlreport.Report
	for i, name := range *from {
		one, err := buildReport(name, opt)
		if err != nil {
			return report(stderr, "report", err, "make one with 'wavsieve apply' (it writes wavsieve-manifest.json), 'wavsieve survey --json' or 'wavsieve bands --json'")
		}
		if i == 0 {
			r = one
			continue
		}
		r.Title = "wavsieve report"
		if one.Subtitle != "" {
			r.Subtitle = strings.TrimPrefix(r.Subtitle+"; "+one.Subtitle, "; ")
		}
		r.Merge(one)
	}
	var b bytes.Buffer
	if err := htmlreport.Write(&b, r); err != nil {
		return report(stderr, "report", err, "")
	}
	if *output == "-" {
		if _, err := stdout.Write(b.Bytes()); err != nil {
			return report(stderr, "report", err, "")
		}
		return exitOK
	}
	if ctx.Err() != nil {
		fmt.Fprintln(stderr, "wavsieve report: interrupted; nothing was written")
		return exitFail
	}
	if err := writeFileAtomic(*output, b.Bytes()); err != nil {
		return report(stderr, "report", err, "")
	}
	if ctx.Err() != nil {
		// The signal came while the file was written: it is complete.
		fmt.Fprintf(stderr, "wavsieve report: interrupted after %s was written in full\n", *output)
		return exitFail
	}
	files := "files"
	if len(r.Files) == 1 {
		files = "file"
	}
	fmt.Fprintf(stderr, "wavsieve report: wrote %s (%d %s, %d KiB)\n", *output, len(r.Files), files, b.Len()/1024)
	return exitOK
}

// buildReport reads one apply record (a JSON or CSV record, or an output
// folder, read through package runrecord) or a survey document.
func buildReport(name string, opt htmlreport.Options) (htmlreport.Report, error) {
	rec, err := runrecord.Read(name)
	if err == nil {
		r, err := htmlreport.FromRecord(rec, "", opt)
		if err != nil {
			return r, fmt.Errorf("%s: %w", name, err)
		}
		return r, nil
	}
	if !errors.Is(err, runrecord.ErrNotRecord) {
		return htmlreport.Report{}, err
	}
	data, rerr := os.ReadFile(name)
	if rerr != nil {
		return htmlreport.Report{}, wavio.PathError(name, rerr)
	}
	var probe struct {
		Files []json.RawMessage `json:"files"`
	}
	if json.Unmarshal(data, &probe) != nil || probe.Files == nil {
		return htmlreport.Report{}, fmt.Errorf("%s: not a record of wavsieve apply nor a survey document", name)
	}
	if htmlreport.IsBands(data) {
		r, err := htmlreport.FromBands(data)
		if err != nil {
			return r, fmt.Errorf("%s: %w", name, err)
		}
		return r, nil
	}
	r, err := htmlreport.FromSurvey(data, "", opt)
	if err != nil {
		return r, fmt.Errorf("%s: %w", name, err)
	}
	return r, nil
}
