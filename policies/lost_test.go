package policies

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"ergostock/chain"
	"ergostock/inventory"
)

func lostSystem(d inventory.Distribution, L int, h, b, k, c float64) inventory.System {
	return inventory.System{Demand: d, LeadTime: L, Holding: h, Shortage: b, OrderCost: k, UnitCost: c, Mode: inventory.Lost}
}

// TestLostZeroLeadHand checks lost sales with zero lead time on cases
// derived by hand (the derivations are in the comments).
func TestLostZeroLeadHand(t *testing.T) {
	for _, c := range []struct {
		name string
		d    inventory.Distribution
		p    Policy
		want inventory.Figures
	}{
		{
			// D = 0 or 2 with probability 1/2 each, base-stock S = 1, L = 0.
			// Every review lifts on-hand to 1 at once, so a = 1 always:
			// on-hand E[(1-D)^+] = 1/2, lost E[(D-1)^+] = 1/2, stockout
			// P(D > 1) = 1/2, fill rate 1 - (1/2)/1 = 1/2. On-hand at review
			// is 0 (after D = 2) with probability 1/2, and then 1 unit is
			// ordered: order frequency 1/2, mean quantity 1, E[q] = 1/2
			// (= E[D] - E[lost]). With h = 1, b = 4, K = 3, c = 2: holding
			// 1/2, shortage 2, ordering 3/2, purchase 1, total 5.
			name: "base-stock S=1, D in {0,2}",
			d:    pmf(t, 0.5, 0, 0.5),
			p:    Policy{Kind: BaseStock, OrderUpTo: 1},
			want: inventory.Figures{FillRate: 0.5, StockoutProbability: 0.5, MeanOnHand: 0.5, MeanLostSales: 0.5,
				OrderFrequency: 0.5, MeanOrderQuantity: 1, HoldingCost: 0.5, ShortageCost: 2, OrderingCost: 1.5, PurchaseCost: 1, TotalCost: 5},
		},
		{
			// D = 0 or 1 with probability 1/2 each, s = 0, S = 2, L = 0.
			// On-hand at review x in {0,1,2}; x = 0 orders 2 (a = 2),
			// x = 1, 2 order nothing (a = x). Transitions: 2 -> 2, 1;
			// 1 -> 1, 0; 0 -> 2, 1, each with probability 1/2. Balance:
			// pi2 = (pi2 + pi0)/2, pi0 = pi1/2, so pi = (1/4, 1/2, 1/4) for
			// x = 0, 1, 2. Then a = 2 w.p. 1/2 and a = 1 w.p. 1/2: on-hand
			// (1/2)(3/2) + (1/2)(1/2) = 1; nothing is ever lost (D <= 1 <= a):
			// fill rate 1, stockout 0. Orders: frequency pi0 = 1/4, size 2,
			// E[q] = 1/2 = E[D]. With h = 1, b = 4, K = 3, c = 2: holding 1,
			// ordering 3/4, purchase 1, total 11/4.
			name: "s-S s=0 S=2, D in {0,1}",
			d:    pmf(t, 0.5, 0.5),
			p:    Policy{Kind: SS, ReorderPoint: 0, OrderUpTo: 2},
			want: inventory.Figures{FillRate: 1, MeanOnHand: 1, OrderFrequency: 0.25, MeanOrderQuantity: 2,
				HoldingCost: 1, OrderingCost: 0.75, PurchaseCost: 1, TotalCost: 2.75},
		},
		{
			// D = 0, 1, 2 with probabilities 1/4, 1/4, 1/2; s-nQ with s = 0,
			// Q = 2 (top = 2), L = 0. x = 0 orders 2 (a = 2); x = 1, 2 order
			// nothing. From a = 2: x' = 2, 1, 0 w.p. 1/4, 1/4, 1/2; from
			// a = 1: x' = 1, 0 w.p. 1/4, 3/4. With x = 0 and x = 2 both at
			// a = 2: pi2 = (pi0 + pi2)/4, pi1 = (pi0 + pi2)/4 + pi1/4,
			// pi0 = (pi0 + pi2)/2 + 3 pi1/4. Let u = pi0 + pi2: pi2 = u/4,
			// pi1 = u/3, and u + pi1 = 1 gives u = 3/4: pi = (9/16, 1/4,
			// 3/16). a = 2 w.p. 3/4, a = 1 w.p. 1/4. On-hand: a = 2 gives
			// (2/4 + 1/4) = 3/4, a = 1 gives 1/4: (3/4)(3/4) + (1/4)(1/4) =
			// 5/8. Lost: a = 2 none, a = 1 gives (1/2)(1) = 1/2: mean 1/8.
			// Stockout: P(D > 1) = 1/2 when a = 1: 1/8. E[D] = 5/4, fill
			// rate 1 - (1/8)/(5/4) = 9/10. Orders: frequency 9/16, size 2,
			// E[q] = 9/8 = E[D] - E[lost]. With h = 1, b = 4, K = 3, c = 2:
			// holding 5/8, shortage 1/2, ordering 27/16, purchase 9/4,
			// total 5.0625.
			name: "s-nQ s=0 Q=2, D in {0,1,2}",
			d:    pmf(t, 0.25, 0.25, 0.5),
			p:    Policy{Kind: SNQ, ReorderPoint: 0, OrderMultiple: 2},
			want: inventory.Figures{FillRate: 0.9, StockoutProbability: 0.125, MeanOnHand: 0.625, MeanLostSales: 0.125,
				OrderFrequency: 9.0 / 16, MeanOrderQuantity: 2, HoldingCost: 0.625, ShortageCost: 0.5, OrderingCost: 27.0 / 16,
				PurchaseCost: 2.25, TotalCost: 5.0625},
		},
	} {
		e, err := Evaluate(lostSystem(c.d, 0, 1, 4, 3, 2), c.p, Options{})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		got, want := e.Figures.Fields(), c.want.Fields()
		for i := range got {
			if !close(got[i].Value, want[i].Value, tight) {
				t.Errorf("%s: %s = %.17g, want %.17g", c.name, got[i].Name, got[i].Value, want[i].Value)
			}
		}
	}
}

