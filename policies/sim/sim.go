package sim

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
	"ergostock/policies"
)

// Defaults for callers that offer them (the command line does).
const (
	DefaultPeriods      = 100_000
	DefaultReplications = 20
	DefaultLevel        = 0.95

	// MaxLeadTime bounds the pipeline each worker holds (L+1 slots).
	MaxLeadTime = 1 << 20
)

// DefaultWarmup returns the warm-up used when none is given: a tenth of the
// periods.
func DefaultWarmup(periods int) int { return periods / 10 }

// Options set the size and the random streams of a simulation. Periods and
// Replications must be given; the zero values of the other fields select
// no warm-up, seed 0, all cores and 95% intervals.
type Options struct {
	Periods      int     // periods simulated per replication, warm-up included
	Warmup       int     // leading periods of each replication left out of the figures
	Replications int     // independent replications, >= 2
	Seed         uint64  // the seed every replication's stream is derived from
	Workers      int     // goroutines; 0 means runtime.GOMAXPROCS(0). Never changes the result
	Level        float64 // confidence level of the intervals; 0 means 0.95
}

// Result holds the figures of a simulation: the mean across replications
// and the half-width of its confidence interval at the given Level.
//
// A ratio figure (fill rate, mean order quantity) is undefined in a
// replication that saw no demand or placed no order; such replications are
// left out of that figure's mean, and a figure with fewer than two defined
// replications has a NaN half-width (NaN mean if none).
type Result struct {
	Mean           inventory.Figures
	HalfWidth      inventory.Figures
	Level          float64             // confidence level of HalfWidth
	TQuantile      float64             // Student t quantile used, with Replications-1 degrees of freedom
	PerReplication []inventory.Figures // figures of each replication, by index
	Periods        int                 // per replication, warm-up included
	Warmup         int
	Replications   int
	Seed           uint64
	TableMax       int     // largest demand held in the alias table
	TableTail      float64 // P(D > TableMax), drawn exactly from the tail
}

// validate checks the options; errors name the option as the command-line
// flag does.
func (o Options) validate() error {
	bad := func(field string, v any, want string) error {
		return &inventory.FieldError{Field: field, Value: fmt.Sprint(v), Want: want}
	}
	switch {
	case o.Periods < 1:
		return bad("periods", o.Periods, "a number of periods >= 1")
	case o.Warmup < 0:
		return bad("warmup", o.Warmup, "a number of periods >= 0")
	case o.Periods <= o.Warmup:
		return bad("periods", o.Periods, fmt.Sprintf("more periods than the warm-up of %d", o.Warmup))
	case o.Replications < 2:
		return bad("replications", o.Replications, "at least 2 replications (an interval needs two)")
	case o.Workers < 0:
		return bad("workers", o.Workers, "a number of workers >= 0 (0: all cores)")
	case o.Level != 0 && !(o.Level > 0 && o.Level < 1):
		return bad("level", o.Level, "a confidence level in (0, 1)")
	}
	return nil
}

// Run simulates policy p on system sys and returns every figure with its
// confidence interval. The result depends only on sys, p and opt without
// opt.Workers: the same inputs give identical results on any number of
// workers.
func Run(sys inventory.System, p policies.Policy, opt Options) (*Result, error) {
	if err := sys.Validate(); err != nil {
		return nil, err
	}
	if err := p.Validate(sys.Mode); err != nil {
		return nil, fmt.Errorf("policy %v: %w", p, err)
	}
	if err := opt.validate(); err != nil {
		return nil, err
	}
	if sys.LeadTime > MaxLeadTime {
		return nil, &inventory.FieldError{Field: "lead_time", Value: fmt.Sprint(sys.LeadTime), Want: fmt.Sprintf("at most %d periods for the simulator", MaxLeadTime)}
	}
	level := opt.Level
	if level == 0 {
		level = DefaultLevel
	}
	workers := opt.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, opt.Replications)

	smp := newSampler(sys.Demand)
	per := make([]inventory.Figures, opt.Replications)
	next := make(chan int)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for r := range next {
				per[r] = replicate(sys, p, smp, opt, r)
			}
		}()
	}
	for r := range opt.Replications {
		next <- r
	}
	close(next)
	wg.Wait()

	res := &Result{
		Level:          level,
		TQuantile:      distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(opt.Replications - 1)}.Quantile(1 - (1-level)/2),
		PerReplication: per,
		Periods:        opt.Periods,
		Warmup:         opt.Warmup,
		Replications:   opt.Replications,
		Seed:           opt.Seed,
		TableMax:       int(smp.k),
		TableTail:      smp.tail,
	}
	res.Mean, res.HalfWidth = aggregate(per, level)
	return res, nil
}

// aggregate returns, figure by figure, the mean across replications and the
// half-width t s / sqrt(R) over the replications where the figure is
// defined, summing in index order.
func aggregate(per []inventory.Figures, level float64) (mean, half inventory.Figures) {
	nf := len(inventory.Figures{}.Fields())
	m := make([]float64, nf)
	h := make([]float64, nf)
	vals := make([]float64, 0, len(per))
	for j := range nf {
		vals = vals[:0]
		for _, f := range per {
			if v := f.Fields()[j].Value; !math.IsNaN(v) {
				vals = append(vals, v)
			}
		}
		m[j], h[j] = interval(vals, level)
	}
	return inventory.FromFields(m), inventory.FromFields(h)
}

// interval returns the mean of x and the half-width of its confidence
// interval at the given level: t_{(1+level)/2, n-1} s / sqrt(n) with s the
// sample standard deviation (two-pass).
func interval(x []float64, level float64) (mean, half float64) {
	n := len(x)
	switch n {
	case 0:
		return math.NaN(), math.NaN()
	case 1:
		return x[0], math.NaN()
	}
	var sum float64
	for _, v := range x {
		sum += v
	}
	mean = sum / float64(n)
	var ss float64
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	sd := math.Sqrt(ss / float64(n-1))
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(n - 1)}.Quantile(1 - (1-level)/2)
	return mean, t * sd / math.Sqrt(float64(n))
}

