// Command wavsieve designs IIR filters at each WAV file's own sample rate,
// runs them over the audio and measures what they did.
//
// Exit codes: 0 done, 1 failed (a bad spec, an unreadable file, a failed
// check), 2 usage error.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/wavsieve/wavsieve/process/buildinfo"
)

func main() {
	os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}

// Exit codes.
const (
	exitOK    = 0
	exitFail  = 1
	exitUsage = 2
)

type command struct {
	name    string
	summary string
	run     func(args []string, stdin io.Reader, stdout, stderr io.Writer) int
}

func commands() []command {
	return []command{
		{"design", "design a filter from a spec at a sample rate and report or plot it", runDesign},
		{"apply", "filter WAV files and folders, each at its own sample rate", runApply},
		{"spectrum", "estimate the power spectrum of a WAV file, or compare two", runSpectrum},
		{"verify", "measure a filtering run and check it against the spec", runVerify},
		{"survey", "measure mains hum, drift, rumble and clipping, and suggest a filter", runSurvey},
		{"report", "make a self-contained HTML report of an apply run, a survey or band levels", runReport},
		{"gather", "merge the records of the shares of a run and list what is missing", runGather},
		{"bands", "measure octave and fractional-octave band levels of WAV files", runBands},
	}
}

const topUsage = `wavsieve filters WAV recordings and measurement files with IIR filters
designed at each file's own sample rate (bilinear transform with pre-warping),
and shows what the filters do.

Usage:
  wavsieve <command> [flags]

Commands:
%s
Run 'wavsieve <command> --help' for a command's flags and examples, and
'wavsieve help <topic>' for the spec-file keys (spec), the JSON documents
(json), the exit codes (exit-codes) and the standard weightings
(weighting). 'wavsieve --version' prints the version.

Exit codes: 0 done, 1 failed, 2 usage error, 3 verify inconclusive (see 'wavsieve help exit-codes').
`

func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprintf(stderr, topUsage, commandList())
		return exitUsage
	}
	switch args[0] {
	case "-h", "--help":
		fmt.Fprintf(stdout, topUsage, commandList())
		return exitOK
	case "help":
		return runHelp(args[1:], stdin, stdout, stderr)
	case "--version", "version":
		fmt.Fprintf(stdout, "wavsieve %s\n", buildinfo.Version())
		return exitOK
	}
	for _, c := range commands() {
		if c.name == args[0] {
			return c.run(args[1:], stdin, stdout, stderr)
		}
	}
	fmt.Fprintf(stderr, "wavsieve: unknown command %q\nRun 'wavsieve --help' for the list of commands.\n", args[0])
	return exitUsage
}

func commandList() string {
	var b strings.Builder
	for _, c := range commands() {
		fmt.Fprintf(&b, "  %-9s %s\n", c.name, c.summary)
	}
	return b.String()
}

// usageError marks an error in the command line itself (exit code 2).
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return usageError{fmt.Sprintf(format, a...)} }

// report prints err for command cmd and returns the exit code: 2 with a
// pointer to the help for a usage error, 1 otherwise, with a hint line
// where one helps.
func report(stderr io.Writer, cmd string, err error, hint string) int {
	var ue usageError
	if errors.As(err, &ue) {
		fmt.Fprintf(stderr, "wavsieve %s: %s\nRun 'wavsieve %s --help' for usage.\n", cmd, userMessage(err.Error()), cmd)
		return exitUsage
	}
	fmt.Fprintf(stderr, "wavsieve %s: %s\n", cmd, userMessage(err.Error()))
	if hint != "" {
		fmt.Fprintf(stderr, "hint: %s\n", hint)
	}
	return exitFail
}
