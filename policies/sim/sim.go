package sim

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"strconv"
	"strings"
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

	// DefaultPeriodBudget is the default bound on Periods x Replications,
	// the periods simulated in all: about 30 s of one idle core at the
	// 76 M periods/s of DEVELOPERS.md section 5 (a few minutes for the
	// widest laws, drawn directly).
	DefaultPeriodBudget = 2_000_000_000

	// DefaultMaxBytes is the default bound on the memory a run takes:
	// pipelines, the demand table and the per-replication figures.
	DefaultMaxBytes = 1 << 30

	// MaxWorkers bounds Options.Workers.
	MaxWorkers = 1024

	// MaxDemand is the largest single demand the simulator draws: integers
	// up to 2^52 are exact in float64, in which the direct samplers work.
	MaxDemand = 1 << 52

	// sumLimit bounds every exact int64 sum of a replication (below 2^63-1
	// with room for round-off in the float64 estimate of the bound).
	sumLimit = 9.2e18

	// demandEps is the per-draw probability beyond which the demand bound
	// used for the sums is set: a draw above it stops the run with an error
	// (see LimitError), never with a wrapped sum.
	demandEps = 1e-15
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
	// PeriodBudget bounds Periods x Replications; 0 means
	// DefaultPeriodBudget.
	PeriodBudget int64
	// MaxBytes bounds the estimated memory of the run; 0 means
	// DefaultMaxBytes.
	MaxBytes int64
}

// LimitError reports an input the simulator refuses for its size: the
// memory it would take, the time it would run, or sums that int64 cannot
// hold. Field names the input as inventory.FieldError does (snake_case;
// the command line shows it as a flag); Want says the limit and Size the
// estimate that broke it.
type LimitError struct {
	Field string
	Value string
	Want  string
	Size  string
}

func (e *LimitError) Error() string {
	return fmt.Sprintf("%s %s: want %s (%s)", e.Field, e.Value, e.Want, e.Size)
}

// FlagMessage is the message with each field named as its command-line
// flag ("--lead-time 1000000000: want ..."). Callers that cannot import
// this package (policies/report) find it through an interface.
func (e *LimitError) FlagMessage() string {
	flags := strings.Split(e.Field, ", ")
	for i, f := range flags {
		flags[i] = "--" + strings.ReplaceAll(f, "_", "-")
	}
	return fmt.Sprintf("%s %s: want %s (%s)", strings.Join(flags, ", "), e.Value, e.Want, e.Size)
}

// byteSize prints a byte count as "16 GB" and the like.
func byteSize(b float64) string {
	for _, u := range []string{"B", "kB", "MB", "GB", "TB", "PB", "EB"} {
		if b < 1000 {
			return fmt.Sprintf("%.3g %s", b, u)
		}
		b /= 1000
	}
	return fmt.Sprintf("%.3g ZB", b)
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
	TableMax       int     // largest demand held in the alias table; -1 when drawn directly
	TableTail      float64 // P(D > TableMax), drawn exactly from the tail
}

// Check returns the error Run would return before simulating anything:
// an invalid system, policy or option (*inventory.FieldError), or an input
// over the limits of memory, period budget or integer range
// (*LimitError). It allocates nothing in proportion to the inputs.
func Check(sys inventory.System, p policies.Policy, opt Options) error {
	_, err := prepare(sys, p, opt)
	return err
}

func prepare(sys inventory.System, p policies.Policy, opt Options) (limits, error) {
	if err := sys.Validate(); err != nil {
		return limits{}, err
	}
	if err := p.Validate(sys.Mode); err != nil {
		return limits{}, fmt.Errorf("policy %v: %w", p, err)
	}
	if err := opt.validate(); err != nil {
		return limits{}, err
	}
	return check(sys, p, opt)
}

// limits holds what Run derived from its size checks.
type limits struct {
	workers int
	dmax    int64 // a draw above it stops the run
}

