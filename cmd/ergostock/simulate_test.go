package main

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"

	"ergostock/inventory"
)

// simRun runs the command line and returns exit status, stdout and stderr.
func simRun(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(append([]string{"ergostock", "simulate"}, args...), strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

var simBase = []string{"--demand", "poisson:mean=4", "--lead-time", "2", "--holding-cost", "1", "--shortage-cost", "9",
	"--order-cost", "20", "--unit-cost", "2", "--reorder-point", "10", "--order-up-to", "20", "--periods", "20000", "--replications", "4"}

func TestSimulateByteIdenticalAcrossWorkers(t *testing.T) {
	for _, extra := range [][]string{{"--json"}, nil} {
		var first string
		for _, w := range []string{"1", "3", "0"} {
			code, out, errs := simRun(append(append(append([]string{}, simBase...), extra...), "--workers", w)...)
			if code != 0 {
				t.Fatalf("workers %s: exit %d: %s", w, code, errs)
			}
			if first == "" {
				first = out
			} else if out != first {
				t.Errorf("workers %s %v: output differs:\n%s\nwant\n%s", w, extra, out, first)
			}
		}
	}
}

func TestSimulateJSON(t *testing.T) {
	code, out, errs := simRun(append(append([]string{}, simBase...), "--json", "--seed", "7", "--warmup", "500")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got map[string]json.RawMessage
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, out)
	}
	for _, f := range (inventory.Figures{}).Fields() {
		var iv struct {
			Mean *float64 `json:"mean"`
			CI95 *float64 `json:"ci95"`
		}
		if err := json.Unmarshal(got[f.Name], &iv); err != nil || iv.Mean == nil || iv.CI95 == nil {
			t.Errorf("%s: %s, want {\"mean\": x, \"ci95\": h}", f.Name, got[f.Name])
		}
	}
	var pol map[string]any
	if err := json.Unmarshal(got["policy"], &pol); err != nil || pol["type"] != "s-S" || pol["reorder_point"] != 10.0 || pol["order_up_to"] != 20.0 || pol["order_multiple"] != nil {
		t.Errorf("policy %s", got["policy"])
	}
	var set struct {
		Periods, Warmup, Replications int
		Seed                          uint64
		Confidence                    float64
	}
	if err := json.Unmarshal(got["settings"], &set); err != nil || set.Periods != 20000 || set.Warmup != 500 || set.Replications != 4 || set.Seed != 7 || set.Confidence != 0.95 {
		t.Errorf("settings %s", got["settings"])
	}
	if len(got) != 14 {
		t.Errorf("%d top-level keys, want 12 figures + policy + settings", len(got))
	}
}

func TestSimulateTable(t *testing.T) {
	code, out, errs := simRun(simBase...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"simulated s-S(s=10,S=20)", "first 2000 discarded", "total cost", " ± ", "exact values outside their interval:"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	// When the exact engine refuses (a lost-sales chain over --max-states),
	// the simulation is still printed and a note goes to stderr.
	args := append(append([]string{}, simBase...), "--unmet", "lost", "--max-states", "1")
	code, out, errs = simRun(args...)
	if code != 0 || !strings.Contains(errs, "exact values not shown") || !strings.Contains(out, "total cost") {
		t.Errorf("over the state limit: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
}

func TestSimulateFlagErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{"--seed", "-1"}, "--seed"},
		{[]string{"--replications", "1"}, "--replications"},
		{[]string{"--periods", "100", "--warmup", "100"}, "--periods"},
		{[]string{"--periods", "0"}, "--periods"},
		{[]string{"--warmup", "-5"}, "--warmup"},
		{[]string{"--workers", "-2"}, "--workers"},
		{[]string{"--periods", "many"}, "periods"},
	} {
		code, out, errs := simRun(append(append([]string{}, simBase...), c.args...)...)
		if code != 2 || !strings.Contains(errs, c.flag) || strings.Count(strings.TrimSpace(errs), "\n") != 0 || out != "" {
			t.Errorf("%v: exit %d, stderr %q, stdout %q; want exit 2 and one line naming %s", c.args, code, errs, out, c.flag)
		}
	}
}