// tally holds the exact integer sums over the counted periods. They are
// exact as long as periods times the largest stock level stays below 2^63.
type tally struct {
	periods    int64
	demand     int64
	served     int64 // demand served from stock at once
	stockouts  int64 // periods ending short
	onHand     int64 // end-of-period on-hand
	backorders int64 // end-of-period backorders
	lost       int64
	orders     int64
	units      int64 // units ordered
}

// figures turns the sums into the figures of one replication.
func (t tally) figures(sys inventory.System) inventory.Figures {
	n := float64(t.periods)
	f := inventory.Figures{
		FillRate:            math.NaN(),
		StockoutProbability: float64(t.stockouts) / n,
		MeanOnHand:          float64(t.onHand) / n,
		MeanBackorders:      float64(t.backorders) / n,
		MeanLostSales:       float64(t.lost) / n,
		OrderFrequency:      float64(t.orders) / n,
		MeanOrderQuantity:   math.NaN(),
	}
	if t.demand > 0 {
		f.FillRate = float64(t.served) / float64(t.demand)
	}
	if t.orders > 0 {
		f.MeanOrderQuantity = float64(t.units) / float64(t.orders)
	}
	f.HoldingCost = sys.Holding * f.MeanOnHand
	if sys.Mode == inventory.Lost {
		f.ShortageCost = sys.Shortage * f.MeanLostSales
	} else {
		f.ShortageCost = sys.Shortage * f.MeanBackorders
	}
	f.OrderingCost = sys.OrderCost * f.OrderFrequency
	f.PurchaseCost = sys.UnitCost * float64(t.units) / n
	f.TotalCost = f.HoldingCost + f.ShortageCost + f.OrderingCost + f.PurchaseCost
	return f
}

// streamSeeds returns the two words seeding the PCG stream of replication
// r: outputs 2r+1 and 2r+2 of SplitMix64 started at seed (Steele, Lea and
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

// state is the system between periods.
type state struct {
	net     int64   // on-hand minus backorders (lost mode: on-hand)
	onOrder int64   // units ordered and not yet received
	pipe    []int64 // ring of L+1 slots: the order placed at t sits in slot (t+L) mod (L+1)
	w, r    int     // slots written and read this period; w = r-1 mod (L+1)
}

// replicate runs replication r: warm-up, then the counted periods.
func replicate(sys inventory.System, p policies.Policy, smp *sampler, opt Options, r int) inventory.Figures {
	a, b := streamSeeds(opt.Seed, r)
	rng := rand.NewPCG(a, b)
	_, top := p.Levels()
	st := state{net: int64(top), pipe: make([]int64, sys.LeadTime+1), w: sys.LeadTime, r: 0}
	var t tally
	step := stepBackorder
	if sys.Mode == inventory.Lost {
		step = stepLost
	}
	step(&st, &t, p, smp, rng, opt.Warmup)
	t = tally{}
	step(&st, &t, p, smp, rng, opt.Periods-opt.Warmup)
	return t.figures(sys)
}

// stepBackorder simulates n periods in backorder mode, adding to t.
func stepBackorder(st *state, t *tally, p policies.Policy, smp *sampler, rng *rand.PCG, n int) {
	net, onOrder, pipe, w, r := st.net, st.onOrder, st.pipe, st.w, st.r
	last := len(pipe) - 1
	s := *t
	for range n {
		// 1. Review.
		q := int64(p.Order(int(net + onOrder)))
		s.orders += int64(uint64(-q) >> 63) // 1 when q > 0
		s.units += q
		onOrder += q
		pipe[w] = q
		// 2. Receive the order of period t-L (with L = 0, w == r: this one).
		arr := pipe[r]
		onOrder -= arr
		net += arr
		w, r = r, r+1
		if r > last {
			r = 0
		}
		// 3. Demand, served from the stock left after clearing backorders.
		d := smp.draw(rng)
		s.demand += d
		s.served += min(d, max(net, 0))
		net -= d
		// 4. End of period.
		s.onHand += max(net, 0)
		s.backorders += max(-net, 0)
		s.stockouts += int64(uint64(net) >> 63) // 1 when net < 0
	}
	s.periods += int64(n)
	*t = s
	st.net, st.onOrder, st.w, st.r = net, onOrder, w, r
}

// stepLost simulates n periods in lost mode, adding to t.
func stepLost(st *state, t *tally, p policies.Policy, smp *sampler, rng *rand.PCG, n int) {
	onHand, onOrder, pipe, w, r := st.net, st.onOrder, st.pipe, st.w, st.r
	last := len(pipe) - 1
	s := *t
	for range n {
		// 1. Review.
		q := int64(p.Order(int(onHand + onOrder)))
		s.orders += int64(uint64(-q) >> 63)
		s.units += q
		onOrder += q
		pipe[w] = q
		// 2. Receive.
		arr := pipe[r]
		onOrder -= arr
		onHand += arr
		w, r = r, r+1
		if r > last {
			r = 0
		}
		// 3. Demand; what stock cannot serve is lost.
		d := smp.draw(rng)
		served := min(d, onHand)
		lost := d - served
		s.demand += d
		s.served += served
		s.lost += lost
		s.stockouts += int64(uint64(-lost) >> 63) // 1 when lost > 0
		onHand -= served
		// 4. End of period.
		s.onHand += onHand
	}
	s.periods += int64(n)
	*t = s
	st.net, st.onOrder, st.w, st.r = onHand, onOrder, w, r
}