// check estimates the memory, time and integer range of the run before
// anything is allocated, and refuses over the limits.
func check(sys inventory.System, p policies.Policy, opt Options) (limits, error) {
	var lim limits
	str := func(v any) string { return fmt.Sprint(v) }
	budget := opt.PeriodBudget
	if budget == 0 {
		budget = DefaultPeriodBudget
	}
	maxBytes := opt.MaxBytes
	if maxBytes == 0 {
		maxBytes = DefaultMaxBytes
	}
	if opt.Workers > MaxWorkers {
		return lim, &LimitError{Field: "workers", Value: str(opt.Workers), Want: fmt.Sprintf("at most %d workers", MaxWorkers),
			Size: "each runs replications with its own pipeline"}
	}
	workers := opt.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	lim.workers = min(workers, opt.Replications)
	// Memory: per-replication figures (kept in Result and sorted through
	// aggregate), one pipeline of L+1 slots per worker, the demand table.
	nf := float64(len(inventory.Figures{}.Fields()))
	if b := float64(opt.Replications) * (nf + 1) * 8; b > float64(maxBytes) {
		return lim, &LimitError{Field: "replications", Value: str(opt.Replications), Want: fmt.Sprintf("at most %d replications", int64(float64(maxBytes)/((nf+1)*8))),
			Size: fmt.Sprintf("their figures would take %s, over the limit of %s", byteSize(b), byteSize(float64(maxBytes)))}
	}
	if n := float64(opt.Periods) * float64(opt.Replications); n > float64(budget) {
		return lim, &LimitError{Field: "periods", Value: str(opt.Periods), Want: fmt.Sprintf("periods x replications at most the period budget of %d", budget),
			Size: fmt.Sprintf("%d x %d = %.3g periods in all; raise the budget to run longer", opt.Periods, opt.Replications, n)}
	}
	// Under random lead times or a review period the ring has lmax+1
	// slots, lmax the largest lead time of the law as the System cuts it,
	// and the law's alias table lmax+1 cells; the sums below bound the
	// pipeline by lmax + R - 1 periods of orders.
	leadSlots := float64(sys.LeadTime)
	var lawCells float64
	if sys.LeadTimeLaw != nil { // (a fixed lead time needs no table: no draw)
		w, _, err := sys.LeadTimeWeights()
		if err != nil {
			return lim, err
		}
		leadSlots = float64(len(w) - 1)
		lawCells = float64(len(w))
	}
	pipe := float64(lim.workers)*(leadSlots+1)*8 + lawCells*cellBytes
	if pipe > float64(maxBytes) {
		return lim, &LimitError{Field: "lead_time", Value: str(sys.LeadTime), Want: fmt.Sprintf("a lead time whose pipelines fit in %s", byteSize(float64(maxBytes))),
			Size: fmt.Sprintf("%d workers x %d slots x 8 bytes = %s", lim.workers, sys.LeadTime+1, byteSize(pipe))}
	}
	cells := tableCells(sys.Demand)
	if b := pipe + float64(cells)*cellBytes; b > float64(maxBytes) {
		return lim, &LimitError{Field: "demand", Value: sys.Demand.String(), Want: fmt.Sprintf("a demand table that fits in %s", byteSize(float64(maxBytes))),
			Size: fmt.Sprintf("%d cells, %s", cells, byteSize(b))}
	}
	// Integer range: every level and every per-period increment of the
	// sums must stay below 2^62, and periods times the largest increment
	// below 2^63.
	s, S, Q := float64(p.ReorderPoint), float64(p.OrderUpTo), float64(p.OrderMultiple)
	given := map[string]int{"reorder_point": p.ReorderPoint, "order_up_to": p.OrderUpTo, "order_multiple": p.OrderMultiple}
	var lo, top float64 // inventory positions after review lie in lo..top
	switch p.Kind {
	case policies.BaseStock:
		lo, top = S, S
	case policies.SS:
		lo, top = s+1, S
	default:
		lo, top = s+1, s+Q
	}
	const levelMax = 1 << 62
	for _, c := range []struct {
		field string
		v     float64
		ok    bool
	}{
		{"reorder_point", s, p.Kind != policies.BaseStock},
		{"order_up_to", S, p.Kind != policies.SNQ},
		{"order_multiple", Q, p.Kind == policies.SNQ},
	} {
		if c.ok && math.Abs(c.v) >= levelMax/4 {
			return lim, &LimitError{Field: c.field, Value: str(given[c.field]), Want: "a level of magnitude below 2^60 (1.15e18)",
				Size: "the simulator's int64 stock and sums would overflow"}
		}
	}
	need := sys.Demand.Bound(demandEps) // P(D > need) <= 1e-15
	if float64(need) > MaxDemand {
		return lim, &LimitError{Field: "demand", Value: sys.Demand.String(), Want: "a demand below 2^52 units per period",
			Size: fmt.Sprintf("P(D > %.3g) > %g", float64(MaxDemand), demandEps)}
	}
	span := top - lo + 1
	fixed := math.Abs(lo) + math.Abs(top) + 2
	L := leadSlots + float64(sys.Review()-1)
	perPeriod := func(dmax float64) float64 { return fixed + (L+2)*(span+dmax) }
	if n := float64(opt.Periods) * perPeriod(float64(need)); n > sumLimit {
		most := math.Floor(sumLimit / perPeriod(float64(need)))
		return lim, &LimitError{Field: "periods", Value: str(opt.Periods), Want: fmt.Sprintf("at most %.0f periods per replication for these levels, lead time and demand", most),
			Size: fmt.Sprintf("periods x (|levels| + (L+2) x (%g + demand up to %d)) = %.3g, beyond the 9.2e18 an exact int64 sum holds", span, need, n)}
	}
	// The demand bound actually enforced: as high as the sums allow.
	dmax := (sumLimit/float64(opt.Periods)-fixed)/(L+2) - span
	lim.dmax = int64(min(dmax, MaxDemand))
	return lim, nil
}

