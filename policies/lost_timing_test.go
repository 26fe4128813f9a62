package policies

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"ergostock/chain"
	"ergostock/inventory"
)

func lostTimedSystem(t testing.TB, demand string, L int, law string, R int) inventory.System {
	t.Helper()
	sys := inventory.System{Demand: lawOf(t, demand), LeadTime: L, ReviewPeriod: R, Holding: 1, Shortage: 9, OrderCost: 5, UnitCost: 2, Mode: inventory.Lost}
	if law != "" {
		sys.LeadTimeLaw = lawOf(t, law)
	}
	if err := sys.Validate(); err != nil {
		t.Fatal(err)
	}
	return sys
}

// With a fixed lead time and review every period the chain at reviews is
// the chain after the arrival (lostChain), state for state: every figure
// agrees to 1e-12.
func TestLostTimedFixedMatches(t *testing.T) {
	for _, demand := range []string{"poisson:mean=2.5", "pmf:0=0.3,1=0.2,2=0.1,5=0.4", "negbin:mean=3,var=7"} {
		for _, L := range []int{0, 1, 2, 3} {
			for _, p := range []Policy{{Kind: BaseStock, OrderUpTo: 9}, {Kind: SS, ReorderPoint: 3, OrderUpTo: 12}, {Kind: SNQ, ReorderPoint: 4, OrderMultiple: 5}} {
				sys := lostTimedSystem(t, demand, L, "", 1)
				opt := Options{MaxStates: DefaultMaxStates, Levels: true}
				want, err := evaluateLost(sys, p, opt)
				if err != nil {
					t.Fatal(err)
				}
				got, err := evaluateLostTimed(sys, p, opt, nil)
				if err != nil {
					t.Fatal(err)
				}
				name := fmt.Sprintf("%s L=%d %v", demand, L, p)
				figuresClose(t, name, got.Figures, want.Figures, 1e-12)
				if L > 0 && got.States != want.States {
					// (With L = 0 lostChain counts the states after the
					// order, this chain those before it.)
					t.Errorf("%s: %d states, want %d", name, got.States, want.States)
				}
				for k := range want.Levels.P {
					if math.Abs(got.Levels.P[k]-want.Levels.P[k]) > 1e-12 {
						t.Errorf("%s: level %d: %g, want %g", name, k, got.Levels.P[k], want.Levels.P[k])
					}
				}
			}
		}
	}
}

// A hand-solved case. Demand 0 or 1 with probability 1/2, L = 0, review
// every 2 periods, base-stock S = 1: the first period of a cycle starts
// with 1 on hand, the second with 1 or 0 (1/2 each). Per period: on hand
// (1/2 + 1/4)/2 = 0.375, lost (0 + 1/4)/2 = 0.125, stockout (0 + 1/4)/2 =
// 0.125, fill rate 1 - 0.125/0.5 = 0.75; an order follows unless both
// demands were 0, 3/4 of the reviews, so 0.375 orders of one unit a
// period.
func TestLostTimedHandCase(t *testing.T) {
	sys := lostTimedSystem(t, "pmf:0=0.5,1=0.5", 0, "", 2)
	e, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 1}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	f := e.Figures
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"mean_on_hand", f.MeanOnHand, 0.375},
		{"mean_lost_sales", f.MeanLostSales, 0.125},
		{"stockout_probability", f.StockoutProbability, 0.125},
		{"fill_rate", f.FillRate, 0.75},
		{"order_frequency", f.OrderFrequency, 0.375},
		{"mean_order_quantity", f.MeanOrderQuantity, 1},
		{"ordering_cost", f.OrderingCost, 5 * 0.375},
		{"purchase_cost", f.PurchaseCost, 2 * 0.375},
	} {
		if math.Abs(c.got-c.want) > 1e-14 {
			t.Errorf("%s = %.17g, want %g", c.name, c.got, c.want)
		}
	}
}

