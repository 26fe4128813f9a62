package network

import "fmt"

// AlonePlan is the network planned one location at a time, the way it is
// done without a network model (common practice): each store at its own
// single-location optimum for its lead time from the centre, as if the
// centre were never out of stock; the centre at the single-location
// optimum against the stores' total demand over its lead time, with the
// stores' demand-weighted shortage cost, and at least the stores' highest
// fill-rate floor as its own fill rate.
type AlonePlan struct {
	Plan
	// Expected are the store fill rates each store's single-location plan
	// promises (in store order); Plan.Result holds what the stores get in
	// the network at those levels.
	Expected []float64
}

// Alone plans every location alone and evaluates the resulting levels as
// a network (exactly for one store, by the decomposition for several).
func Alone(n *Network) (*AlonePlan, error) {
	if err := n.Validate(false); err != nil {
		return nil, err
	}
	m, err := newModel(n)
	if err != nil {
		return nil, err
	}
	s := make([]int, len(n.Stores))
	expected := make([]float64, len(n.Stores))
	var bbar, floor float64
	for i, st := range n.Stores {
		lvl, _, err := m.bestStore(i, []float64{1})
		if err != nil {
			return nil, err
		}
		f, err := m.store(i, lvl, []float64{1})
		if err != nil {
			return nil, err
		}
		s[i], expected[i] = lvl, f.fill
		bbar += m.share[i] * st.Shortage
		floor = max(floor, st.MinFillRate)
	}
	// The centre: the least s0 >= 0 with P(X_{L0} <= s0) >= b/(b + h0),
	// then raised until its own fill rate meets the floor.
	h0 := n.Centre.Holding
	s0 := 0
	if bbar > 0 {
		frac := bbar / (bbar + h0)
		for s0 <= m.x0Bound && m.x0.CDF(s0) < frac {
			s0++
		}
	}
	for {
		cf, err := m.centre(s0)
		if err != nil {
			return nil, err
		}
		if cf.fill >= floor || s0 > m.x0Bound {
			break
		}
		s0++
	}
	res, err := m.evaluate(s0, s)
	if err != nil {
		return nil, err
	}
	search := fmt.Sprintf("each store at its single-location optimum for lead time %s; the centre at the critical fractile of the stores' total demand over %d periods (demand-weighted shortage cost %.4g)", leadList(n), n.Centre.LeadTime, bbar)
	return &AlonePlan{Plan: Plan{Network: n.withLevels(s0, s), Result: res, Search: search}, Expected: expected}, nil
}

func leadList(n *Network) string {
	if len(n.Stores) == 1 {
		return fmt.Sprint(n.Stores[0].LeadTime)
	}
	return "L_i"
}
