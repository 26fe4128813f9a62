package history

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mathext"

	"ergostock/inventory"
)

// The model names of the candidates, in the order they are tried; on equal
// AICc the earlier one is chosen.
const (
	ModelPoisson = "poisson"
	ModelNegBin  = "negbin"
	ModelNormal  = "normal"
	ModelGamma   = "gamma"
	ModelPMF     = "pmf"
)

// ShortHistory is the number of periods below which a fit is warned about.
const ShortHistory = 13

// TrendLevel is the significance level of the trend test.
const TrendLevel = 0.05

// ErrNoDemand is wrapped by the error of a fit to a series without any
// demand: no distribution with a positive mean fits it.
var ErrNoDemand = errors.New("no demand")

// ErrNoPeriods is wrapped by the error of a fit to an empty series.
var ErrNoPeriods = errors.New("no periods")

// Candidate is one model fitted to a series by maximum likelihood.
type Candidate struct {
	Model         string // ModelPoisson, ...
	Params        int    // k, the number of fitted parameters
	LogLikelihood float64
	// AIC is Akaike's information criterion 2k - 2 log L (H. Akaike, "A new
	// look at the statistical model identification", IEEE Transactions on
	// Automatic Control 19(6), 716-723, 1974).
	AIC float64
	// AICc is AIC with the small-sample correction 2k(k+1)/(n-k-1) of
	// C. M. Hurvich and C.-L. Tsai, "Regression and time series model
	// selection in small samples", Biometrika 76(2), 297-307 (1989); +Inf
	// when n <= k+1. It tends to AIC as n grows.
	AICc float64
	// Demand is the fitted distribution; it is built for the chosen
	// candidate only (constructing a discretised law costs more than
	// fitting it), and for the others on a call of Build.
	Demand inventory.Distribution
	build  func() (inventory.Distribution, error)
}

// Build returns the fitted distribution, constructing it if need be.
func (c *Candidate) Build() (inventory.Distribution, error) {
	if c.Demand != nil {
		return c.Demand, nil
	}
	if c.build == nil {
		return nil, fmt.Errorf("%s: no fitted parameters", c.Model)
	}
	d, err := c.build()
	if err != nil {
		return nil, err
	}
	c.Demand = d
	return d, nil
}

// Summary is the fit of one series: its figures, the candidates, the chosen
// model and the warnings a planner should see.
type Summary struct {
	Stats
	Candidates []Candidate
	Chosen     int                    // index into Candidates; -1 when none
	Demand     inventory.Distribution // Candidates[Chosen].Demand, or nil
	Warnings   []string
}

// Model returns the name of the chosen model, or "" when none.
func (s *Summary) Model() string {
	if s.Chosen < 0 || s.Chosen >= len(s.Candidates) {
		return ""
	}
	return s.Candidates[s.Chosen].Model
}

// hist is a series as its distinct values v (ascending) and their counts.
type hist struct {
	v, c []int
	n    int
	mean float64
	m2   float64 // population variance, sum (y - mean)² / n
}

func newHist(y []int) hist {
	s := slices.Clone(y)
	slices.Sort(s)
	var h hist
	for i, x := range s {
		if i == 0 || x != s[i-1] {
			h.v = append(h.v, x)
			h.c = append(h.c, 0)
		}
		h.c[len(h.c)-1]++
	}
	h.n = len(y)
	var sum float64
	for _, x := range y {
		sum += float64(x)
	}
	h.mean = sum / float64(h.n)
	for i, x := range h.v {
		d := float64(x) - h.mean
		h.m2 += float64(h.c[i]) * d * d
	}
	h.m2 /= float64(h.n)
	return h
}