// bruteLostTimed builds the chain of the literal process, period by period: the
// state is the phase of the next period in the review cycle, the stock on
// hand and the list of outstanding orders with their ages (a zero order is
// not placed). Each period: at phase 0 order Order(on hand + outstanding);
// draw the cut-off T (P(T <= l) = P(L = l)/P(L >= l), Kaplan 1970) and
// receive every order at least T periods old; serve the demand, lose the
// rest; age the orders. It shares nothing with lostTimed but the policy's
// order rule and the chain solver, and returns the per-period figures of
// its stationary law.
func bruteLostTimed(t *testing.T, sys inventory.System, p Policy, pmf []float64) inventory.Figures {
	t.Helper()
	var w []float64
	if sys.LeadTimeLaw == nil {
		w = make([]float64, sys.LeadTime+1)
		w[sys.LeadTime] = 1
	} else {
		for l := 0; ; l++ {
			if l > 200 {
				t.Fatal("law too long")
			}
			w = append(w, sys.LeadTimeLaw.PMF(l))
			if sys.LeadTimeLaw.Tail(l+1) == 0 {
				break
			}
		}
	}
	// Cut-off law from the hazards.
	var pT []float64
	surv, prev := 1.0, 0.0
	for l := range w {
		h := 1.0
		if surv > 1e-15 && l < len(w)-1 {
			h = w[l] / surv
		}
		pT = append(pT, h-prev)
		prev = h
		surv -= w[l]
		if h >= 1 {
			break
		}
	}
	R := sys.Review()
	type order struct{ age, q int }
	type state struct {
		f, x int
		out  []order
	}
	key := func(s state) string { return fmt.Sprint(s.f, s.x, s.out) }
	_, top := p.Levels()
	index := map[string]int{}
	var states []state
	add := func(s state) int {
		k := key(s)
		if i, ok := index[k]; ok {
			return i
		}
		index[k] = len(states)
		states = append(states, s)
		return len(states) - 1
	}
	add(state{0, top, nil})
	type fig struct{ onHand, lost, served, stockout, orders, ordered float64 }
	var figs []fig
	var rows []map[int]float64
	for i := 0; i < len(states); i++ {
		s := states[i]
		var g fig
		row := map[int]float64{}
		out := slices.Clone(s.out)
		if s.f == 0 {
			ip := s.x
			for _, o := range out {
				ip += o.q
			}
			if q := p.Order(ip); q > 0 {
				out = append(out, order{0, q})
				g.orders, g.ordered = 1, float64(q)
			}
		}
		for T, pt := range pT {
			if pt <= 0 {
				continue
			}
			a := s.x
			var left []order
			for _, o := range out {
				if o.age >= T {
					a += o.q
				} else {
					left = append(left, order{o.age + 1, o.q})
				}
			}
			for d, pd := range pmf {
				if pd == 0 {
					continue
				}
				pr := pt * pd
				x := max(a-d, 0)
				g.onHand += pr * float64(x)
				g.lost += pr * float64(max(d-a, 0))
				g.served += pr * float64(min(d, a))
				if d > a {
					g.stockout += pr
				}
				j := add(state{(s.f + 1) % R, x, slices.Clone(left)})
				row[j] += pr
			}
		}
		figs = append(figs, g)
		rows = append(rows, row)
	}
	n := len(states)
	if n > 3000 {
		t.Fatalf("brute-force chain of %d states: too large", n)
	}
	dense := make([]float64, n*n)
	for i, row := range rows {
		for j, v := range row {
			dense[i*n+j] = v
		}
	}
	m, err := chain.NewDense(n, dense)
	if err != nil {
		t.Fatal(err)
	}
	r, err := chain.Solve(m, chain.Options{Method: chain.MethodGTH})
	if err != nil {
		t.Fatal(err)
	}
	var tot fig
	for i, pi := range r.Pi {
		g := figs[i]
		tot.onHand += pi * g.onHand
		tot.lost += pi * g.lost
		tot.served += pi * g.served
		tot.stockout += pi * g.stockout
		tot.orders += pi * g.orders
		tot.ordered += pi * g.ordered
	}
	var mean float64
	for d, pd := range pmf {
		mean += float64(d) * pd
	}
	f := inventory.Figures{MeanOnHand: tot.onHand, MeanLostSales: tot.lost, StockoutProbability: tot.stockout,
		OrderFrequency: tot.orders, FillRate: tot.served / mean}
	if tot.orders > 0 {
		f.MeanOrderQuantity = tot.ordered / tot.orders
	}
	f.Price(sys, tot.ordered)
	return f
}

// The chain at reviews against the literal process (bruteLostTimed) on small
// cases: lead-time laws with and without a zero lead time, fixed lead
// times with R > 1, and both at once, for the three policies.
func TestLostTimedBruteForce(t *testing.T) {
	const demand = "pmf:0=0.35,1=0.3,2=0.2,3=0.15"
	pmf := []float64{0.35, 0.3, 0.2, 0.15}
	cases := []struct {
		L   int
		law string
		R   int
	}{
		{0, "pmf:1=0.5,2=0.5", 1},
		{0, "pmf:0=0.2,1=0.3,2=0.5", 1},
		{0, "pmf:1=0.3,2=0.3,3=0.4", 1},
		{2, "", 3},
		{0, "", 2},
		{1, "", 4},
		{0, "pmf:1=0.5,2=0.5", 2},
		{0, "pmf:0=0.25,1=0.25,2=0.5", 3},
		{0, "pmf:2=0.4,3=0.3,4=0.3", 2},
	}
	policies := []Policy{{Kind: BaseStock, OrderUpTo: 5}, {Kind: SS, ReorderPoint: 2, OrderUpTo: 7}, {Kind: SNQ, ReorderPoint: 1, OrderMultiple: 3}}
	for _, c := range cases {
		sys := lostTimedSystem(t, demand, c.L, c.law, c.R)
		for _, p := range policies {
			name := fmt.Sprintf("L=%d law=%q R=%d %v", c.L, c.law, c.R, p)
			e, err := Evaluate(sys, p, Options{Exhaustive: true})
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			want := bruteLostTimed(t, sys, p, pmf)
			figuresClose(t, name, e.Figures, want, 1e-11)
			if e.FlowBalance > 1e-12 {
				t.Errorf("%s: flow balance %g", name, e.FlowBalance)
			}
		}
	}
}

