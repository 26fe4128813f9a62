package chain

import (
	"fmt"
	"math"
)

// Size limits of the dense methods (their storage is n*n float64 and their
// work O(n^3)).
const (
	MaxEigenStates  = 1000
	MaxDirectStates = 4000
	MaxGTHStates    = 4000
	// AutoDenseStates is the largest closed class that MethodAuto solves
	// with dense GTH; larger ones go to banded GTH when the bandwidth w
	// allows (n*w^2 <= 4e9), else to Gauss-Seidel.
	AutoDenseStates = 2000
	// DoublyStochasticTol is the largest |column sum - 1| accepted by the
	// uniform method.
	DoublyStochasticTol = 1e-12
)

// Solve returns the stationary distribution of m, the row vector pi with
// pi P = pi, sum pi = 1, with its diagnostics. The distribution is unique
// iff the chain has exactly one closed class (a standard result, e.g.
// Kemeny & Snell, Finite Markov Chains, 1960, chs. 2-5); otherwise Solve returns a *ReducibleError. Transient states get
// probability 0: the method runs on the closed class alone and its answer
// is embedded. Diagnostics are computed on the whole chain.
func Solve(m Matrix, opt Options) (Result, error) {
	labels := labelsOf(m)
	m = unwrap(m)
	if m == nil || m.Len() < 1 {
		return Result{}, &ShapeError{Msg: "empty chain: want at least 1 state"}
	}
	if opt.Tol == 0 {
		opt.Tol = DefaultTol
	}
	if !(opt.Tol > 0) || math.IsInf(opt.Tol, 0) {
		return Result{}, fmt.Errorf("tolerance %v: want a finite number > 0", opt.Tol)
	}
	if opt.MaxIter == 0 {
		opt.MaxIter = DefaultMaxIter
	}
	if opt.MaxIter < 0 {
		return Result{}, fmt.Errorf("iteration cap %d: want a number >= 1", opt.MaxIter)
	}
	if opt.Method == "" {
		opt.Method = MethodAuto
	}
	if _, err := ParseMethod(string(opt.Method)); err != nil {
		return Result{}, err
	}
	n := m.Len()
	st := Classify(m)
	if len(st.Closed) != 1 {
		cl := make([][]int, len(st.Closed))
		for k, c := range st.Closed {
			cl[k] = st.Classes[c]
		}
		return Result{}, &ReducibleError{Closed: cl, Labels: labels}
	}
	members := st.Classes[st.Closed[0]]
	sub := m
	if len(members) < n {
		sub = restrict(m, members)
	}
	per := st.Period[0]
	name := func(k int) string {
		s := members[k]
		if labels != nil && s < len(labels) {
			return labels[s]
		}
		return fmt.Sprint(s)
	}
	r, err := solveIrreducible(sub, per, opt, name)
	if err != nil {
		return Result{}, err
	}
	if len(members) < n {
		pi := make([]float64, n)
		for k, s := range members {
			pi[s] = r.Pi[k]
		}
		r.Pi = pi
	}
	d := Check(m, r.Pi)
	d.Method, d.Iterations, d.Lazy = r.Diagnostics.Method, r.Diagnostics.Iterations, r.Diagnostics.Lazy
	d.Transient = len(st.Transient)
	d.Period = per
	r.Diagnostics = d
	return r, nil
}

// restrict returns the sub-matrix of a closed class (whose rows have no
// entries outside it), keeping the order of the states.
func restrict(m Matrix, members []int) *CSR {
	n := m.Len()
	pos := make([]int32, n)
	for i := range pos {
		pos[i] = -1
	}
	for k, s := range members {
		pos[s] = int32(k)
	}
	rowPtr := make([]int, len(members)+1)
	var col []int32
	var val []float64
	for k, s := range members {
		m.Row(s, func(j int, p float64) {
			if p != 0 {
				col = append(col, pos[j])
				val = append(val, p)
			}
		})
		rowPtr[k+1] = len(col)
	}
	return &CSR{n: len(members), rowPtr: rowPtr, col: col, val: val}
}

