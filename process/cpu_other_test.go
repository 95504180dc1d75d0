//go:build !unix

package process_test

// cpuSeconds is not measured on this system.
func cpuSeconds() float64 { return 0 }
