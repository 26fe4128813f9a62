package inventory

import (
	"math"
	"strconv"
	"strings"
)

// Distribution is the law of demand in one period: a random variable on the
// non-negative integers 0, 1, 2, ...
//
// Implementations are immutable value types whose String method prints the
// text grammar that Parse reads back to the same distribution.
type Distribution interface {
	// PMF returns P(D = k); 0 for k < 0.
	PMF(k int) float64
	// CDF returns P(D <= k); 0 for k < 0.
	CDF(k int) float64
	// Tail returns P(D >= k), from a closed form where one exists (never
	// as 1 - CDF where that would lose precision); 1 for k <= 0.
	Tail(k int) float64
	Mean() float64
	Variance() float64
	// Bound returns the smallest k with P(D > k) <= eps, for eps in (0, 1).
	Bound(eps float64) int
	String() string
}

// Neglected returns the probability mass that d leaves out of its table
// (see Table), or 0 for a distribution with closed-form tails.
func Neglected(d Distribution) float64 {
	if n, ok := d.(interface{ Neglected() float64 }); ok {
		return n.Neglected()
	}
	return 0
}

// specWant lists the grammar, for errors about the family.
const specWant = "a demand spec: poisson:mean=M, negbin:mean=M,var=V, normal:mean=M,sd=SD, gamma:mean=M,sd=SD or pmf:0=P0,1=P1,..."

// families maps each parametric family to its keys in printing order.
var families = map[string][]string{
	"poisson": {"mean"},
	"negbin":  {"mean", "var"},
	"normal":  {"mean", "sd"},
	"gamma":   {"mean", "sd"},
}

// Parse reads a demand distribution in the grammar
//
//	poisson:mean=M
//	negbin:mean=M,var=V        (V > M)
//	normal:mean=M,sd=SD        (discretised, see Normal)
//	gamma:mean=M,sd=SD         (discretised, see Gamma)
//	pmf:0=P0,1=P1,...          (probabilities summing to 1 within 1e-9)
//
// Spaces around names, keys and values are ignored and keys may come in
// any order; numbers are read by ParseNumber (plain decimal, finite) and
// must be > 0 (pmf probabilities >= 0; support points by ParseInt). Errors are *FieldError values with Field
// "demand" and Value the spec as given.
func Parse(spec string) (Distribution, error) {
	fail := func(want string) (Distribution, error) {
		return nil, &FieldError{Field: "demand", Value: spec, Want: want}
	}
	name, params, ok := strings.Cut(spec, ":")
	name = strings.ToLower(strings.TrimSpace(name))
	if !ok {
		return fail(specWant)
	}
	if strings.TrimSpace(params) == "" {
		if keys, ok := families[name]; ok {
			return fail(name + ":" + keyList(keys) + " (no parameters given)")
		}
		if name == "pmf" {
			return fail("pmf:0=P0,1=P1,... (no probabilities given)")
		}
		return fail(specWant)
	}
	if name == "pmf" {
		return parsePMF(spec, params)
	}
	keys, ok := families[name]
	if !ok {
		return fail(specWant + ", not family " + strconv.Quote(name))
	}
	vals := map[string]float64{}
	for _, kv := range strings.Split(params, ",") {
		k, v, ok := strings.Cut(kv, "=")
		k = strings.ToLower(strings.TrimSpace(k))
		v = strings.TrimSpace(v)
		if !ok {
			return fail(name + ":" + keyList(keys) + ", with each parameter as key=value, not " + strconv.Quote(strings.TrimSpace(kv)))
		}
		if !contains(keys, k) {
			return fail(name + ":" + keyList(keys) + ", not key " + strconv.Quote(k))
		}
		if _, dup := vals[k]; dup {
			return fail(k + " given once, not twice")
		}
		x, err := ParseNumber(v)
		if err != nil {
			return fail(k + " a finite number, not " + strconv.Quote(v) + " (plain decimal, as 9, 0.5 or 1e3; no underscores, hex, inf or nan)")
		}
		vals[k] = x
	}
	for _, k := range keys {
		if _, ok := vals[k]; !ok {
			return fail(name + ":" + keyList(keys) + ", missing " + k)
		}
	}
	var d Distribution
	var err error
	switch name {
	case "poisson":
		d, err = NewPoisson(vals["mean"])
	case "negbin":
		d, err = NewNegBin(vals["mean"], vals["var"])
	case "normal":
		d, err = NewNormal(vals["mean"], vals["sd"])
	case "gamma":
		d, err = NewGamma(vals["mean"], vals["sd"])
	}
	if err != nil {
		if fe, ok := err.(*FieldError); ok {
			fe.Value = spec
		}
		return nil, err
	}
	return d, nil
}

// parsePMF reads the parameters of pmf:k=p,...
func parsePMF(spec, params string) (Distribution, error) {
	fail := func(want string) (Distribution, error) {
		return nil, &FieldError{Field: "demand", Value: spec, Want: want}
	}
	m := map[int]float64{}
	for _, kv := range strings.Split(params, ",") {
		k, v, ok := strings.Cut(kv, "=")
		k, v = strings.TrimSpace(k), strings.TrimSpace(v)
		if !ok {
			return fail("pmf:0=P0,1=P1,..., with each point as k=probability, not " + strconv.Quote(strings.TrimSpace(kv)))
		}
		i64, err := ParseInt(k)
		i := int(i64)
		if err != nil || i64 < 0 || i64 > MaxSupport {
			return fail("pmf support points that are whole numbers 0.." + strconv.Itoa(MaxSupport) + ", not " + strconv.Quote(k))
		}
		if _, dup := m[i]; dup {
			return fail("each pmf support point once, not " + strconv.Itoa(i) + " twice")
		}
		x, err := ParseNumber(v)
		if err != nil || x < 0 {
			return fail("pmf probabilities that are finite numbers >= 0, not " + k + "=" + strconv.Quote(v))
		}
		m[i] = x
	}
	t, err := NewPMFMap(m)
	if err != nil {
		if fe, ok := err.(*FieldError); ok {
			fe.Value = spec
		}
		return nil, err
	}
	return t, nil
}

// MaxParam bounds every mean and standard deviation (and MaxParam^2 every
// variance) that the demand families accept.
const MaxParam = 1e9

// checkParam refuses a parameter that is not a finite number in (0, MaxParam]
// (var: (0, MaxParam^2]).
func checkParam(family, key string, x float64) error {
	limit, lim := MaxParam, "1e9"
	if key == "var" {
		limit, lim = MaxParam*MaxParam, "1e18"
	}
	if math.IsNaN(x) || math.IsInf(x, 0) || !(x > 0) || x > limit {
		return &FieldError{Field: "demand", Value: family + ":" + key + "=" + ftoa(x),
			Want: key + " > 0 and <= " + lim + " (a finite number) in " + family + ":" + keyList(families[family])}
	}
	return nil
}

// keyList prints keys as "mean=M,sd=SD".
func keyList(keys []string) string {
	ph := map[string]string{"mean": "M", "var": "V", "sd": "SD"}
	parts := make([]string, len(keys))
	for i, k := range keys {
		parts[i] = k + "=" + ph[k]
	}
	return strings.Join(parts, ",")
}

func contains(s []string, x string) bool {
	for _, y := range s {
		if y == x {
			return true
		}
	}
	return false
}

// ftoa prints x in the shortest form that reads back exactly.
func ftoa(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
