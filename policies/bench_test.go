package policies

import (
	"testing"

	"ergostock/inventory"
)

// BenchmarkEvaluateSS: s-S in backorder mode, Poisson demand of mean 400,
// lead time 3, s = 1500, S = 3500 (2,000 inventory positions). Target
// (issue 3): under 20 ms.
func BenchmarkEvaluateSS(b *testing.B) {
	sys := inventory.System{Demand: poisson(b, 400), LeadTime: 3, Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
	p := Policy{Kind: SS, ReorderPoint: 1500, OrderUpTo: 3500}
	b.ReportAllocs()
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
	for b.Loop() {
		e, err := Evaluate(sys, p, Options{})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(e.States), "states")
		b.ReportMetric(float64(e.Diagnostics.Iterations), "sweeps")
	}
}