// solveIrreducible runs the chosen method on an irreducible chain.
func solveIrreducible(m Matrix, per int, opt Options, name func(int) string) (Result, error) {
	n := m.Len()
	meth := opt.Method
	if n == 1 {
		if meth == MethodAuto {
			meth = MethodGTH // nothing to eliminate: pi = (1)
		}
		return Result{Pi: []float64{1}, Diagnostics: Diagnostics{Method: meth}}, nil
	}
	if meth == MethodAuto {
		switch {
		case isForward(m):
			meth = MethodForward
		case isDoublyStochastic(m):
			meth = MethodUniform
		case n <= AutoDenseStates:
			meth = MethodGTH
		case bandedOK(n, bandwidth(m)):
			meth = MethodGTH
		default:
			meth = MethodGaussSeidel
		}
	}
	var (
		pi   []float64
		it   int
		lazy bool
		err  error
	)
	switch meth {
	case MethodForward:
		pi, err = forward(m, name)
	case MethodUniform:
		if !isDoublyStochastic(m) {
			return Result{}, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("a column sum differs from 1 by more than %g (not doubly stochastic)", DoublyStochasticTol)}
		}
		pi = make([]float64, n)
		for i := range pi {
			pi[i] = 1 / float64(n)
		}
	case MethodGTH:
		if n <= 64 {
			pi = GTH(toDense(m), n)
			break
		}
		w := bandwidth(m)
		switch {
		case 2*w+1 < n && bandedOK(n, w):
			pi = gthBanded(m, w)
		case n <= MaxGTHStates:
			pi = GTH(toDense(m), n)
		default:
			return Result{}, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("%d states in the closed class with bandwidth %d: GTH is dense O(n^3) above %d states unless the band is narrow (n*w^2 <= %g)", n, w, MaxGTHStates, maxBandWork)}
		}
	case MethodDirect:
		if n > MaxDirectStates {
			return Result{}, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("%d states in the closed class: direct LU is dense O(n^3), limit %d", n, MaxDirectStates)}
		}
		pi, err = direct(m)
	case MethodEigen:
		if n > MaxEigenStates {
			return Result{}, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("%d states in the closed class: eigen is dense O(n^3), limit %d", n, MaxEigenStates)}
		}
		pi, err = eigen(m)
	case MethodPower:
		lazy = per > 1
		pi, it, err = power(ToCSR(m), lazy, opt.Tol, opt.MaxIter)
	case MethodGaussSeidel:
		pi, it, err = gaussSeidel(ToCSR(m), opt.Tol, opt.MaxIter)
	default:
		return Result{}, &MethodError{Name: string(meth)}
	}
	if err != nil {
		return Result{}, err
	}
	return Result{Pi: pi, Diagnostics: Diagnostics{Method: meth, Iterations: it, Lazy: lazy}}, nil
}

// isForward reports whether P(i,j) = 0 whenever i > j >= 1, in O(nnz).
func isForward(m Matrix) bool {
	if c, ok := m.(*CSR); ok {
		for i := 1; i < c.n; i++ {
			for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
				if j := int(c.col[k]); j >= 1 && j < i && c.val[k] != 0 {
					return false
				}
			}
		}
		return true
	}
	ok := true
	for i := 1; i < m.Len() && ok; i++ {
		m.Row(i, func(j int, p float64) {
			if p != 0 && j >= 1 && j < i {
				ok = false
			}
		})
	}
	return ok
}

// isDoublyStochastic reports whether every column sums to 1 within
// DoublyStochasticTol, in O(nnz).
func isDoublyStochastic(m Matrix) bool {
	n := m.Len()
	cs := make([]float64, n)
	if c, ok := m.(*CSR); ok {
		for k, j := range c.col {
			cs[j] += c.val[k]
		}
	} else {
		for i := 0; i < n; i++ {
			m.Row(i, func(j int, p float64) { cs[j] += p })
		}
	}
	for _, s := range cs {
		if math.Abs(s-1) > DoublyStochasticTol {
			return false
		}
	}
	return true
}
