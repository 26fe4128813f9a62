package network

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
)

// SimOptions set the size and random streams of a network simulation.
type SimOptions struct {
	Periods      int    // periods per replication, warm-up included
	Warmup       int    // leading periods left out of the figures
	Replications int    // independent replications, >= 2
	Seed         uint64 // the seed every replication's stream comes from
	Workers      int    // goroutines; 0 is GOMAXPROCS. Never changes the result
}

// MaxSimWork bounds periods x replications x (stores + 1).
const MaxSimWork = 4e9

// Estimate is a mean over replications with the half-width of its 95%
// Student t interval, t_{0.975,R-1} s / sqrt(R) (Law, Simulation Modeling
// and Analysis, 5th ed., 2015, chapter 9, from memory).
type Estimate struct {
	Mean float64 `json:"mean"`
	CI95 float64 `json:"ci95"`
}

// SimFigures are one location's simulated figures, defined as in Figures.
type SimFigures struct {
	Location            string   `json:"location"`
	Parent              string   `json:"parent"`
	InstallationLevel   int      `json:"installation_base_stock"`
	EchelonLevel        int      `json:"echelon_base_stock"`
	FillRate            Estimate `json:"fill_rate"`
	StockoutProbability Estimate `json:"stockout_probability"`
	MeanOnHand          Estimate `json:"mean_on_hand"`
	MeanBackorders      Estimate `json:"mean_backorders"`
	HoldingCost         Estimate `json:"holding_cost"`
	ShortageCost        Estimate `json:"shortage_cost"`
	TotalCost           Estimate `json:"total_cost"`
}

// SimResult is a network simulation, centre first.
type SimResult struct {
	Locations    []SimFigures
	TotalCost    Estimate
	Periods      int
	Warmup       int
	Replications int
	Seed         uint64
}

// figuresPerLocation is the number of figures a replication returns per
// location (fill, stockout, on hand, backorders, holding, shortage, total).
const figuresPerLocation = 7

// Simulate plays the network period by period (the events of the package
// documentation) and estimates every figure from independent replications.
// Each replication starts with every store at its level on hand and the
// centre at its installation level (or empty if that is negative),
// nothing in transit, and drops the warm-up.
func Simulate(n *Network, opt SimOptions) (*SimResult, error) {
	if err := n.Validate(true); err != nil {
		return nil, err
	}
	switch {
	case opt.Replications < 2:
		return nil, &inventory.FieldError{Field: "replications", Value: fmt.Sprint(opt.Replications), Want: "a count >= 2 (an interval needs two replications)"}
	case opt.Periods < 1:
		return nil, &inventory.FieldError{Field: "periods", Value: fmt.Sprint(opt.Periods), Want: "a count >= 1"}
	case opt.Warmup < 0 || opt.Warmup >= opt.Periods:
		return nil, &inventory.FieldError{Field: "warmup", Value: fmt.Sprint(opt.Warmup), Want: fmt.Sprintf("a count from 0 to below --periods (%d)", opt.Periods)}
	case opt.Workers < 0 || opt.Workers > 1024:
		return nil, &inventory.FieldError{Field: "workers", Value: fmt.Sprint(opt.Workers), Want: "a count from 0 (all cores) to 1024"}
	}
	if w := float64(opt.Periods) * float64(opt.Replications) * float64(len(n.Stores)+1); w > MaxSimWork {
		return nil, &inventory.FieldError{Field: "periods", Value: fmt.Sprint(opt.Periods),
			Want: fmt.Sprintf("periods x replications x locations at most %g (this run: %g)", MaxSimWork, w), Err: ErrLimit}
	}
	cells := 0.0
	for _, st := range n.Stores {
		cells += float64(max(st.Demand.Bound(1e-16), 0) + 2)
	}
	if cells > maxSamplerCells*4 {
		return nil, &inventory.FieldError{Field: "network", Value: n.File,
			Want: fmt.Sprintf("stores whose sampling tables hold at most %d cells in all (these need %g; plan in larger units)", maxSamplerCells*4, cells), Err: ErrLimit}
	}
	samplers := make([]*sampler, len(n.Stores))
	for i, st := range n.Stores {
		s, err := newSampler(st.Demand)
		if err != nil {
			return nil, n.errAt(st, "demand", "%q: %v", st.Demand.String(), err)
		}
		samplers[i] = s
	}
	s0, s := n.InstallationLevels()
	workers := opt.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, opt.Replications)
	out := make([][]float64, opt.Replications)
	var wg sync.WaitGroup
	next := make(chan int)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for r := range next {
				out[r] = replicate(n, s0, s, samplers, opt, r)
			}
		}()
	}
	for r := 0; r < opt.Replications; r++ {
		next <- r
	}
	close(next)
	wg.Wait()

	R := float64(opt.Replications)
	tq := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: R - 1}.Quantile(0.975)
	estimate := func(j int) Estimate {
		var mean float64
		for _, v := range out {
			mean += v[j]
		}
		mean /= R
		var ss float64
		for _, v := range out {
			ss += (v[j] - mean) * (v[j] - mean)
		}
		return Estimate{Mean: mean, CI95: tq * math.Sqrt(ss/(R-1)/R)}
	}
	res := &SimResult{Periods: opt.Periods, Warmup: opt.Warmup, Replications: opt.Replications, Seed: opt.Seed}
	echelon := s0
	for _, v := range s {
		echelon += v
	}
	locs := append([]Location{n.Centre}, n.Stores...)
	for k, l := range locs {
		b := k * figuresPerLocation
		f := SimFigures{Location: l.Name, Parent: l.Parent,
			FillRate: estimate(b), StockoutProbability: estimate(b + 1), MeanOnHand: estimate(b + 2),
			MeanBackorders: estimate(b + 3), HoldingCost: estimate(b + 4), ShortageCost: estimate(b + 5), TotalCost: estimate(b + 6)}
		if k == 0 {
			f.InstallationLevel, f.EchelonLevel = s0, echelon
		} else {
			f.InstallationLevel, f.EchelonLevel = s[k-1], s[k-1]
		}
		res.Locations = append(res.Locations, f)
	}
	res.TotalCost = estimate(len(locs) * figuresPerLocation)
	return res, nil
}

