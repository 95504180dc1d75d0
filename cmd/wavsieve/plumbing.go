package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/spf13/pflag"
)

// parseOrHelp parses a command's arguments into fs. A parse error is a
// usage error of command cmd; with --help set after parsing, it prints
// helpText and the flag list on stdout. done reports that the command
// ends here with exit code code; otherwise the command goes on.
func parseOrHelp(fs *pflag.FlagSet, args []string, cmd, helpText string, help *bool, stdout, stderr io.Writer) (code int, done bool) {
	if err := fs.Parse(args); err != nil {
		return report(stderr, cmd, usagef("%v", err), ""), true
	}
	if *help {
		fmt.Fprint(stdout, helpText)
		fmt.Fprint(stdout, fs.FlagUsages())
		return exitOK, true
	}
	return 0, false
}

// libraryPrefixes are the "pkg: " prefixes of the library's errors,
// which mean nothing to a user of the command.
var libraryPrefixes = []string{"analyze: ", "design: ", "process: ", "runrecord: ", "wavio: "}

// plainMessage is err's message without the library's package prefixes
// at its start.
func plainMessage(err error) string {
	msg := err.Error()
	for again := true; again; {
		again = false
		for _, p := range libraryPrefixes {
			if strings.HasPrefix(msg, p) {
				msg, again = msg[len(p):], true
			}
		}
	}
	return msg
}
