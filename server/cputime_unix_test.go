//go:build unix

package server

import (
	"syscall"
	"time"
)

// processCPU returns the user and system CPU time the process has used,
// for benchmarks that report CPU time beside wall time (on a shared
// machine the wall time per point depends on the other load; the CPU time
// much less).
func processCPU() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
