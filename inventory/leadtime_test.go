package inventory

import (
	"math"
	"strings"
	"testing"
)

// The table a Mixture keeps agrees with the sum of its components' closed
// forms (PMF, CDF and Tail) point by point, to 1e-11 relative (the pmf
// by a ratio recurrence re-anchored every 256 points; the closed forms
// themselves carry about that error far into the tails).
func TestMixtureTable(t *testing.T) {
	for _, spec := range []string{"poisson:mean=50", "poisson:mean=3000", "negbin:mean=20,var=60", "normal:mean=30,sd=9"} {
		d, err := Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		x, err := NewMixture(d, []float64{0, 0.25, 0, 0.5, 0.25}, 1, 0)
		if err != nil {
			t.Fatal(err)
		}
		m := x.(Mixture)
		w, c := m.Components()
		for k := 0; k < len(m.pmf)+5; k += 1 + k/50 {
			var p, cdf, tail float64
			for i, ci := range c {
				p += w[i] * ci.PMF(k)
				cdf += w[i] * ci.CDF(k)
				tail += w[i] * ci.Tail(k)
			}
			for _, v := range []struct {
				name      string
				got, want float64
			}{{"pmf", m.PMF(k), p}, {"cdf", m.CDF(k), cdf}, {"tail", m.Tail(k), tail}} {
				if math.Abs(v.got-v.want) > 1e-11*v.want+1e-300 {
					t.Errorf("%s k=%d: %s %.17g, want %.17g", spec, k, v.name, v.got, v.want)
				}
			}
		}
	}
}

func TestParseLeadTime(t *testing.T) {
	for _, c := range []struct {
		in    string
		fixed int
		law   bool
		ok    bool
	}{
		{"3", 3, false, true}, {" 3e0 ", 3, false, true}, {"0", 0, false, true},
		{"pmf:4=1", 4, false, true}, {"pmf:1=0.5,2=0.5", 0, true, true}, {"poisson:mean=3", 0, true, true},
		{"-1", 0, false, false}, {"1.5", 0, false, false}, {"abc", 0, false, false}, {"pmf:1=0.5", 0, false, false},
		{"", 0, false, false}, {"2000000000", 0, false, false},
	} {
		fixed, law, err := ParseLeadTime(c.in)
		if (err == nil) != c.ok || (err == nil && (fixed != c.fixed || (law != nil) != c.law)) {
			t.Errorf("ParseLeadTime(%q) = %d, %v, %v", c.in, fixed, law, err)
		}
		if err != nil {
			if fe, ok := err.(*FieldError); !ok || fe.Field != "lead_time" {
				t.Errorf("ParseLeadTime(%q): %v, want a lead_time FieldError", c.in, err)
			}
		}
	}
}

// FuzzParseLeadTime: every refusal is a one-line *FieldError on lead_time;
// every accepted law either validates or is refused in one line, and its
// nearest admissible law validates.
func FuzzParseLeadTime(f *testing.F) {
	for _, s := range []string{"3", "0", "1e3", "pmf:2=0.2,3=0.5,5=0.3", "pmf:1=0.2,2=0.5,3=0.3", "poisson:mean=4",
		"negbin:mean=4,var=40", "normal:mean=4,sd=1", "gamma:mean=3,sd=5", "pmf:4=1", "-1", "pmf:", "x:y"} {
		f.Add(s)
	}
	d, _ := NewPoisson(3)
	f.Fuzz(func(t *testing.T, s string) {
		fixed, law, err := ParseLeadTime(s)
		if err != nil {
			fe, ok := err.(*FieldError)
			if !ok || fe.Field != "lead_time" || strings.Contains(err.Error(), "\n") {
				t.Fatalf("%q: %v", s, err)
			}
			return
		}
		sys := System{Demand: d, LeadTime: fixed, LeadTimeLaw: law, Holding: 1, Shortage: 1, Mode: Backorder}
		if err := sys.Validate(); err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Fatalf("%q: multi-line %v", s, err)
			}
			if law != nil && strings.Contains(err.Error(), "hazard") {
				sys.LeadTimeLaw = NearestKaplan(law)
				if err := sys.Validate(); err != nil && strings.Contains(err.Error(), "hazard") {
					t.Fatalf("%q: nearest law %v refused: %v", s, sys.LeadTimeLaw, err)
				}
			}
		}
	})
}

// A refusal stays one readable line even when the nearest admissible law
// has thousands of points.
func TestKaplanRefusalIsShort(t *testing.T) {
	_, law, err := ParseLeadTime("pmf:1=0.5,9999=0.5")
	if err != nil {
		t.Fatal(err)
	}
	d, _ := NewPoisson(3)
	sys := System{Demand: d, LeadTimeLaw: law, Holding: 1, Shortage: 1, Mode: Backorder}
	err = sys.Validate()
	if err == nil || len(err.Error()) > 1000 || !strings.Contains(err.Error(), "more points") {
		t.Fatalf("want a short refusal naming the points left out, got %d bytes: %.300v", len(err.Error()), err)
	}
}
