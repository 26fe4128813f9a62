package sim

import (
	"math"
	"math/rand/v2"
)

// The direct samplers draw demand of a family with a wide support in O(1)
// expected time per draw, exactly from the law (to floating-point
// round-off), without a table over the support.

// uniform returns a uniform number in the open interval (0, 1): the 53
// high bits of a draw, offset by half a unit in the last place.
func uniform(rng *rand.PCG) float64 {
	return (float64(rng.Uint64()>>11) + 0.5) * 0x1p-53
}

// normal returns a standard normal variate by Marsaglia's polar method
// (G. Marsaglia and T. A. Bray, "A convenient method for generating normal
// variables", SIAM Review 6, 1964). The second variate of each pair is
// dropped, so that a draw depends on nothing but the stream.
func normal(rng *rand.PCG) float64 {
	for {
		u := 2*uniform(rng) - 1
		v := 2*uniform(rng) - 1
		s := u*u + v*v
		if s < 1 && s > 0 {
			return u * math.Sqrt(-2*math.Log(s)/s)
		}
	}
}

// gammaVariate returns a gamma variate with the given shape > 0 and unit
// scale by the squeeze method of G. Marsaglia and W. W. Tsang, "A simple
// method for generating gamma variables", ACM TOMS 26(3), 2000; a shape
// below 1 is boosted as G(a) = G(a+1) U^(1/a) (ibid., section 6), taken in
// logarithms so that a tiny shape underflows to 0 rather than to NaN.
func gammaVariate(rng *rand.PCG, shape float64) float64 {
	boost := 0.0
	if shape < 1 {
		boost = math.Log(uniform(rng)) / shape
		shape++
	}
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		var x, v float64
		for {
			x = normal(rng)
			v = 1 + c*x
			if v > 0 {
				break
			}
		}
		v = v * v * v
		u := uniform(rng)
		x2 := x * x
		if u < 1-0.0331*x2*x2 || math.Log(u) < 0.5*x2+d*(1-v+math.Log(v)) {
			if boost != 0 {
				return math.Exp(math.Log(d*v) + boost)
			}
			return d * v
		}
	}
}

// roundDemand maps a continuous demand x to the integer demand of the
// SPEC's discretisation, P(D = 0) = F(0.5), P(D = k) = F(k+0.5) - F(k-0.5):
// D = k exactly when k - 0.5 < x <= k + 0.5, and D = 0 when x <= 0.5.
func roundDemand(x float64) float64 {
	if !(x > 0.5) {
		return 0
	}
	return math.Ceil(x - 0.5)
}

// poissonSmall draws Poisson(mu) for mu < 10 by sequential inversion
// (L. Devroye, Non-Uniform Random Variate Generation, Springer 1986,
// section X.3.3): O(1 + mu) steps.
func poissonSmall(rng *rand.PCG, mu float64) float64 {
	u := uniform(rng)
	p := math.Exp(-mu)
	k := 0.0
	for u > p {
		u -= p
		k++
		p *= mu / k
		if p == 0 { // beyond the last representable term: the mass left is round-off
			break
		}
	}
	return k
}

// ptrs holds the constants of the transformed rejection method with
// squeeze for Poisson(mu), mu >= 10 (W. Hörmann, "The transformed rejection
// method for generating Poisson random variables", Insurance: Mathematics
// and Economics 12, 1993, algorithm PTRS).
type ptrs struct {
	mu, logMu, b, a, invAlpha, vr, logInvAlpha float64
}

func newPTRS(mu float64) ptrs {
	smu := math.Sqrt(mu)
	b := 0.931 + 2.53*smu
	a := -0.059 + 0.02483*b
	inv := 1.1239 + 1.1328/(b-3.4)
	return ptrs{mu: mu, logMu: math.Log(mu), b: b, a: a, invAlpha: inv, vr: 0.9277 - 3.6224/(b-2), logInvAlpha: math.Log(inv)}
}

// draw returns one Poisson(mu) variate. The acceptance test compares with
// log P(k) in Loader's saddle-point form, -log(2 pi k)/2 - stirlerr(k) -
// bd0(k, mu) (C. Loader, "Fast and accurate computation of binomial
// probabilities", 2000), which keeps its accuracy for means up to 2^52
// where -mu + k log mu - log k! would lose every digit to cancellation.
func (c *ptrs) draw(rng *rand.PCG) float64 {
	for {
		u := uniform(rng) - 0.5
		v := uniform(rng)
		us := 0.5 - math.Abs(u)
		k := math.Floor((2*c.a/us+c.b)*u + c.mu + 0.43)
		if us >= 0.07 && v <= c.vr {
			return k
		}
		if k < 0 || (us < 0.013 && v > us) {
			continue
		}
		lhs := math.Log(v) + c.logInvAlpha - math.Log(c.a/(us*us)+c.b)
		if lhs <= logPoissonPMF(k, c.mu, c.logMu) {
			return k
		}
	}
}

// logPoissonPMF returns log P(D = k) for D ~ Poisson(mu), k >= 0.
func logPoissonPMF(k, mu, logMu float64) float64 {
	if k == 0 {
		return -mu
	}
	if k < 16 {
		lg, _ := math.Lgamma(k + 1)
		return -mu + k*logMu - lg
	}
	return -0.5*math.Log(2*math.Pi*k) - stirlerr(k) - bd0(k, mu)
}

// stirlerr returns log k! - (k + 1/2) log k + k - log(2 pi)/2 for k >= 16
// by its asymptotic series 1/(12k) - 1/(360k^3) + 1/(1260k^5) - 1/(1680k^7)
// (Abramowitz and Stegun 1964, 6.1.41), below round-off after these terms.
func stirlerr(k float64) float64 {
	const s0, s1, s2, s3 = 1.0 / 12, 1.0 / 360, 1.0 / 1260, 1.0 / 1680
	k2 := 1 / (k * k)
	return (s0 - (s1-(s2-s3*k2)*k2)*k2) / k
}

// bd0 returns k log(k/mu) + mu - k >= 0, for k close to mu by the series
// 2k sum_j v^(2j+1)/(2j+1) - (k - mu) v with v = (k-mu)/(k+mu) (Loader 2000).
func bd0(k, mu float64) float64 {
	if math.Abs(k-mu) < 0.1*(k+mu) {
		v := (k - mu) / (k + mu)
		s := (k - mu) * v
		ej := 2 * k * v
		v2 := v * v
		for j := 1; j < 1000; j++ {
			ej *= v2
			s1 := s + ej/float64(2*j+1)
			if s1 == s {
				return s1
			}
			s = s1
		}
		return s
	}
	return k*math.Log(k/mu) + mu - k
}

// poisson draws Poisson(mu) for any mu >= 0.
func poisson(rng *rand.PCG, mu float64) float64 {
	switch {
	case !(mu > 0):
		return 0
	case mu < 10:
		return poissonSmall(rng, mu)
	}
	c := newPTRS(mu)
	return c.draw(rng)
}
