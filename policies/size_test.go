package policies

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
)

// TestRefusedBeforeAllocation checks the reproductions of issue 10 for
// Evaluate and Optimize in backorder mode: each is refused with the error
// named, before any allocation proportional to the size (the test runs
// without a memory cap, so a missed check would show as an out-of-memory
// crash or a makeslice panic).
func TestRefusedBeforeAllocation(t *testing.T) {
	p9 := optSystem(optPoisson(t, 9), 0, 0.4, 12, 0)
	big := func(m float64) inventory.System { return optSystem(optPoisson(t, m), 0, 0.4, 12, 0) }
	withK := func(k float64) inventory.System { s := p9; s.OrderCost = k; return s }
	for _, c := range []struct {
		name  string
		run   func() error
		input string // SizeError.Input
	}{
		{"S=2e9", func() error {
			_, err := Evaluate(p9, Policy{Kind: BaseStock, OrderUpTo: 2_000_000_000}, Options{})
			return err
		}, "order_up_to"},
		{"S=MaxInt", func() error {
			_, err := Evaluate(p9, Policy{Kind: BaseStock, OrderUpTo: math.MaxInt}, Options{})
			return err
		}, "order_up_to"},
		{"s near MaxInt, Q=5", func() error {
			_, err := Evaluate(p9, Policy{Kind: SNQ, ReorderPoint: 9223372036854775000, OrderMultiple: 5}, Options{})
			return err
		}, "reorder_point"},
		{"s=MinInt/2..S=MaxInt/2", func() error {
			_, err := Evaluate(p9, Policy{Kind: SS, ReorderPoint: math.MinInt / 2, OrderUpTo: math.MaxInt / 2}, Options{})
			return err
		}, "order_up_to"},
		{"S-s over the limit", func() error {
			_, err := Evaluate(p9, Policy{Kind: SS, ReorderPoint: 0, OrderUpTo: 1001}, Options{MaxStates: 1000})
			return err
		}, "order_up_to"},
		{"poisson 1e9", func() error { _, err := Optimize(big(1e9), SS, SearchOptions{}); return err }, "demand"},
		{"poisson 1e9 base-stock", func() error { _, err := Optimize(big(1e9), BaseStock, SearchOptions{}); return err }, "demand"},
		{"K=1e15", func() error { _, err := Optimize(withK(1e15), SS, SearchOptions{}); return err }, "order_cost"},
		{"K=1e15 s-nQ", func() error { _, err := Optimize(withK(1e15), SNQ, SearchOptions{}); return err }, "order_cost"},
		{"wide support", func() error {
			_, err := Evaluate(big(1e6), Policy{Kind: BaseStock, OrderUpTo: 1e6}, Options{MaxStates: 1000})
			return err
		}, "demand"},
	} {
		err := c.run()
		var se *SizeError
		if !errors.As(err, &se) || se.Input != c.input || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: err = %v, want a *SizeError naming %s", c.name, err, c.input)
			continue
		}
		if se.Bound <= float64(se.Limit) {
			t.Errorf("%s: bound %g within the limit %d", c.name, se.Bound, se.Limit)
		}
	}
	// The policy whose highest position s+Q overflows is refused by Validate.
	var fe *inventory.FieldError
	if _, err := Evaluate(p9, Policy{Kind: SNQ, ReorderPoint: math.MaxInt, OrderMultiple: 5}, Options{}); !errors.As(err, &fe) || fe.Field != "reorder_point" {
		t.Errorf("s = MaxInt, Q = 5: err = %v, want a reorder_point error", err)
	}
}

// TestOverflowRefused checks that cost rates whose figures overflow are
// refused, naming the rate, and never give a non-finite figure.
func TestOverflowRefused(t *testing.T) {
	sys := optSystem(optPoisson(t, 9), 0, 1e308, 1e308, 0)
	var fe *inventory.FieldError
	if e, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 12}, Options{}); !errors.Is(err, ErrOverflow) || !errors.As(err, &fe) || fe.Field != "holding_cost" {
		t.Errorf("Evaluate: %v, %v; want ErrOverflow naming holding_cost", e, err)
	}
	if o, err := Optimize(sys, SS, SearchOptions{}); !errors.Is(err, ErrOverflow) {
		t.Errorf("Optimize: %v, %v; want ErrOverflow", o, err)
	}
}

