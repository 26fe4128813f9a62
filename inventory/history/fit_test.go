package history

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

func repeat(pattern []int, n int) []int {
	var y []int
	for len(y) < n {
		y = append(y, pattern...)
	}
	return y[:n]
}

// Pattern classification on constructed series, with ADI and CV² worked
// by hand from their definitions; the cut-offs are those of Syntetos,
// Boylan and Croston (2005), JORS 56(5).
func TestClassify(t *testing.T) {
	for _, c := range []struct {
		name     string
		y        []int
		adi, cv2 float64
		want     Pattern
	}{
		// sizes 5,6: mean 5.5, population variance 0.25, cv2 = 0.25/30.25
		{"smooth", repeat([]int{5, 6}, 52), 1, 0.25 / 30.25, Smooth},
		// sizes 1,20: mean 10.5, variance 90.25, cv2 = 90.25/110.25
		{"erratic", repeat([]int{1, 20}, 52), 1, 90.25 / 110.25, Erratic},
		// one demand of 3 in every 3 periods: adi 3, cv2 0
		{"intermittent", repeat([]int{0, 0, 3}, 51), 3, 0, Intermittent},
		// sizes 1,30 every other period: adi 2, cv2 = 210.25/240.25
		{"lumpy", repeat([]int{0, 1, 0, 30}, 52), 2, 210.25 / 240.25, Lumpy},
		// just at the cut-offs: ADI = 1.32 exactly is not below 1.32
		{"adi at cut-off", repeat(append(make([]int, 8), repeat([]int{4}, 25)...), 33), 33.0 / 25, 0, Intermittent},
	} {
		s := Summarize(c.y)
		if math.Abs(s.ADI-c.adi) > 1e-12 || math.Abs(s.CV2-c.cv2) > 1e-12 || s.Pattern != c.want {
			t.Errorf("%s: adi %g cv2 %g %s, want %g %g %s", c.name, s.ADI, s.CV2, s.Pattern, c.adi, c.cv2, c.want)
		}
	}
	for _, c := range []struct {
		adi, cv2 float64
		want     Pattern
	}{{1.31, 0.48, Smooth}, {1.31, 0.49, Erratic}, {1.32, 0.48, Intermittent}, {1.32, 0.49, Lumpy}} {
		if got := Classify(c.adi, c.cv2); got != c.want {
			t.Errorf("Classify(%g, %g) = %s, want %s", c.adi, c.cv2, got, c.want)
		}
	}
}

func TestSummarize(t *testing.T) {
	// y = 0, 2, 0, 4, 4: mean 2, sample variance (4+0+4+4+4)/4 = 4,
	// zero fraction 0.4, adi 5/3, sizes 2,4,4: mean 10/3, population
	// variance 8/9, cv2 = (8/9)/(100/9) = 0.08.
	s := Summarize([]int{0, 2, 0, 4, 4})
	if s.Periods != 5 || s.Total != 10 || s.Mean != 2 || math.Abs(s.Variance-4) > 1e-15 || s.ZeroFraction != 0.4 ||
		math.Abs(s.ADI-5.0/3) > 1e-15 || math.Abs(s.CV2-0.08) > 1e-15 || s.Pattern != Intermittent {
		t.Errorf("%+v", s)
	}
	z := Summarize([]int{0, 0, 0})
	if !math.IsNaN(z.ADI) || !math.IsNaN(z.CV2) || z.Pattern != "" || z.ZeroFraction != 1 {
		t.Errorf("no demand: %+v", z)
	}
}

// The slope test worked by hand for y = 1, 2, 3, 5, 4 on t = 0..4:
// Sxx = 10, Sxy = 9, b = 0.9, SSR = 10 - 0.9*9 = 1.9, se = sqrt(1.9/3/10),
// t = 3.5762; with 3 degrees of freedom the two-sided p lies between 0.02
// and 0.05 (t quantiles 3.182 and 4.541; Abramowitz and Stegun, Handbook
// of Mathematical Functions, 1964, table 26.10).
func TestTrend(t *testing.T) {
	tr := Summarize([]int{1, 2, 3, 5, 4}).Trend
	wantT := 0.9 / math.Sqrt(1.9/3/10)
	if math.Abs(tr.Slope-0.9) > 1e-12 || math.Abs(tr.T-wantT) > 1e-9 || !(tr.P > 0.02 && tr.P < 0.05) {
		t.Errorf("trend %+v, want slope 0.9, t %.4f, 0.02 < p < 0.05", tr, wantT)
	}
	if p := Summarize(repeat([]int{3, 5}, 20)).Trend.P; p < 0.5 {
		t.Errorf("alternating series: p = %g, want no trend", p)
	}
	if tr := Summarize([]int{1, 2, 3, 4}).Trend; tr.P != 0 || tr.Slope != 1 {
		t.Errorf("a straight line: %+v", tr)
	}
	if tr := Summarize([]int{4, 4, 4, 4}).Trend; tr.P != 1 || tr.Slope != 0 {
		t.Errorf("a constant: %+v", tr)
	}
}

