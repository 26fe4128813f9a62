package inventory

import (
	"fmt"
	"math"
	"strconv"
)

// SumNeglect is the most probability mass that Sum leaves out of a table.
const SumNeglect = 1e-12

// maxTable bounds the length of the tables that Sum and SumUpTo build.
const maxTable = 1 << 24

// MaxConvolution bounds the multiply-adds that one Sum or SumUpTo may
// spend on convolutions (about a second of work); beyond it they refuse.
const MaxConvolution = 1e9

// convolutionWork estimates the multiply-adds of the n-fold power of a
// table of length m by binary powering, each product cut to limit
// entries if limit > 0.
func convolutionWork(m, n, limit int) float64 {
	work := 0.0
	lr, lb := 1.0, float64(m)
	capped := func(x float64) float64 {
		if limit > 0 && x > float64(limit) {
			return float64(limit)
		}
		return x
	}
	for n > 0 {
		if n&1 == 1 {
			work += lr * lb
			lr = capped(lr + lb - 1)
		}
		n >>= 1
		if n > 0 {
			work += lb * lb
			lb = capped(2*lb - 1)
		}
	}
	return work
}

// Sum returns the law of D_1 + ... + D_n for n independent copies of d,
// such as the demand over a lead time of n periods.
//
// n = 0 gives the point mass at 0 and n = 1 gives d itself. Poisson(m)
// sums to Poisson(n m) and a negative binomial sums to the negative binomial
// with the same p, mean n M and variance n V (Johnson, Kemp and Kotz 2005,
// section 5.1); both keep their closed-form tails. Every other distribution
// (an explicit pmf, and the discretised normal and gamma, whose sums are not
// of their own family) is convolved as a Table: each factor is cut at
// B = d.Bound(SumNeglect/n), so the result is exact on 0..B and lacks a
// mass of 1 - (1 - P(D > B))^n <= SumNeglect beyond, reported by Neglected.
// A pmf of finite support is not cut unless the table would grow beyond
// 2^24 points. Mean and Variance of the result are n E[D] and n Var[D]
// exactly.
func Sum(d Distribution, n int) (Distribution, error) {
	switch {
	case n < 0:
		return nil, &FieldError{Field: "lead_time", Value: strconv.Itoa(n), Want: "a number of periods >= 0"}
	case n == 0:
		return pointMass(), nil
	case n == 1:
		return d, nil
	}
	fn := float64(n)
	switch d := d.(type) {
	case Poisson:
		return Poisson{m: fn * d.m}, nil
	case NegBin:
		return makeNegBin(fn*d.m, fn*d.v, fn*d.r, d.p, d.q), nil
	}
	f, cut, err := factor(d, n)
	if err != nil {
		return nil, err
	}
	if convolutionWork(len(f), n, -1) > MaxConvolution {
		return nil, &FieldError{Field: "demand", Value: d.String(),
			Want: fmt.Sprintf("a demand whose %d-period sum needs at most 1e9 operations to tabulate (its table has %d points; use a narrower demand or a shorter lead time)", n, len(f)), Err: ErrLimit}
	}
	w := power(f, n, -1)
	t := newTable(trim(w), 1, -math.Expm1(fn*math.Log1p(-cut)))
	t.mean, t.vari = fn*d.Mean(), fn*d.Variance()
	return Table{t}, nil
}

// SumUpTo returns P(D_1 + ... + D_n = k) for k = 0..K, exactly: the
// convolution restricted to 0..K needs each factor only on 0..K. Closed
// forms (Poisson, negative binomial) are evaluated directly; otherwise the
// table is built by binary powering in O(K^2 log n).
func SumUpTo(d Distribution, n, K int) ([]float64, error) {
	if K < 0 || K >= maxTable {
		return nil, &FieldError{Field: "demand", Value: d.String(), Want: fmt.Sprintf("a table bound 0..%d, not %d", maxTable-1, K)}
	}
	if n < 0 {
		return nil, &FieldError{Field: "lead_time", Value: strconv.Itoa(n), Want: "a number of periods >= 0"}
	}
	switch d.(type) {
	case Poisson, NegBin:
	default:
		if n > 1 && convolutionWork(K+1, n, K+1) > MaxConvolution {
			return nil, &FieldError{Field: "demand", Value: d.String(),
				Want: fmt.Sprintf("a table bound K whose %d-period convolution on 0..K needs at most 1e9 operations, not K = %d", n, K), Err: ErrLimit}
		}
	}
	out := make([]float64, K+1)
	switch d.(type) {
	case Poisson, NegBin:
		s, _ := Sum(d, n)
		for k := range out {
			out[k] = s.PMF(k)
		}
		return out, nil
	}
	if n == 0 {
		out[0] = 1
		return out, nil
	}
	for k := range out {
		out[k] = d.PMF(k)
	}
	if n == 1 {
		return out, nil
	}
	res := power(out, n, K+1)
	copy(out, res)
	for k := len(res); k < len(out); k++ {
		out[k] = 0
	}
	return out, nil
}

// pointMass returns the point mass at 0 (the zero Table).
func pointMass() Table { return Table{} }

// factor tabulates d on 0..B with the mass beyond B, cut where the tail is
// at most SumNeglect/n (or not at all for a short finite table).
func factor(d Distribution, n int) (f []float64, cut float64, err error) {
	if t, ok := d.(Table); ok && t.Neglected() == 0 && (t.Len()-1)*n < maxTable {
		f = make([]float64, t.Len())
		for k := range f {
			f[k] = t.PMF(k)
		}
		return f, 0, nil
	}
	b := d.Bound(SumNeglect / float64(n))
	if convolutionWork(b+1, n, -1) > MaxConvolution {
		return nil, 0, &FieldError{Field: "demand", Value: d.String(),
			Want: fmt.Sprintf("a demand whose %d-period sum needs at most 1e9 operations to tabulate (its table has %d points; use a narrower demand or a shorter lead time)", n, b+1), Err: ErrLimit}
	}
	if b*n >= maxTable {
		return nil, 0, &FieldError{Field: "demand", Value: d.String(),
			Want: fmt.Sprintf("a demand whose sum over %d periods fits a table of %d points", n, maxTable), Err: ErrLimit}
	}
	f = make([]float64, b+1)
	for k := range f {
		f[k] = d.PMF(k)
	}
	return f, d.Tail(b + 1), nil
}

// power returns the n-fold convolution of f with itself by binary
// powering, keeping only the first limit entries if limit > 0.
func power(f []float64, n, limit int) []float64 {
	result := []float64{1}
	base := f
	for {
		if n&1 == 1 {
			result = convolve(result, base, limit)
		}
		n >>= 1
		if n == 0 {
			return result
		}
		base = convolve(base, base, limit)
	}
}

// convolve returns a * b, cut to its first limit entries if limit > 0.
func convolve(a, b []float64, limit int) []float64 {
	n := len(a) + len(b) - 1
	if limit > 0 && n > limit {
		n = limit
	}
	out := make([]float64, n)
	for i, x := range a {
		if x == 0 || i >= n {
			continue
		}
		row := out[i:]
		bb := b
		if len(bb) > len(row) {
			bb = bb[:len(row)]
		}
		for j, y := range bb {
			row[j] += x * y
		}
	}
	return out
}

// trim drops trailing zeros.
func trim(w []float64) []float64 {
	n := len(w)
	for n > 1 && w[n-1] == 0 {
		n--
	}
	return w[:n]
}
