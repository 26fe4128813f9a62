package chain

import "gonum.org/v1/gonum/floats"

// bandwidth returns max |i - j| over the non-zero entries, in O(nnz).
func bandwidth(m Matrix) int {
	w := 0
	if c, ok := m.(*CSR); ok {
		for i := 0; i < c.n; i++ {
			for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
				if c.val[k] != 0 {
					w = max(w, abs(int(c.col[k])-i))
				}
			}
		}
		return w
	}
	for i := 0; i < m.Len(); i++ {
		m.Row(i, func(j int, p float64) {
			if p != 0 {
				w = max(w, abs(j-i))
			}
		})
	}
	return w
}

// Limits of banded GTH: work n*w^2 multiply-adds and storage n*(2w+1)
// float64 for bandwidth w.
const (
	maxBandWork  = 4e9
	maxBandBytes = 1 << 30
)

// bandedOK reports whether GTH restricted to the band is affordable.
func bandedOK(n, w int) bool {
	fn, fw := float64(n), float64(w)
	return fn*fw*fw <= maxBandWork && fn*(2*fw+1)*8 <= maxBandBytes
}

// gthBanded is GTH (Grassmann, Taksar & Heyman 1985) on a matrix of
// bandwidth w. Censoring state k only joins states i, j in [k-w, k), so the
// band holds all fill-in and the work is O(n w^2) instead of O(n^3), with
// the same subtraction-free accuracy. Entry (i, j) is kept at
// a[i*(2w+1) + j - i + w].
func gthBanded(m Matrix, w int) []float64 {
	n := m.Len()
	bw := 2*w + 1
	a := make([]float64, n*bw)
	for i := 0; i < n; i++ {
		m.Row(i, func(j int, p float64) { a[i*bw+j-i+w] += p })
	}
	at := func(i, j int) int { return i*bw + j - i + w }
	s := make([]float64, n)
	for k := n - 1; k >= 1; k-- {
		lo := max(0, k-w)
		rk := a[at(k, lo):at(k, k)]
		sk := sum(rk)
		if sk == 0 {
			sk = 5e-324 // reducible input; avoid 0/0
		}
		s[k] = sk
		for j := range rk {
			rk[j] /= sk // as in GTH: a normalised row cannot overflow
		}
		for i := lo; i < k; i++ {
			if f := a[at(i, k)]; f != 0 {
				floats.AddScaled(a[at(i, lo):at(i, k)], f, rk)
			}
		}
	}
	return gthBack(n, func(j int) int { return max(0, j-w) }, func(i, j int) float64 { return a[at(i, j)] }, s)
}