// Fit summarises a series of demand per period and fits the candidate
// models, each by maximum likelihood:
//
//   - poisson: the MLE of the mean is the sample mean.
//   - negbin: the mean's MLE is the sample mean; the size r solves the
//     profile score equation sum_i [psi(y_i+r) - psi(r)] = n log(1 + mean/r)
//     (Anscombe 1950, Biometrika 37), which has a finite root exactly when
//     the variance with divisor n exceeds the mean (Levin and Reeds 1977,
//     Annals of Statistics 5(1)); otherwise negbin is not a candidate.
//   - normal and gamma, discretised as P(0) = F(0.5), P(k) = F(k+1/2) -
//     F(k-1/2): the discretised likelihood maximised over (mean, log sd)
//     by Nelder-Mead from the moment estimates.
//   - pmf: the empirical frequencies, with one parameter fewer than the
//     number of distinct values.
//
// The model of least AICc, Akaike's criterion with the small-sample
// correction of Hurvich and Tsai (1989), is chosen. Plain AIC undercounts
// the cost of the empirical pmf, whose parameters grow with the number of
// distinct values: on a 104-week erratic series with 70 distinct weekly
// totals it would pick the pmf, which memorises the sample and rules out
// every total not yet seen. AICc penalises exactly that and agrees with
// AIC when the parameters are few. A series without demand returns the
// figures and an error wrapping ErrNoDemand; an empty one, ErrNoPeriods.
//
// The empirical pmf is a candidate only while the largest demand of a
// period is at most inventory.MaxSupport (it allocates one probability per
// value up to it); beyond, a warning says so.
func Fit(y []int) (Summary, error) { return fit(y, "") }

// fit is Fit; where names the rows of the largest demand in the pmf
// warning.
func fit(y []int, where string) (Summary, error) {
	s := Summary{Stats: Summarize(y), Chosen: -1}
	if len(y) == 0 {
		return s, fmt.Errorf("%w: an empty series", ErrNoPeriods)
	}
	if s.Periods < ShortHistory {
		s.Warnings = append(s.Warnings, fmt.Sprintf("short history: %d periods, fewer than %d", s.Periods, ShortHistory))
	}
	if s.Total == 0 {
		return s, fmt.Errorf("%w in %d periods: no model to fit", ErrNoDemand, s.Periods)
	}
	if s.Trend.P < TrendLevel {
		s.Warnings = append(s.Warnings, fmt.Sprintf("trend: %+.3g per period (p = %.2g)", s.Trend.Slope, s.Trend.P))
	}
	h := newHist(y)
	add := func(c Candidate, err error) {
		if err != nil || math.IsNaN(c.LogLikelihood) || math.IsInf(c.LogLikelihood, 0) || c.build == nil {
			return
		}
		k, n := float64(c.Params), float64(h.n)
		c.AIC = 2*k - 2*c.LogLikelihood
		c.AICc = math.Inf(1)
		if n-k-1 > 0 {
			c.AICc = c.AIC + 2*k*(k+1)/(n-k-1)
		}
		s.Candidates = append(s.Candidates, c)
	}
	add(fitPoisson(h))
	if h.m2 > h.mean {
		add(fitNegBin(h))
	}
	if len(h.v) > 1 {
		add(fitNormal(h))
		add(fitGamma(h))
	}
	if top := h.v[len(h.v)-1]; top > inventory.MaxSupport {
		s.Warnings = append(s.Warnings, fmt.Sprintf("no pmf candidate: the largest demand of a period, %d%s, is beyond the pmf limit of %d", top, where, inventory.MaxSupport))
	} else {
		add(fitPMF(h))
	}
	// Build the best candidate; should its constructor refuse the fitted
	// parameters, drop it and take the next best.
	var buildErr error
	for len(s.Candidates) > 0 {
		i := choose(s.Candidates)
		d, err := s.Candidates[i].Build()
		if err == nil {
			s.Chosen, s.Demand = i, d
			break
		}
		buildErr = err
		s.Candidates = append(s.Candidates[:i], s.Candidates[i+1:]...)
	}
	if s.Chosen < 0 {
		return s, fmt.Errorf("no candidate model could be fitted to %d periods (the largest demand of a period is %d%s): %w", s.Periods, h.v[len(h.v)-1], where, buildErr)
	}
	if len(h.v) == 1 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("constant demand: %d every period", h.v[0]))
	}
	return s, nil
}