// Independent lead times in lost mode are not exact: refused, pointing to
// simulate.
func TestLostIndependentRefused(t *testing.T) {
	sys := inventory.System{Demand: lawOf(t, "poisson:mean=2"), LeadTimeLaw: lawOf(t, "pmf:1=0.5,3=0.5"), LeadTimeModel: inventory.Independent,
		Holding: 1, Shortage: 9, Mode: inventory.Lost}
	_, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 8}, Options{})
	if !errors.Is(err, ErrNotExact) || !errors.Is(err, inventory.ErrLimit) || !strings.Contains(err.Error(), "simulate") {
		t.Errorf("lost, independent: %v", err)
	}
	if _, err := Optimize(sys, SS, SearchOptions{}); !errors.Is(err, ErrNotExact) {
		t.Errorf("optimize lost, independent: %v", err)
	}
}

// The size rules of the fixed-lead-time chain hold: a level at the state
// limit is refused before any table is built, and a chain that passes the
// limit while it is enumerated is refused with a counted *SizeError.
func TestLostTimedSizeRefused(t *testing.T) {
	sys := lostTimedSystem(t, "poisson:mean=5", 0, "pmf:2=0.3,3=0.3,4=0.4", 1)
	var se *SizeError
	if _, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 200}, Options{MaxStates: 200}); !errors.As(err, &se) {
		t.Errorf("level at the limit: %v", err)
	}
	if _, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 40}, Options{MaxStates: 1000}); !errors.As(err, &se) || !se.Counted {
		t.Errorf("counted: %v", err)
	}
}

// Optimize in lost mode under a lead-time law, a review period and both:
// no unit neighbour of the optimum is cheaper on the chain, the floors hold
// on the evaluated figures, and the search names its guarantee.
func TestOptimizeLostTimed(t *testing.T) {
	for _, c := range []struct {
		law string
		R   int
	}{{"pmf:1=0.2,2=0.5,3=0.3", 1}, {"", 3}, {"pmf:0=0.3,1=0.7", 2}} {
		sys := lostTimedSystem(t, "poisson:mean=2", 1, c.law, c.R)
		sys.Shortage = 19
		for _, k := range []Kind{BaseStock, SS, SNQ} {
			name := fmt.Sprintf("law=%q R=%d %v", c.law, c.R, k)
			o, err := Optimize(sys, k, SearchOptions{})
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			if o.Search.Guarantee == "" {
				t.Errorf("%s: no guarantee stated", name)
			}
			p := o.Policy
			var near []Policy
			for _, d1 := range []int{-1, 0, 1} {
				for _, d2 := range []int{-1, 0, 1} {
					q := p
					switch k {
					case BaseStock:
						if d2 != 0 {
							continue
						}
						q.OrderUpTo += d1
					case SS:
						q.ReorderPoint, q.OrderUpTo = q.ReorderPoint+d1, q.OrderUpTo+d2
					case SNQ:
						q.ReorderPoint, q.OrderMultiple = q.ReorderPoint+d1, q.OrderMultiple+d2
					}
					if q == p || q.Validate(inventory.Lost) != nil {
						continue
					}
					near = append(near, q)
				}
			}
			for _, q := range near {
				e, err := Evaluate(sys, q, Options{})
				if err != nil {
					t.Fatalf("%s: %v: %v", name, q, err)
				}
				if e.Figures.TotalCost < o.Figures.TotalCost-1e-9 {
					t.Errorf("%s: %v costs %.12g < optimum %v %.12g", name, q, e.Figures.TotalCost, p, o.Figures.TotalCost)
				}
			}
			o2, err := Optimize(sys, k, SearchOptions{MinFillRate: 0.98, MaxStockout: 0.05})
			if err != nil {
				t.Fatalf("%s floor: %v", name, err)
			}
			if o2.Figures.FillRate < 0.98 || o2.Figures.StockoutProbability > 0.05 {
				t.Errorf("%s floor: fill %g, stockout %g", name, o2.Figures.FillRate, o2.Figures.StockoutProbability)
			}
		}
	}
}

