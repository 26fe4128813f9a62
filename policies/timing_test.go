package policies

import (
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
)

func lawOf(t testing.TB, spec string) inventory.Distribution {
	t.Helper()
	d, err := inventory.Parse(spec)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func figuresClose(t *testing.T, name string, got, want inventory.Figures, tol float64) {
	t.Helper()
	g, w := got.Fields(), want.Fields()
	for i := range g {
		if !close(g[i].Value, w[i].Value, tol) {
			t.Errorf("%s: %s = %.17g, want %.17g", name, g[i].Name, g[i].Value, w[i].Value)
		}
	}
}

var timingPolicies = []Policy{
	{Kind: BaseStock, OrderUpTo: 14},
	{Kind: SS, ReorderPoint: 9, OrderUpTo: 20},
	{Kind: SNQ, ReorderPoint: 9, OrderMultiple: 6},
}

// A fixed lead time given as a one-point law, and R = 1 given explicitly,
// give today's figures to 1e-12 (SPEC section 4: "a one-point law is the
// fixed lead time, to round-off"). The one-point law goes through the
// mixture code path here (the System is built directly, not by
// ParseLeadTime, which would turn it into the fixed lead time).
func TestOnePointLawIsFixedLeadTime(t *testing.T) {
	for _, d := range []inventory.Distribution{poisson(t, 3), lawOf(t, "negbin:mean=3,var=7"), lawOf(t, "pmf:0=0.3,1=0.2,2=0.1,5=0.4")} {
		for _, L := range []int{0, 1, 3} {
			fixed := backorderSystem(d, L, 1, 9, 20)
			law := fixed
			law.LeadTimeLaw = lawOf(t, "pmf:"+itoa(L)+"=1")
			law.ReviewPeriod = 1
			law.LeadTime = 99 // ignored when a law is given
			for _, model := range []inventory.LeadTimeModel{inventory.Sequential, inventory.Independent} {
				law.LeadTimeModel = model
				for _, p := range timingPolicies {
					if model == inventory.Independent && p.Kind != BaseStock {
						continue
					}
					want := evaluate(t, fixed, p).Figures
					got := evaluate(t, law, p).Figures
					figuresClose(t, d.String()+" L="+itoa(L)+" "+string(model)+" "+p.String(), got, want, 1e-12)
				}
			}
		}
	}
}

func itoa(i int) string { return strconv.Itoa(i) }

// The demand over a random lead time has the moments of a random sum,
// E[X_L] = E[L] E[D] and Var[X_L] = E[L] Var[D] + E[D]^2 Var[L] (Silver,
// Pyke & Thomas 2017, Inventory and Production Management in Supply
// Chains, 4th ed., section 6.10, from memory); the check is on the
// probabilities themselves (sum k P(X = k)), not on the Mixture's own
// moments.
func TestMixedDemandMoments(t *testing.T) {
	for _, c := range []struct{ demand, law string }{
		{"poisson:mean=50", "pmf:1=0.2,2=0.5,3=0.3"},
		{"negbin:mean=4,var=10", "pmf:1=0.1,2=0.2,3=0.3,4=0.4"},
		{"normal:mean=20,sd=5", "poisson:mean=3"},
		{"pmf:0=0.5,1=0.25,3=0.25", "pmf:2=0.5,3=0.5"},
	} {
		d, law := lawOf(t, c.demand), lawOf(t, c.law)
		sys := backorderSystem(d, 0, 1, 1, 0)
		sys.LeadTimeLaw = law
		x, err := inventory.MixedDemand(sys, 0)
		if err != nil {
			t.Fatal(err)
		}
		var m1, m2 float64
		for k := 0; k <= x.Bound(1e-16)+10; k++ {
			p := x.PMF(k)
			m1 += float64(k) * p
			m2 += float64(k) * float64(k) * p
		}
		mean := law.Mean() * d.Mean()
		vari := law.Mean()*d.Variance() + d.Mean()*d.Mean()*law.Variance()
		if !close(m1, mean, 1e-9) || !close(m2-m1*m1, vari, 1e-8) {
			t.Errorf("%s over %s: mean %.12g var %.12g, want %.12g and %.12g", c.demand, c.law, m1, m2-m1*m1, mean, vari)
		}
		if !close(x.Mean(), mean, 1e-12) || !close(x.Variance(), vari, 1e-12) {
			t.Errorf("%s over %s: Mixture moments %.15g %.15g, want %.15g %.15g", c.demand, c.law, x.Mean(), x.Variance(), mean, vari)
		}
	}
}

// rsReference returns the figures of the order-up-to (R, S) policy with
// Poisson(lambda) demand, backorders and fixed lead time L, from the
// textbook form: the net inventory j = 1..R periods after an order arrives
// is S - D(L + j), each phase with weight 1/R, and the expected orders per
// period are P(D(R) > 0)/R (Axsater 2015, Inventory Control, 3rd ed.,
// section 5.? on periodic review (R, S) policies, from memory; also Zipkin
// 2000, section 6.7). Summed directly over gonum's Poisson pmf.
func rsReference(lambda float64, L, R, S int) (onHand, back, stockout, fill, freq float64) {
	pos := func(m, y int) float64 { // E[(y - X_m)^+]
		if m == 0 {
			return math.Max(float64(y), 0)
		}
		X := distuv.Poisson{Lambda: lambda * float64(m)}
		var s float64
		for x := 0; x < y; x++ {
			s += float64(y-x) * X.Prob(float64(x))
		}
		return s
	}
	for j := 1; j <= R; j++ {
		m := L + j
		X := distuv.Poisson{Lambda: lambda * float64(m)}
		oh := pos(m, S)
		onHand += oh / float64(R)
		back += (oh - float64(S) + lambda*float64(m)) / float64(R)
		stockout += (1 - X.CDF(float64(S))) / float64(R)
		fill += (pos(m-1, S) - oh) / lambda / float64(R)
	}
	freq = (1 - math.Exp(-lambda*float64(R))) / float64(R)
	return
}

func TestReviewPeriodBaseStockTextbook(t *testing.T) {
	for _, c := range []struct {
		lambda  float64
		L, R, S int
	}{{2, 0, 7, 20}, {2, 3, 7, 30}, {5, 1, 4, 35}, {0.3, 2, 5, 4}} {
		sys := backorderSystem(poisson(t, c.lambda), c.L, 1, 9, 50)
		sys.ReviewPeriod = c.R
		e := evaluate(t, sys, Policy{Kind: BaseStock, OrderUpTo: c.S})
		oh, bo, so, fr, fq := rsReference(c.lambda, c.L, c.R, c.S)
		f := e.Figures
		for _, x := range []struct {
			name      string
			got, want float64
		}{{"on hand", f.MeanOnHand, oh}, {"backorders", f.MeanBackorders, bo}, {"stockout", f.StockoutProbability, so},
			{"fill", f.FillRate, fr}, {"order frequency", f.OrderFrequency, fq}, {"ordering cost", f.OrderingCost, 50 * fq}} {
			if !close(x.got, x.want, 1e-10) {
				t.Errorf("%+v: %s = %.15g, want %.15g", c, x.name, x.got, x.want)
			}
		}
		if e.FlowBalance > 1e-9 {
			t.Errorf("%+v: flow balance %g", c, e.FlowBalance)
		}
	}
}

// The mean pipeline under independent lead times is E[L] E[D] whatever
// the crossing (Little's law; Zipkin 2000, section 7.4), and its variance
// is the sum over order ages a of q_a Var[D] + q_a (1 - q_a) E[D]^2, q_a =
// P(L > a), for independent thinned orders.
func TestIndependentPipelineMoments(t *testing.T) {
	d := poisson(t, 4)
	law := lawOf(t, "pmf:1=0.3,2=0.1,4=0.6")
	sys := backorderSystem(d, 0, 1, 9, 0)
	sys.LeadTimeLaw, sys.LeadTimeModel = law, inventory.Independent
	x0, _, err := independentPipeline(sys, d)
	if err != nil {
		t.Fatal(err)
	}
	var mean, vari float64
	q := []float64{1, 0.7, 0.6, 0.6, 0}
	for _, qa := range q {
		mean += qa * 4
		vari += qa*4 + qa*(1-qa)*16
	}
	if !close(x0.Mean(), mean, 1e-10) || !close(x0.Variance(), vari, 1e-10) {
		t.Errorf("pipeline mean %.12g var %.12g, want %.12g %.12g", x0.Mean(), x0.Variance(), mean, vari)
	}
	if !close(law.Mean()*4, mean, 1e-12) {
		t.Errorf("E[L]E[D] = %g, sum of q_a E[D] = %g", law.Mean()*4, mean)
	}
	// Crossing orders pool: the pipeline varies less than under sequential
	// deliveries with the same law... both exact; check base-stock runs.
	e := evaluate(t, sys, Policy{Kind: BaseStock, OrderUpTo: 20})
	if e.Figures.FillRate <= 0 || e.Figures.FillRate >= 1 {
		t.Errorf("fill %g", e.Figures.FillRate)
	}
	if _, err := Evaluate(sys, Policy{Kind: SS, ReorderPoint: 5, OrderUpTo: 20}, Options{}); !errors.Is(err, ErrNotExact) {
		t.Errorf("independent s-S: %v, want ErrNotExact", err)
	}
}

// Kaplan's arrival process realises exactly the laws with a non-decreasing
// hazard (the cut-off law P(T <= l) = P(L = l)/P(L >= l) must be a
// distribution function; Kaplan 1970).
func TestKaplanAdmissible(t *testing.T) {
	for _, c := range []struct {
		law string
		ok  bool
	}{
		{"pmf:1=0.2,2=0.5,3=0.3", true},
		{"pmf:2=0.2,3=0.5,5=0.3", false}, // hazard 0.625 at 3, 0 at 4
		{"pmf:3=1", true},
		{"poisson:mean=4", true},          // log-concave, so rising hazard
		{"negbin:mean=4,var=40", false},   // shape < 1: falling hazard
		{"pmf:0=0.5,1=0.25,2=0.25", true}, // hazards 0.5, 0.5, 1
		{"pmf:0=0.6,1=0.2,2=0.2", false},  // hazards 0.6, 0.5, 1
	} {
		sys := backorderSystem(poisson(t, 5), 0, 1, 9, 0)
		sys.LeadTimeLaw = lawOf(t, c.law)
		err := sys.Validate()
		if (err == nil) != c.ok {
			t.Errorf("%s: Validate = %v, want ok=%v", c.law, err, c.ok)
			continue
		}
		if err != nil {
			near := inventory.NearestKaplan(sys.LeadTimeLaw)
			if !strings.Contains(err.Error(), near.String()) || !strings.Contains(err.Error(), "hazard") {
				t.Errorf("%s: message %q does not offer %s", c.law, err, near)
			}
			s2 := sys
			s2.LeadTimeLaw = near
			if err := s2.Validate(); err != nil {
				t.Errorf("%s: nearest law %s refused: %v", c.law, near, err)
			}
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("multi-line message")
			}
			// Independent lead times realise any law.
			s3 := sys
			s3.LeadTimeModel = inventory.Independent
			if err := s3.Validate(); err != nil {
				t.Errorf("%s independent: %v", c.law, err)
			}
		}
	}
}

