//go:build !linux

package analyze

// spillLow: elsewhere the tracker's reduced-rate signal stays on the
// heap (the Linux version spills it to an unlinked temporary file).
const spillLow = false
