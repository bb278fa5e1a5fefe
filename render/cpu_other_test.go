//go:build !unix

package render

// cpuSeconds is 0 where getrusage is not available.
func cpuSeconds() float64 { return 0 }
