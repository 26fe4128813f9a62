package cputime

import (
	"testing"
	"time"
)

// Report reports the process CPU time per operation since start as
// cpu-ms/op (nothing where Process does not know it): on a machine shared
// with other work it varies less than the wall time, since it leaves out
// the time the process waits for a core. Use it as
//
//	defer cputime.Report(b, cputime.Process())
func Report(b *testing.B, start time.Duration) {
	if b.N > 0 && start > 0 {
		b.ReportMetric(float64(Process()-start)/float64(b.N)/1e6, "cpu-ms/op")
	}
}