// bruteLost is an independent reference for lost mode with L = 1 and a
// demand of bounded support: it lists every pair (x, o) with x + o <= top,
// applies the event order of a period (review and order q, receive o,
// demand d, next state ((x+o-d)^+, q)) for every demand value, solves
// pi P = pi, sum pi = 1 densely with gonum's mat (LU), keeps the
// distribution on the states reached from (top, 0), and averages the figures over states and demands.
func bruteLost(t *testing.T, p []float64, pol Policy) (onHand, lost, stockout, freq, qty float64) {
	t.Helper()
	_, top := pol.Levels()
	type st struct{ x, o int }
	var states []st
	index := map[st]int{}
	for x := 0; x <= top; x++ {
		for o := 0; x+o <= top; o++ {
			index[st{x, o}] = len(states)
			states = append(states, st{x, o})
		}
	}
	n := len(states)
	P := mat.NewDense(n, n, nil)
	for i, s := range states {
		q := pol.Order(s.x + s.o)
		a := s.x + s.o
		for d, pd := range p {
			nx := max(a-d, 0)
			j := index[st{nx, q}]
			P.Set(i, j, P.At(i, j)+pd)
		}
	}
	// The states reached from (top, 0), by depth-first search; the linear
	// system pi (P - I) = 0 with one equation replaced by sum pi = 1 has a
	// unique solution on them (one closed class; transient states get 0).
	seen := make([]bool, n)
	stack := []int{index[st{top, 0}]}
	seen[stack[0]] = true
	var reach []int
	for len(stack) > 0 {
		i := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		reach = append(reach, i)
		for j := range n {
			if P.At(i, j) > 0 && !seen[j] {
				seen[j] = true
				stack = append(stack, j)
			}
		}
	}
	k := len(reach)
	A := mat.NewDense(k, k, nil)
	rhs := mat.NewVecDense(k, nil)
	for r := range k {
		for c := range k {
			v := P.At(reach[c], reach[r])
			if r == c {
				v--
			}
			A.Set(r, c, v)
		}
	}
	for c := range k {
		A.Set(k-1, c, 1)
	}
	rhs.SetVec(k-1, 1)
	var sol mat.VecDense
	if err := sol.SolveVec(A, rhs); err != nil {
		t.Fatal(err)
	}
	for r, i := range reach {
		w := sol.AtVec(r)
		s := states[i]
		a := s.x + s.o
		if q := pol.Order(s.x + s.o); q > 0 {
			freq += w
			qty += w * float64(q)
		}
		for d, pd := range p {
			onHand += w * pd * float64(max(a-d, 0))
			lost += w * pd * float64(max(d-a, 0))
			if d > a {
				stockout += w * pd
			}
		}
	}
	return onHand, lost, stockout, freq, qty / freq
}

