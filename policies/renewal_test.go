package policies

import (
	"math"
	"testing"

	"ergostock/chain"
	"ergostock/inventory"
	"ergostock/policies/internal/cputime"
)

// TestRenewalMatchesMatrix checks the matrix-free evaluation of s-S and
// base-stock (the renewal recursion, solveRenewal) against the stored
// chain solved by chain.Forward (Chain.Method forward), every figure to
// 1e-12 relative, over the demand families, lead times and shapes (wide,
// narrow, base-stock, negative reorder points, a pmf with gaps whose
// positions are partly unreachable), and checks that the matrix-free
// residual and balance are round-off and agree with chain.Check's.
func TestRenewalMatchesMatrix(t *testing.T) {
	mk := func(spec string) inventory.Distribution {
		d, err := inventory.Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		return d
	}
	laws := []string{"poisson:mean=400", "poisson:mean=3.5", "poisson:mean=1e-12", "negbin:mean=4,var=30",
		"normal:mean=40,sd=8", "gamma:mean=5,sd=4", "pmf:0=0.3,3=0.5,9=0.2", "pmf:2=0.5,4=0.5"}
	pols := []Policy{{Kind: SS, ReorderPoint: 1500, OrderUpTo: 3500}, {Kind: SS, ReorderPoint: -7, OrderUpTo: 30},
		{Kind: BaseStock, OrderUpTo: 12}, {Kind: SS, ReorderPoint: 10, OrderUpTo: 11}, {Kind: SS, ReorderPoint: 3, OrderUpTo: 200}}
	for _, spec := range laws {
		for _, L := range []int{0, 2} {
			for _, p := range pols {
				sys := inventory.System{Demand: mk(spec), LeadTime: L, Holding: 1, Shortage: 19, OrderCost: 50, UnitCost: 2, Mode: inventory.Backorder}
				got, err := Evaluate(sys, p, Options{})
				if err != nil {
					t.Fatalf("%s L=%d %v: %v", spec, L, p, err)
				}
				want, err := Evaluate(sys, p, Options{Chain: chain.Options{Method: chain.MethodForward}})
				if err != nil {
					t.Fatalf("%s L=%d %v (matrix): %v", spec, L, p, err)
				}
				gf, wf := got.Figures.Fields(), want.Figures.Fields()
				for i := range gf {
					if !relClose(gf[i].Value, wf[i].Value, 1e-12) {
						t.Errorf("%s L=%d %v: %s %.17g, matrix %.17g", spec, L, p, gf[i].Name, gf[i].Value, wf[i].Value)
					}
				}
				if got.States != want.States || got.Diagnostics.NonZeros != want.Diagnostics.NonZeros {
					t.Errorf("%s L=%d %v: states %d nonzeros %d, matrix %d %d", spec, L, p, got.States, got.Diagnostics.NonZeros, want.States, want.Diagnostics.NonZeros)
				}
				if d := got.Diagnostics; d.Residual > 1e-13 || d.Balance > 1e-14 || math.IsNaN(d.Residual) {
					t.Errorf("%s L=%d %v: residual %.3g balance %.3g", spec, L, p, d.Residual, d.Balance)
				}
				if got.Diagnostics.Method != chain.MethodForward {
					t.Errorf("%s %v: method %s", spec, p, got.Diagnostics.Method)
				}
			}
		}
	}
}

// TestRenewalCheckDetects checks that the matrix-free residual sees a
// vector that is not stationary (the check is not the solve repeated).
func TestRenewalCheckDetects(t *testing.T) {
	sys := inventory.System{Demand: poisson(t, 10), Holding: 1, Shortage: 9, Mode: inventory.Backorder}
	p := Policy{Kind: SS, ReorderPoint: 5, OrderUpTo: 40}
	c, dtab, err := solveRenewal(sys.Demand, p, Options{MaxStates: DefaultMaxStates})
	if err != nil {
		t.Fatal(err)
	}
	m, _, err := solvePosition(sys.Demand, p, Options{MaxStates: DefaultMaxStates})
	if err != nil {
		t.Fatal(err)
	}
	bad := append([]float64(nil), c.pi...)
	bad[3], bad[4] = bad[3]+1e-6, bad[4]-1e-6
	pmf := dtab.pmf
	floor := negligibleTransition * sys.Demand.Tail(1)
	kept := func(k int) bool { return k < len(pmf) && pmf[k] > 0 && pmf[k] >= floor }
	ker := make([]float64, len(pmf))
	klo := 1
	for k := 1; k < len(pmf); k++ {
		if kept(k) {
			ker[k-1] = pmf[k]
		}
	}
	d := renewalCheck(bad, ker, klo, dtab, kept, c.n)
	ref := chain.Check(m.m, bad)
	if !relClose(d.Residual, ref.Residual, 1e-9) || !relClose(d.Balance, ref.Balance, 1e-9) || d.Residual < 1e-7 {
		t.Errorf("perturbed: residual %.6g balance %.6g, chain.Check %.6g %.6g", d.Residual, d.Balance, ref.Residual, ref.Balance)
	}
}

// BenchmarkEvaluateSSMatrix is BenchmarkEvaluateSS on the stored chain
// (Chain.Method forward), the path before the renewal recursion.
func BenchmarkEvaluateSSMatrix(b *testing.B) {
	sys := inventory.System{Demand: poisson(b, 400), LeadTime: 3, Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
	p := Policy{Kind: SS, ReorderPoint: 1500, OrderUpTo: 3500}
	opt := Options{Chain: chain.Options{Method: chain.MethodForward}}
	b.ReportAllocs()
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		if _, err := Evaluate(sys, p, opt); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluateSS8000: as BenchmarkEvaluateSS with S - s = 8,000
// (issue 14 item 3: goal under 4 ms).
func BenchmarkEvaluateSS8000(b *testing.B) {
	sys := inventory.System{Demand: poisson(b, 400), LeadTime: 3, Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
	p := Policy{Kind: SS, ReorderPoint: 1000, OrderUpTo: 9000}
	b.ReportAllocs()
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		if _, err := Evaluate(sys, p, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