// Lost sales under a lead-time law or a review period are evaluated (see
// lost_timing_test.go); orders that may cross are refused.
func TestLostTimingRefused(t *testing.T) {
	sys := inventory.System{Demand: poisson(t, 2), Holding: 1, Shortage: 9, Mode: inventory.Lost, LeadTimeLaw: lawOf(t, "pmf:1=0.5,2=0.5")}
	if _, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 8}, Options{}); err != nil {
		t.Errorf("lost with a law: %v", err)
	}
	sys.LeadTimeModel = inventory.Independent
	if _, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 8}, Options{}); !errors.Is(err, ErrNotExact) || !errors.Is(err, inventory.ErrLimit) {
		t.Errorf("lost with independent lead times: %v", err)
	}
}

// Optimize under a lead-time law and a review period returns a policy no
// neighbour of which (evaluated on the chain) is cheaper, and the
// Evaluate figures of its optimum.
func TestOptimizeUnderTiming(t *testing.T) {
	sys := backorderSystem(poisson(t, 3), 0, 1, 19, 40)
	sys.LeadTimeLaw = lawOf(t, "pmf:1=0.2,2=0.5,3=0.3")
	sys.ReviewPeriod = 3
	for _, k := range []Kind{BaseStock, SS} {
		o, err := Optimize(sys, k, SearchOptions{})
		if err != nil {
			t.Fatal(err)
		}
		best := o.Figures.TotalCost
		p := o.Policy
		var near []Policy
		switch k {
		case BaseStock:
			near = []Policy{{Kind: BaseStock, OrderUpTo: p.OrderUpTo - 1}, {Kind: BaseStock, OrderUpTo: p.OrderUpTo + 1}}
		case SS:
			for _, ds := range []int{-1, 0, 1} {
				for _, dS := range []int{-1, 0, 1} {
					q := Policy{Kind: SS, ReorderPoint: p.ReorderPoint + ds, OrderUpTo: p.OrderUpTo + dS}
					if q.ReorderPoint < q.OrderUpTo && q != p {
						near = append(near, q)
					}
				}
			}
		}
		for _, q := range near {
			if c := evaluate(t, sys, q).Figures.TotalCost; c < best-1e-9 {
				t.Errorf("%v: %v costs %.12g < optimum %.12g", k, q, c, best)
			}
		}
		// Floors hold on the evaluated figures.
		o2, err := Optimize(sys, k, SearchOptions{MinFillRate: 0.99})
		if err != nil {
			t.Fatal(err)
		}
		if o2.Figures.FillRate < 0.99 {
			t.Errorf("%v floor: fill %g", k, o2.Figures.FillRate)
		}
	}
}

