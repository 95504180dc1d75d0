// Package buildinfo tells which version of wavsieve is running, from the
// module's build information, so that every manifest and JSON document
// can record it.
package buildinfo

import (
	"runtime/debug"
	"sync"
)

var version = sync.OnceValue(func() string {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return "unknown"
	}
	v := bi.Main.Version
	if v == "" || v == "(devel)" {
		v = "devel"
	}
	var rev, modified string
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			if s.Value == "true" {
				modified = "+modified"
			}
		}
	}
	if rev != "" {
		if len(rev) > 12 {
			rev = rev[:12]
		}
		v += " (" + rev + modified + ")"
	}
	return v
})

// Version returns the module version ("v1.2.3", or "devel" for a build
// from a work tree), followed by the VCS revision when the build recorded
// one, e.g. "devel (3fa654b1c2d4+modified)".
func Version() string { return version() }
