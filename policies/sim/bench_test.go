package sim

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

// BenchmarkPeriods measures simulated periods per second on one core:
// Poisson demand (mean 4), backorder mode, s-S(8, 20), lead time 2.
// Run with: go test -run '^$' -bench Periods -benchtime 20000000x ./policies/sim/
func BenchmarkPeriods(b *testing.B) {
	for _, mode := range []inventory.Mode{inventory.Backorder, inventory.Lost} {
		b.Run(string(mode), func(b *testing.B) {
			d, err := inventory.Parse("poisson:mean=4")
			if err != nil {
				b.Fatal(err)
			}
			sys := inventory.System{Demand: d, LeadTime: 2, Holding: 1, Shortage: 9, OrderCost: 20, Mode: mode}
			p := policies.Policy{Kind: policies.SS, ReorderPoint: 8, OrderUpTo: 20}
			smp := newSampler(d)
			st := state{net: 20, pipe: make([]int64, sys.LeadTime+1), w: sys.LeadTime}
			rng := rand.NewPCG(1, 2)
			var t tally
			step := stepBackorder
			if mode == inventory.Lost {
				step = stepLost
			}
			b.ReportAllocs()
			b.ResetTimer()
			step(&st, &t, p, smp, rng, b.N, 1<<52)
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "periods/s")
			if t.periods != int64(b.N) {
				b.Fatal("lost periods")
			}
		})
	}
}

// BenchmarkDraw measures the demand sampler alone.
func BenchmarkDraw(b *testing.B) {
	d, err := inventory.Parse("poisson:mean=4")
	if err != nil {
		b.Fatal(err)
	}
	smp := newSampler(d)
	rng := rand.NewPCG(1, 2)
	var sum int64
	for b.Loop() {
		sum += smp.draw(rng)
	}
	if sum < 0 {
		b.Fatal(sum)
	}
}

// BenchmarkLargeMean measures simulated periods per second on one core
// when demand is drawn by a direct sampler (no table over the support):
// backorder mode, base-stock at the mean, lead time 0.
// Run with: go test -run '^$' -bench LargeMean -benchtime 2000000x ./policies/sim/
func BenchmarkLargeMean(b *testing.B) {
	for _, spec := range []string{"poisson:mean=1e7", "negbin:mean=1e7,var=1e14", "normal:mean=1e9,sd=1e7", "gamma:mean=1e9,sd=1e8"} {
		b.Run(spec, func(b *testing.B) {
			d, err := inventory.Parse(spec)
			if err != nil {
				b.Fatal(err)
			}
			smp := newSampler(d)
			if smp.by == byAlias {
				b.Fatalf("%s: alias table, want a direct sampler", spec)
			}
			top := int(d.Mean())
			p := policies.Policy{Kind: policies.BaseStock, OrderUpTo: top}
			st := state{net: int64(top), pipe: make([]int64, 1), w: 0}
			rng := rand.NewPCG(1, 2)
			var t tally
			b.ReportAllocs()
			b.ResetTimer()
			stepBackorder(&st, &t, p, smp, rng, b.N, 1<<52)
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "periods/s")
		})
	}
}

// BenchmarkPCG measures the random number generator alone.
func BenchmarkPCG(b *testing.B) {
	rng := rand.NewPCG(1, 2)
	var x uint64
	for b.Loop() {
		x ^= rng.Uint64()
	}
	if x == 1 {
		b.Fatal(x)
	}
}

// BenchmarkRun measures a whole simulation on all cores (replications in
// parallel), in periods per second over all workers.
// Run with: go test -run '^$' -bench Run -benchtime 3x ./policies/sim/
func BenchmarkRun(b *testing.B) {
	d, err := inventory.Parse("poisson:mean=4")
	if err != nil {
		b.Fatal(err)
	}
	sys := inventory.System{Demand: d, LeadTime: 2, Holding: 1, Shortage: 9, OrderCost: 20, Mode: inventory.Backorder}
	p := policies.Policy{Kind: policies.SS, ReorderPoint: 8, OrderUpTo: 20}
	opt := Options{Periods: 1_000_000, Warmup: 100_000, Replications: 20, Seed: 1}
	for b.Loop() {
		if _, err := Run(sys, p, opt); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.N*opt.Periods*opt.Replications)/b.Elapsed().Seconds(), "periods/s")
}

// BenchmarkTimedPeriods measures the loop of random lead times and review
// periods (stepTimed) on one core: s-S(8,20) under Poisson 4, the law
// pmf:1=0.2,2=0.5,3=0.3, both models, R = 1 and 7, backorder mode.
func BenchmarkTimedPeriods(b *testing.B) {
	d, err := inventory.Parse("poisson:mean=4")
	if err != nil {
		b.Fatal(err)
	}
	_, law, err := inventory.ParseLeadTime("pmf:1=0.2,2=0.5,3=0.3")
	if err != nil {
		b.Fatal(err)
	}
	for _, model := range []inventory.LeadTimeModel{inventory.Sequential, inventory.Independent} {
		for _, R := range []int{1, 7} {
			b.Run(fmt.Sprintf("%s/R=%d", model, R), func(b *testing.B) {
				sys := inventory.System{Demand: d, LeadTimeLaw: law, LeadTimeModel: model, ReviewPeriod: R, Holding: 1, Shortage: 9, OrderCost: 20, Mode: inventory.Backorder}
				tm, err := newTiming(sys)
				if err != nil {
					b.Fatal(err)
				}
				p := policies.Policy{Kind: policies.SS, ReorderPoint: 8, OrderUpTo: 20}
				smp := newSampler(d)
				st := timedState{net: 20, ring: make([]int64, tm.lmax+1)}
				rng := rand.NewPCG(1, 2)
				var t tally
				b.ReportAllocs()
				b.ResetTimer()
				stepTimed(&st, &t, p, smp, tm, false, rng, b.N, 1<<52)
				b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "periods/s")
				if t.periods != int64(b.N) {
					b.Fatal("lost periods")
				}
			})
		}
	}
}
