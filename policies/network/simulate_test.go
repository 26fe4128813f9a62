package network

import (
	"math"
	"reflect"
	"testing"
)

func figs(f Figures) []float64 {
	return []float64{f.FillRate, f.StockoutProbability, f.MeanOnHand, f.MeanBackorders, f.HoldingCost, f.ShortageCost, f.TotalCost}
}

func simFigs(f SimFigures) []Estimate {
	return []Estimate{f.FillRate, f.StockoutProbability, f.MeanOnHand, f.MeanBackorders, f.HoldingCost, f.ShortageCost, f.TotalCost}
}

var figNames = []string{"fill_rate", "stockout_probability", "mean_on_hand", "mean_backorders", "holding_cost", "shortage_cost", "total_cost"}

// The exact serial figures lie inside the simulation's intervals (widened
// to four half-widths, so that 28 comparisons a case rarely fail by
// chance; the seeds are fixed, so the test is deterministic). The
// simulator plays the events one by one with a first-come-first-served
// queue at the centre and shares only the demand law with the
// evaluation.
func TestSerialExactInsideSimulation(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation")
	}
	for _, c := range []struct {
		demand    string
		l0, l1    int
		S0, S1    int
		h0, h1, b float64
	}{
		{"poisson:mean=4", 2, 1, 22, 10, 0.5, 1, 9},
		{"poisson:mean=4", 0, 2, 18, 14, 0.5, 1, 9},
		{"negbin:mean=3,var=9", 3, 0, 16, 4, 0.3, 1, 19},
		{"pmf:0=0.4,1=0.3,5=0.3", 1, 1, 9, 7, 1, 2, 5},
		{"poisson:mean=4", 2, 1, 8, 12, 0.5, 1, 9}, // S0 < S1: the centre is short all the time
	} {
		n := serial(t, c.demand, c.l0, c.l1, c.h0, c.h1, c.b, c.S0, c.S1)
		ex, err := Evaluate(n)
		if err != nil {
			t.Fatal(err)
		}
		sr, err := Simulate(n, SimOptions{Periods: 60000, Warmup: 200, Replications: 10, Seed: 7})
		if err != nil {
			t.Fatal(err)
		}
		for j := range ex.Locations {
			e, s := figs(ex.Locations[j]), simFigs(sr.Locations[j])
			for k := range e {
				if d := math.Abs(e[k] - s[k].Mean); d > 4*s[k].CI95+1e-9 {
					t.Errorf("%+v %s %s: exact %.6g, simulated %.6g +- %.2g", c, ex.Locations[j].Location, figNames[k], e[k], s[k].Mean, s[k].CI95)
				}
			}
		}
	}
}

// The worker count never changes a simulation.
func TestSimulateWorkersDeterministic(t *testing.T) {
	n := serial(t, "poisson:mean=4", 2, 1, 0.5, 1, 9, 22, 10)
	var first *SimResult
	for _, w := range []int{1, 3, 0} {
		r, err := Simulate(n, SimOptions{Periods: 2000, Warmup: 100, Replications: 7, Seed: 11, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = r
		} else if !reflect.DeepEqual(first, r) {
			t.Fatalf("workers %d changed the result", w)
		}
	}
}
