package main

import (
	"bytes"
	"strings"
	"testing"
)

// Lost sales under weekly review: evaluate answers exactly, and simulate
// shows the exact column beside its intervals (the chain at reviews is
// small: one pipeline component for a lead time of 3 days), every exact
// value inside its interval in this run.
func TestLostWeeklyReviewCommands(t *testing.T) {
	sys := []string{"--demand", "poisson:mean=3", "--lead-time", "pmf:1=0.2,2=0.5,3=0.3", "--review-period", "7", "--unmet", "lost",
		"--reorder-point", "15", "--order-up-to", "35", "--holding-cost", "1", "--shortage-cost", "9", "--order-cost", "20"}
	var out, errb bytes.Buffer
	if code := run(append([]string{"ergostock", "evaluate"}, sys...), nil, &out, &errb); code != 0 {
		t.Fatalf("evaluate: exit %d: %s", code, errb.String())
	}
	if !strings.Contains(out.String(), "review period         7") {
		t.Errorf("evaluate: no review period line:\n%s", out.String())
	}
	out.Reset()
	errb.Reset()
	if code := run(append([]string{"ergostock", "simulate", "--periods", "20000"}, sys...), nil, &out, &errb); code != 0 {
		t.Fatalf("simulate: exit %d: %s", code, errb.String())
	}
	if strings.Contains(errb.String(), "exact values not shown") || !strings.Contains(out.String(), "exact values outside their interval") {
		t.Errorf("simulate: no exact column:\nstdout %s\nstderr %s", out.String(), errb.String())
	}
}
