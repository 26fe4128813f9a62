package chain

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// Size limits of the dense methods (their storage is n*n float64 and their
// work O(n^3)).
const (
	MaxEigenStates  = 1000
	MaxDirectStates = 4000
	MaxGTHStates    = 4000
	// AutoDenseStates is the largest closed class that MethodAuto solves
	// with dense GTH; larger ones go to banded GTH when the bandwidth w
	// allows (n*w^2 <= 4e9), else to IAD when ncdPartition finds nearly
	// decomposable blocks, else to Gauss-Seidel.
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
//
// The classes are found by Classify (Tarjan's algorithm plus a period
// search), except for Gauss-Seidel on a *CSR: there Solve first tries
// whether every state can reach state 0 (rootedClass), which for a chain
// built breadth first from state 0 costs a few sequential passes and
// proves that the closed class is unique; only if not does it classify in
// full. The answer is the same either way.
func Solve(m Matrix, opt Options) (Result, error) {
	labels := labelsOf(m)
	m = unwrap(m)
	if m == nil || m.Len() < 1 {
		return Result{}, &ShapeError{Msg: "empty chain: want at least 1 state"}
	}
	if opt.Tol == 0 {
		opt.Tol = DefaultTol
	}
	if err := checkTol(opt.Tol, m); err != nil {
		return Result{}, err
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
	if opt.Init != nil {
		if err := checkInit(opt.Init, n); err != nil {
			return Result{}, err
		}
	}
	var (
		members   []int // the closed class, in order
		per       int   // its period
		transient int   // states outside it
	)
	if c, ok := m.(*CSR); ok && opt.Method == MethodGaussSeidel {
		if mem, p, ok := rootedClass(c); ok {
			members, per, transient = mem, p, n-len(mem)
		}
	}
	if members == nil {
		st := Classify(m)
		if len(st.Closed) != 1 {
			cl := make([][]int, len(st.Closed))
			for k, c := range st.Closed {
				cl[k] = st.Classes[c]
			}
			return Result{}, &ReducibleError{Closed: cl, Labels: labels}
		}
		members, per, transient = st.Classes[st.Closed[0]], st.Period[0], len(st.Transient)
	}
	sub := m
	if len(members) < n {
		sub = restrict(m, members)
		if opt.Init != nil {
			init := make([]float64, len(members))
			for k, s := range members {
				init[k] = opt.Init[s]
			}
			if sum(init) == 0 {
				init = nil // the start put all its mass on transient states
			}
			opt.Init = init
		}
	}
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
	d.Method, d.Iterations, d.Lazy, d.Fallback = r.Diagnostics.Method, r.Diagnostics.Iterations, r.Diagnostics.Lazy, r.Diagnostics.Fallback
	d.Transient = transient
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

// solveIrreducible runs the chosen method on an irreducible chain, and
// makes sure of the answer: an automatic solve (MethodAuto, or
// Options.Fallback) whose iterative method crawls switches to one that
// suits a slowly mixing chain (slowChoice), and any method whose answer
// has a non-finite or negative component is replaced by one that cannot
// underflow (safeChoice), or the solve fails. Diagnostics.Method then
// names both ("gauss-seidel->gmres") and Diagnostics.Fallback says why.
func solveIrreducible(m Matrix, per int, opt Options, name func(int) string) (Result, error) {
	n := m.Len()
	meth := opt.Method
	auto := meth == MethodAuto
	var part *partition // the NCD blocks when auto found them
	if n == 1 {
		if auto {
			meth = MethodGTH // nothing to eliminate: pi = (1)
		}
		return Result{Pi: []float64{1}, Diagnostics: Diagnostics{Method: meth}}, nil
	}
	if auto {
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
			if p, ok := ncdPartition(ToCSR(m)); ok {
				meth, part = MethodIAD, &p
			}
		}
	}
	var sw *switcher
	if (auto || opt.Fallback) && (meth == MethodGaussSeidel || meth == MethodPower) {
		sw = &switcher{limit: min(SwitchSweeps, opt.MaxIter)}
	}
	pi, it, lazy, err := runMethod(m, meth, per, opt, part, name, sw)
	used := meth
	why := ""
	if err != nil {
		var se *switchError
		crawled := errors.As(err, &se) || (auto && meth == MethodIAD && errors.Is(err, ErrNotConverged))
		if !crawled || opt.Context != nil && opt.Context.Err() != nil {
			return Result{}, err
		}
		to := slowChoice(m)
		o := opt
		if finiteVector(pi) {
			o.Init = pi
		}
		o.MaxIter = max(opt.MaxIter-it, 1)
		pi2, it2, _, err2 := runMethod(m, to, per, o, nil, name, nil)
		if err2 != nil {
			return Result{}, fmt.Errorf("%v; then %w", err, err2)
		}
		pi, it, used = pi2, it+it2, meth+"->"+to
		why = err.Error()
		if se != nil {
			why = fmt.Sprintf("%s after %d sweeps (residual %.3g): %s", se.method, se.sweeps, se.residual, se.reason)
		}
		meth, lazy = to, false
	}
	if (meth == MethodDirect || meth == MethodEigen) && badEntry(pi) >= 0 {
		clampRoundOff(pi) // round-off negatives of an unstructured method
	}
	if k := badEntry(pi); k >= 0 {
		bad := fmt.Sprintf("%s gave probability %v to state %s", meth, pi[k], name(k))
		to, ok := safeChoice(m, meth)
		if !ok {
			return Result{}, fmt.Errorf("%s, and no method that cannot underflow applies to %d states with bandwidth %d (GTH is limited to %d states or a narrow band): try --method gmres or gauss-seidel", bad, n, bandwidth(m), MaxGTHStates)
		}
		pi2, it2, _, err2 := runMethod(m, to, per, opt, nil, name, nil)
		if err2 != nil {
			return Result{}, fmt.Errorf("%s; then %w", bad, err2)
		}
		if k2 := badEntry(pi2); k2 >= 0 {
			return Result{}, fmt.Errorf("%s; then %s gave probability %v to state %s", bad, to, pi2[k2], name(k2))
		}
		pi, it, used, lazy = pi2, it+it2, used+"->"+to, false
		if why != "" {
			why += "; "
		}
		why += bad
	}
	return Result{Pi: pi, Diagnostics: Diagnostics{Method: used, Iterations: it, Lazy: lazy, Fallback: why}}, nil
}

// fallbackBandWork is the largest n w^2 for which a crawling iterative
// solve switches to banded GTH rather than GMRES.
const fallbackBandWork = 2e8

// slowChoice is the method for a chain on which an iterative method
// crawled: GTH when it is cheap (dense up to AutoDenseStates, or a band
// with n w^2 <= fallbackBandWork), else GMRES.
func slowChoice(m Matrix) Method {
	n := m.Len()
	if n <= AutoDenseStates {
		return MethodGTH
	}
	if w := bandwidth(m); float64(n)*float64(w)*float64(w) <= fallbackBandWork && bandedOK(n, w) {
		return MethodGTH
	}
	return MethodGMRES
}

// safeChoice is the method that replaces one whose answer was not finite
// or had a negative component: GTH (subtraction-free, extended-range
// substitution) when it applies, else Gauss-Seidel (which keeps every
// component >= 0 and normalises each sweep).
func safeChoice(m Matrix, failed Method) (Method, bool) {
	n := m.Len()
	if failed != MethodGTH && (n <= MaxGTHStates || bandedOK(n, bandwidth(m))) {
		return MethodGTH, true
	}
	if failed != MethodGaussSeidel && failed != MethodGMRES {
		return MethodGaussSeidel, true
	}
	return "", false
}

// runMethod runs one method on an irreducible chain; an iterative method
// that fails returns its last iterate with the error.
func runMethod(m Matrix, meth Method, per int, opt Options, part *partition, name func(int) string, sw *switcher) (pi []float64, it int, lazy bool, err error) {
	n := m.Len()
	ctx := opt.Context
	switch meth {
	case MethodForward:
		pi, err = forward(m, name)
	case MethodUniform:
		if !isDoublyStochastic(m) {
			return nil, 0, false, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("a column sum differs from 1 by more than %g (not doubly stochastic)", DoublyStochasticTol)}
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
			return nil, 0, false, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("%d states in the closed class with bandwidth %d: GTH is dense O(n^3) above %d states unless the band is narrow (n*w^2 <= %g); refused before allocating %s", n, w, MaxGTHStates, maxBandWork, bytesText(8*float64(n)*float64(n)))}
		}
	case MethodDirect:
		if n > MaxDirectStates {
			return nil, 0, false, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("%d states in the closed class: direct LU is dense O(n^3), limit %d states; refused before allocating %s", n, MaxDirectStates, bytesText(16*float64(n)*float64(n)))}
		}
		pi, err = direct(m)
	case MethodEigen:
		if n > MaxEigenStates {
			return nil, 0, false, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("%d states in the closed class: eigen is dense O(n^3), limit %d states; refused before allocating %s", n, MaxEigenStates, bytesText(24*float64(n)*float64(n)))}
		}
		pi, err = eigen(m)
	case MethodPower:
		lazy = per > 1
		pi, it, err = power(ctx, ToCSR(m), lazy, opt.Tol, opt.MaxIter, opt.Init, sw)
	case MethodGaussSeidel:
		pi, it, err = gaussSeidel(ctx, ToCSR(m), opt.Tol, opt.MaxIter, opt.Init, sw)
	case MethodGMRES:
		pi, it, err = gmresSolve(ctx, ToCSR(m), opt.Tol, opt.MaxIter, opt.Init)
	case MethodIAD:
		c := ToCSR(m)
		if part == nil {
			p, ok := ncdPartition(c)
			if !ok {
				return nil, 0, false, &MethodMismatchError{Method: meth, Reason: fmt.Sprintf("no nearly decomposable blocks found: want a gap of at least %d binary orders of magnitude among the entries below 2^-10, 2 to min(n/2, %d) strongly connected blocks above it, and at most %g of each row's mass leaving its block", ncdGap, MaxIADBlocks, AutoCoupling)}
			}
			part = &p
		}
		pi, it, err = iad(ctx, c, *part, opt.Tol, opt.MaxIter, opt.Init)
	default:
		return nil, 0, false, &MethodError{Name: string(meth)}
	}
	return pi, it, lazy, err
}