// RangeError reports a draw beyond the demand the exact sums of the run
// can hold (a tail event of probability below 1e-15 per draw).
type RangeError struct {
	Demand, Limit int64
	Replication   int
}

func (e *RangeError) Error() string {
	return fmt.Sprintf("replication %d drew a demand of %d units, beyond the %d that the exact int64 sums of this run can hold: run fewer periods", e.Replication, e.Demand, e.Limit)
}

// FlagMessage names the flag to change, as LimitError.FlagMessage does.
func (e *RangeError) FlagMessage() string { return "--periods: " + e.Error() }

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
	lim, err := prepare(sys, p, opt)
	if err != nil {
		return nil, err
	}
	level := opt.Level
	if level == 0 {
		level = DefaultLevel
	}

	smp := newSampler(sys.Demand)
	var tm *timing
	if !sys.FixedTiming() {
		if tm, err = newTiming(sys); err != nil {
			return nil, err
		}
	}
	per := make([]inventory.Figures, opt.Replications)
	bad := make([]*RangeError, opt.Replications)
	next := make(chan int)
	var wg sync.WaitGroup
	for range lim.workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for r := range next {
				per[r], bad[r] = replicate(sys, p, smp, tm, opt, r, lim.dmax)
			}
		}()
	}
	for r := range opt.Replications {
		next <- r
	}
	close(next)
	wg.Wait()
	for _, e := range bad { // the first in index order, whatever the workers
		if e != nil {
			return nil, e
		}
	}

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
	if err := finite(sys, res); err != nil {
		return nil, err
	}
	return res, nil
}

