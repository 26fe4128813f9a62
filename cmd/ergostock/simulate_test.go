package main

import (
	"bytes"
	"encoding/json"
	"os"
	"regexp"
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

// simWide draws its demand by a direct sampler (no alias table).
var simWide = []string{"--demand", "negbin:mean=1e7,var=1e14", "--lead-time", "1", "--holding-cost", "1", "--shortage-cost", "9",
	"--order-cost", "20", "--reorder-point", "20000000", "--order-up-to", "60000000", "--periods", "5000", "--replications", "5"}

func TestSimulateByteIdenticalAcrossWorkers(t *testing.T) {
	for _, extra := range [][]string{{"--json"}, nil, append([]string{"--json"}, simWide...), simWide} {
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

// oneLineNaming checks a refusal: the wanted exit status, one line on
// stderr that names want, nothing on stdout, no panic.
func oneLineNaming(t *testing.T, args []string, code int, out, errs string, wantCode int, want string) {
	t.Helper()
	msg := strings.TrimSpace(errs)
	if code != wantCode || !strings.Contains(msg, want) || strings.Contains(msg, "\n") || out != "" ||
		strings.Contains(errs, "panic") || strings.Contains(errs, "goroutine") {
		t.Errorf("%v:\nexit %d, stderr %q, stdout %q\nwant exit %d and one line naming %q", args, code, errs, out, wantCode, want)
	}
}

// noNonFinite fails when s prints a non-finite number.
func noNonFinite(t *testing.T, what, s string) {
	t.Helper()
	if m := nonFinite.FindString(s); m != "" {
		t.Errorf("%s prints %q", what, m)
	}
}

// nonFinite matches how Go prints a non-finite float.
var nonFinite = regexp.MustCompile(`\bNaN\b|[+-]Inf\b|\bInf\b`)

// TestSimulateHostile runs the reproductions of issue 10 through
// simulate: inputs that used to allocate without bound, overflow the exact
// sums or run for ever are refused before anything is allocated, with exit
// status 1 and one line naming the flag, the value and the size.
func TestSimulateHostile(t *testing.T) {
	base := []string{"--demand", "poisson:mean=9", "--holding-cost", ".4", "--shortage-cost", "12"}
	for _, c := range []struct {
		args []string
		code int
		want string // in the one-line message
	}{
		{[]string{"--order-up-to", "9223372036854775807"}, 1, "--order-up-to 9223372036854775807"},
		{[]string{"--order-up-to", "-9223372036854775808"}, 2, "--order-up-to -9223372036854775808"},
		{[]string{"--reorder-point", "9223372036854775000", "--order-multiple", "5"}, 1, "--reorder-point 9223372036854775000"},
		{[]string{"--reorder-point", "3", "--order-multiple", "9223372036854775000"}, 1, "--order-multiple 9223372036854775000"},
		// Levels below 2^60 whose sums over 100,000 periods pass 2^63.
		{[]string{"--reorder-point", "576460752303423487", "--order-multiple", "576460752303423487"}, 1, "--periods 100000: want at most"},
		{[]string{"--order-up-to", "20", "--lead-time", "1000000000"}, 1, "--lead-time 1000000000"},
		{[]string{"--order-up-to", "20", "--lead-time", "9223372036854775807"}, 2, "--lead-time 9223372036854775807"},
		{[]string{"--order-up-to", "20", "--replications", "1000000000"}, 1, "--replications 1000000000"},
		{[]string{"--order-up-to", "20", "--workers", "100000000"}, 1, "--workers 100000000"},
		{[]string{"--order-up-to", "20", "--periods", "9223372036854775807"}, 1, "--periods 9223372036854775807: want periods x replications at most the period budget"},
		{[]string{"--order-up-to", "20", "--periods", "4000000000000000000", "--replications", "2", "--period-budget", "9223372036854775807"}, 1, "9.2e18 an exact int64 sum holds"},
		{[]string{"--order-up-to", "20", "--periods", "300000", "--replications", "20000", "--period-budget", "1000000"}, 1, "period budget of 1000000"},
		{[]string{"--order-up-to", "20", "--holding-cost", "1e308", "--shortage-cost", "1e308"}, 1, "--holding-cost 1e+308"},
		{[]string{"--order-up-to", "20", "--holding-cost", "1e308", "--shortage-cost", "1e308", "--json"}, 1, "--holding-cost 1e+308"},
		{[]string{"--order-up-to", "20", "--order-cost", "1.7e308", "--unit-cost", "1.7e308", "--json"}, 1, "overflows float64"},
		// A heavy tail: P(D > 3.5e10) is about 1e-15, so 2e8 periods could sum past 2^63.
		{[]string{"--demand", "negbin:mean=1e9,var=1e18", "--order-up-to", "20", "--periods", "200000000", "--replications", "2"}, 1, "--periods 200000000: want at most"},
		{[]string{"--order-up-to", "20", "--period-budget", "0"}, 2, "--period-budget 0"},
		{[]string{"--order-up-to", "20", "--lead-time", "1000000"}, 2, "--warmup 10000: want a warm-up longer than the lead time 1000000"},
		{[]string{"--order-up-to", "20", "--periods", "99999999999999999999"}, 2, "periods"},
	} {
		args := append(append([]string{}, base...), c.args...)
		code, out, errs := simRun(args...)
		oneLineNaming(t, args, code, out, errs, c.code, c.want)
	}
}

// TestSimulateHugeButValid: levels and means far beyond the exact engine's
// tables are simulated (the simulator needs no memory in proportion to a
// level or to the support of a wide law), the exact column is left out with
// one line on stderr, and every printed figure is finite.
func TestSimulateHugeButValid(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string // on stdout
	}{
		{[]string{"--demand", "poisson:mean=9", "--order-up-to", "2000000000"}, "mean on hand"},
		{[]string{"--demand", "poisson:mean=1e9", "--order-up-to", "1000030000"}, "fill rate"},
		{[]string{"--demand", "negbin:mean=1e7,var=1e14", "--reorder-point", "20000000", "--order-multiple", "1000000"}, "order frequency"},
		{[]string{"--demand", "gamma:mean=1e8,sd=1e8", "--order-up-to", "400000000", "--unmet", "lost"}, "lost sales"},
		{[]string{"--demand", "normal:mean=1e9,sd=1e8", "--reorder-point", "1100000000", "--order-up-to", "1500000000", "--json"}, `"fill_rate"`},
	} {
		args := append([]string{"--holding-cost", ".4", "--shortage-cost", "12", "--periods", "20000", "--replications", "3"}, c.args...)
		code, out, errs := simRun(args...)
		if code != 0 || !strings.Contains(out, c.want) {
			t.Errorf("%v: exit %d, stderr %q\n%s", args, code, errs, out)
			continue
		}
		noNonFinite(t, strings.Join(args, " "), out)
		if errs != "" && (strings.Count(strings.TrimSpace(errs), "\n") != 0 || !strings.Contains(errs, "exact values not shown")) {
			t.Errorf("%v: stderr %q, want nothing or one line on the exact values", args, errs)
		}
	}
}

// TestReportSKUHostile runs the reproductions through the one-SKU report:
// the cost map, the simulation and the figures refuse with exit 1 and one
// line naming the input, and write nothing.
func TestReportSKUHostile(t *testing.T) {
	base := []string{"--demand", "poisson:mean=9", "--holding-cost", ".4", "--shortage-cost", "12", "--order-up-to", "20"}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--simulate", "--replications", "1000000000"}, "--replications 1000000000"},
		{[]string{"--simulate", "--periods", "9223372036854775807"}, "--periods 9223372036854775807"},
		{[]string{"--holding-cost", "1e308", "--shortage-cost", "1e308"}, "--holding-cost 1e308"},
		// The renewal cost map of a wide demand over the lead time: about
		// 4e11 operations, refused before the convolution.
		{[]string{"--demand", "poisson:mean=200000", "--lead-time", "4", "--order-cost", "100", "--reorder-point", "1000000", "--order-up-to", "1000200"}, "--demand poisson:mean=200000 with --lead-time 4: the cost map"},
		{[]string{"--lead-time", "1000000"}, "1000001 periods"},
	} {
		out := t.TempDir() + "/page.html"
		args := append(append([]string{"ergostock", "report", "--out", out}, base...), c.args...)
		var stdout, stderr bytes.Buffer
		code := run(args, strings.NewReader(""), &stdout, &stderr)
		oneLineNaming(t, args, code, stdout.String(), stderr.String(), 1, c.want)
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%v: a page was written", args)
		}
	}
}