// TestSlowMoverExact checks the figures of a slow mover, where the fill
// rate used to lose every digit to cancellation (0.99594 for mean 1e-12) and
// the chain used to be pinned at the top (mean on hand 60 for mean 1e-300).
//
// Independent values: with D ~ Poisson(m), m -> 0, every demand is one unit
// (P(D >= 2 | D >= 1) = O(m)), so the s-S position is uniform on s+1..S
// (the renewal law m(S-y)/M(S-s) with m(j) = 1/P(D >= 1)); then mean on
// hand = (s+1+S)/2 - 3m, and the stockout probability is
// sum_y P(X > y)/(S-s) with X ~ Poisson(3m), whose tail at y = 19 is
// P(X = 20) (1 + O(m)), taken from gonum's distuv.Poisson.Prob (log-space,
// no cancellation). The fill rate is 1 - O(m^19).
func TestSlowMoverExact(t *testing.T) {
	for _, m := range []float64{1e-12, 1e-300} {
		sys := optSystem(optPoisson(t, m), 2, 1, 10, 0)
		e, err := Evaluate(sys, Policy{Kind: SS, ReorderPoint: 18, OrderUpTo: 60}, Options{})
		if err != nil {
			t.Fatal(err)
		}
		f := e.Figures
		if math.Abs(f.FillRate-1) > 1e-15 {
			t.Errorf("mean %g: fill rate %.17g, want 1 to 1e-15", m, f.FillRate)
		}
		if math.Abs(f.MeanOnHand-39.5) > 1e-9 {
			t.Errorf("mean %g: mean on hand %.17g, want 39.5", m, f.MeanOnHand)
		}
		x := distuv.Poisson{Lambda: 3 * m}
		var want float64
		for y := 19; y <= 60; y++ {
			want += (x.Prob(float64(y+1)) + x.Prob(float64(y+2))) / 42
		}
		if !(math.Abs(f.StockoutProbability-want) <= 1e-9*want) && !(want == 0 && f.StockoutProbability == 0) {
			t.Errorf("mean %g: stockout probability %.6g, want %.6g (gonum)", m, f.StockoutProbability, want)
		}
		if math.Abs(f.OrderFrequency*42-m/(-math.Expm1(-m))*m) > 1e-9*m {
			t.Errorf("mean %g: order frequency %.6g, want about m/42 = %.6g", m, f.OrderFrequency, m/42)
		}
	}
}

// TestServiceResolution checks that service requirements finer than the
// figures resolve are refused with ErrLimit naming the flag's field.
func TestServiceResolution(t *testing.T) {
	sys := optSystem(optPoisson(t, 9), 0, 0.4, 12, 0)
	for _, c := range []struct {
		opt   SearchOptions
		field string
	}{
		{SearchOptions{MaxStockout: 1e-16}, "max_stockout_probability"},
		{SearchOptions{MaxStockout: 9.9e-13}, "max_stockout_probability"},
		{SearchOptions{MinFillRate: 1 - 1e-13}, "min_fill_rate"},
	} {
		var fe *inventory.FieldError
		if _, err := Optimize(sys, BaseStock, c.opt); !errors.Is(err, inventory.ErrLimit) || !errors.As(err, &fe) || fe.Field != c.field {
			t.Errorf("%+v: err = %v, want ErrLimit naming %s", c.opt, err, c.field)
		}
	}
}

// TestSearchContext checks that a search stops on its context.
func TestSearchContext(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	sys := optSystem(optPoisson(t, 9), 0, 0.4, 12, 1e6) // S - s about 7000: thousands of steps
	if _, err := Optimize(sys, SS, SearchOptions{Eval: Options{Context: ctx}}); !errors.Is(err, context.Canceled) {
		t.Errorf("s-S: err = %v, want context.Canceled", err)
	}
	if _, err := Optimize(sys, SNQ, SearchOptions{Eval: Options{Context: ctx}}); !errors.Is(err, context.Canceled) {
		t.Errorf("s-nQ: err = %v, want context.Canceled", err)
	}
	if _, err := Evaluate(sys, Policy{Kind: SS, ReorderPoint: 0, OrderUpTo: 100}, Options{Context: ctx}); !errors.Is(err, context.Canceled) {
		t.Errorf("Evaluate: err = %v, want context.Canceled", err)
	}
}

// TestSizeErrorMessage checks the message form of a SizeError that names
// its input.
func TestSizeErrorMessage(t *testing.T) {
	e := &SizeError{Chain: "inventory-position chain", Bound: 2000000001, Limit: 5000000, What: "states",
		Input: "order_up_to", Value: "2000000000", Bytes: 16e9}
	flag := func(f string) string { return "--" + strings.ReplaceAll(f, "_", "-") }
	want := "--order-up-to 2000000000: the inventory-position chain would need 2000000001 states (about 16 GB); the limit is 5000000 states (--max-states)"
	if got := e.Message(flag); got != want {
		t.Errorf("Message = %q\nwant      %q", got, want)
	}
	if got := e.Error(); !strings.HasPrefix(got, "order_up_to 2000000000: ") || !strings.HasSuffix(got, "(max_states)") {
		t.Errorf("Error = %q", got)
	}
}

// TestFarBelowZero checks levels near the bottom of the int range: nothing
// is served (fill rate 0, stockout 1), where E[(X-y)^+] = E[X] - y rounds
// E[X] away and the unserved-demand form of the fill rate would give 1.
func TestFarBelowZero(t *testing.T) {
	sys := optSystem(optPoisson(t, 9), 2, 0.4, 12, 0)
	for _, p := range []Policy{{Kind: BaseStock, OrderUpTo: math.MinInt + 1}, {Kind: SS, ReorderPoint: math.MinInt, OrderUpTo: math.MinInt + 3}, {Kind: BaseStock, OrderUpTo: -2_000_000_000}} {
		e, err := Evaluate(sys, p, Options{})
		if err != nil {
			t.Fatalf("%v: %v", p, err)
		}
		if f := e.Figures; f.FillRate != 0 || math.Abs(f.StockoutProbability-1) > 1e-15 || f.MeanOnHand != 0 {
			t.Errorf("%v: fill %g stockout %g on hand %g, want 0, 1, 0", p, f.FillRate, f.StockoutProbability, f.MeanOnHand)
		}
	}
	if _, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: math.MinInt}, Options{}); err == nil {
		t.Error("S = MinInt: no error")
	}
}
