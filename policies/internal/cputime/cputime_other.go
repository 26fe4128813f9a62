//go:build !unix

package cputime

import "time"

// Process returns 0 where the process's CPU time is not known.
func Process() time.Duration { return 0 }
