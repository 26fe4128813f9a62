package policies

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/chain"
	"ergostock/inventory"
)

const tight = 1e-12

func poisson(t testing.TB, m float64) inventory.Distribution {
	t.Helper()
	d, err := inventory.NewPoisson(m)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func pmf(t testing.TB, p ...float64) inventory.Distribution {
	t.Helper()
	d, err := inventory.NewPMF(p)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func backorderSystem(d inventory.Distribution, L int, h, b, k float64) inventory.System {
	return inventory.System{Demand: d, LeadTime: L, Holding: h, Shortage: b, OrderCost: k, Mode: inventory.Backorder}
}

func evaluate(t testing.TB, sys inventory.System, p Policy) *Evaluation {
	t.Helper()
	e, err := Evaluate(sys, p, Options{})
	if err != nil {
		t.Fatalf("%v: %v", p, err)
	}
	return e
}

func close(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

// poissonLoss returns E[(X-y)^+], E[(y-X)^+] and P(X > y) for X ~
// Poisson(lambda) by direct summation of gonum's distuv.Poisson pmf, an
// independent path from the loss tables under test.
func poissonLoss(lambda float64, y int) (above, below, over float64) {
	X := distuv.Poisson{Lambda: lambda}
	hi := int(lambda + 40*math.Sqrt(lambda) + 60)
	for x := 0; x <= hi; x++ {
		p := X.Prob(float64(x))
		if x > y {
			above += float64(x-y) * p
			over += p
		} else {
			below += float64(y-x) * p
		}
	}
	if y < 0 {
		over = 1
	}
	return above, below, over
}

// checkBalance asserts global balance per state and across every cut
// {IP <= k} to 1e-12 (the defining property of a stationary law; cut
// equations: Stewart 1994, Introduction to the Numerical Solution of Markov
// Chains, sec. 1.6; common practice).
func checkBalance(t *testing.T, name string, m chain.Matrix, pi []float64, ip func(int) int) {
	t.Helper()
	if worst, i := chain.Balance(m, pi); worst > tight {
		t.Errorf("%s: balance %.3g at state %d, want <= %g", name, worst, i, tight)
	}
	lo, hi := math.MaxInt, math.MinInt
	for i := range pi {
		lo, hi = min(lo, ip(i)), max(hi, ip(i))
	}
	in := make([]bool, len(pi))
	for k := lo; k < hi; k++ {
		for i := range in {
			in[i] = ip(i) <= k
		}
		out, back := chain.CutFlow(m, pi, in)
		if math.Abs(out-back) > tight {
			t.Errorf("%s: cut {IP <= %d}: flow out %.17g, back %.17g", name, k, out, back)
		}
	}
}

// TestNewsvendor: base-stock with zero lead time in backorder mode is the
// newsvendor: on-hand E[(S-D)^+], backorders E[(D-S)^+], stockout P(D > S),
// and the cost-minimising S is the least S with F(S) >= b/(b+h), the
// critical ratio (Porteus 2002, Foundations of Stochastic Inventory Theory,
// ch. 1; Zipkin 2000, Foundations of Inventory Management, ch. 6; chapter
// numbers from memory).
func TestNewsvendor(t *testing.T) {
	for _, tc := range []struct {
		mean float64
		h, b float64
	}{
		{4, 1, 9}, {10, 2, 3}, {25, 1, 19}, {0.7, 1, 4},
	} {
		sys := backorderSystem(poisson(t, tc.mean), 0, tc.h, tc.b, 0)
		best, bestS := math.Inf(1), -1
		hi := int(tc.mean*3 + 10)
		for S := -2; S <= hi; S++ {
			e := evaluate(t, sys, Policy{Kind: BaseStock, OrderUpTo: S})
			above, below, over := poissonLoss(tc.mean, S)
			f := e.Figures
			if !close(f.MeanOnHand, below, tight) || !close(f.MeanBackorders, above, tight) || !close(f.StockoutProbability, over, tight) {
				t.Errorf("mean %g S=%d: on-hand %.15g backorders %.15g stockout %.15g, want %.15g %.15g %.15g",
					tc.mean, S, f.MeanOnHand, f.MeanBackorders, f.StockoutProbability, below, above, over)
			}
			if f.TotalCost < best {
				best, bestS = f.TotalCost, S
			}
		}
		ratio := tc.b / (tc.b + tc.h)
		X := distuv.Poisson{Lambda: tc.mean}
		want := 0
		for X.CDF(float64(want)) < ratio {
			want++
		}
		if bestS != want {
			t.Errorf("mean %g h %g b %g: cheapest S = %d, want the critical-ratio fractile %d", tc.mean, tc.h, tc.b, bestS, want)
		}
	}
}

// TestBaseStockPoissonLeadTime: with Poisson demand of mean m per period and
// lead time L, the demand over L+1 periods is Poisson((L+1)m); expected
// backorders are sum_{x>S} (x-S) P(X=x), stockout probability 1 - F(S), and
// on-hand S - (L+1)m + E[backorders] (Zipkin 2000, Foundations of Inventory
// Management, sec. 6.2, from memory; common practice). Reference values from
// gonum's distuv.Poisson.
func TestBaseStockPoissonLeadTime(t *testing.T) {
	for _, tc := range []struct {
		mean float64
		L, S int
	}{
		{5, 2, 18}, {5, 4, 30}, {0.3, 3, 2}, {40, 1, 85}, {12, 6, 60}, {2, 3, -3},
	} {
		sys := backorderSystem(poisson(t, tc.mean), tc.L, 1, 10, 0)
		e := evaluate(t, sys, Policy{Kind: BaseStock, OrderUpTo: tc.S})
		lam := float64(tc.L+1) * tc.mean
		above, below, _ := poissonLoss(lam, tc.S)
		X := distuv.Poisson{Lambda: lam}
		stockout := 1 - X.CDF(float64(tc.S))
		if tc.S < 0 {
			stockout = 1
		}
		f := e.Figures
		if !close(f.MeanBackorders, above, tight) {
			t.Errorf("%+v: backorders %.15g, want %.15g", tc, f.MeanBackorders, above)
		}
		if !close(f.StockoutProbability, stockout, 1e-10) {
			t.Errorf("%+v: stockout %.15g, want %.15g", tc, f.StockoutProbability, stockout)
		}
		if !close(f.MeanOnHand, below, tight) || !close(f.MeanOnHand, float64(tc.S)-lam+above, 1e-11) {
			t.Errorf("%+v: on-hand %.15g, want %.15g", tc, f.MeanOnHand, below)
		}
		if !close(f.OrderFrequency, 1-math.Exp(-tc.mean), tight) || !close(f.MeanOrderQuantity*f.OrderFrequency, tc.mean, tight) {
			t.Errorf("%+v: order frequency %.15g, quantity %.15g", tc, f.OrderFrequency, f.MeanOrderQuantity)
		}
		if e.States != 1 {
			t.Errorf("%+v: %d states, want 1", tc, e.States)
		}
	}
}

// renewalCost is the long-run cost per period of s-S in backorder mode by
// renewal theory (Veinott & Wagner 1965, Computing optimal (s,S) inventory
// policies, Management Science 11(5); Zheng & Federgruen 1991, Finding
// optimal (s,S) policies is about as simple as evaluating a single policy,
// Operations Research 39(4)):
//
//	c(s,S) = [K + sum_{j=0}^{S-s-1} m(j) G(S-j)] / M(S-s),
//
// with the renewal mass m(0) = 1/(1-p0), m(j) = sum_{i=1}^{j} p_i m(j-i) /
// (1-p0), M(n) = sum_{j<n} m(j), and G(y) = h E[(y-X)^+] + b E[(X-y)^+] for
// X the demand over L+1 periods. It returns c and the order frequency
// 1/M(S-s). p is the pmf of one period's demand; g returns G.
func renewalCost(p func(int) float64, g func(int) float64, K float64, s, S int) (cost, freq float64) {
	n := S - s
	m := make([]float64, n)
	p0 := p(0)
	m[0] = 1 / (1 - p0)
	for j := 1; j < n; j++ {
		var v float64
		for i := 1; i <= j; i++ {
			v += p(i) * m[j-i]
		}
		m[j] = v / (1 - p0)
	}
	var M, num float64
	for j := 0; j < n; j++ {
		M += m[j]
		num += m[j] * g(S-j)
	}
	return (K + num) / M, 1 / M
}

func TestSSRenewal(t *testing.T) {
	type tc struct {
		name string
		d    inventory.Distribution
		p    func(int) float64 // pmf, independent of d
		g    func(L int, h, b float64) func(int) float64
		L    int
		s, S int
	}
	pois := func(mean float64) (func(int) float64, func(int, float64, float64) func(int) float64) {
		P := distuv.Poisson{Lambda: mean}
		return func(k int) float64 { return P.Prob(float64(k)) },
			func(L int, h, b float64) func(int) float64 {
				return func(y int) float64 {
					above, below, _ := poissonLoss(float64(L+1)*mean, y)
					return h*below + b*above
				}
			}
	}
	// Two-point demand 0 or 3 with probabilities 0.6, 0.4: demand over n
	// periods is 3 times a binomial(n, 0.4), enumerated here.
	twoP := func(k int) float64 {
		switch k {
		case 0:
			return 0.6
		case 3:
			return 0.4
		}
		return 0
	}
	twoG := func(L int, h, b float64) func(int) float64 {
		return func(y int) float64 {
			n := L + 1
			var v float64
			for j := 0; j <= n; j++ {
				pr := float64(binom(n, j)) * math.Pow(0.4, float64(j)) * math.Pow(0.6, float64(n-j))
				x := 3 * j
				v += pr * (h*float64(max(y-x, 0)) + b*float64(max(x-y, 0)))
			}
			return v
		}
	}
	var cases []tc
	for _, c := range []struct {
		mean float64
		L    int
		s, S int
	}{{5, 0, 3, 12}, {5, 2, 10, 25}, {20, 1, 30, 70}, {1.5, 3, -2, 4}, {0.4, 0, 0, 6}} {
		p, g := pois(c.mean)
		cases = append(cases, tc{name: "poisson", d: poisson(t, c.mean), p: p, g: g, L: c.L, s: c.s, S: c.S})
	}
	cases = append(cases, tc{name: "two-point", d: pmf(t, 0.6, 0, 0, 0.4), p: twoP, g: twoG, L: 2, s: -1, S: 7})
	for _, c := range cases {
		const h, b, K = 1.5, 12, 40
		sys := backorderSystem(c.d, c.L, h, b, K)
		pol := Policy{Kind: SS, ReorderPoint: c.s, OrderUpTo: c.S}
		e := evaluate(t, sys, pol)
		want, freq := renewalCost(c.p, c.g(c.L, h, b), K, c.s, c.S)
		if !close(e.Figures.TotalCost, want, 1e-11) {
			t.Errorf("%s %v L=%d: total cost %.15g, want %.15g (renewal theory)", c.name, pol, c.L, e.Figures.TotalCost, want)
		}
		if !close(e.Figures.OrderFrequency, freq, 1e-11) {
			t.Errorf("%s %v: order frequency %.15g, want 1/M(S-s) = %.15g", c.name, pol, e.Figures.OrderFrequency, freq)
		}
		if e.FlowBalance > 1e-11 {
			t.Errorf("%s %v: units ordered per period differ from E[D] by %.3g", c.name, pol, e.FlowBalance)
		}
		if e.Diagnostics.Method != chain.MethodForward {
			t.Errorf("%s %v: solved by %s, want forward", c.name, pol, e.Diagnostics.Method)
		}
		pc, _, err := solvePosition(c.d, pol, Options{MaxStates: DefaultMaxStates})
		if err != nil {
			t.Fatal(err)
		}
		checkBalance(t, pol.String(), pc.m, pc.pi, pc.ip)
	}
}

func binom(n, k int) int {
	r := 1
	for i := 1; i <= k; i++ {
		r = r * (n - k + i) / i
	}
	return r
}

// TestSNQUniform: under s-nQ in backorder mode, inventory position after
// review is uniform on s+1..s+Q when the chain is irreducible (Hadley &
// Whitin 1963, Analysis of Inventory Systems, ch. 4, from memory), so every
// figure is the average over those Q positions; the order frequency is
// (1/Q) sum_{a=1}^{Q} P(D >= a). Reference values from gonum's distuv.
func TestSNQUniform(t *testing.T) {
	for _, c := range []struct {
		mean float64
		L    int
		s, Q int
	}{{5, 0, 2, 10}, {5, 2, 12, 7}, {0.6, 1, -3, 4}, {30, 3, 100, 40}, {3, 1, 4, 1}} {
		d := poisson(t, c.mean)
		sys := backorderSystem(d, c.L, 2, 7, 25)
		pol := Policy{Kind: SNQ, ReorderPoint: c.s, OrderMultiple: c.Q}
		e := evaluate(t, sys, pol)
		lam := float64(c.L+1) * c.mean
		var back, on, out, freq float64
		P := distuv.Poisson{Lambda: c.mean}
		for y := c.s + 1; y <= c.s+c.Q; y++ {
			a, bl, o := poissonLoss(lam, y)
			back += a / float64(c.Q)
			on += bl / float64(c.Q)
			out += o / float64(c.Q)
			a1 := y - c.s
			freq += (1 - P.CDF(float64(a1-1))) / float64(c.Q)
		}
		f := e.Figures
		if !close(f.MeanBackorders, back, 1e-11) || !close(f.MeanOnHand, on, 1e-11) || !close(f.StockoutProbability, out, 1e-10) {
			t.Errorf("%v L=%d: backorders %.15g on-hand %.15g stockout %.15g, want %.15g %.15g %.15g",
				pol, c.L, f.MeanBackorders, f.MeanOnHand, f.StockoutProbability, back, on, out)
		}
		if !close(f.OrderFrequency, freq, 1e-10) {
			t.Errorf("%v: order frequency %.15g, want %.15g", pol, f.OrderFrequency, freq)
		}
		if e.FlowBalance > 1e-11 {
			t.Errorf("%v: units ordered per period differ from E[D] by %.3g", pol, e.FlowBalance)
		}
		pc, _, err := solvePosition(d, pol, Options{MaxStates: DefaultMaxStates})
		if err != nil {
			t.Fatal(err)
		}
		for i, w := range pc.pi {
			if math.Abs(w-1/float64(c.Q)) > tight {
				t.Errorf("%v: pi[%d] = %.17g, want 1/%d", pol, i, w, c.Q)
			}
		}
		checkBalance(t, pol.String(), pc.m, pc.pi, pc.ip)
	}
}

// TestSNQReducible: demand 0 or 2 with Q = 4 only ever moves the position
// by an even step, so from top = s+4 the chain stays on {s+4, s+2}, each
// with probability 1/2 (hand derivation: the walk on the even residues
// mod 4 is a circulant on two states).
func TestSNQReducible(t *testing.T) {
	d := pmf(t, 0.5, 0, 0.5)
	sys := backorderSystem(d, 0, 1, 1, 0)
	pol := Policy{Kind: SNQ, ReorderPoint: 0, OrderMultiple: 4}
	e := evaluate(t, sys, pol)
	if e.States != 2 {
		t.Errorf("states %d, want 2", e.States)
	}
	// Y = 4 or 2 with probability 1/2; D = 0 or 2: on-hand E[(Y-D)^+] =
	// (1/2)(4+2)/2 + (1/2)(2+0)/2 = 2; no backorders.
	if !close(e.Figures.MeanOnHand, 2, tight) || e.Figures.MeanBackorders != 0 {
		t.Errorf("on-hand %g backorders %g, want 2 and 0", e.Figures.MeanOnHand, e.Figures.MeanBackorders)
	}
	// An order follows Y = 2 and D = 2: probability 1/4.
	if !close(e.Figures.OrderFrequency, 0.25, tight) || !close(e.Figures.MeanOrderQuantity, 4, tight) {
		t.Errorf("order frequency %g quantity %g, want 0.25 and 4", e.Figures.OrderFrequency, e.Figures.MeanOrderQuantity)
	}
}

// TestNegligibleTransitions: storing every transition of positive
// probability (Options.Exhaustive) and dropping those below 1e-20 into the
// restart give the same figures to round-off, and the moved mass is
// reported (common practice: a perturbation of size delta in a row moves
// the stationary law by O(delta) times the mean cycle length).
func TestNegligibleTransitions(t *testing.T) {
	sys := backorderSystem(poisson(t, 100), 2, 1, 15, 200)
	p := Policy{Kind: SS, ReorderPoint: 250, OrderUpTo: 700}
	a, err := Evaluate(sys, p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Evaluate(sys, p, Options{Exhaustive: true})
	if err != nil {
		t.Fatal(err)
	}
	if a.Neglected <= 0 || a.Neglected > 1e-12 {
		t.Errorf("neglected %g, want in (0, 1e-12]", a.Neglected)
	}
	if a.Diagnostics.NonZeros >= b.Diagnostics.NonZeros {
		t.Errorf("stored %d transitions, exhaustive %d: want fewer", a.Diagnostics.NonZeros, b.Diagnostics.NonZeros)
	}
	fa, fb := a.Figures.Fields(), b.Figures.Fields()
	for i := range fa {
		if !close(fa[i].Value, fb[i].Value, 1e-13) {
			t.Errorf("%s: %.17g default, %.17g exhaustive", fa[i].Name, fa[i].Value, fb[i].Value)
		}
	}
}

// TestSNQLargeQ: a large order multiple builds Q rows of only the residues
// that occur, and the law stays uniform (Hadley & Whitin 1963).
func TestSNQLargeQ(t *testing.T) {
	d := poisson(t, 5)
	pol := Policy{Kind: SNQ, ReorderPoint: 10, OrderMultiple: 20000}
	pc, _, err := solvePosition(d, pol, Options{MaxStates: DefaultMaxStates})
	if err != nil {
		t.Fatal(err)
	}
	if pc.m.Len() != 20000 {
		t.Fatalf("%d states", pc.m.Len())
	}
	for i, w := range pc.pi {
		if math.Abs(w-1.0/20000) > 1e-18 {
			t.Fatalf("pi[%d] = %g", i, w)
		}
	}
	if worst, _ := chain.Balance(pc.m, pc.pi); worst > tight {
		t.Errorf("balance %g", worst)
	}
}

// TestEveryFamily runs every demand family through every policy shape in
// both modes, including the one-state chains (S - s = 1, Q = 1) whose
// single entry sums several probabilities, and checks balance and the flow
// balance (common practice).
func TestEveryFamily(t *testing.T) {
	nb, _ := inventory.NewNegBin(3.0903266006852284, 8.081241599857611)
	nrm, _ := inventory.NewNormal(6, 2.5)
	gam, _ := inventory.NewGamma(4, 3)
	cut, err := inventory.Sum(gam, 2) // a table with a neglected tail
	if err != nil {
		t.Fatal(err)
	}
	if inventory.Neglected(cut) == 0 {
		t.Logf("Sum(%v, 2) neglects nothing", gam)
	}
	dists := []inventory.Distribution{poisson(t, 3.3), nb, nrm, gam, pmf(t, 0.1, 0.2, 0.3, 0.4), cut}
	pols := []Policy{
		{Kind: BaseStock, OrderUpTo: 5}, {Kind: SS, ReorderPoint: 4, OrderUpTo: 5}, {Kind: SS, ReorderPoint: 2, OrderUpTo: 14},
		{Kind: SNQ, ReorderPoint: 3, OrderMultiple: 1}, {Kind: SNQ, ReorderPoint: 3, OrderMultiple: 7},
	}
	for _, d := range dists {
		for _, mode := range []inventory.Mode{inventory.Backorder, inventory.Lost} {
			for _, L := range []int{0, 2} {
				for _, p := range pols {
					sys := inventory.System{Demand: d, LeadTime: L, Holding: 1, Shortage: 9, OrderCost: 5, UnitCost: 1, Mode: mode}
					e, err := Evaluate(sys, p, Options{})
					if err != nil {
						t.Errorf("%v %s L=%d %v: %v", d, mode, L, p, err)
						continue
					}
					// A cut table lacks mass beyond its end, so E[D] (exact) and the
					// chain's flow differ by about that mass times its location.
					flowTol := 1e-11 + 1e3*inventory.Neglected(d)
					// inventory.Sum of a cut table over n periods may neglect up
					// to n times the table's own neglected mass.
					neglTol := 1e-12 * float64(L+1)
					if e.FlowBalance > flowTol || e.Diagnostics.Balance > tight || e.Neglected > neglTol || e.Neglected < inventory.Neglected(d) {
						t.Errorf("%v %s L=%d %v: flow balance %g, balance %g, neglected %g", d, mode, L, p,
							e.FlowBalance, e.Diagnostics.Balance, e.Neglected)
					}
					f := e.Figures
					if f.FillRate < 0 || f.FillRate > 1 || f.MeanOnHand < 0 || f.OrderFrequency <= 0 {
						t.Errorf("%v %s L=%d %v: figures %+v", d, mode, L, p, f)
					}
				}
			}
		}
	}
}

// TestNormalLossBaseStock: for normal demand of large mean, base-stock with
// zero lead time has expected backorders sigma G(z), z = (S - mu)/sigma,
// with G the standard normal loss function, tabulated as G(0) = 0.3989,
// G(1) = 0.0833, G(2) = 0.0085 (Silver, Pyke & Peterson 1998, Inventory
// Management and Production Planning and Scheduling, Appendix III; values
// from memory). Discretising by rounding adds O(1/sigma) relative error.
func TestNormalLossBaseStock(t *testing.T) {
	const mu, sigma = 1000, 100
	d, err := inventory.NewNormal(mu, sigma)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		z, G float64
	}{{0, 0.3989}, {1, 0.0833}, {2, 0.0085}} {
		S := int(mu + c.z*sigma)
		e := evaluate(t, backorderSystem(d, 0, 1, 1, 0), Policy{Kind: BaseStock, OrderUpTo: S})
		if got := e.Figures.MeanBackorders / sigma; math.Abs(got-c.G) > 1e-4 {
			t.Errorf("S = %d: backorders/sigma = %.6f, want G(%g) = %.4f", S, got, c.z, c.G)
		}
	}
}