func TestLostOneLeadBrute(t *testing.T) {
	for _, c := range []struct {
		p   []float64
		pol Policy
	}{
		{[]float64{0.3, 0.4, 0.2, 0.1}, Policy{Kind: BaseStock, OrderUpTo: 4}},
		{[]float64{0.3, 0.4, 0.2, 0.1}, Policy{Kind: SS, ReorderPoint: 1, OrderUpTo: 5}},
		{[]float64{0.1, 0.2, 0.3, 0.2, 0.2}, Policy{Kind: SNQ, ReorderPoint: 2, OrderMultiple: 3}},
		{[]float64{0.5, 0, 0.5}, Policy{Kind: BaseStock, OrderUpTo: 3}},
		// No zero demand: the start (top, 0) is transient.
		{[]float64{0, 0.6, 0.4}, Policy{Kind: SS, ReorderPoint: 2, OrderUpTo: 6}},
		{[]float64{0, 0.6, 0.4}, Policy{Kind: BaseStock, OrderUpTo: 2}},
	} {
		d := pmf(t, c.p...)
		pol := c.pol
		on, lost, out, freq, qty := bruteLost(t, c.p, pol)
		var e *Evaluation
		// The automatic solver (GTH on these small chains), and Gauss-Seidel
		// (chain.Solve's rooted-class path, the no-loss start of base-stock).
		for _, m := range []chain.Method{"", chain.MethodGaussSeidel} {
			var err error
			e, err = Evaluate(lostSystem(d, 1, 1, 1, 0, 0), pol, Options{Chain: chain.Options{Method: m}})
			if err != nil {
				t.Fatalf("%v: %v", pol, err)
			}
			f := e.Figures
			for _, v := range []struct {
				name      string
				got, want float64
			}{
				{"mean_on_hand", f.MeanOnHand, on}, {"mean_lost_sales", f.MeanLostSales, lost},
				{"stockout_probability", f.StockoutProbability, out}, {"order_frequency", f.OrderFrequency, freq},
				{"mean_order_quantity", f.MeanOrderQuantity, qty},
			} {
				if !close(v.got, v.want, 1e-10) {
					t.Errorf("%v L=1 %s: %s = %.15g, want %.15g (brute force)", pol, e.Diagnostics.Method, v.name, v.got, v.want)
				}
			}
		}
		if e.FlowBalance > 1e-12 {
			t.Errorf("%v: flow balance off by %.3g", pol, e.FlowBalance)
		}
		lc, _, err := solveLost(d, pol, 1, Options{MaxStates: DefaultMaxStates}, nil)
		if err != nil {
			t.Fatal(err)
		}
		checkBalance(t, pol.String()+" lost L=1", lc.m, lc.pi, lc.ip)
	}
}

