//go:build unix

package cputime

import (
	"syscall"
	"time"
)

// Process returns the user and system CPU time of the process so far.
func Process() time.Duration {
	var u syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &u); err != nil {
		return 0
	}
	return time.Duration(u.Utime.Nano() + u.Stime.Nano())
}