func candidate(s Summary, model string) (Candidate, bool) {
	for _, c := range s.Candidates {
		if c.Model == model {
			if _, err := c.Build(); err != nil {
				panic(err)
			}
			return c, true
		}
	}
	return Candidate{}, false
}

// logLOf sums log P(y) with the Distribution's own PMF, an evaluation
// independent of the fitting code's likelihoods.
func logLOf(c Candidate, y []int) float64 {
	ll := 0.0
	for _, v := range y {
		ll += math.Log(c.Demand.PMF(v))
	}
	return ll
}

// negBinSample draws from a gamma-Poisson mixture, the negative binomial
// with size r and mean m (M. Greenwood and G. U. Yule, JRSS 83, 1920).
func negBinSample(rng *rand.Rand, n int, r, m float64) []int {
	g := distuv.Gamma{Alpha: r, Beta: r / m, Src: rng}
	y := make([]int, n)
	for i := range y {
		y[i] = int(distuv.Poisson{Lambda: g.Rand(), Src: rng}.Rand())
	}
	return y
}

// The Poisson MLE is the sample mean (e.g. Casella and Berger, "Statistical
// Inference", 2nd ed., 2002, example 7.2.5 for the exponential family).
func TestPoissonMLE(t *testing.T) {
	y := []int{3, 0, 2, 5, 1, 4, 2, 2, 3, 1, 0, 6, 2, 3}
	s, err := Fit(y)
	if err != nil {
		t.Fatal(err)
	}
	c, ok := candidate(s, ModelPoisson)
	if !ok {
		t.Fatal("no poisson candidate")
	}
	if c.Demand.Mean() != s.Mean || s.Mean != 34.0/14 {
		t.Errorf("poisson mean %v, sample mean %v", c.Demand.Mean(), s.Mean)
	}
	if got := logLOf(c, y); math.Abs(got-c.LogLikelihood) > 1e-10*math.Abs(got) {
		t.Errorf("log-likelihood %v, from the pmf %v", c.LogLikelihood, got)
	}
	for _, f := range []float64{0.99, 1.01} {
		p := distuv.Poisson{Lambda: s.Mean * f}
		ll := 0.0
		for _, v := range y {
			ll += p.LogProb(float64(v))
		}
		if ll >= c.LogLikelihood {
			t.Errorf("gonum Poisson at %g x mean: log L %v >= %v at the fit", f, ll, c.LogLikelihood)
		}
	}
	if c.AIC != 2-2*c.LogLikelihood {
		t.Errorf("AIC %v", c.AIC)
	}
}

// The negative binomial fit: the profile score vanishes at the fitted size
// r, and the log-likelihood, evaluated independently with gonum's gamma
// function and the Distribution's own pmf, is no larger at nearby (mean, r).
func TestNegBinFit(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	y := negBinSample(rng, 104, 1.5, 6)
	s, err := Fit(y)
	if err != nil {
		t.Fatal(err)
	}
	c, ok := candidate(s, ModelNegBin)
	if !ok {
		t.Fatal("no negbin candidate")
	}
	m, v := c.Demand.Mean(), c.Demand.Variance()
	if math.Abs(m-s.Mean) > 1e-12*s.Mean {
		t.Errorf("negbin mean %v, sample mean %v", m, s.Mean)
	}
	r := m * m / (v - m)
	h := newHist(y)
	if sc := negBinScore(h, r); math.Abs(sc) > 1e-7 {
		t.Errorf("score at r = %v: %g", r, sc)
	}
	if got := logLOf(c, y); math.Abs(got-c.LogLikelihood) > 1e-9*math.Abs(got) {
		t.Errorf("log-likelihood %v, from the pmf %v", c.LogLikelihood, got)
	}
	// log P(y) = lgamma(y+r) - lgamma(r) - lgamma(y+1) + r log p + y log(1-p), p = r/(r+m)
	ref := func(m, r float64) float64 {
		ll := 0.0
		for _, x := range y {
			a, _ := math.Lgamma(float64(x) + r)
			b, _ := math.Lgamma(r)
			f, _ := math.Lgamma(float64(x) + 1)
			ll += a - b - f + r*math.Log(r/(r+m)) + float64(x)*math.Log(m/(r+m))
		}
		return ll
	}
	best := ref(m, r)
	for _, d := range [][2]float64{{1.01, 1}, {0.99, 1}, {1, 1.01}, {1, 0.99}, {1.01, 1.01}, {0.99, 0.99}} {
		if ll := ref(m*d[0], r*d[1]); ll >= best {
			t.Errorf("log L at (%g m, %g r) = %v >= %v at the fit", d[0], d[1], ll, best)
		}
	}
	if s.Model() == ModelPoisson {
		t.Errorf("over-dispersed series (variance %.1f, mean %.1f) fitted as Poisson", s.Variance, s.Mean)
	}
	pc, _ := candidate(s, ModelPoisson)
	if !(c.AIC < pc.AIC) {
		t.Errorf("negbin AIC %v not below Poisson's %v", c.AIC, pc.AIC)
	}
}