// streamSeeds returns the two words seeding replication r's PCG stream:
// outputs 2r+1 and 2r+2 of SplitMix64 started at seed (Steele, Lea and
// Flood 2014).
func streamSeeds(seed uint64, r int) (uint64, uint64) {
	const gamma = 0x9e3779b97f4a7c15
	mix := func(z uint64) uint64 {
		z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
		z = (z ^ (z >> 27)) * 0x94d049bb133111eb
		return z ^ (z >> 31)
	}
	i := 2 * uint64(r)
	return mix(seed + (i+1)*gamma), mix(seed + (i+2)*gamma)
}

type order struct {
	store int
	qty   int64
}

// replicate runs replication r and returns its figures, location by
// location (figuresPerLocation each), then the total cost.
func replicate(n *Network, s0 int, s []int, smp []*sampler, opt SimOptions, r int) []float64 {
	a, b := streamSeeds(opt.Seed, r)
	rng := rand.New(rand.NewPCG(a, b))
	N := len(n.Stores)
	l0 := n.Centre.LeadTime
	oh0 := int64(max(s0, 0))
	ring0 := make([]int64, l0+1)
	var onOrder0, backlog int64
	queue := make([]order, 0, 64)
	head := 0
	net := make([]int64, N)
	transit := make([]int64, N)
	owed := make([]int64, N)
	rings := make([][]int64, N)
	for i, st := range n.Stores {
		net[i] = int64(s[i])
		rings[i] = make([]int64, st.LeadTime+1)
	}
	// Tallies over the counted periods.
	var cOH, cBO, cShort, cOrdered, cAtOnce float64
	sOH := make([]float64, N)
	sBO := make([]float64, N)
	sShort := make([]float64, N)
	sServed := make([]float64, N)
	sDemand := make([]float64, N)
	for t := 0; t < opt.Periods; t++ {
		// 1. Review: the stores order, then the centre.
		var newOrders int64
		for j := range n.Stores {
			// Orders of the same review join the queue in an order that
			// rotates from period to period: no store has priority.
			i := (j + t) % N
			if q := int64(s[i]) - (net[i] + transit[i] + owed[i]); q > 0 {
				queue = append(queue, order{i, q})
				owed[i] += q
				backlog += q
				newOrders += q
			}
		}
		if q := int64(s0) - (oh0 + onOrder0 - backlog); q > 0 {
			ring0[(t+l0)%(l0+1)] += q
			onOrder0 += q
		}
		// 2. Receive at the centre, ship first come first served, receive
		// at the stores.
		slot := t % (l0 + 1)
		oh0 += ring0[slot]
		onOrder0 -= ring0[slot]
		ring0[slot] = 0
		for oh0 > 0 && head < len(queue) {
			o := &queue[head]
			x := min(oh0, o.qty)
			li := n.Stores[o.store].LeadTime
			rings[o.store][(t+li)%(li+1)] += x
			transit[o.store] += x
			owed[o.store] -= x
			backlog -= x
			oh0 -= x
			o.qty -= x
			if o.qty == 0 {
				head++
			}
		}
		if head > 1024 && head*2 > len(queue) {
			queue = append(queue[:0], queue[head:]...)
			head = 0
		}
		atOnce := newOrders - min(newOrders, backlog)
		count := t >= opt.Warmup
		for i := range n.Stores {
			li := n.Stores[i].LeadTime
			slot := t % (li + 1)
			net[i] += rings[i][slot]
			transit[i] -= rings[i][slot]
			rings[i][slot] = 0
			// 3. Demand.
			d := smp[i].draw(rng)
			served := min(d, max(net[i], 0))
			net[i] -= d
			if count {
				sServed[i] += float64(served)
				sDemand[i] += float64(d)
				if net[i] >= 0 {
					sOH[i] += float64(net[i])
				} else {
					sBO[i] -= float64(net[i])
					sShort[i]++
				}
			}
		}
		if count {
			cOH += float64(oh0)
			cBO += float64(backlog)
			if backlog > 0 {
				cShort++
			}
			cOrdered += float64(newOrders)
			cAtOnce += float64(atOnce)
		}
	}
	T := float64(opt.Periods - opt.Warmup)
	ratio := func(a, b float64) float64 {
		if b == 0 {
			return 1
		}
		return a / b
	}
	out := make([]float64, 0, (N+1)*figuresPerLocation+1)
	c := n.Centre
	hold := c.Holding * cOH / T
	out = append(out, ratio(cAtOnce, cOrdered), cShort/T, cOH/T, cBO/T, hold, 0, hold)
	total := hold
	for i, st := range n.Stores {
		h, sh := st.Holding*sOH[i]/T, st.Shortage*sBO[i]/T
		out = append(out, ratio(sServed[i], sDemand[i]), sShort[i]/T, sOH[i]/T, sBO[i]/T, h, sh, h+sh)
		total += h + sh
	}
	return append(out, total)
}