// timingSim runs the event order of SPEC sections 1 and 4 literally, period
// by period: reviews at t = 0, R, 2R, ...; under sequential deliveries a
// cut-off T drawn each period (P(T <= l) = KaplanCutoff) releases every
// outstanding order at least T periods old; under independent lead times
// each order draws its own. It shares nothing with the chain but the laws.
func timingSim(t *testing.T, sys inventory.System, p Policy, periods int, seed uint64) (onHand, back, stockout, fill, freq float64) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 7))
	w, _, err := sys.LeadTimeWeights()
	if err != nil {
		t.Fatal(err)
	}
	F, _, _ := inventory.KaplanCutoff(w)
	draw := func(cdf func(int) float64) int {
		u := rng.Float64()
		k := 0
		for cdf(k) < u {
			k++
		}
		return k
	}
	lawCDF := func(k int) float64 {
		var s float64
		for i := 0; i <= k && i < len(w); i++ {
			s += w[i]
		}
		return s
	}
	type order struct{ placed, qty, due int }
	var pipe []order
	s, S := p.Levels()
	ni := S
	r := sys.Review()
	var served, demand, orders float64
	warm := periods / 10
	for t := 0; t < periods+warm; t++ {
		if t%r == 0 {
			ip := ni
			for _, o := range pipe {
				ip += o.qty
			}
			if ip <= s {
				q := S - ip
				if p.Kind == SNQ {
					q = ((s-ip)/p.OrderMultiple + 1) * p.OrderMultiple
				}
				pipe = append(pipe, order{t, q, t + draw(lawCDF)})
				if t >= warm {
					orders++
				}
			}
		}
		if sys.Model() == inventory.Independent {
			keep := pipe[:0]
			for _, o := range pipe {
				if o.due <= t {
					ni += o.qty
				} else {
					keep = append(keep, o)
				}
			}
			pipe = keep
		} else {
			cut := draw(func(k int) float64 {
				if k >= len(F) {
					return 1
				}
				return F[k]
			})
			for len(pipe) > 0 && t-pipe[0].placed >= cut {
				ni += pipe[0].qty
				pipe = pipe[1:]
			}
		}
		d := draw(sys.Demand.CDF)
		before := max(ni, 0)
		ni -= d
		if t < warm {
			continue
		}
		served += float64(min(d, before))
		demand += float64(d)
		onHand += float64(max(ni, 0))
		back += float64(max(-ni, 0))
		if ni < 0 {
			stockout++
		}
	}
	n := float64(periods)
	return onHand / n, back / n, stockout / n, served / demand, orders / n
}