// Over-dispersed series across a range of sizes are never chosen Poisson;
// an under-dispersed one has no negbin candidate.
func TestDispersion(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for _, c := range []struct{ r, m float64 }{{0.5, 2}, {1, 10}, {3, 20}, {2, 40}} {
		y := negBinSample(rng, 104, c.r, c.m)
		s, err := Fit(y)
		if err != nil {
			t.Fatal(err)
		}
		if s.Model() == ModelPoisson {
			t.Errorf("negbin(r=%g, mean=%g) sample chosen Poisson", c.r, c.m)
		}
	}
	s, err := Fit(repeat([]int{4, 5, 6, 5}, 52))
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := candidate(s, ModelNegBin); ok {
		t.Error("under-dispersed series has a negbin candidate")
	}
}

// The discretised normal and gamma fits are local maxima of the exact
// discretised likelihood, which matches the Distribution's own pmf.
func TestContinuousFits(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	y := make([]int, 104)
	for i := range y {
		y[i] = max(0, int(math.Round(30+8*rng.NormFloat64())))
	}
	s, err := Fit(y)
	if err != nil {
		t.Fatal(err)
	}
	h := newHist(y)
	for _, c := range []struct {
		model string
		ll    func(m, sd float64) float64
	}{
		{ModelNormal, func(m, sd float64) float64 { return normalLogL(h, m, sd) }},
		{ModelGamma, func(m, sd float64) float64 { return gammaLogL(h, m, sd) }},
	} {
		cand, ok := candidate(s, c.model)
		if !ok {
			t.Fatalf("no %s candidate", c.model)
		}
		if got := logLOf(cand, y); math.Abs(got-cand.LogLikelihood) > 1e-8*math.Abs(got) {
			t.Errorf("%s: log-likelihood %v, from the pmf %v", c.model, cand.LogLikelihood, got)
		}
		var m, sd float64
		if _, err := fmt.Sscanf(strings.ReplaceAll(cand.Demand.String(), ",", " "), c.model+":mean=%g sd=%g", &m, &sd); err != nil {
			t.Fatalf("%s: %v", cand.Demand, err)
		}
		best := c.ll(m, sd)
		for _, d := range [][2]float64{{1.002, 1}, {0.998, 1}, {1, 1.01}, {1, 0.99}} {
			if ll := c.ll(m*d[0], sd*d[1]); ll > best+1e-6 {
				t.Errorf("%s: log L at (%g m, %g sd) = %v > %v at the fit", c.model, d[0], d[1], ll, best)
			}
		}
	}
	// The quadrature used inside the optimiser agrees with the exact form.
	for _, p := range [][2]float64{{30, 8}, {5, 9}, {0.7, 2.1}, {60, 40}} {
		a, b := gammaLogL(h, p[0], p[1]), newGammaQuad(h).logL(p[0], p[1])
		if math.Abs(a-b) > 1e-6*math.Abs(a) {
			t.Errorf("gamma(%v): exact %v, quadrature %v", p, a, b)
		}
	}
}

func TestDegenerate(t *testing.T) {
	if _, err := Fit(nil); !errors.Is(err, ErrNoPeriods) {
		t.Errorf("empty: %v", err)
	}
	s, err := Fit(make([]int, 20))
	if !errors.Is(err, ErrNoDemand) || s.Demand != nil || s.Chosen != -1 || s.Periods != 20 {
		t.Errorf("all zero: %v %+v", err, s)
	}
	s, err = Fit(repeat([]int{3}, 20))
	if err != nil || s.Model() != ModelPMF || s.Demand.String() != "pmf:3=1" {
		t.Errorf("constant: %v %s %v", err, s.Model(), s.Demand)
	}
	if !hasWarning(s, "constant demand: 3 every period") {
		t.Errorf("constant: warnings %q", s.Warnings)
	}
	s, err = Fit([]int{0, 1, 0, 2, 1})
	if err != nil || !hasWarning(s, "short history: 5 periods, fewer than 13") {
		t.Errorf("short: %v %q", err, s.Warnings)
	}
	up := make([]int, 52)
	for i := range up {
		up[i] = 10 + i/2 + i%3
	}
	s, err = Fit(up)
	if err != nil || !hasWarning(s, "trend: ") {
		t.Errorf("trend: %v %q", err, s.Warnings)
	}
	// A single period with demand.
	s, err = Fit([]int{7})
	if err != nil || s.Demand == nil {
		t.Errorf("one period: %v", err)
	}
}

