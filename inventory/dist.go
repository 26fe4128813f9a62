package inventory

import (
	"math"
	"sort"
)

// Poisson is the Poisson distribution with mean Lambda:
//
//	P(D = k) = exp(-m) m^k / k!,  P(D >= k) = P(k, m)  (k >= 1),
//
// where P(a, x) is the lower regularised incomplete gamma function
// (Abramowitz and Stegun, Handbook of Mathematical Functions, 1964, 26.4.21).
// Point probabilities use Loader's saddle-point form (C. Loader, "Fast and
// accurate computation of binomial probabilities", 2000), so they keep full
// relative accuracy far into the tail. Mean and variance are both m.
type Poisson struct {
	m float64
}

// NewPoisson returns the Poisson distribution with the given mean > 0.
func NewPoisson(mean float64) (Poisson, error) {
	if err := checkParam("poisson", "mean", mean); err != nil {
		return Poisson{}, err
	}
	return Poisson{m: mean}, nil
}

// PMF returns P(D = k).
func (d Poisson) PMF(k int) float64 {
	if k < 0 {
		return 0
	}
	return poissonTerm(float64(k), d.m)
}

// CDF returns P(D <= k) = Q(k+1, m), the upper regularised incomplete gamma.
func (d Poisson) CDF(k int) float64 {
	if k < 0 {
		return 0
	}
	_, q := gammaPQ(float64(k+1), d.m)
	return q
}

// Tail returns P(D >= k) = P(k, m), the lower regularised incomplete gamma.
func (d Poisson) Tail(k int) float64 {
	if k <= 0 {
		return 1
	}
	p, _ := gammaPQ(float64(k), d.m)
	return p
}

// Mean returns m.
func (d Poisson) Mean() float64 { return d.m }

// Variance returns m.
func (d Poisson) Variance() float64 { return d.m }

// Bound returns the smallest k with P(D > k) <= eps.
func (d Poisson) Bound(eps float64) int { return bound(d, eps) }

func (d Poisson) String() string { return "poisson:mean=" + ftoa(d.m) }

// NegBin is the negative binomial distribution with mean M and variance
// V > M, in the parametrisation
//
//	P(D = k) = Gamma(k+r) / (Gamma(r) k!) p^r (1-p)^k,  r = M^2/(V-M), p = M/V,
//
// with r > 0 real (the Poisson-gamma mixture; N. L. Johnson, A. W. Kemp and
// S. Kotz, Univariate Discrete Distributions, 3rd ed., 2005, eq. 5.1 and 5.19).
// Its tail is a regularised incomplete beta function,
// P(D >= k) = I_(1-p)(k, r) (ibid., eq. 5.31); point probabilities are
// computed as r/(r+k) times a binomial term in Loader's saddle-point form.
// Where the small tail lies on the slow side of the continued fraction
// (size r << 1), the tails are tabulated once by summing point
// probabilities, so they keep their relative accuracy.
type NegBin struct {
	m, v    float64 // mean and variance as given
	r, p, q float64 // size, success probability, q = 1-p computed as (v-m)/v
	cache   *negbinTails
}

// NewNegBin returns the negative binomial distribution with mean > 0 and
// variance > mean.
func NewNegBin(mean, variance float64) (NegBin, error) {
	if err := checkParam("negbin", "mean", mean); err != nil {
		return NegBin{}, err
	}
	if err := checkParam("negbin", "var", variance); err != nil {
		return NegBin{}, err
	}
	if !(variance > mean) {
		return NegBin{}, &FieldError{Field: "demand", Value: negbinSpec(mean, variance),
			Want: "var > mean (negbin is over-dispersed; for var = mean use poisson:mean=M)"}
	}
	r := mean * mean / (variance - mean)
	if !(r > 0) || math.IsInf(r, 0) {
		return NegBin{}, &FieldError{Field: "demand", Value: negbinSpec(mean, variance),
			Want: "var and mean whose size mean^2/(var-mean) is a positive finite number"}
	}
	return makeNegBin(mean, variance, r, mean/variance, (variance-mean)/variance), nil
}

// maxNegBinCache bounds the tail table a NegBin keeps (see makeNegBin).
const maxNegBinCache = 1 << 17

