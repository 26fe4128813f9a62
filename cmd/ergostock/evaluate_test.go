package main

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

func runEvaluate(args ...string) (code int, stdout, stderr string) {
	var out, errb bytes.Buffer
	code = run(append([]string{"ergostock", "evaluate"}, args...), nil, &out, &errb)
	return code, out.String(), errb.String()
}

var figureNames = []string{"fill_rate", "stockout_probability", "mean_on_hand", "mean_backorders",
	"mean_lost_sales", "order_frequency", "mean_order_quantity", "holding_cost", "shortage_cost",
	"ordering_cost", "purchase_cost", "total_cost"}

func TestEvaluateJSON(t *testing.T) {
	for _, c := range []struct {
		args   []string
		policy map[string]any
		sys    inventory.System
		p      policies.Policy
	}{
		{
			args:   []string{"--order-up-to", "18"},
			policy: map[string]any{"type": "base-stock", "order_up_to": 18.0},
			p:      policies.Policy{Kind: policies.BaseStock, OrderUpTo: 18},
		},
		{
			args:   []string{"--reorder-point", "-2", "--order-up-to", "15"},
			policy: map[string]any{"type": "s-S", "reorder_point": -2.0, "order_up_to": 15.0},
			p:      policies.Policy{Kind: policies.SS, ReorderPoint: -2, OrderUpTo: 15},
		},
		{
			args:   []string{"--reorder-point", "6", "--order-multiple", "5"},
			policy: map[string]any{"type": "s-nQ", "reorder_point": 6.0, "order_multiple": 5.0},
			p:      policies.Policy{Kind: policies.SNQ, ReorderPoint: 6, OrderMultiple: 5},
		},
		{
			args:   []string{"--reorder-point", "6", "--order-multiple", "5", "--unmet", "lost"},
			policy: map[string]any{"type": "s-nQ", "reorder_point": 6.0, "order_multiple": 5.0},
			p:      policies.Policy{Kind: policies.SNQ, ReorderPoint: 6, OrderMultiple: 5},
		},
		{
			args:   []string{"--reorder-point", "0", "--order-up-to", "12", "--unmet", "lost"},
			policy: map[string]any{"type": "s-S", "reorder_point": 0.0, "order_up_to": 12.0},
			p:      policies.Policy{Kind: policies.SS, ReorderPoint: 0, OrderUpTo: 12},
		},
	} {
		base := []string{"--demand", "poisson:mean=3", "--lead-time", "2", "--holding-cost", "1.5",
			"--shortage-cost", "12", "--order-cost", "30", "--unit-cost", "2", "--json"}
		code, out, errs := runEvaluate(append(base, c.args...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d, stderr %s", c.args, code, errs)
		}
		var got map[string]any
		if err := json.Unmarshal([]byte(out), &got); err != nil {
			t.Fatalf("%v: %v\n%s", c.args, err, out)
		}
		d, _ := inventory.NewPoisson(3)
		mode := inventory.Backorder
		if strings.Contains(strings.Join(c.args, " "), "lost") {
			mode = inventory.Lost
		}
		sys := inventory.System{Demand: d, LeadTime: 2, Holding: 1.5, Shortage: 12, OrderCost: 30, UnitCost: 2, Mode: mode}
		e, err := policies.Evaluate(sys, c.p, policies.Options{})
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range e.Figures.Fields() {
			v, ok := got[f.Name].(float64)
			if !ok || math.Abs(v-f.Value) > 1e-15*math.Max(1, math.Abs(f.Value)) {
				t.Errorf("%v: %s = %v, want %v", c.args, f.Name, got[f.Name], f.Value)
			}
		}
		for _, name := range figureNames {
			if _, ok := got[name]; !ok {
				t.Errorf("%v: no field %s", c.args, name)
			}
		}
		pol, _ := got["policy"].(map[string]any)
		if len(pol) != len(c.policy) {
			t.Errorf("%v: policy %v, want %v", c.args, pol, c.policy)
		}
		for k, v := range c.policy {
			if pol[k] != v {
				t.Errorf("%v: policy.%s = %v, want %v", c.args, k, pol[k], v)
			}
		}
		for _, k := range []string{"states", "diagnostics", "neglected_mass"} {
			if _, ok := got[k]; !ok {
				t.Errorf("%v: no field %s", c.args, k)
			}
		}
		diag, _ := got["diagnostics"].(map[string]any)
		for _, k := range []string{"method", "iterations", "residual", "balance"} {
			if _, ok := diag[k]; !ok {
				t.Errorf("%v: no diagnostics.%s", c.args, k)
			}
		}
		if b, _ := diag["balance"].(float64); b > 1e-12 {
			t.Errorf("%v: balance %g", c.args, b)
		}
	}
}

func TestEvaluateTable(t *testing.T) {
	code, out, errs := runEvaluate("--demand", "poisson:mean=4", "--lead-time", "1", "--holding-cost", "1",
		"--shortage-cost", "9", "--reorder-point", "5", "--order-up-to", "14")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"s-S(s=5,S=14)", "fill rate", "fraction of demand", "total cost", "cost/period",
		"chain states", "9", "forward", "residual", "balance"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	// Aligned: the value column starts at the same offset on every figure line.
	col := -1
	for _, line := range strings.Split(out, "\n") {
		if strings.HasSuffix(line, " ") {
			t.Errorf("trailing space: %q", line)
		}
		for _, label := range []string{"fill rate", "mean on hand", "total cost"} {
			if strings.HasPrefix(line, label+" ") {
				i := len(label)
				for i < len(line) && line[i] == ' ' {
					i++
				}
				if col >= 0 && i != col {
					t.Errorf("value column at %d, want %d: %q", i, col, line)
				}
				col = i
			}
		}
	}
}

func TestEvaluateBadInput(t *testing.T) {
	base := func(extra ...string) []string {
		a := []string{"--demand", "poisson:mean=4", "--holding-cost", "1", "--shortage-cost", "9"}
		return append(a, extra...)
	}
	for _, c := range []struct {
		args []string
		code int
		want string // in stderr
	}{
		{[]string{"--demand", "poisson:mean=4", "--holding-cost", "-1", "--shortage-cost", "9", "--order-up-to", "5"}, 2, "--holding-cost"},
		{[]string{"--demand", "poisson:mean=4", "--holding-cost", "1", "--shortage-cost", "NaN", "--order-up-to", "5"}, 2, "--shortage-cost"},
		{base("--order-cost", "Inf", "--order-up-to", "5"), 2, "--order-cost"},
		{[]string{"--demand", "poisson:mean=-4", "--holding-cost", "1", "--shortage-cost", "9", "--order-up-to", "5"}, 2, "--demand"},
		{[]string{"--demand", "binomial:n=3", "--holding-cost", "1", "--shortage-cost", "9", "--order-up-to", "5"}, 2, "--demand"},
		{[]string{"--demand", "pmf:0=0.5,1=0.2", "--holding-cost", "1", "--shortage-cost", "9", "--order-up-to", "5"}, 2, "--demand"},
		{base("--lead-time", "-1", "--order-up-to", "5"), 2, "--lead-time"},
		{base("--reorder-point", "5", "--order-up-to", "5"), 2, "reorder point 5"},
		{base("--reorder-point", "5", "--order-multiple", "0"), 2, "order multiple 0"},
		{base("--unmet", "later", "--order-up-to", "5"), 2, "--unmet"},
		{base("--reorder-point", "3"), 2, "--reorder-point"},
		{base(), 2, "no policy"},
		{base("--order-up-to", "30", "--lead-time", "4", "--unmet", "lost", "--max-states", "1000"), 1, "--max-states"},
		{base("--order-up-to", "30", "--lead-time", "4", "--unmet", "lost", "--max-states", "0"), 2, "--max-states"},
		{base("--order-up-to", "5", "extra"), 2, "unexpected argument"},
		{[]string{"--holding-cost", "1", "--shortage-cost", "9", "--order-up-to", "5"}, 2, "--demand: required"},
		{[]string{"--demand", "poisson:mean=4", "--shortage-cost", "9", "--order-up-to", "5"}, 2, "--holding-cost: required"},
		{[]string{"--demand", "poisson:mean=4", "--holding-cost", "x", "--shortage-cost", "9", "--order-up-to", "5"}, 2, "holding-cost"},
		{base("--order-up-to", "five"), 2, "order-up-to"},
		{base("--order-up-to", "5", "--no-such-flag"), 2, "no-such-flag"},
	} {
		code, out, errs := runEvaluate(c.args...)
		if code != c.code || !strings.Contains(errs, c.want) || out != "" {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want exit %d and %q on stderr", c.args, code, out, errs, c.code, c.want)
		}
		if strings.Count(strings.TrimRight(errs, "\n"), "\n") > 0 {
			t.Errorf("%v: error spans lines: %q", c.args, errs)
		}
	}
	// The size refusal gives the count and the limit (the a-priori bound of
	// the chain after the arrival, C(34, 4) = 46376).
	_, _, errs := runEvaluate(base("--order-up-to", "30", "--lead-time", "4", "--unmet", "lost", "--max-states", "1000")...)
	if !strings.Contains(errs, "46376") || !strings.Contains(errs, "1000") {
		t.Errorf("size refusal %q: want the count 46376 and the limit 1000", errs)
	}
}
