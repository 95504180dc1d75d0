package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strings"
	"syscall"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/process/runrecord"
)

const gatherHelp = `Merge the records of the shares of a run into one, and say what is missing.

Usage:
  wavsieve gather [--json] <dir>

A run split with apply --shard K/N (one task of a cluster job per share)
writes one record per share into the output folder,
wavsieve-manifest.K-of-N.json, each holding the whole sorted input list
and its share. gather merges every share's record found in <dir> into
one record of the whole run, wavsieve-manifest.json and .csv in <dir>
(rows already there are kept, keyed by output), and checks that the
shares covered every input exactly once. (Shares given --manifest keep
their records where it says, and gather does not look for them there.)

When inputs are missing (a share that never ran, or files that failed),
it prints, for each share concerned, the command that redoes it: a share
run again skips the outputs it already made, so only what is missing is
filtered. In a Slurm array whose task i runs share i+1, resubmit the
array indices it lists.

--json prints {"files": [rows of the merged record], "missing": [inputs
not done], "failed": [{"input", "output", "error"}], "shares": {"total":
N, "found": [K, ...]}, "resubmit": [{"share", "working_dir", "command"}]}.

Exit codes: 0 every input done exactly once, 1 some missing (or done
twice, or no share records), 2 usage error.

Examples:
  wavsieve gather out/archive
  wavsieve gather --json out/archive > out/archive-gather.json

Flags:
`

func runGather(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("gather", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	asJSON := fs.Bool("json", false, "print the merged record and what is missing as JSON on stdout")
	help := fs.BoolP("help", "h", false, "show this help")
	if code, done := parseOrHelp(fs, args, "gather", gatherHelp, help, stdout, stderr); done {
		return code
	}
	if fs.NArg() != 1 {
		return report(stderr, "gather", usagef("give one output folder"), "")
	}
	dir := fs.Arg(0)
	if !isDir(dir) {
		return report(stderr, "gather", usagef("%s: no such folder; give the --output folder of the shares", dir), "")
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	g, err := runrecord.Gather(ctx, dir)
	if err != nil {
		// The library's "runrecord: " prefix means nothing to a user.
		return report(stderr, "gather", errors.New(plainMessage(err)), "")
	}
	base := runrecord.Base(dir, 0, 0)
	if *asJSON {
		rows, err := json.Marshal(g.Record)
		if err != nil {
			return report(stderr, "gather", err, "")
		}
		var whole struct {
			Files json.RawMessage `json:"files"`
		}
		json.Unmarshal(rows, &whole)
		doc := struct {
			Kind     string               `json:"kind"`
			Version  string               `json:"version"`
			Files    json.RawMessage      `json:"files"`
			Missing  []string             `json:"missing"`
			Failed   []runrecord.Failure  `json:"failed"`
			Shares   runrecord.Shares     `json:"shares"`
			Resubmit []runrecord.Resubmit `json:"resubmit"`
			Twice    []string             `json:"done_twice,omitempty"`
			Record   string               `json:"record"`
		}{"wavsieve-gather", g.Record.Version, whole.Files, g.Missing, g.Failed, g.Shares, g.Resubmit, g.Twice, base + ".json"}
		if doc.Resubmit == nil {
			doc.Resubmit = []runrecord.Resubmit{}
		}
		if err := writeJSON(stdout, doc, true); err != nil {
			return report(stderr, "gather", err, "")
		}
	}
	out := stderr
	if !*asJSON {
		out = stdout
	}
	total := len(g.Record.Inputs)
	fmt.Fprintf(out, "%d of %d inputs done; %d of %d shares found; record %s.json\n", total-len(g.Missing), total, len(g.Shares.Found), g.Shares.Total, base)
	for _, f := range g.Failed {
		fmt.Fprintf(out, "failed: %s\n", f.Error)
	}
	for _, in := range g.Twice {
		fmt.Fprintf(out, "done by more than one share: %s\n", in)
	}
	if len(g.Missing) > 0 {
		const shown = 10
		for i, in := range g.Missing {
			if i == shown {
				fmt.Fprintf(out, "missing: ... and %d more (all of them in gather --json)\n", len(g.Missing)-shown)
				break
			}
			fmt.Fprintf(out, "missing: %s\n", in)
		}
		fmt.Fprintf(out, "%d inputs missing; redo them with:\n", len(g.Missing))
		var idx []string
		for _, r := range g.Resubmit {
			cmd := runrecord.ShellQuote(r.Command)
			if r.WorkingDir != "" {
				cmd = "cd " + runrecord.ShellQuote([]string{r.WorkingDir}) + " && " + cmd
			}
			fmt.Fprintf(out, "  %s\n", cmd)
			idx = append(idx, fmt.Sprint(r.Share-1))
		}
		if len(idx) > 0 {
			fmt.Fprintf(out, "or, in a Slurm array whose task i runs share i+1: sbatch --array=%s with the same script\n", strings.Join(idx, ","))
		}
		fmt.Fprintf(out, "then run 'wavsieve gather %s' again.\n", filepath.Clean(dir))
	}
	if !g.Complete() {
		return exitFail
	}
	return exitOK
}