func hasWarning(s Summary, prefix string) bool {
	for _, w := range s.Warnings {
		if strings.HasPrefix(w, prefix) {
			return true
		}
	}
	return false
}

func TestSKUFit(t *testing.T) {
	h := mustRead(t, "sku,date,quantity\nA,2026-01-05,2\nA,2026-01-06,x\nA,2026-01-07,y\nB,2026-01-05,z\n", Day)
	s, err := h.SKUs[0].Fit()
	if err != nil || !hasWarning(s, `2 bad rows skipped, first h.csv:3: quantity "x": want a whole number >= 0`) {
		t.Errorf("A: %v %q", err, s.Warnings)
	}
	_, err = h.SKUs[1].Fit()
	var re *RowError
	if err == nil || !errors.As(err, &re) || re.Line != 5 {
		t.Errorf("B: %v", err)
	}
}

func ExampleFit() {
	// Weekly issues of pantograph carbon strips at one depot.
	weekly := []int{0, 1, 0, 0, 3, 0, 1, 0, 0, 0, 5, 0, 2, 0, 0, 1, 0, 4, 0, 0, 2, 0, 0, 7, 0, 1}
	s, err := Fit(weekly)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d periods, mean %.3f, variance %.3f, ADI %.3f, CV² %.3f: %s\n",
		s.Periods, s.Mean, s.Variance, s.ADI, s.CV2, s.Pattern)
	for _, c := range s.Candidates {
		fmt.Printf("%-7s k=%d  log L %8.3f  AIC %7.3f\n", c.Model, c.Params, c.LogLikelihood, c.AIC)
	}
	fmt.Printf("chosen: %s, mean %.4f, variance %.4f\n", s.Model(), s.Demand.Mean(), s.Demand.Variance())
	// Output:
	// 26 periods, mean 1.038, variance 3.318, ADI 2.600, CV² 0.523: lumpy
	// poisson k=1  log L  -45.650  AIC  93.300
	// negbin  k=2  log L  -35.232  AIC  74.464
	// gamma   k=2  log L  -35.340  AIC  74.680
	// pmf     k=6  log L  -33.418  AIC  78.835
	// chosen: negbin, mean 1.0385, variance 3.9438
}

// The chosen candidate has the least AICc; AIC decides only when no AICc
// is finite (n <= k+1 for every candidate).
func TestChoose(t *testing.T) {
	inf := math.Inf(1)
	for _, c := range []struct {
		cs   []Candidate
		want int
	}{
		{[]Candidate{{AIC: 10, AICc: 11}, {AIC: 9, AICc: 12}, {AIC: 9.5, AICc: 10.5}}, 2},
		{[]Candidate{{AIC: 10, AICc: 10}, {AIC: 10, AICc: 10}}, 0},
		{[]Candidate{{AIC: 4, AICc: inf}, {AIC: 2, AICc: inf}}, 1},
		{[]Candidate{{AIC: 1, AICc: inf}, {AIC: 5, AICc: 7}}, 1},
		{nil, -1},
	} {
		if got := choose(c.cs); got != c.want {
			t.Errorf("choose(%v) = %d, want %d", c.cs, got, c.want)
		}
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for range 20 {
		s, err := Fit(negBinSample(rng, 60, 2, 5))
		if err != nil {
			t.Fatal(err)
		}
		for i, c := range s.Candidates {
			if c.AICc < s.Candidates[s.Chosen].AICc {
				t.Errorf("candidate %d (%s) has AICc %v below the chosen %v", i, c.Model, c.AICc, s.Candidates[s.Chosen].AICc)
			}
			k, n := float64(c.Params), 60.0
			if want := 2*k - 2*c.LogLikelihood + 2*k*(k+1)/(n-k-1); math.Abs(c.AICc-want) > 1e-9*math.Abs(want) {
				t.Errorf("%s: AICc %v, want %v", c.Model, c.AICc, want)
			}
		}
	}
}