// TestLostBalance checks global balance and the cuts {IP <= k} on larger
// lost-sales chains with Poisson demand.
func TestLostBalance(t *testing.T) {
	for _, c := range []struct {
		mean float64
		L    int
		pol  Policy
	}{
		{3, 2, Policy{Kind: BaseStock, OrderUpTo: 10}},
		{2, 3, Policy{Kind: SS, ReorderPoint: 3, OrderUpTo: 9}},
		{4, 1, Policy{Kind: SNQ, ReorderPoint: 5, OrderMultiple: 6}},
		{6, 0, Policy{Kind: SS, ReorderPoint: 4, OrderUpTo: 20}},
	} {
		d := poisson(t, c.mean)
		lc, _, err := solveLost(d, c.pol, c.L, Options{MaxStates: DefaultMaxStates}, nil)
		if err != nil {
			t.Fatal(err)
		}
		checkBalance(t, c.pol.String(), lc.m, lc.pi, lc.ip)
		e, err := Evaluate(lostSystem(d, c.L, 1, 5, 10, 1), c.pol, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if e.FlowBalance > 1e-12 {
			t.Errorf("%v: flow balance off by %.3g", c.pol, e.FlowBalance)
		}
	}
}

func TestLostTooLarge(t *testing.T) {
	sys := lostSystem(poisson(t, 5), 4, 1, 5, 0, 0)
	_, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 30}, Options{MaxStates: 10000})
	var se *SizeError
	if !errors.As(err, &se) {
		t.Fatalf("err = %v, want a *SizeError", err)
	}
	// The a-priori bound C(34, 4) = 46376 is above the limit, so the
	// reachable states are counted, and the count passes the limit.
	if se.Bound != 46376 || se.Limit != 10000 || !se.Counted || !strings.Contains(err.Error(), "--max-states") {
		t.Errorf("err = %v", err)
	}
	// An absurd level is refused before any allocation.
	if _, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 1 << 40}, Options{}); !errors.As(err, &se) {
		t.Errorf("err = %v, want a *SizeError", err)
	}
}

