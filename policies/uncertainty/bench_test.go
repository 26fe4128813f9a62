package uncertainty

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"ergostock/inventory"
	"ergostock/policies"
)

// syntheticItem is one invented SKU for timing: a weekly series mixing the
// four demand patterns (as the batch benchmark does) and its costs.
type syntheticItem struct {
	sku string
	y   []int
	sys inventory.System
}

func synthetic(n, weeks int, seed uint64) []syntheticItem {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	poisson := func(lam float64) int {
		l, k, p := math.Exp(-lam), 0, 1.0
		for {
			p *= rng.Float64()
			if p <= l {
				return k
			}
			k++
		}
	}
	items := make([]syntheticItem, n)
	for i := range items {
		var size func() int
		prob := 1.0
		switch i % 4 {
		case 0:
			m := 1 + 15*rng.Float64()
			size = func() int { return poisson(m) }
		case 1:
			m := 2 + 8*rng.Float64()
			size = func() int { return poisson(m * rng.ExpFloat64()) }
		case 2:
			prob = 0.2 + 0.3*rng.Float64()
			size = func() int { return 1 + poisson(1) }
		default:
			prob = 0.2 + 0.3*rng.Float64()
			size = func() int { return 1 + poisson(6*rng.ExpFloat64()) }
		}
		y := make([]int, weeks)
		for w := range y {
			if rng.Float64() < prob {
				y[w] = size()
			}
		}
		h := 0.1 + rng.Float64()
		sys := inventory.System{LeadTime: rng.IntN(3), Holding: h, Shortage: h * (5 + 20*rng.Float64()), Mode: inventory.Backorder}
		if i%2 == 0 {
			sys.OrderCost = 5 + 50*rng.Float64()
		}
		items[i] = syntheticItem{sku: fmt.Sprintf("SKU-%05d", i), y: y, sys: sys}
	}
	return items
}

// BenchmarkCatalogue times the analysis of a synthetic backorder catalogue
// of 104-week histories with B = 200 resamples, SKUs planned on all cores
// (one goroutine per SKU's resamples, as batch runs them), and reports the
// figure extrapolated to 1,000 SKUs (s/1000sku). Issue 13's goal: 1,000
// SKUs under 60 s on the 2-core machine.
func BenchmarkCatalogue(b *testing.B) {
	cases := []struct{ skus, B int }{{20, 200}, {50, 200}}
	if os.Getenv("ERGOSTOCK_BENCH_FULL") != "" {
		// The goal's own size (about half a minute on 2 quiet cores).
		cases = append(cases, struct{ skus, B int }{1000, 200})
	}
	for _, c := range cases {
		b.Run(fmt.Sprintf("skus=%d,B=%d", c.skus, c.B), func(b *testing.B) {
			items := synthetic(c.skus, 104, 13)
			for b.Loop() {
				start := time.Now()
				var next atomic.Int64
				var wg sync.WaitGroup
				var failed atomic.Int64
				for w := 0; w < runtime.GOMAXPROCS(0); w++ {
					wg.Add(1)
					go func() {
						defer wg.Done()
						for {
							i := int(next.Add(1) - 1)
							if i >= len(items) {
								return
							}
							it := items[i]
							if _, err := Analyze(it.sku, it.y, it.sys, Options{Resamples: c.B, Seed: 1, Workers: 1}); err != nil {
								failed.Add(1)
							}
						}
					}()
				}
				wg.Wait()
				if failed.Load() > 0 {
					b.Fatalf("%d SKUs failed", failed.Load())
				}
				b.ReportMetric(time.Since(start).Seconds()*1000/float64(c.skus), "s/1000sku")
			}
		})
	}
}

// BenchmarkResample times the parts of one resample of a smooth 104-week
// series: the refit alone, and refit + optimise + evaluation of the
// recommendation.
func BenchmarkResample(b *testing.B) {
	it := synthetic(1, 104, 13)[0]
	it.sys.OrderCost = 30
	res, err := Analyze(it.sku, it.y, it.sys, Options{Resamples: 2})
	if err != nil {
		b.Fatal(err)
	}
	buf := make([]int, len(it.y))
	b.Run("fit", func(b *testing.B) {
		r := Stream(1, "x", 0)
		for b.Loop() {
			resampleIID(buf, it.y, r)
			if _, err := fitOf(buf); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("fit+optimize+evaluate", func(b *testing.B) {
		r := Stream(1, "x", 0)
		var rs Resample
		for b.Loop() {
			resampleIID(buf, it.y, r)
			planResample(&rs, buf, it.sys, policies.SS, res.Point.Policy, policies.SearchOptions{}, fitOf)
			if rs.Err != nil {
				b.Fatal(rs.Err)
			}
		}
	})
}
