package network

import (
	"fmt"
	"math"
	"testing"
)

// distribution builds a centre with installation level s0 feeding stores
// with the given Poisson means, lead times and levels.
func distribution(t testing.TB, l0, s0 int, means []float64, leads, levels []int) *Network {
	n := &Network{Levels: Installation, Centre: Location{Name: "hub", LeadTime: l0, Holding: 0.5, BaseStock: s0, HasLevel: true}}
	for i, m := range means {
		n.Stores = append(n.Stores, Location{Name: fmt.Sprintf("s%d", i), Parent: "hub", LeadTime: leads[i],
			Demand: mustParse(t, fmt.Sprintf("poisson:mean=%g", m)), Holding: 1, Shortage: 10, BaseStock: levels[i], HasLevel: true})
	}
	return n
}

// The METRIC decomposition against simulation of the same network over a
// grid of networks: two and five stores of unequal demand, short and long
// lead times, the centre's installation level at about its 20%, 50%, 80% and
// 95% quantile of lead-time demand, the stores' levels at about their 90%
// quantile of lead-time demand plus one period. The worst fill-rate error
// found is recorded in DEVELOPERS.md (section 5); the bound asserted here
// is a little above it. The centre's own figures are exact and must agree
// within the simulation's noise.
func TestMETRICAgainstSimulationGrid(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation grid")
	}
	worst, worstCase := 0.0, ""
	worst2, worstCase2 := 0.0, ""
	for _, means := range [][]float64{{2, 5}, {1, 1.5, 2, 3, 4}} {
		for _, l0 := range []int{1, 4} {
			for _, l := range []int{1, 3} {
				for _, q := range []float64{0.2, 0.5, 0.8, 0.95} {
					total := 0.0
					for _, m := range means {
						total += m
					}
					x0 := mustParse(t, fmt.Sprintf("poisson:mean=%g", total*float64(l0)))
					s0 := 0
					for x0.CDF(s0) < q {
						s0++
					}
					leads := make([]int, len(means))
					levels := make([]int, len(means))
					for i, m := range means {
						leads[i] = l
						d := mustParse(t, fmt.Sprintf("poisson:mean=%g", m*float64(l+1)))
						for d.CDF(levels[i]) < 0.9 {
							levels[i]++
						}
					}
					n := distribution(t, l0, s0, means, leads, levels)
					ex, err := Evaluate(n)
					if err != nil {
						t.Fatal(err)
					}
					sr, err := Simulate(n, SimOptions{Periods: 40000, Warmup: 400, Replications: 8, Seed: 3})
					if err != nil {
						t.Fatal(err)
					}
					c := sr.Locations[0]
					if d := math.Abs(ex.Locations[0].MeanBackorders - c.MeanBackorders.Mean); d > 4*c.MeanBackorders.CI95+1e-9 {
						t.Errorf("N=%d L0=%d: centre backorders %g, simulated %g +- %g", len(means), l0, ex.Locations[0].MeanBackorders, c.MeanBackorders.Mean, c.MeanBackorders.CI95)
					}
					n2 := *n
					n2.Split = TwoMoment
					ex2, err := Evaluate(&n2)
					if err != nil {
						t.Fatal(err)
					}
					for i := 1; i < len(ex2.Locations); i++ {
						if e := math.Abs(ex2.Locations[i].FillRate - sr.Locations[i].FillRate.Mean); e > worst2 {
							worst2 = e
							worstCase2 = fmt.Sprintf("N=%d L0=%d L=%d centre quantile %.2f store %s: %.4f vs simulated %.4f +- %.4f",
								len(means), l0, l, q, ex2.Locations[i].Location, ex2.Locations[i].FillRate, sr.Locations[i].FillRate.Mean, sr.Locations[i].FillRate.CI95)
						}
					}
					for i := 1; i < len(ex.Locations); i++ {
						e := math.Abs(ex.Locations[i].FillRate - sr.Locations[i].FillRate.Mean)
						if e > worst {
							worst = e
							worstCase = fmt.Sprintf("N=%d L0=%d L=%d centre quantile %.2f store %s: %.4f vs simulated %.4f +- %.4f",
								len(means), l0, l, q, ex.Locations[i].Location, ex.Locations[i].FillRate, sr.Locations[i].FillRate.Mean, sr.Locations[i].FillRate.CI95)
						}
					}
				}
			}
		}
	}
	t.Logf("worst fill-rate error of the decomposition over the grid: binomial split %.4f (%s); two-moment split %.4f (%s)", worst, worstCase, worst2, worstCase2)
	if worst > metricGridBound {
		t.Errorf("worst fill-rate error %.4f above the recorded bound %.2f: %s", worst, metricGridBound, worstCase)
	}
	if worst2 > metricGridBound {
		t.Errorf("two-moment split: worst fill-rate error %.4f above the recorded bound %.2f: %s", worst2, metricGridBound, worstCase2)
	}
}

// metricGridBound is the bound asserted by the grid test (see DEVELOPERS.md).
const metricGridBound = 0.05

// Stores with laws that do not sum in closed form (negative binomial, an
// explicit pmf): the centre's figures, exact from the convolved total
// demand, inside the simulation's intervals; the stores' within the
// grid's bound.
func TestMixedLawsAgainstSimulation(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation")
	}
	n := &Network{Levels: Installation, Centre: Location{Name: "hub", LeadTime: 3, Holding: 0.5, BaseStock: 22, HasLevel: true}}
	for i, d := range []string{"negbin:mean=3,var=8", "pmf:0=0.5,2=0.3,5=0.2", "normal:mean=2,sd=1"} {
		n.Stores = append(n.Stores, Location{Name: fmt.Sprintf("s%d", i), Parent: "hub", LeadTime: 1 + i, Demand: mustParse(t, d),
			Holding: 1, Shortage: 10, BaseStock: 9 + 2*i, HasLevel: true})
	}
	ex, err := Evaluate(n)
	if err != nil {
		t.Fatal(err)
	}
	sr, err := Simulate(n, SimOptions{Periods: 60000, Warmup: 500, Replications: 8, Seed: 5})
	if err != nil {
		t.Fatal(err)
	}
	e, s := figs(ex.Locations[0]), simFigs(sr.Locations[0])
	for k := range e {
		if math.Abs(e[k]-s[k].Mean) > 4*s[k].CI95+1e-9 {
			t.Errorf("centre %s: exact %.6g, simulated %.6g +- %.2g", figNames[k], e[k], s[k].Mean, s[k].CI95)
		}
	}
	for i := 1; i < len(ex.Locations); i++ {
		if d := math.Abs(ex.Locations[i].FillRate - sr.Locations[i].FillRate.Mean); d > metricGridBound {
			t.Errorf("%s: fill rate %.4f, simulated %.4f", ex.Locations[i].Location, ex.Locations[i].FillRate, sr.Locations[i].FillRate.Mean)
		}
	}
}
