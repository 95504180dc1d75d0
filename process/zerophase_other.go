//go:build !linux

package process

// mapSamples returns n zeroed float64 from the Go heap; release does
// nothing (the collector frees them). The Linux version maps them
// outside the heap, with huge pages.
func mapSamples(n int) (x []float64, release func()) {
	return make([]float64, n), func() {}
}

// prefault does nothing: the memory is the Go heap's.
func prefault(p []float64) {}
