//go:build unix

package batch

import (
	"syscall"
	"testing"
	"time"
)

// processCPU returns the user and system CPU time of the process so far.
func processCPU() time.Duration {
	var u syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &u); err != nil {
		return 0
	}
	return time.Duration(u.Utime.Nano() + u.Stime.Nano())
}

// reportCPU reports the process CPU time per operation since start as
// cpu-ms/op: on a machine shared with other work it varies less than the
// wall time (it leaves out the time the process waits for a core).
func reportCPU(b *testing.B, start time.Duration) {
	if b.N > 0 {
		b.ReportMetric(float64(processCPU()-start)/float64(b.N)/1e6, "cpu-ms/op")
	}
}
