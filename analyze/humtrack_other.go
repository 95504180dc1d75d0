//go:build !linux

package analyze

import (
	"errors"
	"os"
)

// spillLow: elsewhere the tracker's reduced-rate signal stays on the
// heap (the Linux version spills it to a mapped temporary file).
const spillLow = false

// mapLow is not used without spilling.
func mapLow(f *os.File, n int) ([]float32, func(), error) {
	return nil, nil, errors.New("no mapping on this system")
}