// makeNegBin builds a NegBin from checked parameters. Below k0, the least
// k where the continued fraction for I_q(k, r) converges fast, the tail is
// 1 - I_p(r, k), which loses digits when it is small (a size r << 1 puts
// nearly all mass at 0 and leaves a long thin tail). Then the tails on
// j..k0 are tabulated once as P(D >= j) = P(D >= j+1) + P(D = j), a sum of
// positive terms, down to where the tail exceeds 1/2, if that takes at
// most maxNegBinCache terms.
func makeNegBin(m, v, r, p, q float64) NegBin {
	d := NegBin{m: m, v: v, r: r, p: p, q: q}
	k0 := 1
	if x := (q*(r+2) - 1) / p; x > 0 {
		if x > maxNegBinCache*4 {
			return d
		}
		k0 = int(x)
	}
	for k0 > 1 && d.upper(k0-1) {
		k0--
	}
	for !d.upper(k0) {
		k0++
	}
	t0 := d.Tail(k0)
	if k0 <= 1 || t0 >= 1e-2 {
		return d
	}
	tails := []float64{t0}
	var s sum
	s.Add(t0)
	for j := k0 - 1; j >= 1 && len(tails) <= maxNegBinCache; j-- {
		s.Add(d.PMF(j))
		tails = append(tails, s.Value())
		if s.Value() > 0.5 {
			break
		}
	}
	if len(tails) > maxNegBinCache {
		return d
	}
	// Reverse so that tails[i] = P(D >= start+i).
	for i, j := 0, len(tails)-1; i < j; i, j = i+1, j-1 {
		tails[i], tails[j] = tails[j], tails[i]
	}
	d.cache = &negbinTails{start: k0 - len(tails) + 1, tails: tails}
	return d
}

// negbinTails holds P(D >= start+i) for a NegBin whose lower-side tails
// would lose digits; it is never modified after construction.
type negbinTails struct {
	start int
	tails []float64
}

func negbinSpec(m, v float64) string { return "negbin:mean=" + ftoa(m) + ",var=" + ftoa(v) }

// Size returns r = M^2/(V-M).
func (d NegBin) Size() float64 { return d.r }

// Prob returns p = M/V.
func (d NegBin) Prob() float64 { return d.p }

// PMF returns P(D = k).
func (d NegBin) PMF(k int) float64 {
	switch {
	case k < 0:
		return 0
	case k == 0:
		if d.q < 0.5 {
			return math.Exp(d.r * math.Log1p(-d.q))
		}
		return math.Exp(d.r * math.Log(d.p))
	}
	fk := float64(k)
	return d.r / (d.r + fk) * binomialTerm(d.r, d.r+fk, d.p, d.q)
}

// upper reports whether P(D >= k) is the smaller side, where the continued
// fraction for I_(1-p)(k, r) converges fast.
func (d NegBin) upper(k int) bool {
	fk := float64(k)
	return d.q < (fk+1)/(fk+d.r+2)
}

// Tail returns P(D >= k) = I_(1-p)(k, r).
func (d NegBin) Tail(k int) float64 {
	if k <= 0 {
		return 1
	}
	if d.upper(k) {
		return clamp01(d.PMF(k) * betaFraction(float64(k), d.r, d.q))
	}
	if c := d.cache; c != nil && k >= c.start {
		return c.tails[k-c.start]
	}
	return clamp01(1 - d.lower(k-1))
}

// lower returns P(D <= k) = I_p(r, k+1) directly; use when !upper(k+1).
func (d NegBin) lower(k int) float64 {
	fk := float64(k + 1)
	return clamp01(d.PMF(k+1) * fk / d.r * betaFraction(d.r, fk, d.p))
}

// CDF returns P(D <= k) = I_p(r, k+1).
func (d NegBin) CDF(k int) float64 {
	if k < 0 {
		return 0
	}
	if d.upper(k + 1) {
		return clamp01(1 - d.Tail(k+1))
	}
	return d.lower(k)
}

// Mean returns M.
func (d NegBin) Mean() float64 { return d.m }

// Variance returns V.
func (d NegBin) Variance() float64 { return d.v }

// Bound returns the smallest k with P(D > k) <= eps.
func (d NegBin) Bound(eps float64) int { return bound(d, eps) }

func (d NegBin) String() string { return negbinSpec(d.m, d.v) }