// bytesText formats a byte count for a message.
func bytesText(b float64) string {
	switch {
	case b >= 1<<40:
		return fmt.Sprintf("%.3g TiB", b/(1<<40))
	case b >= 1<<30:
		return fmt.Sprintf("%.3g GiB", b/(1<<30))
	default:
		return fmt.Sprintf("%.3g MiB", b/(1<<20))
	}
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

// checkInit checks a starting vector of Options.Init.
func checkInit(init []float64, n int) error {
	if len(init) != n {
		return &ShapeError{Msg: fmt.Sprintf("starting vector of %d entries for a chain of %d states: want %d", len(init), n, n)}
	}
	var s float64
	for i, v := range init {
		if !(v >= 0) || math.IsInf(v, 0) {
			return fmt.Errorf("starting vector, state %d: %v: want a finite number >= 0", i, v)
		}
		s += v
	}
	if !(s > 0) || math.IsInf(s, 0) {
		return fmt.Errorf("starting vector sums to %v: want a finite sum > 0", s)
	}
	return nil
}

// rootedClass finds the closed class of c without the full decomposition
// into classes when state 0 can be reached from every state: then every
// closed class contains state 0, so there is exactly one, and it is the set
// of states reachable from 0 (all other states are transient). reachesRoot
// proves the premise, a breadth-first search from 0 finds the class, and
// its period is 1 when a member has a self-loop, else the gcd of
// level(u)+1-level(v) over its edges u -> v with the breadth-first levels
// from 0 (as Classify computes it). Only transitions with p > 0 count. ok
// is false when some state cannot reach 0; the caller then classifies in
// full.
func rootedClass(c *CSR) (members []int, per int, ok bool) {
	n := c.n
	zeros := slices.Contains(c.val, 0)
	if !reachesRoot(c, zeros) {
		return nil, 0, false
	}
	level := make([]int32, n)
	for i := range level {
		level[i] = -1
	}
	queue := make([]int32, 1, n)
	level[0] = 0
	for h := 0; h < len(queue); h++ {
		u := queue[h]
		for k := c.rowPtr[u]; k < c.rowPtr[u+1]; k++ {
			if v := c.col[k]; level[v] < 0 && c.val[k] > 0 {
				level[v] = level[u] + 1
				queue = append(queue, v)
			}
		}
	}
	members = make([]int, 0, len(queue))
	for i, l := range level {
		if l >= 0 {
			members = append(members, i)
		}
	}
	for _, i := range members {
		for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
			if int(c.col[k]) == i && c.val[k] > 0 {
				return members, 1, true
			}
		}
	}
	d := 0
	for _, u := range members {
		for k := c.rowPtr[u]; k < c.rowPtr[u+1]; k++ {
			if c.val[k] > 0 {
				d = gcd(d, abs(int(level[u])+1-int(level[c.col[k]])))
			}
		}
	}
	if d == 0 {
		d = 1 // defensive: a closed class always has a cycle
	}
	return members, d, true
}