// finite refuses a result with an infinite figure or half-width (costs so
// large that a figure overflows float64), naming the costs behind it. NaN
// stays allowed only where a ratio figure is undefined.
func finite(sys inventory.System, res *Result) error {
	costs := []struct {
		field string
		v     float64
	}{{"holding_cost", sys.Holding}, {"shortage_cost", sys.Shortage}, {"order_cost", sys.OrderCost}, {"unit_cost", sys.UnitCost}}
	mf, hf := res.Mean.Fields(), res.HalfWidth.Fields()
	for i, f := range mf {
		if !math.IsInf(f.Value, 0) && !math.IsInf(hf[i].Value, 0) && !(math.IsNaN(f.Value) && i >= 7) {
			continue
		}
		var names, vals []string
		for j, c := range costs {
			if c.v == 0 || (i >= 7 && i < 11 && j != i-7) {
				continue
			}
			names = append(names, c.field)
			vals = append(vals, strconv.FormatFloat(c.v, 'g', -1, 64))
		}
		if len(names) == 0 {
			names, vals = []string{"demand"}, []string{sys.Demand.String()}
		}
		return &LimitError{Field: strings.Join(names, ", "), Value: strings.Join(vals, ", "),
			Want: "costs whose figures stay below 1.8e308 (state them in larger money units)",
			Size: f.Label + " overflows float64"}
	}
	return nil
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
	if math.IsInf(sum, 0) { // large figures: sum the shares instead
		mean = 0
		for _, v := range x {
			mean += v / float64(n)
		}
	}
	var ss, scale float64
	for _, v := range x {
		scale = math.Max(scale, math.Abs(v-mean))
	}
	if scale > 0 { // scaled so that squares of large figures do not overflow
		for _, v := range x {
			d := (v - mean) / scale
			ss += d * d
		}
	}
	sd := scale * math.Sqrt(ss/float64(n-1))
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
// A draw above dmax stops it with a *RangeError.
func replicate(sys inventory.System, p policies.Policy, smp *sampler, tm *timing, opt Options, r int, dmax int64) (inventory.Figures, *RangeError) {
	a, b := streamSeeds(opt.Seed, r)
	rng := rand.NewPCG(a, b)
	_, top := p.Levels()
	if tm != nil {
		st := timedState{net: int64(top), ring: make([]int64, tm.lmax+1)}
		lost := sys.Mode == inventory.Lost
		var t tally
		if d := stepTimed(&st, &t, p, smp, tm, lost, rng, opt.Warmup, dmax); d > dmax {
			return inventory.Figures{}, &RangeError{Demand: d, Limit: dmax, Replication: r}
		}
		t = tally{}
		if d := stepTimed(&st, &t, p, smp, tm, lost, rng, opt.Periods-opt.Warmup, dmax); d > dmax {
			return inventory.Figures{}, &RangeError{Demand: d, Limit: dmax, Replication: r}
		}
		return t.figures(sys), nil
	}
	st := state{net: int64(top), pipe: make([]int64, sys.LeadTime+1), w: sys.LeadTime, r: 0}
	var t tally
	step := stepBackorder
	if sys.Mode == inventory.Lost {
		step = stepLost
	}
	if d := step(&st, &t, p, smp, rng, opt.Warmup, dmax); d > dmax {
		return inventory.Figures{}, &RangeError{Demand: d, Limit: dmax, Replication: r}
	}
	t = tally{}
	if d := step(&st, &t, p, smp, rng, opt.Periods-opt.Warmup, dmax); d > dmax {
		return inventory.Figures{}, &RangeError{Demand: d, Limit: dmax, Replication: r}
	}
	return t.figures(sys), nil
}

// stepBackorder simulates n periods in backorder mode, adding to t. It
// stops at the first demand above dmax and returns it (0 when none).
func stepBackorder(st *state, t *tally, p policies.Policy, smp *sampler, rng *rand.PCG, n int, dmax int64) (over int64) {
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
		if d > dmax {
			return d
		}
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
	return 0
}

// stepLost simulates n periods in lost mode, adding to t; it stops at a
// demand above dmax as stepBackorder does.
func stepLost(st *state, t *tally, p policies.Policy, smp *sampler, rng *rand.PCG, n int, dmax int64) (over int64) {
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
		if d > dmax {
			return d
		}
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
	return 0
}
