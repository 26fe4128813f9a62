package chain

import "math"

// Extended-range arithmetic for the substitution phases of GTH and of
// forward substitution. A stationary vector can span far more than the
// 2^±1022 range of float64 before it is normalised: on a birth-death chain
// with up-probability 0.5 and down-probability 0.45, pi_{k+1}/pi_k = 10/9,
// so over 8000 states the unnormalised values run from 1 to 10^366 and
// overflow (Inf/Inf = NaN after normalisation), although the normalised
// answer is an ordinary vector whose smallest entries underflow to 0. Each
// value is therefore kept as a mantissa in [0.5, 1) (or 0) and a binary
// exponent, as by math.Frexp; sums align the exponents on the largest term.
// Terms more than 2^-1100 below the largest are dropped (they cannot change
// a float64 sum), so no overflow, underflow or NaN can occur before the
// final normalisation, which rounds each component once (to a subnormal or
// 0 when the true value is that small). The scheme is the usual one for
// extended exponent ranges (Higham, Accuracy and Stability of Numerical
// Algorithms, 2nd ed., 2002, sec. 27.8; from memory).

// xfloat is m * 2^e with m in [0.5, 1) or m = 0.
type xfloat struct {
	m float64
	e int
}

func mkx(v float64) xfloat {
	m, e := math.Frexp(v)
	return xfloat{m, e}
}

// xscale returns x * v for a finite v >= 0.
func (x xfloat) scale(v float64) xfloat {
	if x.m == 0 || v == 0 {
		return xfloat{}
	}
	vm, ve := math.Frexp(v)
	m, e := math.Frexp(x.m * vm)
	return xfloat{m, e + x.e + ve}
}

// div returns x / v for a finite v > 0.
func (x xfloat) div(v float64) xfloat {
	if x.m == 0 {
		return xfloat{}
	}
	vm, ve := math.Frexp(v)
	m, e := math.Frexp(x.m / vm)
	return xfloat{m, e + x.e - ve}
}

// add returns x + y for x, y >= 0.
func (x xfloat) add(y xfloat) xfloat {
	switch {
	case y.m == 0:
		return x
	case x.m == 0:
		return y
	}
	if y.e > x.e {
		x, y = y, x
	}
	d := y.e - x.e // <= 0
	if d < -1100 {
		return x
	}
	m, e := math.Frexp(x.m + math.Ldexp(y.m, d))
	return xfloat{m, e + x.e}
}

// xnormalise returns the float64 vector x / sum(x).
func xnormalise(x []xfloat) []float64 {
	emax := math.MinInt
	for _, v := range x {
		if v.m != 0 && v.e > emax {
			emax = v.e
		}
	}
	out := make([]float64, len(x))
	if emax == math.MinInt {
		return out
	}
	var s float64 // sum relative to 2^emax: in [0.5, len(x)]
	for _, v := range x {
		if d := v.e - emax; v.m != 0 && d > -1100 {
			s += math.Ldexp(v.m, d)
		}
	}
	sm, se := math.Frexp(s)
	for i, v := range x {
		if v.m == 0 {
			continue
		}
		d := v.e - emax - se
		if d < -1100 {
			continue // below the smallest subnormal
		}
		out[i] = math.Ldexp(v.m/sm, d)
	}
	return out
}

// finiteVector reports whether every entry of x is finite and >= 0 and
// their sum is finite and > 0.
func finiteVector(x []float64) bool {
	var s float64
	for _, v := range x {
		if !(v >= 0) || math.IsInf(v, 0) {
			return false
		}
		s += v
	}
	return s > 0 && !math.IsInf(s, 0)
}

// gthBack is the substitution phase of GTH on a reduced matrix: with
// pi_0 = 1, pi_j = sum_{i in [lo(j), j)} pi_i r(i,j) / s_j, then
// normalised. It is done in float64 first; if that overflows (or the
// reduced values are not usable), again in extended range.
func gthBack(n int, lo func(j int) int, r func(i, j int) float64, s []float64) []float64 {
	pi := make([]float64, n)
	pi[0] = 1
	for j := 1; j < n; j++ {
		var t float64
		for i := lo(j); i < j; i++ {
			t += pi[i] * r(i, j)
		}
		pi[j] = t / s[j]
	}
	if finiteVector(pi) {
		normalise(pi)
		if finiteVector(pi) {
			return pi
		}
	}
	x := make([]xfloat, n)
	x[0] = xfloat{0.5, 1}
	for j := 1; j < n; j++ {
		var t xfloat
		for i := lo(j); i < j; i++ {
			if v := r(i, j); v != 0 {
				t = t.add(x[i].scale(v))
			}
		}
		x[j] = t.div(s[j])
	}
	return xnormalise(x)
}