// Normal is the normal distribution with mean Mu and standard deviation
// Sigma, discretised to the integers by rounding, negative values to 0:
//
//	P(D = 0) = F(0.5),  P(D = k) = F(k+0.5) - F(k-0.5)  (k >= 1),
//
// F the normal CDF; so P(D >= k) = 1 - F(k-0.5), computed as the normal
// survival function through erfc, never as 1 - CDF. Mean and Variance
// are those of the discretised D (not Mu and Sigma^2). For Sigma >= 4 the
// rounded normal R has mean Mu and variance Sigma^2 + 1/12 (Sheppard's
// correction, W. F. Sheppard, Proc. London Math. Soc. 29, 1898) to within
// exp(-2 pi^2 Sigma^2), by the Poisson summation formula, and the part of R
// below zero is summed term by term until it is below 1e-30 (or, for a wide
// normal, by the Euler-Maclaurin formula, exact to round-off); for Sigma < 4
// the moments are summed over the support where the neglected mass is below
// 1e-30.
type Normal struct {
	mu, sigma  float64
	mean, vari float64
}

// NewNormal returns the discretised normal with parameters mu > 0 and sd > 0.
func NewNormal(mu, sd float64) (Normal, error) {
	if err := checkParam("normal", "mean", mu); err != nil {
		return Normal{}, err
	}
	if err := checkParam("normal", "sd", sd); err != nil {
		return Normal{}, err
	}
	d := Normal{mu: mu, sigma: sd}
	if sd < 4 {
		lo := int(math.Max(0, math.Floor(mu-13*sd)))
		hi := int(math.Ceil(mu + 13*sd))
		d.mean, d.vari = moments(d, lo, hi)
		return d, nil
	}
	// With R = round(X), D = max(0, R) = R + (-R)^+. For sd >= 4,
	// E[R] = mu and Var[R] = sd^2 + 1/12 to within exp(-2 pi^2 sd^2) <
	// 1e-136 (Poisson summation of the sawtooth X - R, whose Fourier
	// coefficients meet the characteristic function at 2 pi n). The part
	// below zero, L1 = E[(-R)^+] = sum_{j>=1} P(R <= -j) and
	// L2 = E[R^2; R < 0] = sum_{j>=1} (2j-1) P(R <= -j), is summed term by
	// term, or for sd >= 600 with many terms by the Euler-Maclaurin formula
	// (see normalLeft); then E[D] = mu + L1 and
	// Var[D] = sd^2 + 1/12 - L2 - 2 mu L1 - L1^2.
	var l1, l2 float64
	if sd >= 600 && 13*sd-mu > 5000 {
		l1, l2 = normalLeft(mu, sd)
	} else {
		var s1, s2 sum
		for j := 1; ; j++ {
			p := normalLower((0.5 - float64(j) - mu) / sd)
			if p < 1e-300 || p*float64(2*j) < 1e-30*sd {
				break
			}
			s1.Add(p)
			s2.Add(float64(2*j-1) * p)
		}
		l1, l2 = s1.Value(), s2.Value()
	}
	d.mean = mu + l1
	d.vari = sd*sd + 1.0/12 - l2 - 2*mu*l1 - l1*l1
	return d, nil
}

// normalLeft returns L1 = sum_{j>=1} g(j-1/2) and L2 = sum_{j>=1} 2(j-1/2) g(j-1/2)
// for g(x) = Phi(-(x+mu)/sd), by the Euler-Maclaurin formula for the
// midpoint rule with unit step (Abramowitz and Stegun 1964, 25.4.7 with
// the midpoint Bernoulli values): sum f(j-1/2) = integral_0^inf f +
// f'(0)/24 - 7 f”'(0)/5760 + R, where R is of order (2 pi sd)^-6 relative
// and below round-off for sd >= 600. With w = mu/sd, G the normal loss
// function and G2(w) = E[((Z-w)^+)^2] = (1+w^2)(1-Phi(w)) - w phi(w):
//
//	integral g = sd G(w),        g'(0) = -phi(w)/sd,   g'''(0) = -(w^2-1) phi(w)/sd^3,
//	integral 2x g = sd^2 G2(w),  (2xg)'(0) = 2 g(0),   (2xg)'''(0) = 6 g''(0) = 6 w phi(w)/sd^2.
func normalLeft(mu, sd float64) (l1, l2 float64) {
	w := mu / sd
	phi := sqrt2PiInv * math.Exp(-w*w/2)
	q := normalUpper(w)
	l1 = sd*NormalLoss(w) - phi/(24*sd) + 7*(w*w-1)*phi/(5760*sd*sd*sd)
	l2 = sd*sd*((1+w*w)*q-w*phi) + 2*q/24 - 7*6*w*phi/(5760*sd*sd)
	return l1, l2
}

