package chain

import "math"

// Residual returns ||pi P - pi||_1 = sum_j |sum_i pi_i P(i,j) - pi_j|.
func Residual(m Matrix, pi []float64) float64 {
	m = unwrap(m)
	n := m.Len()
	y := make([]float64, n)
	mulVec(m, pi, y)
	var r float64
	for j := range y {
		r += math.Abs(y[j] - pi[j])
	}
	return r
}

// mulVec sets y = x P.
func mulVec(m Matrix, x, y []float64) {
	for j := range y {
		y[j] = 0
	}
	if c, ok := m.(*CSR); ok {
		for i := 0; i < c.n; i++ {
			xi := x[i]
			if xi == 0 {
				continue
			}
			for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
				y[c.col[k]] += xi * c.val[k]
			}
		}
		return
	}
	for i := 0; i < m.Len(); i++ {
		xi := x[i]
		if xi == 0 {
			continue
		}
		m.Row(i, func(j int, p float64) { y[j] += xi * p })
	}
}

// Balance returns the largest violation of global balance over single
// states, max_i |out_i - in_i| with out_i = pi_i sum_{k!=i} P(i,k) and
// in_i = sum_{k!=i} pi_k P(k,i), and the state where it occurs. Global
// balance is the defining property of a stationary distribution
// (Stewart 1994, sec. 1.6). 1 - P(i,i) is computed as the sum of the other
// entries of row i, without subtraction.
func Balance(m Matrix, pi []float64) (worst float64, state int) {
	m = unwrap(m)
	n := m.Len()
	in := make([]float64, n)
	out := make([]float64, n)
	c, isCSR := m.(*CSR)
	if isCSR {
		for i := 0; i < n; i++ {
			pii := pi[i]
			var off float64
			for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
				if j := int(c.col[k]); j != i {
					off += c.val[k]
					in[j] += pii * c.val[k]
				}
			}
			out[i] = pii * off
		}
	}
	for i := 0; i < n && !isCSR; i++ {
		pii := pi[i]
		var off float64
		m.Row(i, func(j int, p float64) {
			if j != i {
				off += p
				in[j] += pii * p
			}
		})
		out[i] = pii * off
	}
	for i := 0; i < n; i++ {
		if d := math.Abs(out[i] - in[i]); d > worst {
			worst, state = d, i
		}
	}
	return worst, state
}

// CutFlow returns the probability flow across the cut between the set
// in (in[i] true) and its complement: out = sum_{i in, j not in} pi_i
// P(i,j) and back = sum_{i not in, j in} pi_i P(i,j). For a stationary pi
// the two are equal: summing global balance over the states of the set,
// the flows inside it cancel (common practice; used by the cut equations of
// Stewart 1994, sec. 1.6).
func CutFlow(m Matrix, pi []float64, in []bool) (out, back float64) {
	m = unwrap(m)
	for i := 0; i < m.Len(); i++ {
		pii, ini := pi[i], in[i]
		m.Row(i, func(j int, p float64) {
			if ini != in[j] {
				if ini {
					out += pii * p
				} else {
					back += pii * p
				}
			}
		})
	}
	return out, back
}

// Check returns the diagnostics of any vector pi for m: Residual, Balance,
// BalanceState, States and NonZeros (Method and Iterations left zero).
func Check(m Matrix, pi []float64) Diagnostics {
	m = unwrap(m)
	var d Diagnostics
	d.States = m.Len()
	d.NonZeros = nonZeros(m)
	d.Residual = Residual(m, pi)
	d.Balance, d.BalanceState = Balance(m, pi)
	return d
}
