package chain

import (
	"fmt"
	"math"
)

// Switching away from a crawling iterative method, and the checks that no
// method returns a non-finite or negative probability.

// SwitchSweeps is the most sweeps an automatic solve (MethodAuto, or
// Options.Fallback) gives Gauss-Seidel or the power method before it
// switches to a method that suits a slowly mixing chain. It switches
// earlier when the residual has stopped falling, or when the rate of the
// last switchWindow sweeps predicts more than SwitchSweeps in all.
const SwitchSweeps = 300

// switchWindow is the span of sweeps over which the convergence rate is
// measured.
const switchWindow = 16

// switcher watches the residuals of an iterative method for an automatic
// solve; a nil *switcher never switches.
type switcher struct {
	limit int
	hist  [switchWindow + 1]float64 // residuals of the last sweeps, by it % len
}

// switchError is returned by an iterative method that gives way; it wraps
// ErrNotConverged.
type switchError struct {
	method   Method
	sweeps   int
	residual float64
	reason   string
}

func (e *switchError) Error() string {
	return fmt.Sprintf("%s: %v after %d sweeps: residual %.3g, %s", e.method, ErrNotConverged, e.sweeps, e.residual, e.reason)
}

func (e *switchError) Unwrap() error { return ErrNotConverged }

// check is called after sweep it with residual r.
func (s *switcher) check(m Method, it int, r, tol float64) error {
	if s == nil {
		return nil
	}
	s.hist[it%len(s.hist)] = r
	if it >= s.limit {
		return &switchError{m, it, r, fmt.Sprintf("not converged within %d sweeps", s.limit)}
	}
	if it < switchWindow+8 || it%4 != 0 {
		return nil
	}
	r0 := s.hist[(it-switchWindow)%len(s.hist)]
	if !(r0 > 0) || !(r > 0) {
		return nil
	}
	rate := math.Pow(r/r0, 1.0/switchWindow)
	if rate >= 1 {
		return &switchError{m, it, r, fmt.Sprintf("the residual did not fall over the last %d sweeps", switchWindow)}
	}
	need := math.Log(tol/r) / math.Log(rate)
	if float64(it)+need > float64(s.limit) {
		return &switchError{m, it, r, fmt.Sprintf("falling by a factor %.6f a sweep, it would need about %.3g sweeps more", rate, need)}
	}
	return nil
}

// TolError reports a tolerance that cannot be used: at or above 2 (the L1
// residual of any probability vector is at most 2, so any start would meet
// it), not a finite positive number, or below what double precision can
// reach on the chain (Min).
type TolError struct {
	Tol float64
	Min float64 // the least usable tolerance for the chain (0 if not known)
	Msg string
}

func (e *TolError) Error() string { return fmt.Sprintf("tolerance %v: %s", e.Tol, e.Msg) }

// MinTol returns the smallest tolerance accepted for m:
//
//	u (4 + 2 sqrt(nnz / n)),   u = 2^-53,
//
// with nnz/n the mean number of transitions a row. A component of pi P is
// an inner product of about nnz/n terms; its rounding errors behave like a
// random walk, of size about u sqrt(nnz/n) relative to the component
// (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., 2002,
// sec. 2.8, the statistical rule of thumb; from memory), and rounding pi
// itself adds about 2u to ||pi P - pi||_1. A residual target below twice
// that floor can only be met by luck, so it is refused (with 5 transitions
// a row the floor is about 9.4e-16; the default 1e-13 is far above it for
// any row length up to a dense 100,000-state chain).
func MinTol(m Matrix) float64 {
	m = unwrap(m)
	n := m.Len()
	if n < 1 {
		return 0
	}
	r := float64(nonZeros(m)) / float64(n)
	return 0x1p-53 * (4 + 2*math.Sqrt(r))
}

// checkTol checks a tolerance against its range and the chain's floor.
func checkTol(tol float64, m Matrix) error {
	if !(tol > 0) || math.IsInf(tol, 0) {
		return &TolError{Tol: tol, Msg: "want a finite number > 0"}
	}
	if tol >= 2 {
		return &TolError{Tol: tol, Msg: "want a number < 2 (the residual ||pi P - pi||_1 of any probability vector is at most 2, so the start vector would pass)"}
	}
	if lo := MinTol(m); tol < lo {
		return &TolError{Tol: tol, Min: lo, Msg: fmt.Sprintf("want at least %.2g for this chain (double precision cannot reach a smaller residual ||pi P - pi||_1 with %.3g transitions a state on average)", lo, float64(nonZeros(m))/float64(m.Len()))}
	}
	return nil
}

// badEntry returns the first state whose probability is not finite or is
// negative, or -1 (also -1 when all are 0 or the sum is not finite: then
// 0).
func badEntry(pi []float64) int {
	var s float64
	for i, v := range pi {
		if !(v >= 0) || math.IsInf(v, 0) {
			return i
		}
		s += v
	}
	if !(s > 0) || math.IsInf(s, 0) {
		return 0
	}
	return -1
}

// clampRoundOff sets to 0 the negative components of pi (from an
// unstructured dense method, direct or eigen) that are round-off: at most
// 64 u max(pi) in magnitude. It reports false if a larger negative (or a
// non-finite value) remains.
func clampRoundOff(pi []float64) bool {
	var big float64
	for _, v := range pi {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
		big = max(big, v)
	}
	floor := 64 * 0x1p-53 * big
	for i, v := range pi {
		if v < 0 {
			if -v > floor {
				return false
			}
			pi[i] = 0
		}
	}
	if big > 0 {
		normalise(pi)
	}
	return big > 0
}