// choose returns the index of the candidate of least AICc, or of least AIC
// when no AICc is finite (n <= k+1 for every candidate); the first on ties.
func choose(cs []Candidate) int {
	best := -1
	for i, c := range cs {
		if best < 0 || c.AICc < cs[best].AICc {
			best = i
		}
	}
	if best >= 0 && math.IsInf(cs[best].AICc, 1) {
		best = -1
		for i, c := range cs {
			if best < 0 || c.AIC < cs[best].AIC {
				best = i
			}
		}
	}
	return best
}

// Fit fits the SKU's series (see the function Fit) and adds warnings for
// its bad rows and for the rows left out of its series (the first three,
// then a count). A SKU with an Err returns it; a SKU whose every row was
// bad returns an error naming the first of them.
func (k *SKU) Fit() (Summary, error) {
	if k.Err != nil {
		return Summary{Stats: Summarize(nil), Chosen: -1}, k.Err
	}
	if k.Records == 0 && len(k.Errors) > 0 {
		s := Summary{Stats: Summarize(nil), Chosen: -1}
		return s, fmt.Errorf("no usable rows (%d bad, first %w)", len(k.Errors), k.Errors[0])
	}
	where := ""
	if k.peakLine > 0 {
		where = fmt.Sprintf(" (its rows start at %s:%d)", k.peakFile, k.peakLine)
	}
	s, err := fit(k.Demand, where)
	switch len(k.Errors) {
	case 0:
	case 1:
		s.Warnings = append(s.Warnings, "bad row skipped: "+k.Errors[0].Error())
	default:
		s.Warnings = append(s.Warnings, fmt.Sprintf("%d bad rows skipped, first %v", len(k.Errors), k.Errors[0]))
	}
	if k.unit != "" {
		s.Warnings = append(s.Warnings, k.unit)
	}
	switch {
	case k.Returns > 0 && k.ReturnsMode == ReturnsIgnore:
		s.Warnings = append(s.Warnings, fmt.Sprintf("returns ignored: %d rows with negative quantities (%d units) left out of the demand (--returns net nets them)", k.Returns, k.ReturnUnits))
	case k.Returns > 0 && k.ReturnsMode == ReturnsNet:
		s.Warnings = append(s.Warnings, fmt.Sprintf("returns netted: %d rows (%d units) subtracted within their periods, floored at 0", k.Returns, k.ReturnUnits))
	}
	for i, o := range k.LeftOut {
		if i == 3 {
			s.Warnings = append(s.Warnings, fmt.Sprintf("%d more dates left out, the last %v", len(k.LeftOut)-3, k.LeftOut[len(k.LeftOut)-1]))
			break
		}
		s.Warnings = append(s.Warnings, o.String())
	}
	return s, err
}

func fitPoisson(h hist) (Candidate, error) {
	m := h.mean
	ll := 0.0
	lm := math.Log(m)
	for i, v := range h.v {
		lg, _ := math.Lgamma(float64(v) + 1)
		ll += float64(h.c[i]) * (float64(v)*lm - m - lg)
	}
	return Candidate{Model: ModelPoisson, Params: 1, LogLikelihood: ll,
		build: func() (inventory.Distribution, error) { return newPoisson(m) }}, nil
}

// psiDiff returns psi(r+v) - psi(r) = sum_{j<v} 1/(r+j).
func psiDiff(r float64, v int) float64 {
	if v <= 64 {
		s := 0.0
		for j := v - 1; j >= 0; j-- {
			s += 1 / (r + float64(j))
		}
		return s
	}
	return mathext.Digamma(r+float64(v)) - mathext.Digamma(r)
}

// lgammaDiff returns log Gamma(r+v) - log Gamma(r) = sum_{j<v} log(r+j).
func lgammaDiff(r float64, v int) float64 {
	if v <= 64 {
		s := 0.0
		for j := 0; j < v; j++ {
			s += math.Log(r + float64(j))
		}
		return s
	}
	a, _ := math.Lgamma(r + float64(v))
	b, _ := math.Lgamma(r)
	return a - b
}

