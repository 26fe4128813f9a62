package inventory

import (
	"fmt"
	"math"
	"math/big"
	"testing"
)

// bruteLoss sums E[(X-y)^+] and E[(y-X)^+] over the pmf p directly.
func bruteLoss(pmf []float64, y int) (over, under float64) {
	var o, u sum
	for k, p := range pmf {
		if k > y {
			o.Add(float64(k-y) * p)
		} else {
			u.Add(float64(y-k) * p)
		}
	}
	return o.Value(), u.Value()
}

func TestLossTableBruteForce(t *testing.T) {
	for _, c := range []struct {
		spec   string
		lo, hi int
	}{
		{"poisson:mean=4", -3, 40},
		{"poisson:mean=400", 300, 520},
		{"negbin:mean=6,var=30", 0, 150},
		{"normal:mean=20,sd=4", -2, 60},
		{"gamma:mean=3,sd=5", 0, 120},
		{"pmf:0=0.2,1=0.5,3=0.3", -1, 8},
	} {
		d := mustDist(t, c.spec)
		lt, err := NewLossTable(d, c.lo, c.hi)
		if err != nil {
			t.Fatal(err)
		}
		pmf := make([]float64, d.Bound(1e-300)+10)
		for k := range pmf {
			pmf[k] = d.PMF(k)
		}
		for y := c.lo; y <= c.hi; y++ {
			over, under := bruteLoss(pmf, y)
			if got := lt.Over(y); !near(got, over, 1e-12, 1e-300) {
				t.Errorf("%s: Over(%d) = %v, brute force %v", c.spec, y, got, over)
			}
			if got := lt.Under(y); !near(got, under, 1e-12, 1e-300) {
				t.Errorf("%s: Under(%d) = %v, brute force %v", c.spec, y, got, under)
			}
			if lt.CDF(y) != d.CDF(y) || !near(lt.Tail(y), d.Tail(y), 1e-15, 0) {
				t.Errorf("%s: CDF or Tail at %d differ from the distribution", c.spec, y)
			}
			// Over - Under = E[X] - y (the defining identity).
			if got := lt.Over(y) - lt.Under(y); !near(got, d.Mean()-float64(y), 1e-12, 1e-12) {
				t.Errorf("%s: Over-Under at %d = %v, want %v", c.spec, y, got, d.Mean()-float64(y))
			}
		}
		if !math.IsNaN(lt.Over(c.hi+1)) || lt.In(c.lo-1) {
			t.Errorf("%s: values outside the table should be NaN", c.spec)
		}
		o, u, err := Loss(d, c.hi)
		if err != nil || o != lt.Over(c.hi) || u != lt.Under(c.hi) {
			t.Errorf("%s: Loss(%d) = %v %v %v, table %v %v", c.spec, c.hi, o, u, err, lt.Over(c.hi), lt.Under(c.hi))
		}
	}
	if _, err := NewLossTable(mustDist(t, "poisson:mean=1"), 5, 4); err == nil {
		t.Errorf("NewLossTable with hi < lo accepted")
	}
}

// Far above the mean the suffix sum keeps relative accuracy: Poisson(10)
// at y = 60 against exp(-10) sum_{j>y} (j-y) 10^j/j! in 256-bit arithmetic.
func TestLossFarTail(t *testing.T) {
	d, _ := NewPoisson(10)
	over, _, err := Loss(d, 60)
	if err != nil {
		t.Fatal(err)
	}
	const prec = 256
	term := new(big.Float).SetPrec(prec).SetFloat64(1)
	s := new(big.Float).SetPrec(prec)
	ten := new(big.Float).SetPrec(prec).SetFloat64(10)
	for j := 1; j < 400; j++ {
		term.Mul(term, ten)
		term.Quo(term, new(big.Float).SetPrec(prec).SetInt64(int64(j)))
		if j > 60 {
			s.Add(s, new(big.Float).SetPrec(prec).Mul(term, new(big.Float).SetInt64(int64(j-60))))
		}
	}
	want, _ := s.Float64()
	want *= math.Exp(-10)
	if !near(over, want, 1e-12, 0) {
		t.Errorf("Over(60) = %v, 256-bit sum %v", over, want)
	}
}

