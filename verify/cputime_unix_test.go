//go:build unix

package verify

import "syscall"

// cpuSeconds is the process's user and system time so far: on the shared
// machine a benchmark's wall time counts the other jobs too, its CPU time
// much less so.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
}
