package inventory

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// TestParseNumber checks the one number rule against strconv's reading of
// the accepted forms (common practice: the plain decimal notation).
func TestParseNumber(t *testing.T) {
	for _, c := range []struct {
		in   string
		want float64
		err  error
	}{
		{"9", 9, nil}, {"-0.5", -0.5, nil}, {"+3", 3, nil}, {".25", 0.25, nil}, {"3.", 3, nil},
		{"1e3", 1000, nil}, {"1E-3", 0.001, nil}, {"2.5e+2", 250, nil}, {"0", 0, nil},
		{"9_000", 0, ErrNumberSyntax}, {"0x10", 0, ErrNumberSyntax}, {"0x1p-2", 0, ErrNumberSyntax},
		{"inf", 0, ErrNumberSyntax}, {"+Inf", 0, ErrNumberSyntax}, {"NaN", 0, ErrNumberSyntax},
		{"", 0, ErrNumberSyntax}, {".", 0, ErrNumberSyntax}, {"1e", 0, ErrNumberSyntax}, {"e5", 0, ErrNumberSyntax},
		{" 1", 0, ErrNumberSyntax}, {"1 ", 0, ErrNumberSyntax}, {"1,5", 0, ErrNumberSyntax}, {"--1", 0, ErrNumberSyntax},
		{"1e400", 0, ErrNumberRange}, {"-1e400", 0, ErrNumberRange},
	} {
		got, err := ParseNumber(c.in)
		if c.err != nil {
			var ne *NumberError
			if !errors.Is(err, c.err) || !errors.As(err, &ne) || ne.Value != c.in {
				t.Errorf("ParseNumber(%q) = %v, %v; want %v", c.in, got, err, c.err)
			}
			continue
		}
		if err != nil || got != c.want {
			t.Errorf("ParseNumber(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
	}
}

func TestParseInt(t *testing.T) {
	for _, c := range []struct {
		in   string
		want int64
		err  error
	}{
		{"12", 12, nil}, {"-3", -3, nil}, {"1e6", 1000000, nil}, {"2.0", 2, nil}, {"1e10", 10000000000, nil},
		{"9223372036854775807", 9223372036854775807, nil}, {"-9223372036854775808", -9223372036854775808, nil},
		{"9223372036854775808", 0, ErrNumberRange}, {"4294967297", 4294967297, nil}, {"1e19", 0, ErrNumberRange},
		{"1.5", 0, ErrNotWhole}, {"1e17", 0, ErrNotWhole}, {"0x10", 0, ErrNumberSyntax}, {"1_000", 0, ErrNumberSyntax},
	} {
		got, err := ParseInt(c.in)
		if c.err != nil {
			if !errors.Is(err, c.err) {
				t.Errorf("ParseInt(%q) = %v, %v; want %v", c.in, got, err, c.err)
			}
			continue
		}
		if err != nil || got != c.want {
			t.Errorf("ParseInt(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
	}
}

// TestParseNumberRule checks that the demand grammar follows the one rule.
func TestParseNumberRule(t *testing.T) {
	for _, spec := range []string{"poisson:mean=9_000", "poisson:mean=0x10", "poisson:mean=inf", "pmf:0x1=1", "pmf:0=0x1p0", "negbin:mean=1,var=1_0"} {
		if d, err := Parse(spec); err == nil {
			t.Errorf("Parse(%q) = %v, want an error", spec, d)
		}
	}
	if d, err := Parse("pmf:0=.5,1e1=.5"); err != nil || d.PMF(10) != 0.5 {
		t.Errorf(`Parse("pmf:0=.5,1e1=.5") = %v, %v`, d, err)
	}
}

// TestUnrepresentable checks that laws double precision cannot carry are
// refused with the reason, not as "a positive mean".
func TestUnrepresentable(t *testing.T) {
	for _, c := range []struct {
		spec, want string
	}{
		{"negbin:mean=1,var=1e18", "P(D >= 1) rounds to 0"},
		{"gamma:mean=1e-9,sd=1", "puts all its mass at 0"},
		{"normal:mean=1e-9,sd=1e-9", "puts all its mass at 0"},
	} {
		d, err := Parse(c.spec)
		if err == nil {
			err = System{Demand: d, Holding: 1, Shortage: 1, Mode: Backorder}.Validate()
		}
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Field != "demand" || !strings.Contains(fe.Want, c.want) {
			t.Errorf("%s: err = %v, want a demand error containing %q", c.spec, err, c.want)
		}
	}
}

// FuzzParseNumber checks the rule against strconv: what ParseNumber
// accepts is made of digits, signs, one point and an exponent mark only,
// and reads as strconv.ParseFloat reads it; ParseInt agrees with
// ParseNumber on the whole numbers it accepts.
func FuzzParseNumber(f *testing.F) {
	for _, s := range []string{"9", "-0.5", "1e3", "9_000", "0x10", "inf", ".5", "5.", "1e400", "9223372036854775807", "2.0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		x, err := ParseNumber(s)
		if err != nil {
			if _, ierr := ParseInt(s); ierr == nil {
				t.Fatalf("ParseInt(%q) accepts what ParseNumber refuses", s)
			}
			return
		}
		if strings.Trim(s, "0123456789+-.eE") != "" {
			t.Fatalf("ParseNumber(%q) accepted a character outside the rule", s)
		}
		y, serr := strconv.ParseFloat(s, 64)
		if serr != nil || x != y {
			t.Fatalf("ParseNumber(%q) = %v, strconv %v, %v", s, x, y, serr)
		}
		if i, err := ParseInt(s); err == nil && float64(i) != x && math.Abs(x) < 1<<53 {
			t.Fatalf("ParseInt(%q) = %d, ParseNumber %v", s, i, x)
		}
	})
}
