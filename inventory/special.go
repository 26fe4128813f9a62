package inventory

import "math"

// This file holds the special functions behind the distributions. The
// point probabilities use the saddle-point forms of C. Loader, "Fast and
// accurate computation of binomial probabilities", 2000 (the deviance bd0
// and the Stirling remainder stirlerr), which keep full relative accuracy
// far into the tails where exp(k log m - m - lgamma(k+1)) loses digits.
// Tails use the power series and the continued fractions of the regularised
// incomplete gamma and beta functions (Abramowitz and Stegun, Handbook of
// Mathematical Functions, 1964, 6.5.29, 6.5.31 and 26.5.8), evaluated with
// the modified Lentz method (W. H. Press et al., Numerical Recipes, 3rd ed.,
// 2007, sections 5.2, 6.2 and 6.4), each scaled by a point probability
// computed as above, so a small tail is never formed as 1 minus something.

const (
	ln2Pi      = 1.8378770664093454835606594728112 // log(2*pi)
	iterLimit  = 1 << 20
	lentzTiny  = 1e-300
	seriesTol  = 1e-17
	sqrtTwo    = math.Sqrt2
	sqrt2PiInv = 0.39894228040143267793994605993438 // 1/sqrt(2*pi)
)

// stirlerr returns log(Gamma(n+1)) - (n+1/2) log(n) + n - log(2 pi)/2, the
// remainder of Stirling's formula, for n > 0.
func stirlerr(n float64) float64 {
	if n > 15 {
		const (
			s0 = 1.0 / 12
			s1 = 1.0 / 360
			s2 = 1.0 / 1260
			s3 = 1.0 / 1680
			s4 = 1.0 / 1188
		)
		nn := n * n
		switch {
		case n > 500:
			return (s0 - s1/nn) / n
		case n > 80:
			return (s0 - (s1-s2/nn)/nn) / n
		case n > 35:
			return (s0 - (s1-(s2-s3/nn)/nn)/nn) / n
		}
		return (s0 - (s1-(s2-(s3-s4/nn)/nn)/nn)/nn) / n
	}
	lg, _ := math.Lgamma(n + 1)
	return lg - (n+0.5)*math.Log(n) + n - ln2Pi/2
}

// bd0 returns the deviance x log(x/np) + np - x >= 0 without cancellation
// (Loader 2000), for x >= 0 and np > 0.
func bd0(x, np float64) float64 {
	if x == 0 {
		return np
	}
	if math.Abs(x-np) < 0.1*(x+np) {
		v := (x - np) / (x + np)
		s := (x - np) * v
		ej := 2 * x * v
		v *= v
		for j := 1; j < 1000; j++ {
			ej *= v
			s1 := s + ej/float64(2*j+1)
			if s1 == s {
				return s1
			}
			s = s1
		}
		return s
	}
	return x*math.Log(x/np) + np - x
}

// poissonTerm returns exp(-m) m^a / Gamma(a+1) for real a >= 0 and m > 0:
// the Poisson point probability when a is an integer.
func poissonTerm(a, m float64) float64 {
	if a == 0 {
		return math.Exp(-m)
	}
	return math.Exp(-stirlerr(a)-bd0(a, m)) / math.Sqrt(2*math.Pi*a)
}

// binomialTerm returns Gamma(n+1)/(Gamma(x+1)Gamma(n-x+1)) p^x q^(n-x) for
// real 0 < x < n, with q = 1-p given separately to avoid rounding.
func binomialTerm(x, n, p, q float64) float64 {
	lc := stirlerr(n) - stirlerr(x) - stirlerr(n-x) - bd0(x, n*p) - bd0(n-x, n*q)
	return math.Exp(lc) * math.Sqrt(n/(2*math.Pi*x*(n-x)))
}

