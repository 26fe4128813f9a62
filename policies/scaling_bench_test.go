package policies

import (
	"fmt"
	"testing"

	"ergostock/inventory"
	"ergostock/policies/internal/cputime"
)

// BenchmarkScaling records how one evaluation or search grows with the
// width S - s, the demand mean and the lead time (issue 14 item 7; the
// table is in DEVELOPERS.md section 5, the catalogue sizes come from
// policies/batch's BenchmarkBatch):
//
//	width=N     s-S evaluation, Poisson 400, L = 3, S - s = N (s = 1500)
//	mean=M      s-S evaluation, Poisson M, L = 3, s = 4M, S - s = 2000
//	lead=L      s-S search (Zheng-Federgruen and the optimum's
//	            evaluation), Poisson 40, K = 500, h = 1, b = 19, lead time L
//	lead=L,floor the same under a 0.999 fill-rate floor
//	lost,lead=L lost-sales base-stock evaluation, Poisson 5, S = 30
//
// Run with -benchmem; cpu-ms/op is the process CPU time per operation.
func BenchmarkScaling(b *testing.B) {
	eval := func(b *testing.B, sys inventory.System, p Policy) {
		b.ReportAllocs()
		defer cputime.Report(b, cputime.Process())
		var e *Evaluation
		for b.Loop() {
			var err error
			if e, err = Evaluate(sys, p, Options{}); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(e.States), "states")
	}
	for _, n := range []int{500, 2000, 8000, 32000} {
		b.Run(fmt.Sprintf("width=%d", n), func(b *testing.B) {
			sys := inventory.System{Demand: poisson(b, 400), LeadTime: 3, Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
			eval(b, sys, Policy{Kind: SS, ReorderPoint: 1500, OrderUpTo: 1500 + n})
		})
	}
	for _, m := range []int{4, 40, 400, 4000} {
		b.Run(fmt.Sprintf("mean=%d", m), func(b *testing.B) {
			sys := inventory.System{Demand: poisson(b, float64(m)), LeadTime: 3, Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
			eval(b, sys, Policy{Kind: SS, ReorderPoint: 4 * m, OrderUpTo: 4*m + 2000})
		})
	}
	for _, floor := range []float64{0, 0.999} {
		for L := 1; L <= 6; L++ {
			name := fmt.Sprintf("lead=%d", L)
			if floor > 0 {
				name += ",floor"
			}
			b.Run(name, func(b *testing.B) {
				sys := inventory.System{Demand: poisson(b, 40), LeadTime: L, Holding: 1, Shortage: 19, OrderCost: 500, Mode: inventory.Backorder}
				b.ReportAllocs()
				defer cputime.Report(b, cputime.Process())
				for b.Loop() {
					if _, err := Optimize(sys, SS, SearchOptions{MinFillRate: floor}); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
	for L := 1; L <= 5; L++ {
		b.Run(fmt.Sprintf("lost,lead=%d", L), func(b *testing.B) {
			sys := inventory.System{Demand: poisson(b, 5), LeadTime: L, Holding: 1, Shortage: 20, Mode: inventory.Lost}
			eval(b, sys, Policy{Kind: BaseStock, OrderUpTo: 30})
		})
	}
}