// maxMomentTerms bounds the terms summed for the discretised moments.
const maxMomentTerms = 4000000

// Mu returns the mean of the underlying continuous normal.
func (d Normal) Mu() float64 { return d.mu }

// Sigma returns the standard deviation of the underlying continuous normal.
func (d Normal) Sigma() float64 { return d.sigma }

// PMF returns P(D = k).
func (d Normal) PMF(k int) float64 {
	switch {
	case k < 0:
		return 0
	case k == 0:
		return normalLower((0.5 - d.mu) / d.sigma)
	}
	za := (float64(k) - 0.5 - d.mu) / d.sigma
	zb := (float64(k) + 0.5 - d.mu) / d.sigma
	if za > 0 {
		return normalUpper(za) - normalUpper(zb)
	}
	return normalLower(zb) - normalLower(za)
}

// CDF returns P(D <= k) = F(k+0.5).
func (d Normal) CDF(k int) float64 {
	if k < 0 {
		return 0
	}
	return normalLower((float64(k) + 0.5 - d.mu) / d.sigma)
}

// Tail returns P(D >= k) = 1 - F(k-0.5).
func (d Normal) Tail(k int) float64 {
	if k <= 0 {
		return 1
	}
	return normalUpper((float64(k) - 0.5 - d.mu) / d.sigma)
}

// Mean returns E[D] of the discretised distribution.
func (d Normal) Mean() float64 { return d.mean }

// Variance returns Var[D] of the discretised distribution.
func (d Normal) Variance() float64 { return d.vari }

// Bound returns the smallest k with P(D > k) <= eps.
func (d Normal) Bound(eps float64) int { return bound(d, eps) }

func (d Normal) String() string { return "normal:mean=" + ftoa(d.mu) + ",sd=" + ftoa(d.sigma) }

// Gamma is the gamma distribution with mean Mu and standard deviation
// Sigma (shape a = Mu^2/Sigma^2, scale Sigma^2/Mu), discretised as
//
//	P(D = 0) = F(0.5),  P(D = k) = F(k+0.5) - F(k-0.5)  (k >= 1),
//
// with F(x) = P(a, x/scale) the lower regularised incomplete gamma
// function (Abramowitz and Stegun 1964, 6.5.1); P(D >= k) = Q(a, (k-0.5)/scale)
// is computed directly from its continued fraction in the upper tail. Mean
// and Variance are those of the discretised D: Mu and Sigma^2 + 1/12
// (Sheppard's correction) when the shape is >= 2 and the characteristic
// function at 2 pi is below exp(-80)/(1+Mu)^2 in modulus (then exact to
// round-off, see NewGamma), else summed over the support where the
// neglected mass is below 1e-30, the far part of a wide gamma (scale >= 600)
// by the Euler-Maclaurin formula.
type Gamma struct {
	mu, sigma    float64
	shape, scale float64
	mean, vari   float64
}

