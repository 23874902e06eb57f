//go:build unix

package modem

import "syscall"

// cpuSeconds returns the process's user plus system CPU time, for
// benchmarks that report it beside the wall time (on a shared machine
// the CPU time moves less).
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	t := func(v syscall.Timeval) float64 { return float64(v.Sec) + float64(v.Usec)/1e6 }
	return t(ru.Utime) + t(ru.Stime)
}