// rootSweeps is how many sweeps over the rows reachesRoot makes before it
// finishes with a breadth-first search over the columns.
const rootSweeps = 6

// reachesRoot reports whether state 0 can be reached from every state of c
// (zeros: whether c stores explicit zeros, which are not transitions). A
// state reaches 0 iff it is 0 or one of its successors does: sweeps over
// the rows, alternately forwards and backwards, mark such states using the
// marks already made. These are sequential passes over the storage, and
// few are needed when the states are numbered in breadth-first order from
// 0, as a chain built from a start state usually is (4 or 5 for the
// lost-sales chains of package policies). A sweep that marks nothing more
// proves that the unmarked states cannot reach 0. After rootSweeps sweeps a
// breadth-first search backwards over the columns, from every marked state,
// finishes the job in O(n + nnz).
func reachesRoot(c *CSR, zeros bool) bool {
	n := c.n
	seen := make([]bool, n)
	seen[0] = true
	count := 1
	mark := func(i int) bool {
		for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
			if seen[c.col[k]] && (!zeros || c.val[k] > 0) {
				seen[i] = true
				count++
				return true
			}
		}
		return false
	}
	for sweep := 0; sweep < rootSweeps && count < n; sweep++ {
		changed := false
		if sweep%2 == 0 {
			for i := 1; i < n; i++ {
				if !seen[i] && mark(i) {
					changed = true
				}
			}
		} else {
			for i := n - 1; i >= 1; i-- {
				if !seen[i] && mark(i) {
					changed = true
				}
			}
		}
		if !changed {
			return false
		}
	}
	if count == n {
		return true
	}
	ptr, row, val := transpose(c)
	queue := make([]int32, 0, n)
	for i, s := range seen {
		if s {
			queue = append(queue, int32(i))
		}
	}
	for h := 0; h < len(queue); h++ {
		v := queue[h]
		for k := ptr[v]; k < ptr[v+1]; k++ {
			if u := row[k]; !seen[u] && val[k] > 0 {
				seen[u] = true
				queue = append(queue, u)
			}
		}
	}
	return len(queue) == n
}