// negBinScore is the derivative in r of the profile log-likelihood of the
// negative binomial with mean fixed at the sample mean.
func negBinScore(h hist, r float64) float64 {
	s := 0.0
	for i, v := range h.v {
		if v > 0 {
			s += float64(h.c[i]) * psiDiff(r, v)
		}
	}
	return s - float64(h.n)*math.Log1p(h.mean/r)
}

// negBinLogL is the log-likelihood of the negative binomial with size r
// and mean m: P(y) = Gamma(y+r)/(Gamma(r) y!) (r/(r+m))^r (m/(r+m))^y.
func negBinLogL(h hist, r, m float64) float64 {
	lp := math.Log(r / (r + m))
	lq := math.Log(m / (r + m))
	ll := 0.0
	for i, v := range h.v {
		lf, _ := math.Lgamma(float64(v) + 1)
		ll += float64(h.c[i]) * (lgammaDiff(r, v) - lf + r*lp + float64(v)*lq)
	}
	return ll
}

func fitNegBin(h hist) (Candidate, error) {
	m := h.mean
	r0 := m * m / (h.m2 - m) // the moment estimate
	f := func(lr float64) float64 { return negBinScore(h, math.Exp(lr)) }
	lo, hi := math.Log(r0), math.Log(r0)
	flo, fhi := f(lo), f(hi)
	for i := 0; flo <= 0 && i < 60; i++ {
		lo -= 1.5
		flo = f(lo)
	}
	for i := 0; fhi >= 0 && i < 60; i++ {
		hi += 1.5
		fhi = f(hi)
	}
	if flo <= 0 || fhi >= 0 {
		return Candidate{}, errors.New("negbin: no sign change of the score")
	}
	r := math.Exp(brentRoot(f, lo, hi, flo, fhi, 1e-10, 200))
	return Candidate{Model: ModelNegBin, Params: 2, LogLikelihood: negBinLogL(h, r, m),
		build: func() (inventory.Distribution, error) { return newNegBin(m, m+m*m/r) }}, nil
}

// discLogL is the log-likelihood of the series under the discretisation
// P(0) = F(0.5), P(k) = F(k+1/2) - F(k-1/2) of a continuous law whose CDF
// and survival function at x are given by cdf(x) and sf(x); logPdf is a
// fallback log density used where the difference underflows. Below the
// split point mid (the law's mean) differences are taken of the CDF, above
// it of the survival function, so that no small probability is formed as
// the difference of numbers near 1; each boundary k+1/2 is evaluated once.
func discLogL(h hist, mid float64, cdf, sf func(float64) float64, logPdf func(float64) float64) float64 {
	// at returns F(x) for x <= mid, else 1 - F(x) = sf(x); upper tells which.
	at := func(x float64) (float64, bool) {
		if x <= mid {
			return cdf(x), false
		}
		return sf(x), true
	}
	ll := 0.0
	prevX := math.NaN()
	var prevV float64
	var prevUp bool
	for i, v := range h.v {
		x := float64(v)
		var p float64
		hiV, hiUp := at(x + 0.5)
		if v == 0 {
			p = hiV
			if hiUp {
				p = 1 - hiV
			}
		} else {
			var loV float64
			var loUp bool
			if prevX == x-0.5 {
				loV, loUp = prevV, prevUp
			} else {
				loV, loUp = at(x - 0.5)
			}
			switch {
			case !loUp && !hiUp:
				p = hiV - loV
			case loUp && hiUp:
				p = loV - hiV
			default: // the interval holds mid: a central, not small, probability
				p = 1 - loV - hiV
			}
		}
		prevX, prevV, prevUp = x+0.5, hiV, hiUp
		var lp float64
		if p > 1e-280 {
			lp = math.Log(p)
		} else {
			lp = logPdf(x)
		}
		ll += float64(h.c[i]) * lp
	}
	return ll
}

// Nelder-Mead settings: the log-likelihood is maximised to 1e-6 absolute,
// in at most 300 evaluations.
const (
	nmFtol    = 1e-6
	nmXtol    = 1e-4
	nmMaxEval = 300
)

