package main

import "strings"

// libPrefixes are the "pkg: " prefixes library errors carry: those of
// plainMessage and analyze/verify's; they mean nothing to a user and are
// left out of what the command prints, wherever the wrapping put them.
var libPrefixes = append([]string{"verify: "}, libraryPrefixes...)

// userMessage is msg without the library prefixes, at its start or after
// a ": " that a wrapping added ("in.wav: process: no channel 3" reads
// "in.wav: no channel 3").
func userMessage(msg string) string {
	for changed := true; changed; {
		changed = false
		for _, p := range libPrefixes {
			if strings.HasPrefix(msg, p) {
				msg, changed = msg[len(p):], true
			}
			if strings.Contains(msg, ": "+p) {
				msg, changed = strings.ReplaceAll(msg, ": "+p, ": "), true
			}
		}
	}
	return msg
}
