package inventory

import (
	"fmt"
	"math"
)

// LossTable holds, for every integer y in Lo()..Hi(), the distribution
// function, the tail and the two partial expectations (first-order loss
// functions) of a demand X:
//
//	Under(y) = E[(y-X)^+] = sum_{k<y} P(X <= k)     (0 for y <= 0),
//	Over(y)  = E[(X-y)^+] = E[X] - y + Under(y)    (E[X] - y for y <= 0),
//
// (E. A. Silver, D. F. Pyke and R. Peterson, Inventory Management and
// Production Planning and Scheduling, 3rd ed., 1998, section 7.7 and
// Appendix III; the identity is (X-y)^+ - (y-X)^+ = X - y). Both are
// built in one pass by prefix sums, in time linear in Hi() (Under needs
// the sum from 0). Nothing is truncated, with one documented exception
// below.
//
// Above the mean, E[X] - y + Under(y) subtracts nearly equal numbers, so
// there Over is instead the suffix sum Over(y) = sum_{k>=y} P(X > k) of
// closed-form tails: Over(y) = P(X > y) + Over(y+1), starting from Over(Hi())
// summed upward until a term is below 1e-17 of the sum and the geometric
// bound on the remainder (term * r / (1-r), r the ratio of the last two
// terms) is too. For a cut Table the neglected mass (<= 1e-12) is left out
// of that sum.
type LossTable struct {
	lo, hi                 int
	cdf, tail, under, over []float64 // index y - lo
}

// NewLossTable tabulates d on lo..hi (lo <= hi, hi - lo and hi below 2^24).
func NewLossTable(d Distribution, lo, hi int) (LossTable, error) {
	if hi < lo || hi-lo >= maxTable || hi >= maxTable {
		return LossTable{}, fmt.Errorf("inventory: loss table range %d..%d: want lo <= hi, both below %d apart and hi < %d", lo, hi, maxTable, maxTable)
	}
	n := hi - lo + 1
	t := LossTable{lo: lo, hi: hi, cdf: make([]float64, n), tail: make([]float64, n),
		under: make([]float64, n), over: make([]float64, n)}
	mean := d.Mean()
	for i := range t.cdf {
		t.cdf[i] = d.CDF(lo + i)
	}
	// P(X >= y) = 1 - P(X <= y-1) where that difference is >= 1/2, else
	// the closed tail.
	for i := range t.tail {
		y := lo + i
		switch {
		case y <= 0:
			t.tail[i] = 1
		case i > 0 && t.cdf[i-1] < 0.5:
			t.tail[i] = 1 - t.cdf[i-1]
		default:
			t.tail[i] = d.Tail(y)
		}
	}
	// Under by the running sum of F(k), k = 0..y-1.
	var u sum
	for k := 0; k < lo; k++ {
		u.Add(d.CDF(k))
	}
	for i := range t.under {
		if lo+i > 0 {
			t.under[i] = u.Value()
		}
		if lo+i >= 0 {
			u.Add(t.cdf[i])
		}
	}
	// Over: by the identity at or below the mean, by tail sums above it.
	split := int(math.Floor(mean))
	for y := lo; y <= hi && y <= split; y++ {
		i := y - lo
		t.over[i] = math.Max(0, mean-float64(y)+t.under[i])
	}
	if hi > split {
		neg := Neglected(d)
		s := tailSum(d, hi, neg)
		t.over[hi-lo] = s.Value()
		for y := hi - 1; y >= lo && y > split; y-- {
			s.Add(math.Max(0, t.tail[y+1-lo]-neg))
			t.over[y-lo] = s.Value()
		}
	}
	return t, nil
}

// tailSum returns sum_{k>=y} (P(X > k) - neg), y >= 0.
func tailSum(d Distribution, y int, neg float64) sum {
	var s sum
	prev := math.Inf(1)
	for k := y; k < y+maxTable; k++ {
		term := math.Max(0, d.Tail(k+1)-neg)
		s.Add(term)
		if term == 0 {
			break
		}
		if term <= 1e-17*s.Value() {
			r := term / prev
			if r < 1 && term*r/(1-r) <= 1e-17*s.Value() {
				break
			}
		}
		prev = term
	}
	return s
}

// Lo returns the least y in the table.
func (t LossTable) Lo() int { return t.lo }

// Hi returns the largest y in the table.
func (t LossTable) Hi() int { return t.hi }

// In reports whether y lies in Lo()..Hi().
func (t LossTable) In(y int) bool { return y >= t.lo && y <= t.hi }

// CDF returns P(X <= y), or NaN outside the table.
func (t LossTable) CDF(y int) float64 { return t.at(t.cdf, y) }

// Tail returns P(X >= y), or NaN outside the table.
func (t LossTable) Tail(y int) float64 { return t.at(t.tail, y) }

// Over returns E[(X-y)^+], or NaN outside the table.
func (t LossTable) Over(y int) float64 { return t.at(t.over, y) }

// Under returns E[(y-X)^+], or NaN outside the table.
func (t LossTable) Under(y int) float64 { return t.at(t.under, y) }

func (t LossTable) at(v []float64, y int) float64 {
	if !t.In(y) {
		return math.NaN()
	}
	return v[y-t.lo]
}

// Loss returns E[(X-y)^+] and E[(y-X)^+] for one y, as NewLossTable(d, y, y).
func Loss(d Distribution, y int) (over, under float64, err error) {
	t, err := NewLossTable(d, y, y)
	if err != nil {
		return 0, 0, err
	}
	return t.over[0], t.under[0], nil
}

// NormalLoss returns the standard normal first-order loss function
//
//	G(z) = E[(Z-z)^+] = phi(z) - z (1 - Phi(z))
//
// (Silver, Pyke and Peterson 1998, section 7.7 and Appendix III). For
// z >= 3 it is computed as phi(z) w / (z + w), with w the tail of the
// continued fraction of the Mills ratio (1 - Phi(z))/phi(z) = 1/(z + w),
// w = 1/(z + 2/(z + 3/(z + ...))) (Abramowitz and Stegun 1964, 26.2.14),
// which avoids the cancellation of the direct form far out.
func NormalLoss(z float64) float64 {
	switch {
	case math.IsNaN(z):
		return z
	case math.IsInf(z, 1):
		return 0
	case math.IsInf(z, -1):
		return math.Inf(1)
	}
	phi := sqrt2PiInv * math.Exp(-z*z/2)
	if z < 3 {
		return phi - z*normalUpper(z)
	}
	// w by the modified Lentz method: w = 1/(z + 2/(z + 3/(z + ...))).
	f := z
	c, d := z, 0.0
	for k := 2; k < 10000; k++ {
		d = z + float64(k)*d
		if d == 0 {
			d = lentzTiny
		}
		c = z + float64(k)/c
		if c == 0 {
			c = lentzTiny
		}
		d = 1 / d
		del := c * d
		f *= del
		if math.Abs(del-1) < 1e-16 {
			break
		}
	}
	w := 1 / f
	return phi * w / (z + w)
}
