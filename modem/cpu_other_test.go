//go:build !unix

package modem

// cpuSeconds is not measured here (see cpu_unix_test.go).
func cpuSeconds() float64 { return 0 }
