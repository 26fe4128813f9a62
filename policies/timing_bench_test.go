package policies

import (
	"testing"
	"time"

	"ergostock/inventory"
)

// BenchmarkEvaluateSSLeadTimeLaw (issue 12 item 9): s-S(300, 500) in
// backorder mode, Poisson demand of mean 50, lead time uniform on 1..10
// periods under sequential deliveries; target: within 3 times the same
// evaluation with a fixed lead time (the sub-benchmarks fixed=5, the
// nearest whole number to the mean 5.5, and fixed=10, the longest value).
// The weekly sub-benchmark adds a review period of 7.
func BenchmarkEvaluateSSLeadTimeLaw(b *testing.B) {
	law, err := inventory.Parse("pmf:1=0.1,2=0.1,3=0.1,4=0.1,5=0.1,6=0.1,7=0.1,8=0.1,9=0.1,10=0.1")
	if err != nil {
		b.Fatal(err)
	}
	p := Policy{Kind: SS, ReorderPoint: 300, OrderUpTo: 500}
	base := inventory.System{Demand: poisson(b, 50), Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
	cases := []struct {
		name string
		sys  func() inventory.System
	}{
		{"fixed=5", func() inventory.System { s := base; s.LeadTime = 5; return s }},
		{"fixed=10", func() inventory.System { s := base; s.LeadTime = 10; return s }},
		{"law=1..10", func() inventory.System { s := base; s.LeadTimeLaw = law; return s }},
		{"law=1..10,R=7", func() inventory.System { s := base; s.LeadTimeLaw = law; s.ReviewPeriod = 7; return s }},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			sys := c.sys()
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Evaluate(sys, p, Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkOptimizeSSLeadTimeLaw: the s-S search (Zheng-Federgruen on the
// problem at reviews) for Poisson 50, lead time uniform on 1..10, K = 500,
// with a fixed lead time 5 beside it, and weekly review.
func BenchmarkOptimizeSSLeadTimeLaw(b *testing.B) {
	law, err := inventory.Parse("pmf:1=0.1,2=0.1,3=0.1,4=0.1,5=0.1,6=0.1,7=0.1,8=0.1,9=0.1,10=0.1")
	if err != nil {
		b.Fatal(err)
	}
	base := inventory.System{Demand: poisson(b, 50), Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
	for _, c := range []struct {
		name string
		law  inventory.Distribution
		L, R int
	}{{"fixed=5", nil, 5, 1}, {"law=1..10", law, 0, 1}, {"law=1..10,R=7", law, 0, 7}} {
		b.Run(c.name, func(b *testing.B) {
			sys := base
			sys.LeadTime, sys.LeadTimeLaw, sys.ReviewPeriod = c.L, c.law, c.R
			for b.Loop() {
				if _, err := Optimize(sys, SS, SearchOptions{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkEvaluateLostTimed: lost sales on the chain at reviews (see
// lostTimed) beside the fixed-lead-time chain: base-stock S = 30 at
// Poisson 5 with a fixed lead time 3 and with a law uniform on 1..3 (the
// same number of pipeline components), and weekly review of daily demand
// (Poisson 2 a day, s-S(10, 40)) with a lead time of 2 days and with a law
// uniform on 1..5 days.
//
//	go test -run '^$' -bench EvaluateLostTimed -benchtime 3x -count 3 -benchmem ./policies/
func BenchmarkEvaluateLostTimed(b *testing.B) {
	law3, err := inventory.Parse("pmf:1=0.3333333333333333,2=0.3333333333333333,3=0.3333333333333334")
	if err != nil {
		b.Fatal(err)
	}
	law5, err := inventory.Parse("pmf:1=0.2,2=0.2,3=0.2,4=0.2,5=0.2")
	if err != nil {
		b.Fatal(err)
	}
	bs := Policy{Kind: BaseStock, OrderUpTo: 30}
	ss := Policy{Kind: SS, ReorderPoint: 10, OrderUpTo: 40}
	for _, c := range []struct {
		name   string
		demand float64
		L, R   int
		law    inventory.Distribution
		p      Policy
	}{
		{"fixed=3", 5, 3, 1, nil, bs},
		{"law=1..3", 5, 0, 1, law3, bs},
		{"daily,fixed=2,R=7", 2, 2, 7, nil, ss},
		{"daily,law=1..5,R=7", 2, 0, 7, law5, ss},
	} {
		b.Run(c.name, func(b *testing.B) {
			sys := inventory.System{Demand: poisson(b, c.demand), LeadTime: c.L, LeadTimeLaw: c.law, ReviewPeriod: c.R,
				Holding: 1, Shortage: 9, OrderCost: 20, Mode: inventory.Lost}
			b.ReportAllocs()
			var states int
			for b.Loop() {
				e, err := Evaluate(sys, c.p, Options{})
				if err != nil {
					b.Fatal(err)
				}
				states = e.States
			}
			b.ReportMetric(float64(states), "states")
		})
	}
}

// BenchmarkLeadTimeLawOverFixed reports the ratio of the time of the
// evaluation of BenchmarkEvaluateSSLeadTimeLaw's law=1..10 to that of
// fixed=5 (issue 12 item 9: at most 3), the two interleaved in every
// iteration so that the load of a shared machine falls on both alike.
//
//	go test -run '^$' -bench LeadTimeLawOverFixed -benchtime 300x -count 3 ./policies/
func BenchmarkLeadTimeLawOverFixed(b *testing.B) {
	law, err := inventory.Parse("pmf:1=0.1,2=0.1,3=0.1,4=0.1,5=0.1,6=0.1,7=0.1,8=0.1,9=0.1,10=0.1")
	if err != nil {
		b.Fatal(err)
	}
	p := Policy{Kind: SS, ReorderPoint: 300, OrderUpTo: 500}
	fixed := inventory.System{Demand: poisson(b, 50), LeadTime: 5, Holding: 1, Shortage: 20, OrderCost: 500, Mode: inventory.Backorder}
	withLaw := fixed
	withLaw.LeadTime, withLaw.LeadTimeLaw = 0, law
	var tf, tl time.Duration
	for b.Loop() {
		t0 := time.Now()
		if _, err := Evaluate(fixed, p, Options{}); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		if _, err := Evaluate(withLaw, p, Options{}); err != nil {
			b.Fatal(err)
		}
		tf += t1.Sub(t0)
		tl += time.Since(t1)
	}
	b.ReportMetric(float64(tl)/float64(tf), "law/fixed")
	b.ReportMetric(float64(tf.Microseconds())/float64(b.N), "µs-fixed")
	b.ReportMetric(float64(tl.Microseconds())/float64(b.N), "µs-law")
}