// Handbook values of G(z) to four decimals, as tabulated in standard
// inventory texts (Silver, Pyke and Peterson 1998, Appendix III; values
// quoted from memory), and the identity G(z) - G(-z) = -z.
func TestNormalLoss(t *testing.T) {
	for _, c := range []struct{ z, g float64 }{
		{0, 0.3989}, {0.5, 0.1978}, {1, 0.0833}, {1.5, 0.0293}, {2, 0.0085}, {3, 0.0004},
	} {
		if got := NormalLoss(c.z); math.Abs(got-c.g) > 0.00005 {
			t.Errorf("G(%v) = %.6f, table %.4f", c.z, got, c.g)
		}
	}
	for _, z := range []float64{0.1, 1, 2.5, 2.999, 3, 3.001, 4, 6} {
		if got := NormalLoss(-z) - NormalLoss(z); !near(got, z, 1e-15, 0) {
			t.Errorf("G(-%v) - G(%v) = %v", z, z, got)
		}
	}
	// Continuity across the switch to the continued fraction at z = 3,
	// and the far tail against G(z) = integral of the survival, here the
	// asymptotic phi(z)/z^2 (1 - 3/z^2 + 15/z^4 - 105/z^6), from the
	// asymptotic series of the Mills ratio (Abramowitz and Stegun 26.2.12).
	if a, b := NormalLoss(math.Nextafter(3, 0)), NormalLoss(3); !near(a, b, 1e-13, 0) {
		t.Errorf("G jumps at 3: %v vs %v", a, b)
	}
	for _, z := range []float64{20, 30} {
		phi := math.Exp(-z*z/2) / math.Sqrt(2*math.Pi)
		want := phi / (z * z) * (1 - 3/(z*z) + 15/math.Pow(z, 4) - 105/math.Pow(z, 6))
		if got := NormalLoss(z); !near(got, want, 1e-7, 0) {
			t.Errorf("G(%v) = %v, asymptotic %v", z, got, want)
		}
	}
}

// The discretised normal's E[(X-y)^+] against sigma G((y-mu)/sigma). With
// D = round(X) (mu = 1000 puts no mass below 0), E[(D-y)^+] =
// sum_{j>=0} P(D > y+j) = sum_{j>=0} S(y+j+1/2), S the normal survival
// function: the midpoint rule with unit step for the integral of S over
// [y, inf), which is sigma G(z), z = (y-mu)/sigma. The Euler-Maclaurin
// formula for the midpoint rule gives sum = integral + S'(y)/24 -
// 7 S”'(y)/5760 + ..., and S'(y) = -phi(z)/sigma, so
// E[(D-y)^+] = sigma G(z) - phi(z)/(24 sigma) + O(sigma^-3): a difference of
// at most 1/(24 sigma sqrt(2 pi)) = 3.3e-4 here, and the next term is
// below 1e-8.
func TestDiscretisedNormalLoss(t *testing.T) {
	const mu, sd = 1000.0, 50.0
	d, _ := NewNormal(mu, sd)
	lt, err := NewLossTable(d, 800, 1300)
	if err != nil {
		t.Fatal(err)
	}
	for y := 800; y <= 1300; y += 25 {
		z := (float64(y) - mu) / sd
		phi := math.Exp(-z*z/2) / math.Sqrt(2*math.Pi)
		cont := sd * NormalLoss(z)
		got := lt.Over(y)
		// The leading discretisation error -phi(z)/(24 sd), at most 1/(24 sd sqrt(2 pi)).
		if diff := got - cont; math.Abs(diff+phi/(24*sd)) > 1e-8 || math.Abs(diff) > 1/(24*sd*math.Sqrt(2*math.Pi))+1e-7 {
			t.Errorf("y=%d: E[(D-y)^+] = %v, sigma G(z) = %v, diff %v, predicted %v", y, got, cont, diff, -phi/(24*sd))
		}
	}
}

func ExampleNormalLoss() {
	for _, z := range []float64{0, 1, 2} {
		fmt.Printf("G(%v) = %.4f\n", z, NormalLoss(z))
	}
	// Output:
	// G(0) = 0.3989
	// G(1) = 0.0833
	// G(2) = 0.0085
}

func ExampleLossTable() {
	d, _ := Parse("poisson:mean=4")
	lt, _ := NewLossTable(d, 3, 6)
	for y := lt.Lo(); y <= lt.Hi(); y++ {
		fmt.Printf("y=%d P(X<=y)=%.4f E[(X-y)+]=%.4f E[(y-X)+]=%.4f\n", y, lt.CDF(y), lt.Over(y), lt.Under(y))
	}
	// Output:
	// y=3 P(X<=y)=0.4335 E[(X-y)+]=1.3480 E[(y-X)+]=0.3480
	// y=4 P(X<=y)=0.6288 E[(X-y)+]=0.7815 E[(y-X)+]=0.7815
	// y=5 P(X<=y)=0.7851 E[(X-y)+]=0.4103 E[(y-X)+]=1.4103
	// y=6 P(X<=y)=0.8893 E[(X-y)+]=0.1954 E[(y-X)+]=2.1954
}

func BenchmarkLossTablePoisson(b *testing.B) {
	d, _ := NewPoisson(400)
	s, _ := Sum(d, 4)
	for i := 0; i < b.N; i++ {
		if _, err := NewLossTable(s, 0, 3000); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkLossTableNormalSum(b *testing.B) {
	d, _ := NewNormal(400, 60)
	s, _ := Sum(d, 4)
	for i := 0; i < b.N; i++ {
		if _, err := NewLossTable(s, 0, 3000); err != nil {
			b.Fatal(err)
		}
	}
}