// TestLostLongPipeline: with (top+1)^L beyond 63 bits the pipeline keys are
// byte strings; the chain must still balance (common practice) and conserve
// flow: units ordered = units served.
func TestLostLongPipeline(t *testing.T) {
	d := pmf(t, 0.5, 0.3, 0.2)
	for _, L := range []int{31, 32} {
		pol := Policy{Kind: BaseStock, OrderUpTo: 3}
		lc, _, err := solveLost(d, pol, L, Options{MaxStates: DefaultMaxStates}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if ix := newStateIndex(lc.top, L, 1); (ix.small == nil) != (L >= 32) {
			t.Fatalf("L = %d: uint64 keys %v, want them for 4^L < 2^63 only", L, ix.small != nil)
		}
		checkBalance(t, pol.String(), lc.m, lc.pi, lc.ip)
		e, err := Evaluate(lostSystem(d, L, 1, 1, 0, 0), pol, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if e.FlowBalance > 1e-12 || e.States != lc.m.Len() {
			t.Errorf("L = %d: flow balance %g, states %d", L, e.FlowBalance, e.States)
		}
	}
}

// TestLostTailNearOne is a regression test: with demand that is almost
// never below a few units, P(D >= a) for small a rounds to a hair above 1;
// the chain must still build (found on the demo catalogue).
func TestLostTailNearOne(t *testing.T) {
	d, err := inventory.Parse("gamma:mean=30.23999655271979,sd=5.893839460536945")
	if err != nil {
		t.Fatal(err)
	}
	sys := inventory.System{Demand: d, LeadTime: 1, Holding: 0.0054, Shortage: 2.45, UnitCost: 1.13, Mode: inventory.Lost}
	e, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 80}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if e.Diagnostics.Balance > 1e-12 {
		t.Errorf("balance %g, want <= 1e-12", e.Diagnostics.Balance)
	}
}

// TestLostUnevenChain: Poisson demand of mean 400 against s-nQ(3, 7): every
// period ends with nothing on hand (P(D < 10) is about 1e-155), so each
// review orders 7, a = 7 and E[lost] = E[(D - 7)^+] = 393 up to 1e-150,
// fill rate 7/400 (derived by hand). Dense GTH underflowed to NaN on this
// chain; the solve falls back to Gauss-Seidel.
func TestLostUnevenChain(t *testing.T) {
	sys := inventory.System{Demand: poisson(t, 400), Holding: 1, Shortage: 9, OrderCost: 5, UnitCost: 1, Mode: inventory.Lost}
	e, err := Evaluate(sys, Policy{Kind: SNQ, ReorderPoint: 3, OrderMultiple: 7}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	f := e.Figures
	if math.Abs(f.MeanLostSales-393) > 1e-12 || math.Abs(f.FillRate-7.0/400) > 1e-15 || f.OrderFrequency != 1 || math.IsNaN(e.Diagnostics.Residual) || e.Diagnostics.Residual > tight {
		t.Errorf("figures %+v, diagnostics %+v", f, e.Diagnostics)
	}
}

// TestLostStartVectors: the Gauss-Seidel sweeps of a base-stock
// lost-sales solve start from the law the state would have if nothing were
// lost (baseStockStart) instead of the uniform vector. The figures equal
// those from the uniform start to the solver's tolerance, in fewer sweeps.
func TestLostStartVectors(t *testing.T) {
	var uniform, started int
	for _, c := range []struct {
		m    float64
		L, S int
	}{{6, 2, 24}, {6, 2, 15}, {2, 3, 12}, {8.4, 1, 60}} {
		sys := inventory.System{Demand: poisson(t, c.m), LeadTime: c.L, Holding: 1, Shortage: 19, OrderCost: 10, Mode: inventory.Lost}
		p := Policy{Kind: BaseStock, OrderUpTo: c.S}
		gs := chain.Options{Method: chain.MethodGaussSeidel}
		e, err := Evaluate(sys, p, Options{Chain: gs})
		if err != nil {
			t.Fatal(err)
		}
		// The uniform start, through chain.Options.Init.
		gs.Init = make([]float64, e.States)
		for i := range gs.Init {
			gs.Init[i] = 1
		}
		u, err := Evaluate(sys, p, Options{Chain: gs})
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("%+v: %d states, sweeps from the uniform start %d, from the no-loss law %d", c, e.States, u.Diagnostics.Iterations, e.Diagnostics.Iterations)
		uniform += u.Diagnostics.Iterations
		started += e.Diagnostics.Iterations
		for _, fd := range [][2]float64{
			{u.Figures.TotalCost, e.Figures.TotalCost}, {u.Figures.FillRate, e.Figures.FillRate},
			{u.Figures.MeanOnHand, e.Figures.MeanOnHand}, {u.Figures.StockoutProbability, e.Figures.StockoutProbability},
		} {
			if math.Abs(fd[0]-fd[1]) > 1e-11*(1+math.Abs(fd[0])) {
				t.Errorf("%+v: uniform start %.15g, no-loss start %.15g", c, fd[0], fd[1])
			}
		}
		if e.Diagnostics.Residual > tight {
			t.Errorf("%+v: residual %g", c, e.Diagnostics.Residual)
		}
	}
	if started >= uniform {
		t.Errorf("%d sweeps in all, %d from the uniform start", started, uniform)
	}
}

// TestLostReachableCount: demand of 0 or 1 unit (P(D = 1) = 0.15),
// base-stock S = 21, L = 3. Each order replaces the last period's sale, 0
// or 1, so the later orders o_2, o_3 take values in {0, 1} and on-hand
// after the arrival is a = 21 - (o_2 + o_3) - (last sale): 2^3 = 8
// reachable states (derived by hand; the chain of the state at review,
// which also holds o_1, has 2^4 = 16). On-hand never reaches 0, so no
// state with an empty shelf may be built: the lump P(D >= a) is 0 for
// a >= 2.
func TestLostReachableCount(t *testing.T) {
	sys := inventory.System{Demand: pmf(t, 0.85, 0.15), LeadTime: 3, Holding: 1, Shortage: 9, Mode: inventory.Lost}
	for _, m := range []chain.Method{"", chain.MethodGaussSeidel} {
		e, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 21}, Options{Chain: chain.Options{Method: m}})
		if err != nil {
			t.Fatal(err)
		}
		// Nothing is ever lost: on-hand stays >= 21 - 4 = 17 > 1.
		if e.States != 8 || e.Diagnostics.Transient != 0 || e.Figures.MeanLostSales != 0 || math.Abs(e.Figures.FillRate-1) > 1e-13 {
			t.Errorf("%s: %d states (%d transient), lost %g, fill %g: want 8, 0, 0, 1", m, e.States, e.Diagnostics.Transient, e.Figures.MeanLostSales, e.Figures.FillRate)
		}
	}
}

