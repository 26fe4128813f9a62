package inventory

import (
	"math"
	"math/big"
	"testing"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// close reports whether got is within rel relative or abs absolute of want.
func near(got, want, rel, abs float64) bool {
	if got == want {
		return true
	}
	d := math.Abs(got - want)
	return d <= abs || d <= rel*math.Abs(want)
}

func mustDist(t *testing.T, spec string) Distribution {
	t.Helper()
	d, err := Parse(spec)
	if err != nil {
		t.Fatalf("Parse(%q): %v", spec, err)
	}
	return d
}

// Reference: gonum stat/distuv.Poisson (Prob, CDF) and mathext.GammaIncReg
// for the tail P(D >= k) = P(k, m) (Abramowitz and Stegun 1964, 26.4.21).
func TestPoissonAgainstGonum(t *testing.T) {
	for _, m := range []float64{0.3, 1, 4, 10, 57.5, 400} {
		d, err := NewPoisson(m)
		if err != nil {
			t.Fatal(err)
		}
		ref := distuv.Poisson{Lambda: m}
		hi := int(m + 12*math.Sqrt(m) + 20)
		for k := 0; k <= hi; k++ {
			x := float64(k)
			if got, want := d.PMF(k), ref.Prob(x); !near(got, want, 1e-12, 1e-300) {
				t.Errorf("poisson %v: PMF(%d) = %v, gonum %v", m, k, got, want)
			}
			if got, want := d.CDF(k), ref.CDF(x); !near(got, want, 1e-12, 1e-15) {
				t.Errorf("poisson %v: CDF(%d) = %v, gonum %v", m, k, got, want)
			}
			if k >= 1 {
				if got, want := d.Tail(k), mathext.GammaIncReg(x, m); !near(got, want, 1e-11, 1e-300) {
					t.Errorf("poisson %v: Tail(%d) = %v, gonum GammaIncReg %v", m, k, got, want)
				}
			}
		}
	}
}

// bigPoissonTail returns P(D >= k) for Poisson(m) as exp(-m) * sum_{j>=k}
// m^j/j! in 256-bit arithmetic: an independent reference for the far tail.
func bigPoissonTail(m float64, k int) float64 {
	prec := uint(256)
	mb := new(big.Float).SetPrec(prec).SetFloat64(m)
	term := new(big.Float).SetPrec(prec).SetFloat64(1)
	for j := 1; j <= k; j++ {
		term.Mul(term, mb)
		term.Quo(term, new(big.Float).SetPrec(prec).SetInt64(int64(j)))
	}
	s := new(big.Float).SetPrec(prec).Set(term)
	for j := k + 1; j < k+2000; j++ {
		term.Mul(term, mb)
		term.Quo(term, new(big.Float).SetPrec(prec).SetInt64(int64(j)))
		s.Add(s, term)
	}
	f, _ := s.Float64()
	return f * math.Exp(-m)
}

// bigPoissonCDF returns P(D <= k) the same way.
func bigPoissonCDF(m float64, k int) float64 {
	prec := uint(256)
	mb := new(big.Float).SetPrec(prec).SetFloat64(m)
	term := new(big.Float).SetPrec(prec).SetFloat64(1)
	s := new(big.Float).SetPrec(prec).SetFloat64(1)
	for j := 1; j <= k; j++ {
		term.Mul(term, mb)
		term.Quo(term, new(big.Float).SetPrec(prec).SetInt64(int64(j)))
		s.Add(s, term)
	}
	f, _ := s.Float64()
	return f * math.Exp(-m)
}

// The far tails must keep their relative accuracy; 1 - CDF would give 0.
func TestPoissonFarTails(t *testing.T) {
	for _, c := range []struct {
		m float64
		k int
	}{{10, 60}, {10, 100}, {4, 40}, {400, 600}, {400, 1000}, {0.5, 30}} {
		d, _ := NewPoisson(c.m)
		if got, want := d.Tail(c.k), bigPoissonTail(c.m, c.k); !near(got, want, 1e-12, 0) {
			t.Errorf("poisson %v: Tail(%d) = %v, 256-bit sum %v", c.m, c.k, got, want)
		}
	}
	for _, c := range []struct {
		m float64
		k int
	}{{400, 250}, {400, 100}, {100, 20}} {
		d, _ := NewPoisson(c.m)
		if got, want := d.CDF(c.k), bigPoissonCDF(c.m, c.k); !near(got, want, 1e-12, 0) {
			t.Errorf("poisson %v: CDF(%d) = %v, 256-bit sum %v", c.m, c.k, got, want)
		}
	}
}

// lgammaNegBin is the textbook pmf Gamma(k+r)/(Gamma(r) k!) p^r q^k through
// math.Lgamma (Johnson, Kemp and Kotz 2005, eq. 5.19): an independent formula.
func lgammaNegBin(k int, r, p float64) float64 {
	a, _ := math.Lgamma(float64(k) + r)
	b, _ := math.Lgamma(r)
	c, _ := math.Lgamma(float64(k) + 1)
	return math.Exp(a - b - c + r*math.Log(p) + float64(k)*math.Log1p(-p))
}

func TestNegBin(t *testing.T) {
	for _, c := range []struct{ m, v float64 }{{4, 9}, {10, 30}, {0.5, 0.7}, {2, 40}, {120, 150}, {25, 25.5}, {1e-3, 0.3}, {3, 3.01}} {
		d, err := NewNegBin(c.m, c.v)
		if err != nil {
			t.Fatal(err)
		}
		r, p := c.m*c.m/(c.v-c.m), c.m/c.v
		if !near(d.Size(), r, 1e-15, 0) || !near(d.Prob(), p, 1e-15, 0) {
			t.Errorf("negbin %v: size %v prob %v, want %v %v", c, d.Size(), d.Prob(), r, p)
		}
		hi := d.Bound(1e-25) + 2
		var s, m1, m2 sum
		for k := 0; k <= hi; k++ {
			pk := d.PMF(k)
			if want := lgammaNegBin(k, r, p); !near(pk, want, 1e-10, 1e-300) {
				t.Errorf("negbin %v: PMF(%d) = %v, lgamma formula %v", c, k, pk, want)
			}
			s.Add(pk)
			m1.Add(float64(k) * pk)
			m2.Add(float64(k) * float64(k) * pk)
			if k >= 1 {
				// Reference: gonum mathext.RegIncBeta, P(D >= k) = I_q(k, r)
				// (Johnson, Kemp and Kotz 2005, eq. 5.31).
				if got, want := d.Tail(k), mathext.RegIncBeta(float64(k), r, 1-p); !near(got, want, 1e-10, 1e-15) {
					t.Errorf("negbin %v: Tail(%d) = %v, gonum RegIncBeta %v", c, k, got, want)
				}
			}
			if got := d.CDF(k) + d.Tail(k+1); !near(got, 1, 0, 1e-14) {
				t.Errorf("negbin %v: CDF(%d)+Tail(%d) = %v", c, k, k+1, got)
			}
		}
		// The mean and variance of the parametrisation are M and V.
		if !near(s.Value(), 1, 0, 1e-13) {
			t.Errorf("negbin %v: pmf sums to %v", c, s.Value())
		}
		mean := m1.Value()
		if !near(mean, c.m, 1e-12, 0) || !near(m2.Value()-mean*mean, c.v, 1e-10, 0) {
			t.Errorf("negbin %v: summed mean %v variance %v", c, mean, m2.Value()-mean*mean)
		}
	}
}

// Far negbin tail against a log-space sum of the lgamma pmf.
func TestNegBinFarTail(t *testing.T) {
	d, _ := NewNegBin(10, 30)
	r, p := d.Size(), d.Prob()
	for _, k := range []int{100, 200, 400} {
		var s sum
		for j := k; j < k+3000; j++ {
			s.Add(lgammaNegBin(j, r, p))
		}
		if got, want := d.Tail(k), s.Value(); !near(got, want, 1e-10, 0) {
			t.Errorf("negbin Tail(%d) = %v, summed %v", k, got, want)
		}
	}
}

// Reference: gonum distuv.Normal and distuv.Gamma continuous CDFs and
// survival functions, with the discretisation of SPEC section 1. gonum's
// Normal.Survival is 1 - erf and loses the far tail, so the normal survival
// is taken as gonum's CDF reflected about the mean (symmetry).
type refNormal struct{ distuv.Normal }

func (n refNormal) Survival(x float64) float64 { return n.CDF(2*n.Mu - x) }

func TestDiscretisedAgainstGonum(t *testing.T) {
	type cont interface {
		CDF(float64) float64
		Survival(float64) float64
	}
	cases := []struct {
		spec string
		ref  cont
	}{
		{"normal:mean=10,sd=3", refNormal{distuv.Normal{Mu: 10, Sigma: 3}}},
		{"normal:mean=2,sd=5", refNormal{distuv.Normal{Mu: 2, Sigma: 5}}},
		{"normal:mean=1000,sd=50", refNormal{distuv.Normal{Mu: 1000, Sigma: 50}}},
		{"gamma:mean=10,sd=3", distuv.Gamma{Alpha: 100.0 / 9, Beta: 10.0 / 9}},
		{"gamma:mean=2,sd=5", distuv.Gamma{Alpha: 4.0 / 25, Beta: 2.0 / 25}},
		{"gamma:mean=300,sd=40", distuv.Gamma{Alpha: 300.0 * 300 / 1600, Beta: 300.0 / 1600}},
	}
	for _, c := range cases {
		d := mustDist(t, c.spec)
		hi := d.Bound(1e-16) + 3
		var m1 sum
		for k := 0; k <= hi; k++ {
			x := float64(k)
			want := c.ref.CDF(x+0.5) - c.ref.CDF(x-0.5)
			if k == 0 {
				want = c.ref.CDF(0.5)
			} else if x-0.5 > 0 && c.ref.Survival(x-0.5) < 0.5 {
				want = c.ref.Survival(x-0.5) - c.ref.Survival(x+0.5)
			}
			if got := d.PMF(k); !near(got, want, 1e-10, 1e-17) {
				t.Errorf("%s: PMF(%d) = %v, gonum %v", c.spec, k, got, want)
			}
			if got, want := d.CDF(k), c.ref.CDF(x+0.5); !near(got, want, 1e-12, 1e-16) {
				t.Errorf("%s: CDF(%d) = %v, gonum %v", c.spec, k, got, want)
			}
			if k >= 1 {
				if got, want := d.Tail(k), c.ref.Survival(x-0.5); !near(got, want, 1e-11, 1e-300) {
					t.Errorf("%s: Tail(%d) = %v, gonum survival %v", c.spec, k, got, want)
				}
			}
			m1.Add(x * want)
		}
		// The discretised mean, summed independently from gonum's CDF.
		if got := d.Mean(); !near(got, m1.Value(), 1e-12, 0) {
			t.Errorf("%s: Mean = %v, summed from gonum %v", c.spec, got, m1.Value())
		}
	}
}

// For a normal far from 0 with sd >= 4 the discretised moments are mu and
// sigma^2 + 1/12 (Sheppard 1898); check the closed forms against the sum.
func TestNormalSheppard(t *testing.T) {
	for _, c := range []struct{ mu, sd float64 }{{400, 5}, {1000, 20}, {3000, 4}} {
		d, _ := NewNormal(c.mu, c.sd)
		lo, hi := int(c.mu-14*c.sd), int(c.mu+14*c.sd)
		m, v := moments(d, lo, hi)
		if !near(d.Mean(), m, 1e-14, 0) || !near(d.Variance(), v, 1e-12, 0) {
			t.Errorf("normal %v: closed form %v %v, summed %v %v", c, d.Mean(), d.Variance(), m, v)
		}
	}
	// The gamma's closed form (NewGamma) against the sum over its support.
	for _, c := range []struct{ mu, sd float64 }{{300, 40}, {1e4, 500}, {80, 12}} {
		d, _ := NewGamma(c.mu, c.sd)
		if d.Mean() != c.mu || d.Variance() != c.sd*c.sd+1.0/12 {
			t.Errorf("gamma %v: closed form not taken (mean %v var %v)", c, d.Mean(), d.Variance())
		}
		lo, hi := int(c.mu-20*c.sd), int(c.mu+30*c.sd)
		if lo < 0 {
			lo = 0
		}
		m, v := moments(d, lo, hi)
		if !near(d.Mean(), m, 1e-14, 0) || !near(d.Variance(), v, 1e-12, 0) {
			t.Errorf("gamma %v: closed form %v %v, summed %v %v", c, d.Mean(), d.Variance(), m, v)
		}
	}
}

// Wide normals and gammas take their moments from the Euler-Maclaurin
// formula (normalLeft, Gamma.wideMoments); check against the plain sums.
func TestWideMoments(t *testing.T) {
	for _, spec := range []string{"gamma:mean=700,sd=700", "gamma:mean=1500,sd=1000", "gamma:mean=60,sd=200", "normal:mean=10,sd=2000", "normal:mean=2000,sd=1000"} {
		d := mustDist(t, spec)
		lo := 0
		if n, ok := d.(Normal); ok && n.Mu() > 13*n.Sigma() {
			lo = int(n.Mu() - 13*n.Sigma())
		}
		m, v := moments(d, lo, d.Bound(1e-30)+1)
		if !near(d.Mean(), m, 1e-13, 0) || !near(d.Variance(), v, 1e-12, 0) {
			t.Errorf("%s: mean %v var %v, summed %v %v", spec, d.Mean(), d.Variance(), m, v)
		}
	}
}

// Every family: pmf sums to 1, CDF(k) + Tail(k+1) = 1, summed moments
// agree with Mean and Variance, and Bound is the least k with tail <= eps.
func TestFamiliesConsistent(t *testing.T) {
	specs := []string{
		"poisson:mean=0.2", "poisson:mean=7", "poisson:mean=400",
		"negbin:mean=3,var=12", "negbin:mean=50,var=51",
		"normal:mean=0.5,sd=2", "normal:mean=30,sd=6", "normal:mean=3,sd=10", "normal:mean=60,sd=5",
		"gamma:mean=0.8,sd=2", "gamma:mean=40,sd=10",
		"pmf:0=0.1,1=0.3,2=0.6", "pmf:3=1",
	}
	for _, spec := range specs {
		d := mustDist(t, spec)
		hi := d.Bound(1e-17) + 2
		var s, m1, m2 sum
		for k := 0; k <= hi; k++ {
			pk := d.PMF(k)
			if pk < 0 || pk > 1 {
				t.Errorf("%s: PMF(%d) = %v", spec, k, pk)
			}
			s.Add(pk)
			m1.Add(float64(k) * pk)
			m2.Add(float64(k) * float64(k) * pk)
			if got := d.CDF(k) + d.Tail(k+1); !near(got, 1, 0, 1e-14) {
				t.Errorf("%s: CDF(%d)+Tail(%d) = %v", spec, k, k+1, got)
			}
		}
		if !near(s.Value(), 1, 0, 1e-13) {
			t.Errorf("%s: pmf sums to %v", spec, s.Value())
		}
		mean := m1.Value()
		if !near(mean, d.Mean(), 1e-12, 1e-15) || !near(m2.Value()-mean*mean, d.Variance(), 1e-9, 1e-12) {
			t.Errorf("%s: summed mean %v var %v, methods %v %v", spec, mean, m2.Value()-mean*mean, d.Mean(), d.Variance())
		}
		for _, eps := range []float64{0.5, 1e-3, 1e-9, 1e-12} {
			b := d.Bound(eps)
			if d.Tail(b+1) > eps || (b > 0 && d.Tail(b) <= eps) {
				t.Errorf("%s: Bound(%g) = %d, Tail(b) %v Tail(b+1) %v", spec, eps, b, d.Tail(b), d.Tail(b+1))
			}
		}
		if d.PMF(-1) != 0 || d.CDF(-1) != 0 || d.Tail(0) != 1 || d.Tail(-5) != 1 {
			t.Errorf("%s: wrong values off the support", spec)
		}
	}
}

func TestNewPMF(t *testing.T) {
	d, err := NewPMF([]float64{0.25, 0, 0.5, 0.25 + 4e-10, 0, 0})
	if err != nil {
		t.Fatal(err)
	}
	if d.Len() != 4 {
		t.Errorf("Len = %d, want 4 (trailing zeros trimmed)", d.Len())
	}
	var s sum
	for k := 0; k < d.Len(); k++ {
		s.Add(d.PMF(k))
	}
	if !near(s.Value(), 1, 0, 2e-16) {
		t.Errorf("renormalised pmf sums to %v", s.Value())
	}
	if d.String() != "pmf:0=0.25,2=0.5,3=0.2500000004" {
		t.Errorf("String = %q", d.String())
	}
	for _, bad := range [][]float64{{0.5, 0.4}, {1.1, -0.1}, {math.NaN(), 1}, {}} {
		if _, err := NewPMF(bad); err == nil {
			t.Errorf("NewPMF(%v) accepted", bad)
		}
	}
	if _, err := NewPMFMap(map[int]float64{-1: 1}); err == nil {
		t.Errorf("NewPMFMap with a negative support point accepted")
	}
}
