package report

import (
	"fmt"
	"math"

	"ergostock/inventory"
	"ergostock/policies"
)

// levelEps is the per-period demand tail left out when the demand over
// several periods is convolved; the neglected mass is reported.
const levelEps = 1e-13

// levelLaw is the stationary law of the stock level a chart shows: P[i] is
// the probability of level Lo+i. Neglected is the probability mass outside
// P (a truncated demand tail), at most (L+1) * 1e-13.
type levelLaw struct {
	Lo        int
	P         []float64
	Neglected float64
}

// mean returns the mean level of the law.
func (l levelLaw) mean() float64 {
	m := 0.0
	for i, p := range l.P {
		m += float64(l.Lo+i) * p
	}
	return m
}

// stockLevels returns the stationary law of net inventory at the end of a
// period (backorder mode) or of on-hand stock at the end of a period (lost
// mode), as the exact evaluation computes it from the policy's chain (see
// policies.LevelDistribution for the formulas). Neglected is the mass left
// out at the two ends together.
func stockLevels(sys inventory.System, p policies.Policy) (levelLaw, error) {
	e, err := policies.Evaluate(sys, p, policies.Options{Levels: true})
	if err != nil {
		return levelLaw{}, err
	}
	if e.Levels == nil {
		return levelLaw{}, fmt.Errorf("policy %v: the evaluation returned no level distribution", p)
	}
	return levelLaw{Lo: e.Levels.Min, P: e.Levels.P, Neglected: e.Levels.Below + e.Levels.Above}, nil
}

// renewalMass returns m(0..n-1), the expected number of periods, counted
// from an order, in which cumulative demand equals j (see stockLevels).
func renewalMass(d inventory.Distribution, n int) []float64 {
	m := make([]float64, n)
	p := make([]float64, n)
	for k := range n {
		p[k] = d.PMF(k)
	}
	q := 1 - p[0]
	m[0] = 1 / q
	for j := 1; j < n; j++ {
		sum := 0.0
		for k := 1; k <= j; k++ {
			sum += p[k] * m[j-k]
		}
		m[j] = sum / q
	}
	return m
}

// periodsDemand returns the pmf of the demand over n >= 1 periods by
// repeated convolution, each period's demand cut where P(D > k) <= 1e-13,
// and the neglected mass (at most n * 1e-13).
func periodsDemand(d inventory.Distribution, n int) ([]float64, float64) {
	b := d.Bound(levelEps)
	one := make([]float64, b+1)
	for k := range one {
		one[k] = d.PMF(k)
	}
	negl := d.Tail(b + 1)
	x := append([]float64(nil), one...)
	for range n - 1 {
		y := make([]float64, len(x)+b)
		for i, a := range x {
			if a == 0 {
				continue
			}
			for k, c := range one {
				y[i+k] += a * c
			}
		}
		x = y
	}
	return x, math.Min(1, float64(n)*negl)
}

// snqClass returns the inventory positions after review that an s-nQ
// policy visits when started at s+Q. Positions move as y -> s+1 + ((y-D-s-1)
// mod Q), so from s+Q they reach exactly the positions y with s+Q-y a
// multiple of g = gcd(Q, the demand sizes of positive probability); on them
// the chain is irreducible and doubly stochastic, so its stationary law is
// uniform. For most demand laws g = 1 and every position s+1..s+Q is
// visited. Demand sizes are scanned up to the point where P(D > k) <= 1e-13.
func snqClass(d inventory.Distribution, s, q int) []int {
	g := q
	for k := 1; k <= d.Bound(levelEps) && g > 1; k++ {
		if d.PMF(k) > 0 {
			g = gcd(g, k)
		}
	}
	var c []int
	for y := s + q; y > s; y -= g {
		c = append(c, y)
	}
	return c
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}