// TestLostNegligibleTransitions: by default the lost-sales chain does not
// store demand transitions below negligibleTransition (1e-20) but folds
// their mass into the lump to 0 on hand; Options.Exhaustive stores them
// all. Both must give every figure to 1e-12 relative (the folded mass,
// at most ~1e-19 per row, moves the stationary law by round-off: Meyer,
// "The condition of a finite Markov chain and perturbation bounds for the
// limiting probabilities", SIAM J. Algebraic Discrete Methods 1(3), 1980,
// bounds the change by the row perturbation times the condition of the
// chain; see foldEqual for figures that are themselves tiny), with fewer
// stored transitions and the folded mass in (0, 1e-12] reported as
// Neglected. Cases: the four parametric families, each with
// lead time 0 and at least 1, some small enough for the dense solver and
// some solved by Gauss-Seidel; tails are folded on the right (d near a)
// and, for normal and gamma, also on the left (d near 0: the start state
// cannot be re-entered, and the chain is rooted elsewhere; the folded
// chain must then have no transient state). The last two cases were
// derived by hand on the chain of the state after the arrival, a: with
// P(D = 2) = 1e-21 and S = 3, the row of a = 3 has no lump (P(D >= 3) = 0)
// and folds into the entry of the largest demand (3 states either way);
// with P(D = 1) = 1e-21 and S = 2, a = 1 is reached only by the folded
// demand 1 from a = 2 (2 states folded, 3 exhaustive).
func TestLostNegligibleTransitions(t *testing.T) {
	nb, err := inventory.NewNegBin(4, 12)
	if err != nil {
		t.Fatal(err)
	}
	nrm, err := inventory.NewNormal(20, 3)
	if err != nil {
		t.Fatal(err)
	}
	nrmHigh, err := inventory.NewNormal(100, 8)
	if err != nil {
		t.Fatal(err)
	}
	gam, err := inventory.NewGamma(30, 5)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		d      inventory.Distribution
		L      int
		p      Policy
		states [2]int // folded, exhaustive; 0 when not checked
	}{
		{poisson(t, 5), 0, Policy{Kind: SS, ReorderPoint: 8, OrderUpTo: 45}, [2]int{}},
		{poisson(t, 5), 1, Policy{Kind: BaseStock, OrderUpTo: 40}, [2]int{}},
		{poisson(t, 5), 2, Policy{Kind: SS, ReorderPoint: 12, OrderUpTo: 50}, [2]int{}},
		{nb, 0, Policy{Kind: SS, ReorderPoint: 5, OrderUpTo: 130}, [2]int{}},
		{nb, 1, Policy{Kind: SS, ReorderPoint: 8, OrderUpTo: 130}, [2]int{}},
		{nb, 1, Policy{Kind: SNQ, ReorderPoint: 8, OrderMultiple: 125}, [2]int{}},
		{nrm, 0, Policy{Kind: BaseStock, OrderUpTo: 60}, [2]int{}},
		{nrm, 1, Policy{Kind: BaseStock, OrderUpTo: 60}, [2]int{}},
		{nrmHigh, 0, Policy{Kind: SS, ReorderPoint: 110, OrderUpTo: 190}, [2]int{}},
		{nrmHigh, 1, Policy{Kind: SS, ReorderPoint: 120, OrderUpTo: 200}, [2]int{}},
		{gam, 0, Policy{Kind: SS, ReorderPoint: 20, OrderUpTo: 120}, [2]int{}},
		{gam, 1, Policy{Kind: BaseStock, OrderUpTo: 120}, [2]int{}},
		{gam, 2, Policy{Kind: SS, ReorderPoint: 70, OrderUpTo: 160}, [2]int{}},
		{pmf(t, 0.5, 0.5, 1e-21), 1, Policy{Kind: BaseStock, OrderUpTo: 3}, [2]int{3, 3}},
		{pmf(t, 0.5, 1e-21, 0.5), 1, Policy{Kind: BaseStock, OrderUpTo: 2}, [2]int{2, 3}},
	}
	for _, c := range cases {
		name := fmt.Sprintf("%v L=%d %v", c.d, c.L, c.p)
		sys := lostSystem(c.d, c.L, 0.1, 9, 20, 1)
		f, err := Evaluate(sys, c.p, Options{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		x, err := Evaluate(sys, c.p, Options{Exhaustive: true})
		if err != nil {
			t.Fatalf("%s exhaustive: %v", name, err)
		}
		t.Logf("%s: %d states, %d transitions (%s); exhaustive %d, %d (%s); neglected %.2g",
			name, f.States, f.Diagnostics.NonZeros, f.Diagnostics.Method, x.States, x.Diagnostics.NonZeros, x.Diagnostics.Method, f.Neglected)
		if f.Neglected <= 0 || f.Neglected > 1e-12 {
			t.Errorf("%s: neglected %g, want in (0, 1e-12]", name, f.Neglected)
		}
		if x.Neglected >= f.Neglected {
			t.Errorf("%s: exhaustive neglected %g, folded %g", name, x.Neglected, f.Neglected)
		}
		// With L = 0 the successors that order merge into one entry, and
		// folded transitions may merge with stored ones.
		if f.Diagnostics.NonZeros > x.Diagnostics.NonZeros || (c.L > 0 && f.Diagnostics.NonZeros == x.Diagnostics.NonZeros) {
			t.Errorf("%s: %d transitions stored, exhaustive %d: want fewer", name, f.Diagnostics.NonZeros, x.Diagnostics.NonZeros)
		}
		if c.states != [2]int{} && (f.States != c.states[0] || x.States != c.states[1]) {
			t.Errorf("%s: %d and %d states, want %v", name, f.States, x.States, c.states)
		}
		ff, fx := f.Figures.Fields(), x.Figures.Fields()
		for i := range ff {
			if !foldEqual(ff[i].Value, fx[i].Value) {
				t.Errorf("%s: %s %.17g folded, %.17g exhaustive", name, ff[i].Name, ff[i].Value, fx[i].Value)
			}
		}
		if f.Diagnostics.Transient != 0 {
			t.Errorf("%s: %d transient states", name, f.Diagnostics.Transient)
		}
		for _, e := range []*Evaluation{f, x} {
			if e.Diagnostics.Residual > tight || e.FlowBalance > 1e-11 {
				t.Errorf("%s: residual %g, flow balance %g", name, e.Diagnostics.Residual, e.FlowBalance)
			}
		}
	}
}

// foldEqual reports |got - want| <= 1e-12 |want| + 1e-17: relative 1e-12
// for every figure above 1e-5, and an absolute 1e-17 (a thousand times the
// largest mass folded in a row) below. A figure that is itself tiny (a
// stockout probability of 1e-13, say) is made of masses of the order of
// the folded transitions, so any fold moves it by about 1e-22 absolutely
// (seen: 2.2e-22, i.e. 1e-9 relative, for Poisson 5, L = 1, S = 40, with
// every target of the fold tried: the lump, the nearest stored entry, a
// proportional rescaling of the row; the lump moved it least).
func foldEqual(got, want float64) bool {
	return math.Abs(got-want) <= 1e-12*math.Abs(want)+1e-17
}

// TestLostMemoryRefused: a lead time so long that a few thousand states
// pass the memory limit is refused before the chain is allocated, with a
// *LostMemoryError that unwraps to a *SizeError, whatever the state limit
// (issue 10: --lead-time 1000000 asked for 16 GB, and with --max-states
// 1e8 crashed after 59 s). A state whose tuple alone passes the limit is
// refused before the demand table is built.
func TestLostMemoryRefused(t *testing.T) {
	sys := lostSystem(poisson(t, 5), 1_000_000, 1, 9, 0, 0)
	for _, ms := range []int{0, 100_000_000} {
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		_, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: 30}, Options{MaxStates: ms})
		runtime.ReadMemStats(&after)
		var me *LostMemoryError
		var se *SizeError
		if !errors.As(err, &me) || !errors.As(err, &se) {
			t.Fatalf("max states %d: err = %v, want a *LostMemoryError and a *SizeError", ms, err)
		}
		if msg := err.Error(); !strings.Contains(msg, "lead time 1000000") || !strings.Contains(msg, "2.0 GiB") || strings.Contains(msg, "\n") {
			t.Errorf("message %q: want one line naming the lead time and the limit", msg)
		}
		if got := after.TotalAlloc - before.TotalAlloc; got > 64<<20 {
			t.Errorf("max states %d: %d bytes allocated before the refusal, want under 64 MiB", ms, got)
		}
	}
	huge := lostSystem(poisson(t, 5), inventory.MaxLeadTime, 1, 9, 0, 0)
	if _, err := Evaluate(huge, Policy{Kind: BaseStock, OrderUpTo: 3}, Options{}); !errors.As(err, new(*LostMemoryError)) {
		t.Errorf("lead time 1e9: err = %v, want a *LostMemoryError", err)
	}
}