// NewGamma returns the discretised gamma with mean mu > 0 and sd > 0.
func NewGamma(mu, sd float64) (Gamma, error) {
	if err := checkParam("gamma", "mean", mu); err != nil {
		return Gamma{}, err
	}
	if err := checkParam("gamma", "sd", sd); err != nil {
		return Gamma{}, err
	}
	d := Gamma{mu: mu, sigma: sd, shape: (mu / sd) * (mu / sd), scale: sd * sd / mu}
	if !(d.shape > 0) || !(d.scale > 0) || math.IsInf(d.shape, 0) || math.IsInf(d.scale, 0) {
		return Gamma{}, &FieldError{Field: "demand", Value: d.String(),
			Want: "mean and sd whose shape (mean/sd)^2 and scale sd^2/mean are positive finite numbers"}
	}
	// D = round(X) with X >= 0, and X = D + s(X) with the sawtooth s(x) =
	// x - round(x) = sum_{n>=1} (-1)^(n+1) sin(2 pi n x)/(pi n). So E[D] =
	// mean - E[s(X)] and Var[D] = sd^2 + 1/12 - (terms in phi(2 pi n) and
	// phi'(2 pi n)), phi(t) = (1 - i scale t)^(-shape) the characteristic
	// function, |phi'(t)| <= mean |phi(t)|. For shape >= 2 the terms sum to at
	// most a few times (1 + mean) |phi(2 pi)|, so when
	// |phi(2 pi)| = (1 + (2 pi scale)^2)^(-shape/2) <= exp(-80) / (1+mean)^2
	// the moments mean and sd^2 + 1/12 (Sheppard's correction) are exact to
	// round-off.
	if d.shape >= 2 && d.shape/2*math.Log1p(math.Pow(2*math.Pi*d.scale, 2)) >= 80+2*math.Log1p(mu) {
		d.mean, d.vari = mu, sd*sd+1.0/12
		return d, nil
	}
	// Otherwise sum over lo..hi: lo is the least k with F(k+0.5) >= 1e-30,
	// so the mass below lo is under 1e-30; hi bounds the upper tail alike.
	lo := sort.Search(int(math.Ceil(mu))+1, func(k int) bool { return d.CDF(k) >= 1e-30 })
	hi := bound(d, 1e-30) + 1
	if k := int(math.Ceil(600 * (math.Abs(d.shape-1) + 1))); d.scale >= 600 && hi-lo > 5000 && k < hi {
		if k < lo {
			k = lo
		}
		d.mean, d.vari = d.wideMoments(lo, k)
		return d, nil
	}
	if hi-lo > maxMomentTerms {
		return Gamma{}, &FieldError{Field: "demand", Value: d.String(),
			Want: "a gamma whose discretised support spans at most 4e6 units (a smaller sd, or shape (mean/sd)^2 >= 2)"}
	}
	d.mean, d.vari = moments(d, lo, hi)
	return d, nil
}

// wideMoments returns the moments of a wide discretised gamma (scale >=
// 600): E[D] = sum_{k>=1} P(D >= k) and E[D^2] = sum_{k>=1} (2k-1) P(D >= k)
// summed term by term for k <= K and beyond by the Euler-Maclaurin formula
// for the midpoint rule, as for normalLeft, applied to S(x) = P(X > x) and
// 2x S(x) on [K, inf) with nodes K+1/2, K+3/2, ... For x >= K = 600(|a-1|+1)
// every derivative of the density satisfies |f^(j)| <= f (c/600)^j, so the
// neglected remainder is below round-off. With z = K/scale, t = z^a e^-z/Gamma(a+1)
// and Q = Q(a, z):
//
//	integral S    = scale (a t - (z-a) Q),
//	integral 2x S = scale^2 ((a(a+1) - z^2) Q + a(a+1) t + a z t),
//
// and f(K) = a t/(z scale), f' = f ((a-1)/x - 1/scale),
// f” = f (((a-1)/x - 1/scale)^2 - (a-1)/x^2). The variance E[D^2] - E[D]^2
// loses at most log10(1+a) digits (here a < 200).
func (d Gamma) wideMoments(lo, K int) (mean, variance float64) {
	var m1, m2 sum
	m1.Add(float64(lo))
	m2.Add(float64(lo) * float64(lo))
	for k := lo + 1; k <= K; k++ {
		t := d.Tail(k)
		m1.Add(t)
		m2.Add(float64(2*k-1) * t)
	}
	a, th, x := d.shape, d.scale, float64(K)
	z := x / th
	t := poissonTerm(a, z)
	_, q := gammaPQ(a, z)
	f := a * t / (z * th)
	u := (a-1)/x - 1/th
	f1 := f * u
	f2 := f * (u*u - (a-1)/(x*x))
	// sum S(mid) = integral + S'(K)/24 - 7 S'''(K)/5760, S' = -f, S''' = -f''.
	m1.Add(th * (a*t - (z-a)*q))
	m1.Add(-f / 24)
	m1.Add(7 * f2 / 5760)
	// h = 2x S: h' = 2S - 2x f, h''' = -6 f' - 2x f''.
	m2.Add(th * th * ((a*(a+1)-z*z)*q + a*(a+1)*t + a*z*t))
	m2.Add((2*q - 2*x*f) / 24)
	m2.Add(-7 * (-6*f1 - 2*x*f2) / 5760)
	mean = m1.Value()
	return mean, m2.Value() - mean*mean
}