func normalLogL(h hist, mu, sd float64) float64 {
	z := func(x float64) float64 { return (x - mu) / sd }
	return discLogL(h, mu,
		func(x float64) float64 { return 0.5 * math.Erfc(-z(x)/math.Sqrt2) },
		func(x float64) float64 { return 0.5 * math.Erfc(z(x)/math.Sqrt2) },
		func(x float64) float64 { return -z(x)*z(x)/2 - math.Log(sd) - 0.5*math.Log(2*math.Pi) })
}

func fitNormal(h hist) (Candidate, error) {
	// Start from the moments with Sheppard's correction for grouping,
	// var - 1/12 (W. F. Sheppard, Proc. London Math. Soc. 29, 1898).
	sd0 := math.Sqrt(math.Max(h.m2-1.0/12, h.m2/2))
	mu, lsd, f, _ := nelderMead2(func(mu, lsd float64) float64 {
		return -normalLogL(h, mu, math.Exp(lsd))
	}, h.mean, math.Log(sd0), 0.05*sd0, 0.05, nmFtol, nmXtol, nmMaxEval)
	if !(mu > 0) {
		return Candidate{}, fmt.Errorf("normal: fitted mean %g, want > 0", mu)
	}
	sd := math.Exp(lsd)
	return Candidate{Model: ModelNormal, Params: 2, LogLikelihood: -f,
		build: func() (inventory.Distribution, error) { return newNormal(mu, sd) }}, nil
}

// gammaLogL is the discretised gamma log-likelihood with shape a = (m/sd)²
// and rate b = m/sd², from the regularised incomplete gamma function.
func gammaLogL(h hist, m, sd float64) float64 {
	a := m * m / (sd * sd)
	b := m / (sd * sd)
	lga, _ := math.Lgamma(a)
	return discLogL(h, m,
		func(x float64) float64 { return mathext.GammaIncReg(a, b*x) },
		func(x float64) float64 { return mathext.GammaIncRegComp(a, b*x) },
		func(x float64) float64 { return a*math.Log(b) + (a-1)*math.Log(x) - b*x - lga })
}

// Gauss-Legendre rules on [-1, 1] with 3, 4 and 6 points (Abramowitz and
// Stegun, Handbook of Mathematical Functions, 1964, table 25.4).
var (
	gl3Node   = []float64{-0.7745966692414834, 0, 0.7745966692414834}
	gl3Weight = []float64{0.5555555555555556, 0.8888888888888888, 0.5555555555555556}
	gl4Node   = []float64{-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526}
	gl4Weight = []float64{0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538}
	gl6Node   = []float64{-0.9324695142031521, -0.6612093864662645, -0.2386191860831909, 0.2386191860831909, 0.6612093864662645, 0.9324695142031521}
	gl6Weight = []float64{0.1713244923791704, 0.3607615730481386, 0.4679139345726910, 0.4679139345726910, 0.3607615730481386, 0.1713244923791704}
)

// gammaQuad evaluates gammaLogL with P(k), k >= 1, integrated by a
// Gauss-Legendre rule over [k-1/2, k+1/2]; it serves inside the optimiser,
// where the incomplete gamma function would dominate the cost. The density
// is analytic on each interval and its one singularity, x = 0, lies 2k
// half-widths from the interval's centre, so an n-point rule has relative
// error about rho^-2n with rho = 2k + sqrt(4k²-1) (the bound of Gauss
// quadrature for functions analytic inside a Bernstein ellipse; P. J. Davis
// and P. Rabinowitz, "Methods of Numerical Integration", 2nd ed., 1984,
// section 4.6): 6 points for k = 1 (1e-7), 4 for k = 2..5 (7e-8), 3 beyond
// (5e-9), provided the density does not vary on a scale finer than the
// interval, hence sd >= 2; otherwise the exact form is used. These errors
// shift the optimum by a negligible amount; the likelihood reported for the
// fitted parameters is always the exact one.
//
// With x = k + t/2 at node t, the density ratio f(x)/f(k) is
// exp((a-1) log(1 + t/2k) - b t/2): the logarithms depend on the data only
// and are computed once per series.
type gammaQuad struct {
	h    hist
	logk []float64   // log k per distinct value (0 for k = 0)
	lr   [][]float64 // log(1 + t_j/2k) per distinct value and node
	rule [][]float64 // the nodes used for each distinct value
	wt   [][]float64 // and their weights
}

