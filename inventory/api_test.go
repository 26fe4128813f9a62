package inventory

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func TestParse(t *testing.T) {
	for _, c := range []struct {
		spec       string
		str        string
		mean, vari float64
	}{
		{"poisson:mean=4", "poisson:mean=4", 4, 4},
		{" Poisson : mean = 2.5 ", "poisson:mean=2.5", 2.5, 2.5},
		{"negbin:var=9,mean=4", "negbin:mean=4,var=9", 4, 9},
		{"negbin: mean=0.1 , var=1e-1000000000000000000001", "", 0, 0}, // var underflows to 0: refused below
		{"normal:sd=50,mean=1000", "normal:mean=1000,sd=50", 1000, 2500 + 1.0/12},
		{"gamma:mean=5,sd=4", "gamma:mean=5,sd=4", math.NaN(), math.NaN()},
		{"pmf:0=0.2,1=0.5,2=0.3", "pmf:0=0.2,1=0.5,2=0.3", 1.1, 0.49},
		{"pmf: 2 = 0.3 , 0=0.2,1=0.5,5=0", "pmf:0=0.2,1=0.5,2=0.3", 1.1, 0.49},
	} {
		d, err := Parse(c.spec)
		if c.str == "" {
			if err == nil {
				t.Errorf("Parse(%q) accepted", c.spec)
			}
			continue
		}
		if err != nil {
			t.Errorf("Parse(%q): %v", c.spec, err)
			continue
		}
		if d.String() != c.str {
			t.Errorf("Parse(%q).String() = %q, want %q", c.spec, d.String(), c.str)
		}
		if !math.IsNaN(c.mean) && (!near(d.Mean(), c.mean, 1e-14, 0) || !near(d.Variance(), c.vari, 1e-13, 0)) {
			t.Errorf("Parse(%q): mean %v variance %v, want %v %v", c.spec, d.Mean(), d.Variance(), c.mean, c.vari)
		}
	}
}

func TestParseErrors(t *testing.T) {
	for _, c := range []struct{ spec, want string }{
		{"", "a demand spec: poisson:mean=M"},
		{"poisson", "a demand spec"},
		{"poisson:", "poisson:mean=M (no parameters given)"},
		{"pmf:", "pmf:0=P0,1=P1,... (no probabilities given)"},
		{"weibull:mean=3", `not family "weibull"`},
		{"poisson:mean=-1", "mean > 0 and <= 1e9 (a finite number) in poisson:mean=M"},
		{"poisson:mean=2e9", "mean > 0 and <= 1e9"},
		{"negbin:mean=2,var=1e19", "var > 0 and <= 1e18"},
		{"poisson:mean=0", "mean > 0"},
		{"poisson:mean=NaN", `mean a finite number, not "NaN"`},
		{"poisson:mean=+Inf", `mean a finite number, not "+Inf"`},
		{"poisson:mean=abc", `mean a finite number, not "abc"`},
		{"poisson:mean=1,mean=2", "mean given once, not twice"},
		{"poisson:lambda=2", `poisson:mean=M, not key "lambda"`},
		{"poisson:mean", `with each parameter as key=value, not "mean"`},
		{"negbin:mean=4", "negbin:mean=M,var=V, missing var"},
		{"negbin:mean=4,var=4", "var > mean"},
		{"negbin:mean=4,var=3", "var > mean"},
		{"normal:mean=4,sd=0", "sd > 0"},
		{"normal:mean=4,var=2", `not key "var"`},
		{"gamma:sd=3", "missing mean"},
		{"pmf:0=0.5,1=0.4", "sum to 1 within 1e-9, not to 0.9"},
		{"pmf:0=0.5,0=0.5", "each pmf support point once, not 0 twice"},
		{"pmf:-1=0.5,0=0.5", `whole numbers 0..1048576, not "-1"`},
		{"pmf:1.5=0.5,0=0.5", `not "1.5"`},
		{"pmf:9999999=1", `not "9999999"`},
		{"pmf:0=-0.5,1=1.5", `finite numbers >= 0, not 0="-0.5"`},
		{"pmf:0=1,1=NaN", `not 1="NaN"`},
		{"pmf:0=1,1", `each point as k=probability, not "1"`},
	} {
		_, err := Parse(c.spec)
		var fe *FieldError
		if !errors.As(err, &fe) {
			t.Errorf("Parse(%q) error %v, want a *FieldError", c.spec, err)
			continue
		}
		if fe.Field != "demand" || fe.Value != c.spec || !strings.Contains(fe.Want, c.want) {
			t.Errorf("Parse(%q) = %+v, want Field demand, Value the spec, Want containing %q", c.spec, *fe, c.want)
		}
		if strings.Contains(err.Error(), "\n") {
			t.Errorf("Parse(%q) error spans lines: %q", c.spec, err)
		}
	}
}

