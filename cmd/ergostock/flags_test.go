package main

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
)

// runSafe runs the command line in process and reports a panic as a test
// failure instead of a crash.
func runSafe(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	func() {
		defer func() {
			if r := recover(); r != nil {
				t.Errorf("%v: panic: %v", args, r)
				code = -1
			}
		}()
		code = run(append([]string{"ergostock"}, args...), strings.NewReader(""), &out, &errb)
	}()
	return code, out.String(), errb.String()
}

// TestEngineRefusals runs the reproductions of issue 10 that belong to
// evaluate and optimize: each must be a one-line refusal with the status
// given (1 for a size, a limit or an overflow, 2 for a command-line
// mistake) naming the input, never a panic, an out-of-memory crash or a
// non-finite figure.
func TestEngineRefusals(t *testing.T) {
	costs := []string{"--holding-cost", ".4", "--shortage-cost", "12"}
	ev := func(a ...string) []string {
		return append(append([]string{"evaluate", "--demand", "poisson:mean=9"}, costs...), a...)
	}
	opt := func(demand string, a ...string) []string {
		return append(append([]string{"optimize", "--demand", demand}, costs...), a...)
	}
	for _, c := range []struct {
		args []string
		code int
		want []string // all on stderr
	}{
		// Sizes refused before allocation (16 GB, makeslice panics).
		{ev("--order-up-to", "2000000000"), 1, []string{"--order-up-to 2000000000:", "2000000002 entries", "GB", "the limit is 5000000 states (--max-states)"}},
		{ev("--order-up-to", "9223372036854775807"), 1, []string{"--order-up-to 9223372036854775807:", "--max-states"}},
		{ev("--reorder-point", "9223372036854775000", "--order-multiple", "5"), 1, []string{"--reorder-point 9223372036854775000:", "--max-states"}},
		{ev("--reorder-point", "9223372036854775807", "--order-multiple", "5"), 2, []string{"--reorder-point 9223372036854775807:", "int range"}},
		{ev("--reorder-point", "-9223372036854775000", "--order-up-to", "9223372036854775000"), 1, []string{"--order-up-to 9223372036854775000:", "1.84e+19 states"}},
		{ev("--reorder-point", "0", "--order-up-to", "6000000"), 1, []string{"--order-up-to 6000000:", "6000000 states", "--max-states"}},
		{ev("--reorder-point", "0", "--order-multiple", "6000000"), 1, []string{"--order-multiple 6000000:", "--max-states"}},
		// The search: demand too wide, an enormous order quantity.
		{opt("negbin:mean=1,var=1e18"), 1, []string{"--demand negbin:mean=1,var=1e+18:", "P(D >= 1) rounds to 0", "variance is too large"}},
		{opt("poisson:mean=1e9"), 1, []string{"--demand poisson:mean=1e+09:", "1e-17 tail", "larger units", "--max-states"}},
		{opt("poisson:mean=9", "--order-cost", "1e15"), 1, []string{"--order-cost 1e15:", "economic order quantity", "2.16e+08", "--max-states"}},
		{opt("poisson:mean=9", "--order-cost", "1e15", "--policy", "s-nQ"), 1, []string{"--order-cost 1e15:", "economic order quantity"}},
		{opt("gamma:mean=1e-9,sd=1"), 1, []string{"--demand gamma:mean=1e-09,sd=1:", "puts all its mass at 0"}},
		{opt("poisson:mean=1e7"), 1, []string{"--demand poisson:mean=1e+07:", "--max-states"}},
		{[]string{"evaluate", "--demand", "normal:mean=100,sd=30", "--holding-cost", "1", "--shortage-cost", "9", "--order-up-to", "300", "--lead-time", "400000000"}, 1, []string{"--demand normal:mean=100,sd=30:", "400000000-period sum"}},
		{opt("poisson:mean=9", "--lead-time", "1000000000"), 1, []string{"--demand poisson:mean=9:", "1000000001 periods", "--max-states"}},
		{opt("pmf:0=0.5,1000000=0.5", "--order-cost", "50", "--policy", "s-nQ"), 1, []string{"--demand pmf:0=0.5,1000000=0.5:", "plan in units of 1000000"}},
		{opt("poisson:mean=9", "--holding-cost", "1e-300", "--order-cost", "1"), 1, []string{"--order-cost 1:", "economic order quantity"}},
		// Overflowing figures, in the table and in JSON.
		{[]string{"evaluate", "--demand", "poisson:mean=9", "--holding-cost", "1e308", "--shortage-cost", "1e308", "--order-up-to", "12", "--json"}, 1, []string{"--holding-cost 1e308:", "float64"}},
		{[]string{"evaluate", "--demand", "poisson:mean=9", "--holding-cost", "1", "--shortage-cost", "1e308", "--order-up-to", "2"}, 1, []string{"--shortage-cost 1e308:", "float64"}},
		{[]string{"optimize", "--demand", "poisson:mean=9", "--holding-cost", "1e308", "--shortage-cost", "1e308"}, 1, []string{"--holding-cost 1e308:"}},
		// Service requirements finer than the figures resolve.
		{opt("poisson:mean=9", "--max-stockout-probability", "1e-16"), 1, []string{"--max-stockout-probability 1e-16:", "at least 1e-12"}},
		{opt("poisson:mean=9", "--min-fill-rate", "0.9999999999999"), 1, []string{"--min-fill-rate 0.9999999999999:", "1 - 1e-12"}},
		{opt("poisson:mean=9", "--min-fill-rate", "0.99999999999999999"), 2, []string{"--min-fill-rate 0.99999999999999999:", "reads as 1"}},
		// One number rule for the demand grammar and the flags.
		{ev("--order-up-to", "0x10"), 2, []string{"--order-up-to 0x10:", "plain decimal"}},
		{ev("--order-up-to", "1_000"), 2, []string{"--order-up-to 1_000:", "plain decimal"}},
		{ev("--order-up-to", "9223372036854775808"), 2, []string{"--order-up-to 9223372036854775808:", "whole number from"}},
		{ev("--order-up-to", "12.5"), 2, []string{"--order-up-to 12.5:", "whole number"}},
		{[]string{"evaluate", "--demand", "poisson:mean=9_000", "--holding-cost", "1", "--shortage-cost", "1", "--order-up-to", "5"}, 2, []string{"--demand poisson:mean=9_000:", "plain decimal"}},
		{[]string{"evaluate", "--demand", "poisson:mean=0x10", "--holding-cost", "1", "--shortage-cost", "1", "--order-up-to", "5"}, 2, []string{"--demand poisson:mean=0x10:"}},
		{[]string{"evaluate", "--demand", "poisson:mean=9", "--holding-cost", "0x1p-2", "--shortage-cost", "1", "--order-up-to", "5"}, 2, []string{"--holding-cost 0x1p-2:", "plain decimal"}},
		{[]string{"evaluate", "--demand", "poisson:mean=9", "--holding-cost", "1", "--shortage-cost", "inf", "--order-up-to", "5"}, 2, []string{"--shortage-cost inf:"}},
		{[]string{"evaluate", "--demand", "poisson:mean=9", "--holding-cost", "1", "--shortage-cost", "NaN", "--order-up-to", "5"}, 2, []string{"--shortage-cost NaN:"}},
		{opt("poisson:mean=9", "--min-fill-rate", "nan"), 2, []string{"--min-fill-rate nan:"}},
		{opt("poisson:mean=9", "--max-evaluations", "0x10"), 2, []string{"--max-evaluations 0x10:"}},
		// Integer flags beyond the range: the value typed, never a wrapped one.
		{ev("--order-up-to", "12", "--max-states", "4294967297"), 2, []string{"--max-states 4294967297:", "2147483647"}},
		{ev("--order-up-to", "12", "--max-states", "1e10"), 2, []string{"--max-states 1e10:", "2147483647"}},
		{ev("--order-up-to", "12", "--max-states", "-1"), 2, []string{"--max-states -1:"}},
		{ev("--order-up-to", "12", "--lead-time", "99999999999999999999"), 2, []string{"--lead-time 99999999999999999999:"}},
		{ev("--order-up-to", "12", "--lead-time", "4294967297"), 2, []string{"--lead-time 4294967297:", "from 0 to 1000000000"}},
		{ev("--order-up-to", "12", "--lead-time", "9223372036854775807"), 2, []string{"--lead-time 9223372036854775807:", "from 0 to 1000000000"}},
		{ev("--order-up-to", "-9223372036854775808"), 2, []string{"--order-up-to -9223372036854775808:"}},
	} {
		code, out, errs := runSafe(t, c.args...)
		ok := code == c.code && out == "" && strings.Count(errs, "\n") == 1 && strings.HasPrefix(errs, "ergostock: ")
		for _, w := range c.want {
			ok = ok && strings.Contains(errs, w)
		}
		if !ok {
			t.Errorf("%v:\n exit %d, stdout %q\n stderr %q\n want exit %d, one line containing %q", c.args[:min(len(c.args), 12)], code, out, errs, c.code, c.want)
		}
	}
}