// sampler draws a demand by the alias method (Walker 1977; Vose 1991)
// over 0..K with P(D > K) <= 1e-16, plus one cell for the tail beyond K,
// resolved by inverting the exact tail, so nothing is truncated.
type sampler struct {
	prob  []float64
	alias []int32
	k     int64
	tail  float64
	dist  inventory.Distribution
}

// maxSamplerCells bounds the alias table.
const maxSamplerCells = 1 << 22

func newSampler(d inventory.Distribution) (*sampler, error) {
	k := max(d.Bound(1e-16), 0)
	if k+2 > maxSamplerCells {
		return nil, fmt.Errorf("its sampling table would need %d cells, over the limit of %d (plan in larger units): %w", k+2, maxSamplerCells, ErrLimit)
	}
	p := make([]float64, k+2)
	var sum float64
	for i := 0; i <= k; i++ {
		if v := d.PMF(i); v > 0 {
			p[i] = v
			sum += v
		}
	}
	tail := d.Tail(k + 1)
	if !(tail > 0) {
		tail = 0
	}
	p[k+1] = tail
	sum += tail
	s := &sampler{prob: make([]float64, len(p)), alias: make([]int32, len(p)), k: int64(k), tail: tail, dist: d}
	// Vose 1991: pair every small scaled weight with a large donor.
	nn := float64(len(p))
	var small, large []int
	scaled := make([]float64, len(p))
	for i, v := range p {
		scaled[i] = v / sum * nn
		if scaled[i] < 1 {
			small = append(small, i)
		} else {
			large = append(large, i)
		}
	}
	for len(small) > 0 && len(large) > 0 {
		l, g := small[len(small)-1], large[len(large)-1]
		small = small[:len(small)-1]
		s.prob[l], s.alias[l] = scaled[l], int32(g)
		scaled[g] -= 1 - scaled[l]
		if scaled[g] < 1 {
			large = large[:len(large)-1]
			small = append(small, g)
		}
	}
	for _, i := range large {
		s.prob[i], s.alias[i] = 1, int32(i)
	}
	for _, i := range small {
		s.prob[i], s.alias[i] = 1, int32(i)
	}
	return s, nil
}

func (s *sampler) draw(rng *rand.Rand) int64 {
	i := rng.IntN(len(s.prob))
	if rng.Float64() >= s.prob[i] {
		i = int(s.alias[i])
	}
	if int64(i) <= s.k {
		return int64(i)
	}
	// Beyond K: the least m > K with P(D > m) <= u P(D > K).
	target := rng.Float64() * s.tail
	m := s.k + 1
	for steps := 0; steps < 1<<20 && s.dist.Tail(int(m+1)) > target; steps++ {
		m++
	}
	return m
}
