package policies

import (
	"testing"

	"ergostock/inventory"
	"ergostock/policies/internal/cputime"
)

// BenchmarkEvaluateSS: s-S in backorder mode, Poisson demand of mean 400,
// lead time 3, s = 1500, S = 3500 (2,000 inventory positions). Target
// (issue 3): under 20 ms.
func BenchmarkEvaluateSS(b *testing.B) {
	sys := inventory.System{Demand: poisson(b, 400), LeadTime: 3, Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
	p := Policy{Kind: SS, ReorderPoint: 1500, OrderUpTo: 3500}
	b.ReportAllocs()
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		if _, err := Evaluate(sys, p, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluateLost: base-stock S = 30 in lost mode, lead time 4,
// Poisson demand of mean 5 (324,632 states at most; all reachable). Target
// (issue 3): under 2 s and 1 GB peak memory.
func BenchmarkEvaluateLost(b *testing.B) {
	sys := inventory.System{Demand: poisson(b, 5), LeadTime: 4, Holding: 1, Shortage: 20, Mode: inventory.Lost}
	p := Policy{Kind: BaseStock, OrderUpTo: 30}
	b.ReportAllocs()
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		e, err := Evaluate(sys, p, Options{})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(e.States), "states")
		b.ReportMetric(float64(e.Diagnostics.Iterations), "sweeps")
	}
}

// lostOptCase is a lost-sales system of the demo scale: Poisson demand of
// mean 8.4 per period, lead time 3, h = 0.02, b = 6.9, K = 62, c = 4.5.
func lostOptCase(b testing.TB) inventory.System {
	return inventory.System{Demand: poisson(b, 8.4), LeadTime: 3, Holding: 0.02, Shortage: 6.9, OrderCost: 62, UnitCost: 4.5, Mode: inventory.Lost}
}

// BenchmarkOptimizeLostBaseStock: the base-stock search in lost mode on
// lostOptCase (about a dozen chains of up to 250,000 states).
func BenchmarkOptimizeLostBaseStock(b *testing.B) {
	benchOptimizeLost(b, BaseStock)
}

// BenchmarkOptimizeLostSS: the s-S compass search in lost mode on
// lostOptCase.
func BenchmarkOptimizeLostSS(b *testing.B) {
	benchOptimizeLost(b, SS)
}

func benchOptimizeLost(b *testing.B, k Kind) {
	sys := lostOptCase(b)
	b.ReportAllocs()
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		o, err := Optimize(sys, k, SearchOptions{})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(o.Search.Evaluated), "evaluated")
		b.ReportMetric(float64(o.States), "states")
	}
}

// BenchmarkEvaluateSSLevels: BenchmarkEvaluateSS with Options.Levels (the
// net-inventory distribution: a convolution over 2,000 positions and the
// ~500 values of lead-time demand between its 1e-30 quantiles).
func BenchmarkEvaluateSSLevels(b *testing.B) {
	sys := inventory.System{Demand: poisson(b, 400), LeadTime: 3, Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
	p := Policy{Kind: SS, ReorderPoint: 1500, OrderUpTo: 3500}
	b.ReportAllocs()
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		e, err := Evaluate(sys, p, Options{Levels: true})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(len(e.Levels.P)), "levels")
	}
}

// BenchmarkEvaluateLostLevels: BenchmarkEvaluateLost with Options.Levels.
func BenchmarkEvaluateLostLevels(b *testing.B) {
	sys := inventory.System{Demand: poisson(b, 5), LeadTime: 4, Holding: 1, Shortage: 20, Mode: inventory.Lost}
	p := Policy{Kind: BaseStock, OrderUpTo: 30}
	b.ReportAllocs()
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		e, err := Evaluate(sys, p, Options{Levels: true})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(len(e.Levels.P)), "levels")
	}
}
