//go:build unix

package render

import "syscall"

// cpuSeconds returns the process's user + system CPU time in seconds
// (getrusage), for benchmarks' CPU-s/op metric.
func cpuSeconds() float64 {
	var u syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &u) != nil {
		return 0
	}
	return float64(u.Utime.Sec+u.Stime.Sec) + 1e-6*float64(u.Utime.Usec+u.Stime.Usec)
}