// TestReportSKUFarCurrent: a current policy far from the optimum would
// stretch the cost map past its limit (a renewal mass over 3e5 levels,
// about 5e10 operations); the page is written with the map around the
// optimum and a note, and prints no non-finite figure.
func TestReportSKUFarCurrent(t *testing.T) {
	out := t.TempDir() + "/page.html"
	args := []string{"ergostock", "report", "--out", out, "--demand", "poisson:mean=9", "--holding-cost", ".4", "--shortage-cost", "12",
		"--reorder-point", "300000", "--order-up-to", "300100"}
	var stdout, stderr bytes.Buffer
	if code := run(args, strings.NewReader(""), &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	page, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(page, []byte("The cost map leaves out the current policy s-S(s=300000,S=300100)")) {
		t.Error("the page lacks the note on the current policy")
	}
	noNonFinite(t, "page", string(page))
}

// Issue 12: simulate under a lead-time law, both models and a review
// period. The table names the timing, the JSON settings carry it, the
// exact column is shown where the engine evaluates the case, and a case
// it does not evaluate is labelled as estimates on stderr.
func TestSimulateTiming(t *testing.T) {
	law := []string{"--demand", "poisson:mean=4", "--lead-time", "pmf:1=0.2,2=0.5,3=0.3", "--holding-cost", "1", "--shortage-cost", "9",
		"--order-cost", "20", "--reorder-point", "20", "--order-up-to", "29", "--periods", "20000", "--replications", "4"}
	for _, c := range []struct {
		name   string
		extra  []string
		out    []string
		stderr string
	}{
		{"sequential, weekly review", []string{"--review-period", "7"}, []string{"lead time pmf:1=0.2,2=0.5,3=0.3 (sequential), review every 7 periods", "exact values outside their interval"}, ""},
		{"independent s-S", []string{"--lead-time-model", "independent"}, []string{"(independent)"}, "the figures are simulation estimates only"},
		{"json", []string{"--review-period", "3", "--json"}, []string{`"lead_time": "pmf:1=0.2,2=0.5,3=0.3"`, `"lead_time_model": "sequential"`, `"review_period": 3`}, ""},
	} {
		code, out, errs := simRun(append(append([]string{}, law...), c.extra...)...)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", c.name, code, errs)
		}
		for _, w := range c.out {
			if !strings.Contains(out, w) {
				t.Errorf("%s: output lacks %q:\n%s", c.name, w, out)
			}
		}
		if c.stderr != "" && !strings.Contains(errs, c.stderr) {
			t.Errorf("%s: stderr %q, want %q", c.name, errs, c.stderr)
		}
	}
}
