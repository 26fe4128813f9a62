package sim

import (
	"fmt"
	"math/rand/v2"

	"ergostock/inventory"
	"ergostock/policies"
)

// timing holds what a replication needs to play random lead times and a
// review period literally. It is built from the System's lead-time law
// (inventory.System.LeadTimeWeights, the same law object the exact engine
// reads) and, under sequential deliveries, the cut-off law of Kaplan's
// arrival process (inventory.KaplanCutoff); nothing else is shared with
// the exact engine. A timing is read-only and shared by the workers.
type timing struct {
	review int      // R: orders are placed in periods 0, R, 2R, ...
	seq    bool     // sequential deliveries (Kaplan 1970); false: independent lead times
	lmax   int      // the largest lead time (the cut-off never exceeds it)
	draw   *sampler // the cut-off T (sequential) or the order's lead time (independent)
	// fixed >= 0 when the law drawn has one point: it is used without a
	// draw, so a one-point law with R = 1 consumes the random stream as a
	// fixed lead time does and gives the same figures.
	fixed int64
}

// lead returns the next cut-off or lead time.
func (tm *timing) lead(rng *rand.PCG) int64 {
	if tm.fixed >= 0 {
		return tm.fixed
	}
	return tm.draw.draw(rng)
}

// newTiming returns the timing of sys. The laws are tabulated as the
// System cuts them (tails below inventory.LeadTimeNeglect joined to the
// last point), so the law simulated is the law evaluated.
func newTiming(sys inventory.System) (*timing, error) {
	if sys.LeadTimeLaw == nil { // a fixed lead time reviewed every R periods: no draw
		return &timing{review: sys.Review(), seq: true, lmax: sys.LeadTime, fixed: int64(sys.LeadTime)}, nil
	}
	w, _, err := sys.LeadTimeWeights()
	if err != nil {
		return nil, err
	}
	tm := &timing{review: sys.Review(), seq: sys.Model() == inventory.Sequential, lmax: len(w) - 1}
	if tm.seq {
		F, j, ok := inventory.KaplanCutoff(w)
		if !ok { // Validate refuses such laws first; kept for a direct caller
			return nil, &inventory.FieldError{Field: "lead_time", Value: fmt.Sprint(sys.LeadTimeLaw),
				Want: fmt.Sprintf("a law that sequential deliveries can realise (its hazard falls from l = %d to %d)", j, j+1)}
		}
		// P(T = l) = F[l] - F[l-1], clamped at 0 where round-off makes a
		// flat stretch dip (Validate allows dips of 1e-9).
		p := make([]float64, len(F))
		prev := 0.0
		for l, f := range F {
			p[l] = max(f-prev, 0)
			prev = max(prev, f)
		}
		w = p
	}
	// The largest value with mass: a lead time or cut-off never above it.
	for tm.lmax > 0 && w[tm.lmax] == 0 {
		tm.lmax--
	}
	tm.draw = newWeightSampler(w[:tm.lmax+1])
	tm.fixed = -1
	points := 0
	for _, v := range w[:tm.lmax+1] {
		if v > 0 {
			points++
		}
	}
	if points == 1 {
		tm.fixed = int64(tm.lmax)
	}
	return tm, nil
}

// newWeightSampler returns an alias sampler of the values 0..len(w)-1
// with weights w (>= 0, not all 0), with no tail cell.
func newWeightSampler(w []float64) *sampler {
	var sum float64
	for _, v := range w {
		sum += v
	}
	s := &sampler{cells: make([]cell, len(w)), n: uint64(len(w)), k: int64(len(w) - 1)}
	s.build(w, sum)
	return s
}

// timedState is the system between periods under random lead times or a
// review period.
type timedState struct {
	net     int64   // on-hand minus backorders (lost mode: on-hand)
	onOrder int64   // units ordered and not yet received
	ring    []int64 // lmax+1 slots (see stepTimed)
	t       int64   // the period about to be played, counted from the replication's start
	front   int64   // sequential: the oldest period whose order has not arrived
}

// stepTimed plays n periods with random lead times and review period R,
// adding to s, in either mode. Each period:
//
//  1. Review, only when t is a multiple of R: the order rule on the
//     inventory position (backorder: net + on order; lost: on-hand + on
//     order).
//  2. Receive. Sequential deliveries (Kaplan 1970, Management Science
//     16(7)): a cut-off T is drawn, and every order placed in a period
//     <= t - T that has not arrived arrives now, so orders arrive in the
//     order placed; the ring slot of period u holds the order placed in u,
//     and front walks forward over them (amortised O(1): front advances by
//     one per period on average). Independent lead times: the order
//     placed in t draws its own lead time l and is added to the slot of
//     its arrival period t + l; the slot of t is emptied now, so orders
//     may overtake each other.
//  3. Demand, served from stock (backorder: after clearing backorders;
//     lost: what stock cannot serve is lost).
//  4. End-of-period charges (every period, review or not).
//
// A ring of lmax+1 slots suffices: no lead time or cut-off exceeds lmax.
// It stops at the first demand above dmax and returns it (0 when none).
func stepTimed(st *timedState, s *tally, p policies.Policy, smp *sampler, tm *timing, lost bool, rng *rand.PCG, n int, dmax int64) (over int64) {
	net, onOrder, ring, t, front := st.net, st.onOrder, st.ring, st.t, st.front
	size := int64(len(ring))
	R := int64(tm.review)
	phase := t % R
	defer func() {
		st.net, st.onOrder, st.t, st.front = net, onOrder, t, front
	}()
	for range n {
		// 1. Review.
		if phase == 0 {
			q := int64(p.Order(int(net + onOrder)))
			if q > 0 {
				s.orders++
				s.units += q
				onOrder += q
				if tm.seq {
					ring[t%size] = q
				} else {
					ring[(t+tm.lead(rng))%size] += q
				}
			}
		}
		phase++
		if phase == R {
			phase = 0
		}
		// 2. Receive.
		var arr int64
		if tm.seq {
			for cut := t - tm.lead(rng); front <= cut; front++ {
				i := front % size
				arr += ring[i]
				ring[i] = 0
			}
		} else {
			i := t % size
			arr, ring[i] = ring[i], 0
		}
		onOrder -= arr
		net += arr
		t++
		// 3. Demand.
		d := smp.draw(rng)
		if d > dmax {
			return d
		}
		s.demand += d
		if lost {
			served := min(d, net)
			l := d - served
			s.served += served
			s.lost += l
			s.stockouts += int64(uint64(-l) >> 63) // 1 when l > 0
			net -= served
			s.onHand += net
		} else {
			s.served += min(d, max(net, 0))
			net -= d
			s.onHand += max(net, 0)
			s.backorders += max(-net, 0)
			s.stockouts += int64(uint64(net) >> 63) // 1 when net < 0
		}
		s.periods++
	}
	return 0
}