// TestUnmetAnyCase checks that --unmet follows the items file's rule: any
// case, spaces trimmed.
func TestUnmetAnyCase(t *testing.T) {
	for _, v := range []string{"LOST", "Lost", " lost ", "BACKORDER"} {
		code, out, errs := runSafe(t, "evaluate", "--demand", "poisson:mean=4", "--holding-cost", "1", "--shortage-cost", "9", "--order-up-to", "8", "--unmet", v, "--json")
		want := fmt.Sprintf(`"unmet": "%s"`, strings.ToLower(strings.TrimSpace(v)))
		if code != 0 || !strings.Contains(out, want) {
			t.Errorf("--unmet %q: exit %d, stderr %q, want %s in %s", v, code, errs, want, out)
		}
	}
}

// TestNumberFlagsExact checks that a number flag given with an exponent or
// fraction reads as the number (1e1 = 10), by the one rule.
func TestNumberFlagsExact(t *testing.T) {
	a := []string{"evaluate", "--demand", "poisson:mean=4", "--holding-cost", "1.0e0", "--shortage-cost", "9.", "--json"}
	_, want, _ := runSafe(t, append(a[:len(a):len(a)], "--order-up-to", "10")...)
	code, got, errs := runSafe(t, append(a[:len(a):len(a)], "--order-up-to", "1e1")...)
	if code != 0 || got != want {
		t.Errorf("--order-up-to 1e1: exit %d, stderr %q; output differs from --order-up-to 10", code, errs)
	}
}
