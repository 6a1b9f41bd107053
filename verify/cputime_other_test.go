//go:build !unix

package verify

// cpuSeconds is unavailable here; the cpu metric then reads 0.
func cpuSeconds() float64 { return 0 }
