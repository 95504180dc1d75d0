package buildinfo

import (
	"strings"
	"testing"
)

func TestVersionNotEmpty(t *testing.T) {
	v := Version()
	if v == "" || strings.HasPrefix(v, " ") {
		t.Fatalf("Version() = %q, want a non-empty version", v)
	}
	if Version() != v {
		t.Fatalf("Version() changed between calls")
	}
}