// TestLostSearchRefusesEarly: a base-stock search whose start (the
// backorder optimum for b - c) has a chain over the state limit stops at
// once with the reason, a *SizeError, instead of trying level after level
// (issue 10: Poisson 20, L = 6 ran 2 minutes and 1 GB before giving up).
// A done context stops a search with the context's error.
func TestLostSearchRefusesEarly(t *testing.T) {
	sys := lostSystem(poisson(t, 20), 6, 1, 9, 0, 0)
	o, err := Optimize(sys, BaseStock, SearchOptions{Eval: Options{MaxStates: 20000}})
	var se *SizeError
	if !errors.As(err, &se) || !strings.Contains(err.Error(), "scan starts at") {
		t.Fatalf("optimum %v, err = %v: want a *SizeError naming the start", o, err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = Optimize(lostOptCase(t), SS, SearchOptions{Eval: Options{Context: ctx}})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("err = %v, want context.Canceled", err)
	}
}

// TestLostWorkReuse: chains built one after another in one lostWork, as a
// search builds them (larger, smaller, other kinds), give exactly the
// figures of chains built afresh (common practice: a reused buffer must
// not leak state from one build into the next).
func TestLostWorkReuse(t *testing.T) {
	for _, L := range []int{0, 1, 2, 3} {
		sys := lostSystem(poisson(t, 4), L, 1, 9, 5, 2)
		opt := Options{MaxStates: DefaultMaxStates, Levels: true}
		var w lostWork
		for _, p := range []Policy{
			{Kind: BaseStock, OrderUpTo: 14}, {Kind: SS, ReorderPoint: 3, OrderUpTo: 25},
			{Kind: BaseStock, OrderUpTo: 6}, {Kind: SNQ, ReorderPoint: 5, OrderMultiple: 9},
			{Kind: SS, ReorderPoint: -1, OrderUpTo: 4}, {Kind: BaseStock, OrderUpTo: 18},
		} {
			got, err := evaluateLostIn(sys, p, opt, &w)
			if err != nil {
				t.Fatal(err)
			}
			want, err := evaluateLost(sys, p, opt)
			if err != nil {
				t.Fatal(err)
			}
			if got.Figures != want.Figures || got.States != want.States || !slices.Equal(got.Levels.P, want.Levels.P) {
				t.Errorf("L=%d %v: reused %+v (%d states), fresh %+v (%d states)", L, p, got.Figures, got.States, want.Figures, want.States)
			}
		}
	}
}

// TestLostLongPipelineSmallChain: a lead time of 400 with an s-S policy
// that keeps at most one order in the pipeline (s = 0, S = 10, demand 0
// or 1) has a small chain although its a-priori bound is astronomical:
// the memory probe must give up on it and the chain be built. On hand is
// 1..10 with nothing on order (10 states), or 0 with the order of 10 at
// one of the L positions, due in 0..L-1 periods (400 states): 410 states
// (derived by hand). Units ordered = units served (common practice).
func TestLostLongPipelineSmallChain(t *testing.T) {
	sys := lostSystem(pmf(t, 0.5, 0.5), 400, 1, 9, 5, 0)
	e, err := Evaluate(sys, Policy{Kind: SS, ReorderPoint: 0, OrderUpTo: 10}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if e.States != 410 || e.FlowBalance > 1e-12 || e.Diagnostics.Residual > tight {
		t.Errorf("%d states (want 410), flow balance %g, residual %g", e.States, e.FlowBalance, e.Diagnostics.Residual)
	}
}