// Mu returns the mean of the underlying continuous gamma distribution.
func (d Gamma) Mu() float64 { return d.mu }

// Sigma returns the standard deviation of the underlying continuous gamma.
func (d Gamma) Sigma() float64 { return d.sigma }

// Shape returns the shape parameter (Mu/Sigma)^2.
func (d Gamma) Shape() float64 { return d.shape }

// Scale returns the scale parameter Sigma^2/Mu.
func (d Gamma) Scale() float64 { return d.scale }

// PMF returns P(D = k).
func (d Gamma) PMF(k int) float64 {
	switch {
	case k < 0:
		return 0
	case k == 0:
		p, _ := gammaPQ(d.shape, 0.5/d.scale)
		return p
	}
	xa := (float64(k) - 0.5) / d.scale
	xb := (float64(k) + 0.5) / d.scale
	pa, qa := gammaPQ(d.shape, xa)
	pb, qb := gammaPQ(d.shape, xb)
	if xa >= d.shape {
		return math.Max(0, qa-qb)
	}
	return math.Max(0, pb-pa)
}

// CDF returns P(D <= k) = F(k+0.5).
func (d Gamma) CDF(k int) float64 {
	if k < 0 {
		return 0
	}
	p, _ := gammaPQ(d.shape, (float64(k)+0.5)/d.scale)
	return p
}

// Tail returns P(D >= k) = 1 - F(k-0.5).
func (d Gamma) Tail(k int) float64 {
	if k <= 0 {
		return 1
	}
	_, q := gammaPQ(d.shape, (float64(k)-0.5)/d.scale)
	return q
}

// Mean returns E[D] of the discretised distribution.
func (d Gamma) Mean() float64 { return d.mean }

// Variance returns Var[D] of the discretised distribution.
func (d Gamma) Variance() float64 { return d.vari }

// Bound returns the smallest k with P(D > k) <= eps.
func (d Gamma) Bound(eps float64) int { return bound(d, eps) }

func (d Gamma) String() string { return "gamma:mean=" + ftoa(d.mu) + ",sd=" + ftoa(d.sigma) }

// moments returns the mean and variance of d from its support lo..hi,
// outside of which the mass is negligible (below 1e-30): the mean as
// lo + sum_{k=lo+1..hi} P(D >= k), the variance as the central second
// moment sum (k-mean)^2 P(D=k), both with compensated summation.
func moments(d Distribution, lo, hi int) (mean, variance float64) {
	var s sum
	s.Add(float64(lo))
	for k := lo + 1; k <= hi; k++ {
		s.Add(d.Tail(k))
	}
	mean = s.Value()
	var v sum
	for k := lo; k <= hi; k++ {
		x := float64(k) - mean
		v.Add(x * x * d.PMF(k))
	}
	return mean, v.Value()
}

// bound returns the smallest k >= 0 with P(D > k) = Tail(k+1) <= eps, by
// doubling and bisection on the monotone tail. For eps <= 0 it returns the
// first k where the tail underflows to 0.
func bound(d Distribution, eps float64) int {
	if eps >= 1 {
		return 0
	}
	if eps < 0 {
		eps = 0
	}
	ok := func(k int) bool { return d.Tail(k+1) <= eps }
	hi := int(math.Min(d.Mean()+10*math.Sqrt(d.Variance()), 1<<40)) + 1
	if hi < 1 {
		hi = 1
	}
	for !ok(hi) && hi < 1<<50 {
		hi *= 2
	}
	return sort.Search(hi+1, ok)
}

func clamp01(x float64) float64 {
	switch {
	case x < 0:
		return 0
	case x > 1:
		return 1
	}
	return x
}

// CompensatedSum is Neumaier's compensated summation (A. Neumaier,
// "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher Summen",
// ZAMM 54, 1974): the running sum of many terms of mixed size, accurate to
// about one rounding whatever their number. The zero value is the empty sum.
type CompensatedSum struct{ s, c float64 }

// Add adds x to the sum.
func (a *CompensatedSum) Add(x float64) {
	t := a.s + x
	if math.Abs(a.s) >= math.Abs(x) {
		a.c += (a.s - t) + x
	} else {
		a.c += (x - t) + a.s
	}
	a.s = t
}

// Value returns the sum.
func (a *CompensatedSum) Value() float64 { return a.s + a.c }

// sum is the package's short name for CompensatedSum.
type sum = CompensatedSum
