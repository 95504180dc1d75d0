//go:build unix

package process_test

import "syscall"

// cpuSeconds is the process's user plus system CPU time: on a shared
// machine it compares two runs where wall time mostly measures the other
// jobs.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return float64(ru.Utime.Sec+ru.Stime.Sec) + float64(ru.Utime.Usec+ru.Stime.Usec)/1e6
}