// gammaSeries returns sum_{n>=0} x^n / ((a+1)(a+2)...(a+n)), so that the
// lower regularised incomplete gamma P(a, x) = poissonTerm(a, x) * gammaSeries(a, x)
// (Abramowitz and Stegun 6.5.29). Use for x < a+1.
func gammaSeries(a, x float64) float64 {
	sum, term := 1.0, 1.0
	for n := 1; n < iterLimit; n++ {
		term *= x / (a + float64(n))
		sum += term
		if term < sum*seriesTol {
			break
		}
	}
	return sum
}

// gammaFraction returns the continued fraction
// 1/(x+1-a- 1(1-a)/(x+3-a- 2(2-a)/(x+5-a- ...))), so that the upper
// regularised incomplete gamma Q(a, x) = exp(-x) x^a / Gamma(a) * gammaFraction(a, x)
// = a * poissonTerm(a, x) * gammaFraction(a, x) (Abramowitz and Stegun
// 6.5.31). Use for x >= a+1.
func gammaFraction(a, x float64) float64 {
	b := x + 1 - a
	c := 1 / lentzTiny
	d := 1 / b
	h := d
	for i := 1; i < iterLimit; i++ {
		an := -float64(i) * (float64(i) - a)
		b += 2
		var del float64
		c, d, del = lentz(an, b, c, d)
		h *= del
		if math.Abs(del-1) < 1e-16 {
			break
		}
	}
	return h
}

// lentz is one step of the modified Lentz method for the continued fraction
// b0 + a1/(b1 + a2/(b2 + ...)) (Lentz 1976; Thompson & Barnett 1986): from
// the running c and d and the next partial numerator a and denominator b it
// returns the new c and d and the factor del that multiplies the value.
func lentz(a, b, c, d float64) (c2, d2, del float64) {
	d = b + a*d
	if math.Abs(d) < lentzTiny {
		d = lentzTiny
	}
	c = b + a/c
	if math.Abs(c) < lentzTiny {
		c = lentzTiny
	}
	d = 1 / d
	return c, d, d * c
}

// gammaPQ returns the regularised incomplete gamma functions P(a, x) and
// Q(a, x) = 1 - P(a, x) for a > 0, x >= 0; the smaller of the two is
// computed directly, never by subtraction.
func gammaPQ(a, x float64) (p, q float64) {
	if x <= 0 {
		return 0, 1
	}
	if math.IsInf(x, 1) {
		return 1, 0
	}
	t := poissonTerm(a, x) // exp(-x) x^a / Gamma(a+1)
	if x < a+1 {
		p = t * gammaSeries(a, x)
		if p > 1 {
			p = 1
		}
		return p, 1 - p
	}
	q = t * a * gammaFraction(a, x)
	if q > 1 {
		q = 1
	}
	return 1 - q, q
}

// betaFraction returns the continued fraction of the regularised incomplete
// beta function (Abramowitz and Stegun 26.5.8), so that
// I_x(a, b) = x^a (1-x)^b / (a B(a, b)) * betaFraction(a, b, x).
// It converges fast for x < (a+1)/(a+b+2).
func betaFraction(a, b, x float64) float64 {
	qab, qap, qam := a+b, a+1, a-1
	c := 1.0
	d := 1 - qab*x/qap
	if math.Abs(d) < lentzTiny {
		d = lentzTiny
	}
	d = 1 / d
	h := d
	for m := 1; m < iterLimit; m++ {
		fm := float64(m)
		m2 := 2 * fm
		aa := fm * (b - fm) * x / ((qam + m2) * (a + m2))
		var del float64
		c, d, del = lentz(aa, 1, c, d)
		h *= del
		aa = -(a + fm) * (qab + fm) * x / ((a + m2) * (qap + m2))
		c, d, del = lentz(aa, 1, c, d)
		h *= del
		if math.Abs(del-1) < 1e-16 {
			break
		}
	}
	return h
}

// normalUpper returns 1 - Phi(z) for the standard normal, accurate for large z.
func normalUpper(z float64) float64 { return 0.5 * math.Erfc(z/sqrtTwo) }

// normalLower returns Phi(z), accurate for very negative z.
func normalLower(z float64) float64 { return 0.5 * math.Erfc(-z/sqrtTwo) }