// The exact figures under a lead-time law and a review period against the
// literal simulation (two million periods; tolerances of about five
// standard errors of these runs).
func TestTimingAgainstSimulation(t *testing.T) {
	if testing.Short() {
		t.Skip("simulates millions of periods")
	}
	for _, c := range []struct {
		law   string
		model inventory.LeadTimeModel
		r     int
		p     Policy
	}{
		{"pmf:1=0.2,2=0.5,3=0.3", inventory.Sequential, 1, Policy{Kind: SS, ReorderPoint: 8, OrderUpTo: 25}},
		{"pmf:1=0.2,2=0.5,3=0.3", inventory.Sequential, 3, Policy{Kind: SS, ReorderPoint: 12, OrderUpTo: 30}},
		{"pmf:0=0.1,1=0.2,2=0.3,3=0.4", inventory.Sequential, 4, Policy{Kind: SNQ, ReorderPoint: 15, OrderMultiple: 9}},
		{"pmf:1=0.3,2=0.1,4=0.6", inventory.Independent, 1, Policy{Kind: BaseStock, OrderUpTo: 16}},
		{"pmf:1=0.3,2=0.1,4=0.6", inventory.Independent, 2, Policy{Kind: BaseStock, OrderUpTo: 20}},
	} {
		sys := backorderSystem(poisson(t, 3), 0, 1, 9, 10)
		sys.LeadTimeLaw, sys.LeadTimeModel, sys.ReviewPeriod = lawOf(t, c.law), c.model, c.r
		f := evaluate(t, sys, c.p).Figures
		oh, bo, so, fr, fq := timingSim(t, sys, c.p, 2_000_000, 1)
		for _, x := range []struct {
			name           string
			got, want, tol float64
		}{{"on hand", f.MeanOnHand, oh, 0.02 * oh}, {"backorders", f.MeanBackorders, bo, 0.03*bo + 0.002},
			{"stockout", f.StockoutProbability, so, 0.004}, {"fill", f.FillRate, fr, 0.004}, {"order frequency", f.OrderFrequency, fq, 0.002}} {
			if math.Abs(x.got-x.want) > x.tol {
				t.Errorf("%s %s R=%d %v: %s exact %.5g, simulated %.5g", c.law, c.model, c.r, c.p, x.name, x.got, x.want)
			}
		}
	}
}
