package main

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// optRun runs `ergostock optimize` and returns exit status, stdout, stderr.
func optRun(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(append([]string{"ergostock", "optimize"}, args...), strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

// The classical test problem of Zheng and Federgruen (1991): Poisson demand
// of mean 10, K = 64, h = 1, b = 9, zero lead time; optimum s = 6, S = 40
// with cost about 35.02 (from memory, confirmed by brute force in the
// policies package tests).
var optClassic = []string{"--demand", "poisson:mean=10", "--holding-cost", "1", "--shortage-cost", "9", "--order-cost", "64"}

func TestOptimizeJSON(t *testing.T) {
	code, out, errs := optRun(append(append([]string{}, optClassic...), "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var v map[string]any
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	for _, f := range []string{"fill_rate", "stockout_probability", "mean_on_hand", "mean_backorders", "mean_lost_sales",
		"order_frequency", "mean_order_quantity", "holding_cost", "shortage_cost", "ordering_cost", "purchase_cost", "total_cost"} {
		if _, ok := v[f].(float64); !ok {
			t.Errorf("field %s missing or not a number", f)
		}
	}
	p := v["policy"].(map[string]any)
	if p["type"] != "s-S" || p["reorder_point"] != 6.0 || p["order_up_to"] != 40.0 {
		t.Errorf("policy %v, want s-S with s=6, S=40", p)
	}
	if c := v["total_cost"].(float64); math.Abs(c-35.02) > 0.005 {
		t.Errorf("total cost %g, want about 35.02", c)
	}
	s, ok := v["search"].(map[string]any)
	if !ok {
		t.Fatalf("no search object in %s", out)
	}
	for _, f := range []string{"policies_evaluated", "method", "bounds", "guarantee"} {
		if _, ok := s[f]; !ok {
			t.Errorf("search.%s missing", f)
		}
	}
}

func TestOptimizeFloorsAndTypes(t *testing.T) {
	for _, c := range []struct {
		args  []string
		check func(v map[string]any) bool
	}{
		{[]string{"--policy", "base-stock"}, func(v map[string]any) bool {
			return v["policy"].(map[string]any)["order_up_to"] == 14.0 // critical fractile of Poisson(10) at 0.9
		}},
		{[]string{"--policy", "s-nQ"}, func(v map[string]any) bool { return v["policy"].(map[string]any)["type"] == "s-nQ" }},
		{[]string{"--min-fill-rate", "0.99"}, func(v map[string]any) bool { return v["fill_rate"].(float64) >= 0.99 }},
		{[]string{"--max-stockout-probability", "0.02"}, func(v map[string]any) bool { return v["stockout_probability"].(float64) <= 0.02 }},
		{[]string{"--unmet", "lost", "--lead-time", "1"}, func(v map[string]any) bool { return v["mean_lost_sales"].(float64) > 0 }},
	} {
		code, out, errs := optRun(append(append(append([]string{}, optClassic...), c.args...), "--json")...)
		if code != 0 {
			t.Errorf("%v: exit %d: %s", c.args, code, errs)
			continue
		}
		var v map[string]any
		if err := json.Unmarshal([]byte(out), &v); err != nil {
			t.Fatal(err)
		}
		if !c.check(v) {
			t.Errorf("%v: unexpected result %s", c.args, out)
		}
	}
}

func TestOptimizeRefused(t *testing.T) {
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"--min-fill-rate", "1"}, 2, "--min-fill-rate"},
		{[]string{"--min-fill-rate", "0"}, 2, "--min-fill-rate"},
		{[]string{"--max-stockout-probability", "-0.5"}, 2, "--max-stockout-probability"},
		{[]string{"--policy", "min-max"}, 2, "--policy"},
		{[]string{"--holding-cost", "0"}, 2, "--holding-cost"},
		{[]string{"--unmet", "lost", "--lead-time", "3", "--max-states", "10"}, 1, "the limit is 10 states (--max-states)"},
		{[]string{"--unmet", "lost", "--lead-time", "3", "--max-states", "50"}, 1, "--max-states 50: lost-sales search: the compass search starts at"},
	} {
		args := append(append([]string{}, optClassic...), c.args...)
		code, out, errs := optRun(args...)
		if code != c.code || !strings.Contains(errs, c.want) || out != "" || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: exit %d, stderr %q, stdout %q; want exit %d naming %s", c.args, code, errs, out, c.code, c.want)
		}
	}
}

func TestOptimizeTable(t *testing.T) {
	code, out, errs := optRun(optClassic...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"s-S(s=6,S=40)", "total cost", "search", "Zheng-Federgruen (1991)", "policies evaluated", "bounds order_up_to", "guarantee"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
}