// sameDist compares two distributions point by point.
func sameDist(a, b Distribution) error {
	if a.String() != b.String() || a.Mean() != b.Mean() || a.Variance() != b.Variance() {
		return fmt.Errorf("%s (mean %v var %v) vs %s (mean %v var %v)", a, a.Mean(), a.Variance(), b, b.Mean(), b.Variance())
	}
	for _, k := range []int{0, 1, 2, 3, 5, 10, 50} {
		if a.PMF(k) != b.PMF(k) || a.Tail(k) != b.Tail(k) || a.CDF(k) != b.CDF(k) {
			return fmt.Errorf("%s: values differ at %d", a, k)
		}
	}
	return nil
}

func TestRoundTrip(t *testing.T) {
	specs := []string{
		"poisson:mean=0.1", "poisson:mean=3.14159", "negbin:mean=1e-3,var=0.3",
		"negbin:mean=7.25,var=7.250001", "normal:mean=12.5,sd=0.3", "gamma:mean=0.7,sd=3.3",
		"pmf:0=0.1,1=0.2,2=0.30000000000000004,7=0.39999999999999997",
		"pmf:0=0.3333333333,1=0.3333333333,2=0.3333333334",
	}
	for _, s := range specs {
		d := mustDist(t, s)
		e, err := Parse(d.String())
		if err != nil {
			t.Errorf("Parse(%q.String()): %v", s, err)
			continue
		}
		if err := sameDist(d, e); err != nil {
			t.Errorf("round trip of %q: %v", s, err)
		}
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{
		"poisson:mean=4", "negbin:mean=4,var=9", "normal:mean=40,sd=8", "gamma:mean=5,sd=4",
		"pmf:0=0.2,1=0.5,2=0.3", "pmf:3=1", "poisson:mean=1e-300", "gamma:mean=1e-5,sd=1e5",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, spec string) {
		d, err := Parse(spec)
		if err != nil {
			var fe *FieldError
			if !errors.As(err, &fe) {
				t.Fatalf("Parse(%q): error %v is not a *FieldError", spec, err)
			}
			return
		}
		// Keep the fuzzer quick: skip specs whose moments take long to check.
		if d.Mean() > 1e6 || d.Variance() > 1e8 {
			return
		}
		e, err := Parse(d.String())
		if err != nil {
			t.Fatalf("Parse(%q) = %s, which does not parse: %v", spec, d, err)
		}
		if err := sameDist(d, e); err != nil {
			t.Fatalf("round trip of %q: %v", spec, err)
		}
		for _, k := range []int{0, 1, 2, d.Bound(1e-9)} {
			for _, v := range []float64{d.PMF(k), d.CDF(k), d.Tail(k)} {
				if !(v >= 0 && v <= 1) {
					t.Fatalf("%s: value %v at %d outside [0,1]", d, v, k)
				}
			}
		}
	})
}

func ExampleParse() {
	d, err := Parse("negbin: mean=4, var=12")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(d)
	fmt.Printf("P(D=0) = %.6f, P(D>=10) = %.6f\n", d.PMF(0), d.Tail(10))
	_, err = Parse("negbin:mean=4,var=3")
	fmt.Println(err)
	// Output:
	// negbin:mean=4,var=12
	// P(D=0) = 0.111111, P(D>=10) = 0.075147
	// demand "negbin:mean=4,var=3": want var > mean (negbin is over-dispersed; for var = mean use poisson:mean=M)
}
