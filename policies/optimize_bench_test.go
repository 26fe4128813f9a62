package policies

import (
	"testing"
	"time"

	"ergostock/inventory"
)

// benchSS400 is the benchmark case of issue 5: s-S in backorder mode,
// Poisson demand of mean 400 per period, lead time 3, K = 5000, h = 1,
// b = 19. Its optimum is found once, outside the timings.
func benchSS400(b *testing.B) (inventory.System, Policy) {
	b.Helper()
	sys := inventory.System{Demand: optPoisson(b, 400), LeadTime: 3, Holding: 1, Shortage: 19, OrderCost: 5000, Mode: inventory.Backorder}
	o, err := Optimize(sys, SS, SearchOptions{})
	if err != nil {
		b.Fatal(err)
	}
	return sys, o.Policy
}

// BenchmarkOptimizeSSPoisson400 times Optimize (the Zheng-Federgruen search
// with its tables, then Evaluate of the optimum); compare with
// BenchmarkEvaluateSSOptimumPoisson400, one evaluation of the same optimum.
// Target (issue 5): at most 5 times one evaluation.
func BenchmarkOptimizeSSPoisson400(b *testing.B) {
	sys, _ := benchSS400(b)
	b.ReportAllocs()
	for b.Loop() {
		o, err := Optimize(sys, SS, SearchOptions{})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(o.Search.Evaluated), "costed")
	}
}

// BenchmarkEvaluateSSOptimumPoisson400 times one Evaluate of the optimum
// of BenchmarkOptimizeSSPoisson400.
func BenchmarkEvaluateSSOptimumPoisson400(b *testing.B) {
	sys, p := benchSS400(b)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(sys, p, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkZhengFedergruenPoisson400 times the search alone (tables, renewal
// mass and the algorithm), without the final Evaluate.
func BenchmarkZhengFedergruenPoisson400(b *testing.B) {
	sys, _ := benchSS400(b)
	b.ReportAllocs()
	for b.Loop() {
		mo, err := newBOModel(sys)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := mo.zhengFedergruen(); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkOptimizeOverEvaluateSSPoisson400 alternates one Optimize and one
// Evaluate of its optimum in every iteration and reports the ratio of their
// total times ("opt/eval"), which a loaded machine disturbs less than two
// separate benchmarks. Target (issue 5): at most 5.
func BenchmarkOptimizeOverEvaluateSSPoisson400(b *testing.B) {
	sys, p := benchSS400(b)
	var opt, eval time.Duration
	for b.Loop() {
		t0 := time.Now()
		if _, err := Optimize(sys, SS, SearchOptions{}); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		if _, err := Evaluate(sys, p, Options{}); err != nil {
			b.Fatal(err)
		}
		opt += t1.Sub(t0)
		eval += time.Since(t1)
	}
	b.ReportMetric(float64(opt)/float64(eval), "opt/eval")
}
