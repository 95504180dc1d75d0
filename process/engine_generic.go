//go:build !amd64 || purego

package process

// useWave4 is false where there is no assembly kernel: every section
// then runs through pairSection.
var useWave4 = false

func wave4(x *float64, steps int, stride int, w *float64, z *float64) {
	panic("process: wave4 called without an assembly kernel")
}
