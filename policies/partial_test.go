package policies

import (
	"math"
	"testing"

	"ergostock/inventory"
)

// TestLossTableAgainstInventory compares the running-sum loss table used by
// the evaluation with inventory.LossTable, which computes every point from
// the closed-form CDF and tail (an independent path), and with the
// identity E[(X-y)^+] - E[(y-X)^+] = E[X] - y (common practice).
func TestLossTableAgainstInventory(t *testing.T) {
	nb, err := inventory.NewNegBin(6, 20)
	if err != nil {
		t.Fatal(err)
	}
	nrm, err := inventory.NewNormal(40, 8)
	if err != nil {
		t.Fatal(err)
	}
	gam, err := inventory.NewGamma(5, 4)
	if err != nil {
		t.Fatal(err)
	}
	sum3, err := inventory.Sum(pmf(t, 0.2, 0.5, 0.3), 3)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		d      inventory.Distribution
		lo, hi int
	}{
		{poisson(t, 4), -3, 30}, {poisson(t, 1600), 1501, 3500}, {nb, -2, 80},
		{nrm, 10, 90}, {gam, 0, 60}, {sum3, -1, 8}, {pmf(t, 0.5, 0, 0.5), 0, 5},
	} {
		mine := newLossTable(c.d, c.lo, c.hi)
		ref, err := inventory.NewLossTable(c.d, c.lo, c.hi)
		if err != nil {
			t.Fatal(err)
		}
		mu := c.d.Mean()
		for y := c.lo; y <= c.hi; y++ {
			i := mine.at(y)
			if !close(mine.above[i], ref.Over(y), 1e-12) || !close(mine.below[i], ref.Under(y), 1e-12) ||
				!close(mine.over[i], c.d.Tail(y+1), 1e-12) {
				t.Errorf("%v y=%d: above %.17g below %.17g over %.17g, inventory.LossTable and Tail %.17g %.17g %.17g",
					c.d, y, mine.above[i], mine.below[i], mine.over[i], ref.Over(y), ref.Under(y), c.d.Tail(y+1))
			}
			if d := mine.above[i] - mine.below[i] - (mu - float64(y)); math.Abs(d) > 1e-11*math.Max(1, math.Abs(float64(y))) {
				t.Errorf("%v y=%d: above - below - (E[X] - y) = %.3g", c.d, y, d)
			}
		}
	}
}

// TestLossTableBelowMean checks a loss table that ends far below the mean:
// E[(X-y)^+] = E[X] - y + E[(y-X)^+] (the loss identity; Zipkin 2000,
// appendix C, from memory), where E[(y-X)^+] is below 1e-300 for Poisson
// means of 5e4 and 1e6 at y <= 10, so E[(X-y)^+] = E[X] - y exactly.
func TestLossTableBelowMean(t *testing.T) {
	for _, m := range []float64{5e4, 1e6} {
		tab := newLossTable(poisson(t, m), 0, 10)
		for y := 0; y <= 10; y++ {
			if got, want := tab.above[y], m-float64(y); got != want {
				t.Errorf("mean %g: E[(X-%d)^+] = %.17g, want %.17g", m, y, got, want)
			}
		}
	}
}