// lostTimingSim plays the lost-sales process literally for periods periods
// after a warm-up: reviews at t = 0, R, 2R, ...; each period a cut-off T
// (P(T <= l) = KaplanCutoff of the law) releases every outstanding order
// at least T periods old, in the order placed; demand beyond the stock on
// hand is lost. Demand is drawn by inverting the law's CDF. It shares
// nothing with the chain but the laws and the order rule.
func lostTimingSim(t *testing.T, sys inventory.System, p Policy, periods int, seed uint64) (onHand, lost, stockout, fill, freq float64) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 11))
	var F []float64
	if sys.LeadTimeLaw == nil {
		F = make([]float64, sys.LeadTime+1)
		F[sys.LeadTime] = 1
	} else {
		w, _, err := sys.LeadTimeWeights()
		if err != nil {
			t.Fatal(err)
		}
		F, _, _ = inventory.KaplanCutoff(w)
	}
	draw := func(cdf func(int) float64) int {
		u := rng.Float64()
		k := 0
		for cdf(k) < u {
			k++
		}
		return k
	}
	type order struct{ placed, qty int }
	var pipe []order
	_, top := p.Levels()
	x := top
	r := sys.Review()
	var served, demand, orders float64
	warm := periods / 10
	for t := 0; t < periods+warm; t++ {
		if t%r == 0 {
			ip := x
			for _, o := range pipe {
				ip += o.qty
			}
			if q := p.Order(ip); q > 0 {
				pipe = append(pipe, order{t, q})
				if t >= warm {
					orders++
				}
			}
		}
		cut := draw(func(k int) float64 {
			if k >= len(F) {
				return 1
			}
			return F[k]
		})
		for len(pipe) > 0 && t-pipe[0].placed >= cut {
			x += pipe[0].qty
			pipe = pipe[1:]
		}
		d := draw(sys.Demand.CDF)
		if t < warm {
			x = max(x-d, 0)
			continue
		}
		served += float64(min(d, x))
		demand += float64(d)
		lost += float64(max(d-x, 0))
		if d > x {
			stockout++
		}
		x = max(x-d, 0)
		onHand += float64(x)
	}
	n := float64(periods)
	return onHand / n, lost / n, stockout / n, served / demand, orders / n
}

// The exact lost-sales figures under lead-time laws and review periods
// against the literal simulation (a million periods; tolerances of about
// five standard errors of these runs), with Poisson demand and the default
// folding of negligible transitions.
func TestLostTimedAgainstSimulation(t *testing.T) {
	if testing.Short() {
		t.Skip("simulates millions of periods")
	}
	for _, c := range []struct {
		L   int
		law string
		r   int
		p   Policy
	}{
		{0, "pmf:1=0.2,2=0.5,3=0.3", 1, Policy{Kind: SS, ReorderPoint: 8, OrderUpTo: 20}},
		{0, "pmf:1=0.2,2=0.5,3=0.3", 3, Policy{Kind: BaseStock, OrderUpTo: 18}},
		{0, "pmf:0=0.1,1=0.2,2=0.3,3=0.4", 4, Policy{Kind: SNQ, ReorderPoint: 12, OrderMultiple: 9}},
		{2, "", 7, Policy{Kind: SS, ReorderPoint: 15, OrderUpTo: 35}},
	} {
		sys := lostTimedSystem(t, "poisson:mean=3", c.L, c.law, c.r)
		e, err := Evaluate(sys, c.p, Options{})
		if err != nil {
			t.Fatal(err)
		}
		f := e.Figures
		oh, lo, so, fr, fq := lostTimingSim(t, sys, c.p, 1_000_000, 1)
		name := fmt.Sprintf("L=%d law=%q R=%d %v", c.L, c.law, c.r, c.p)
		for _, x := range []struct {
			name            string
			exact, sim, tol float64
		}{
			{"mean_on_hand", f.MeanOnHand, oh, 0.01 * (1 + oh)},
			{"mean_lost_sales", f.MeanLostSales, lo, 0.005 + 0.01*lo},
			{"stockout_probability", f.StockoutProbability, so, 0.003},
			{"fill_rate", f.FillRate, fr, 0.003},
			{"order_frequency", f.OrderFrequency, fq, 0.002},
		} {
			if math.Abs(x.exact-x.sim) > x.tol {
				t.Errorf("%s: %s exact %.6g, simulated %.6g", name, x.name, x.exact, x.sim)
			}
		}
	}
}

// A fixed lead time of a billion periods with weekly review is refused
// before the pipeline is allocated, as a memory limit.
func TestLostTimedHugeLeadTime(t *testing.T) {
	sys := lostTimedSystem(t, "poisson:mean=5", 1_000_000_000, "", 7)
	_, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 30}, Options{})
	var me *LostMemoryError
	if !errors.As(err, &me) || strings.Contains(err.Error(), "\n") {
		t.Errorf("huge lead time: %v", err)
	}
}
