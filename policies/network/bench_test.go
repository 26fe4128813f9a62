package network

import (
	"fmt"
	"testing"
)

// BenchmarkSerialOptimumPoisson50 finds the exact optimum of a serial
// system (Poisson demand of mean 50, L0 = L1 = 3) by the Clark-Scarf
// recursion and evaluates it (issue 16: under 50 ms).
func BenchmarkSerialOptimumPoisson50(b *testing.B) {
	n := serial(b, "poisson:mean=50", 3, 3, 0.5, 1, 19, 0, 0)
	for b.Loop() {
		p, err := Optimize(n)
		if err != nil {
			b.Fatal(err)
		}
		_ = p
	}
}

// benchStores is a centre (L0 = 3) with 50 stores of Poisson means 1..5
// and lead times 1..3, the centre at about its 80% quantile of lead-time
// demand and each store at about its 95% quantile.
func benchStores(b *testing.B) *Network {
	means := make([]float64, 50)
	leads := make([]int, 50)
	levels := make([]int, 50)
	total := 0.0
	for i := range means {
		means[i] = float64(1 + i%5)
		leads[i] = 1 + i%3
		total += means[i]
		d := mustParse(b, fmt.Sprintf("poisson:mean=%g", means[i]*float64(leads[i]+1)))
		for d.CDF(levels[i]) < 0.95 {
			levels[i]++
		}
	}
	x0 := mustParse(b, fmt.Sprintf("poisson:mean=%g", total*3))
	s0 := 0
	for x0.CDF(s0) < 0.8 {
		s0++
	}
	return distribution(b, 3, s0, means, leads, levels)
}

// BenchmarkEvaluate50Stores evaluates a centre with 50 stores by the
// decomposition (issue 16: under 100 ms).
func BenchmarkEvaluate50Stores(b *testing.B) {
	n := benchStores(b)
	for b.Loop() {
		if _, err := Evaluate(n); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkOptimize50Stores searches the levels of the same network.
func BenchmarkOptimize50Stores(b *testing.B) {
	n := benchStores(b)
	for b.Loop() {
		if _, err := Optimize(n); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluate50StoresTwoMoment is the same with the two-moment split.
func BenchmarkEvaluate50StoresTwoMoment(b *testing.B) {
	n := benchStores(b)
	n.Split = TwoMoment
	for b.Loop() {
		if _, err := Evaluate(n); err != nil {
			b.Fatal(err)
		}
	}
}