func newGammaQuad(h hist) *gammaQuad {
	q := &gammaQuad{h: h, logk: make([]float64, len(h.v)), lr: make([][]float64, len(h.v)),
		rule: make([][]float64, len(h.v)), wt: make([][]float64, len(h.v))}
	for i, v := range h.v {
		if v == 0 {
			continue
		}
		node, weight := gl3Node, gl3Weight
		switch {
		case v == 1:
			node, weight = gl6Node, gl6Weight
		case v <= 5:
			node, weight = gl4Node, gl4Weight
		}
		k := float64(v)
		q.logk[i] = math.Log(k)
		q.rule[i], q.wt[i] = node, weight
		q.lr[i] = make([]float64, len(node))
		for j, t := range node {
			q.lr[i][j] = math.Log1p(t / (2 * k))
		}
	}
	return q
}

func (q *gammaQuad) logL(m, sd float64) float64 {
	if sd < 2 {
		return gammaLogL(q.h, m, sd)
	}
	a := m * m / (sd * sd)
	b := m / (sd * sd)
	lga, _ := math.Lgamma(a)
	lnorm := a*math.Log(b) - lga
	var e3, e4, e6 [6]float64 // exp(-b t/2) per node of each rule
	for j, t := range gl3Node {
		e3[j] = -b * t / 2
	}
	for j, t := range gl4Node {
		e4[j] = -b * t / 2
	}
	for j, t := range gl6Node {
		e6[j] = -b * t / 2
	}
	h := q.h
	ll := 0.0
	for i, v := range h.v {
		var lp float64
		if v == 0 {
			lp = math.Log(mathext.GammaIncReg(a, 0.5*b))
		} else {
			var bt []float64
			switch len(q.rule[i]) {
			case 3:
				bt = e3[:3]
			case 4:
				bt = e4[:4]
			default:
				bt = e6[:6]
			}
			s := 0.0
			for j, w := range q.wt[i] {
				s += w * math.Exp((a-1)*q.lr[i][j]+bt[j])
			}
			k := float64(v)
			lp = lnorm + (a-1)*q.logk[i] - b*k + math.Log(0.5*s)
		}
		ll += float64(h.c[i]) * lp
	}
	return ll
}

func fitGamma(h hist) (Candidate, error) {
	q := newGammaQuad(h)
	lm, lsd, _, _ := nelderMead2(func(lm, lsd float64) float64 {
		return -q.logL(math.Exp(lm), math.Exp(lsd))
	}, math.Log(h.mean), math.Log(math.Sqrt(h.m2)), 0.05, 0.05, nmFtol, nmXtol, nmMaxEval)
	m, sd := math.Exp(lm), math.Exp(lsd)
	return Candidate{Model: ModelGamma, Params: 2, LogLikelihood: gammaLogL(h, m, sd),
		build: func() (inventory.Distribution, error) { return newGamma(m, sd) }}, nil
}

func fitPMF(h hist) (Candidate, error) {
	top := h.v[len(h.v)-1]
	if top > inventory.MaxSupport {
		return Candidate{}, fmt.Errorf("pmf: demand %d beyond the largest support point %d", top, inventory.MaxSupport)
	}
	ll := 0.0
	for i := range h.v {
		q := float64(h.c[i]) / float64(h.n)
		ll += float64(h.c[i]) * math.Log(q)
	}
	return Candidate{Model: ModelPMF, Params: len(h.v) - 1, LogLikelihood: ll,
		build: func() (inventory.Distribution, error) {
			p := make([]float64, top+1)
			for i, v := range h.v {
				p[v] = float64(h.c[i]) / float64(h.n)
			}
			return newPMF(p)
		}}, nil
}
