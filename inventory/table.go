package inventory

import (
	"math"
	"sort"
	"strconv"
	"strings"
)

// MaxSupport is the largest support point an explicit probability mass
// function may name.
const MaxSupport = 1 << 20

// Table is a distribution given by its probability mass function on
// 0..Len()-1: an explicit pmf (NewPMF, NewPMFMap, Parse of "pmf:...") or the
// result of a convolution (Sum).
//
// An explicit pmf keeps the weights w_k as given and divides by their sum
// W, computed with compensated summation: P(D = k) = w_k / W. So the
// weights print back unchanged and Parse(t.String()) is the same table.
//
// A table made by truncated convolution may lack a mass Neglected() <= 1e-12
// that lies beyond the table: PMF and CDF leave it out, Tail counts it, so
// CDF(k) + Tail(k+1) = 1 for every k and Tail(k) = Neglected() for k >= Len().
// Mean and Variance are then the exact moments of the untruncated sum.
//
// A Table refers to immutable shared data, so copies are cheap and Tables
// compare with == by identity. The zero Table is the point mass at 0.
type Table struct {
	*table
}

type table struct {
	w          []float64 // weights on 0..n-1, no trailing zeros
	norm       float64   // divisor of the weights
	cum        []float64 // cum[k] = sum_{j<=k} w_j
	suf        []float64 // suf[k] = sum_{j>=k} w_j, suf[n] = 0
	neglected  float64
	mean, vari float64
}

// zeroTable backs the zero Table; it is never modified.
var zeroTable = &table{w: []float64{1}, norm: 1, cum: []float64{1}, suf: []float64{1, 0}}

func (t Table) get() *table {
	if t.table == nil {
		return zeroTable
	}
	return t.table
}

// NewPMF returns the distribution with P(D = k) proportional to p[k]. The
// entries must be finite and >= 0 and sum to 1 within 1e-9; they are
// renormalised by their sum.
func NewPMF(p []float64) (Table, error) {
	for k, x := range p {
		if math.IsNaN(x) || math.IsInf(x, 0) || x < 0 {
			return Table{}, &FieldError{Field: "demand", Value: pmfSpec(p),
				Want: "pmf probabilities that are finite numbers >= 0, not " + strconv.Itoa(k) + "=" + ftoa(x)}
		}
	}
	if len(p) > MaxSupport+1 {
		return Table{}, &FieldError{Field: "demand", Value: "pmf with " + strconv.Itoa(len(p)) + " points",
			Want: "a pmf on at most 0.." + strconv.Itoa(MaxSupport)}
	}
	n := len(p)
	for n > 0 && p[n-1] == 0 {
		n--
	}
	w := append([]float64(nil), p[:n]...)
	var s sum
	for _, x := range w {
		s.Add(x)
	}
	total := s.Value()
	if !(math.Abs(total-1) <= 1e-9) {
		return Table{}, &FieldError{Field: "demand", Value: pmfSpec(p),
			Want: "pmf probabilities that sum to 1 within 1e-9, not to " + ftoa(total)}
	}
	t := newTable(w, total, 0)
	t.mean, t.vari = t.tableMoments()
	return Table{t}, nil
}

// NewPMFMap is NewPMF with the probabilities given by support point, each
// an integer in 0..MaxSupport.
func NewPMFMap(m map[int]float64) (Table, error) {
	n := 0
	for k := range m {
		if k < 0 || k > MaxSupport {
			return Table{}, &FieldError{Field: "demand", Value: "pmf:" + strconv.Itoa(k) + "=" + ftoa(m[k]),
				Want: "pmf support points that are whole numbers 0.." + strconv.Itoa(MaxSupport)}
		}
		if k+1 > n {
			n = k + 1
		}
	}
	p := make([]float64, n)
	for k, x := range m {
		p[k] = x
	}
	return NewPMF(p)
}

// newTable builds the cumulative sums of w; the caller sets the moments.
func newTable(w []float64, norm, neglected float64) *table {
	n := len(w)
	t := &table{w: w, norm: norm, neglected: neglected, cum: make([]float64, n), suf: make([]float64, n+1)}
	var s sum
	for k, x := range w {
		s.Add(x)
		t.cum[k] = s.Value()
	}
	s = sum{}
	for k := n - 1; k >= 0; k-- {
		s.Add(w[k])
		t.suf[k] = s.Value()
	}
	return t
}

// tableMoments returns the mean and variance of the weights.
func (t *table) tableMoments() (mean, variance float64) {
	var m sum
	for k, x := range t.w {
		m.Add(float64(k) * x)
	}
	mean = m.Value() / t.norm
	var v sum
	for k, x := range t.w {
		y := float64(k) - mean
		v.Add(y * y * x)
	}
	return mean, v.Value() / t.norm
}

// Len returns the length of the table: P(D = k) = 0 for k >= Len().
func (t Table) Len() int { return len(t.get().w) }

// Neglected returns the probability mass that the table leaves out
// (0 for an explicit pmf).
func (t Table) Neglected() float64 { return t.get().neglected }

// PMF returns P(D = k).
func (t Table) PMF(k int) float64 {
	d := t.get()
	if k < 0 || k >= len(d.w) {
		return 0
	}
	return d.w[k] / d.norm
}

// CDF returns P(D <= k), without the neglected mass.
func (t Table) CDF(k int) float64 {
	d := t.get()
	switch {
	case k < 0:
		return 0
	case k >= len(d.w):
		k = len(d.w) - 1
		if k < 0 {
			return 0
		}
	}
	if d.suf[k+1] < d.cum[k] {
		return clamp01(1 - d.neglected - d.suf[k+1]/d.norm)
	}
	return clamp01(d.cum[k] / d.norm)
}

// Tail returns P(D >= k), including the neglected mass.
func (t Table) Tail(k int) float64 {
	d := t.get()
	switch {
	case k <= 0:
		return 1
	case k >= len(d.w):
		return d.neglected
	}
	if d.cum[k-1] < d.suf[k] {
		return clamp01(1 - d.cum[k-1]/d.norm)
	}
	return clamp01(d.suf[k]/d.norm + d.neglected)
}

// Mean returns E[D].
func (t Table) Mean() float64 { return t.get().mean }

// Variance returns Var[D].
func (t Table) Variance() float64 { return t.get().vari }

// Bound returns the smallest k with P(D > k) <= eps; Len() if eps is below
// the neglected mass.
func (t Table) Bound(eps float64) int {
	d := t.get()
	if eps < d.neglected {
		return len(d.w)
	}
	return sort.Search(len(d.w), func(k int) bool { return t.Tail(k+1) <= eps })
}

// String prints the nonzero weights as pmf:k=w_k,...
func (t Table) String() string { return pmfSpec(t.get().w) }

func pmfSpec(w []float64) string {
	var b strings.Builder
	b.WriteString("pmf:")
	first := true
	for k, x := range w {
		if x == 0 {
			continue
		}
		if !first {
			b.WriteByte(',')
		}
		first = false
		b.WriteString(strconv.Itoa(k))
		b.WriteByte('=')
		b.WriteString(ftoa(x))
	}
	return b.String()
}
