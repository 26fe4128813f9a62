package main

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

// evaluate and optimize with a lead-time law and a review period: the JSON
// keeps every field of SPEC section 2 at the top level (SPEC section 4)
// with the engine's figures, and the table names the law, the model and
// the review period.
func TestEvaluateTiming(t *testing.T) {
	sysArgs := []string{"--demand", "poisson:mean=5", "--lead-time", "pmf:1=0.2,2=0.5,3=0.3", "--review-period", "7",
		"--holding-cost", "1", "--shortage-cost", "9", "--order-cost", "20"}
	law, _ := inventory.Parse("pmf:1=0.2,2=0.5,3=0.3")
	d, _ := inventory.NewPoisson(5)
	sys := inventory.System{Demand: d, LeadTimeLaw: law, ReviewPeriod: 7, Holding: 1, Shortage: 9, OrderCost: 20, Mode: inventory.Backorder}
	p := policies.Policy{Kind: policies.SS, ReorderPoint: 30, OrderUpTo: 70}
	want, err := policies.Evaluate(sys, p, policies.Options{})
	if err != nil {
		t.Fatal(err)
	}
	code, out, errs := runEvaluate(append(sysArgs, "--reorder-point", "30", "--order-up-to", "70", "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var obj map[string]any
	if err := json.Unmarshal([]byte(out), &obj); err != nil {
		t.Fatal(err)
	}
	for _, f := range want.Figures.Fields() {
		v, ok := obj[f.Name].(float64)
		if !ok || v != f.Value {
			t.Errorf("%s = %v, want %v", f.Name, obj[f.Name], f.Value)
		}
	}
	if obj["lead_time"] != "pmf:1=0.2,2=0.5,3=0.3" || obj["review_period"] != 7.0 || obj["lead_time_model"] != "sequential" {
		t.Errorf("timing fields: %v %v %v", obj["lead_time"], obj["review_period"], obj["lead_time_model"])
	}
	code, out, _ = runEvaluate(append(sysArgs, "--reorder-point", "30", "--order-up-to", "70")...)
	for _, s := range []string{"pmf:1=0.2,2=0.5,3=0.3", "lead-time model", "sequential", "review period", "7"} {
		if code != 0 || !strings.Contains(out, s) {
			t.Errorf("table lacks %q:\n%s", s, out)
		}
	}
	// optimize: same fields, the method says it searched at reviews.
	var ob, eb bytes.Buffer
	code = run(append([]string{"ergostock", "optimize"}, append(sysArgs, "--json")...), nil, &ob, &eb)
	if code != 0 {
		t.Fatalf("optimize exit %d: %s", code, eb.String())
	}
	obj = nil
	if err := json.Unmarshal(ob.Bytes(), &obj); err != nil {
		t.Fatal(err)
	}
	for _, name := range figureNames {
		if _, ok := obj[name].(float64); !ok {
			t.Errorf("optimize JSON lacks %s", name)
		}
	}
	if !strings.Contains(ob.String(), "reviews every 7") {
		t.Errorf("optimize JSON does not say how it searched: %s", ob.String())
	}
}

// --help of evaluate and optimize states the modelling assumptions of
// lead-time laws and review periods.
func TestTimingHelp(t *testing.T) {
	for _, cmd := range []string{"evaluate", "optimize"} {
		var out, errb bytes.Buffer
		run([]string{"ergostock", cmd, "--help"}, nil, &out, &errb)
		for _, s := range []string{"--lead-time-model", "--review-period", "Kaplan", "hazard", "independent", "per period", "Lost sales"} {
			if !strings.Contains(out.String(), s) {
				t.Errorf("%s --help lacks %q", cmd, s)
			}
		}
	}
}
