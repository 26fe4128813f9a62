package chain

import "context"

// Matrix is a square row-stochastic matrix in some storage.
// Row calls fn for every stored entry (j, p) of row i, in increasing j.
// Stored entries may include explicit zeros; structural code treats only
// p > 0 as a transition.
type Matrix interface {
	Len() int
	Row(i int, fn func(j int, p float64))
}

// Method names a stationary solver.
type Method string

// The solvers. MethodAuto picks one from the size, sparsity and structure.
const (
	MethodAuto        Method = "auto"
	MethodPower       Method = "power"
	MethodEigen       Method = "eigen"
	MethodDirect      Method = "direct"
	MethodGTH         Method = "gth"
	MethodGaussSeidel Method = "gauss-seidel"
	// MethodForward is exact forward substitution for chains in which every
	// transition into a state j >= 1 comes from a state i <= j (the chain
	// moves only forward, or restarts in state 0). Subtraction-free, O(nnz).
	MethodForward Method = "forward"
	// MethodUniform answers 1/n for an irreducible doubly stochastic chain.
	MethodUniform Method = "uniform"
	// MethodIAD is iterative aggregation/disaggregation (Koury, McAllister
	// & Stewart 1984) on a nearly completely decomposable chain, with the
	// blocks found by ncdPartition; it refuses a chain without such blocks.
	MethodIAD Method = "iad"
	// MethodGMRES is restarted GMRES with an ILU(0) preconditioner on the
	// system with one state fixed (see gmresSolve), for slowly mixing
	// chains; MethodAuto switches to it when Gauss-Seidel crawls.
	MethodGMRES Method = "gmres"
)

// Methods lists every method name in a stable order.
var Methods = []Method{MethodAuto, MethodPower, MethodEigen, MethodDirect,
	MethodGTH, MethodGaussSeidel, MethodForward, MethodUniform, MethodIAD, MethodGMRES}

// ParseMethod returns the Method named s, or an error naming the choices.
func ParseMethod(s string) (Method, error) {
	for _, m := range Methods {
		if string(m) == s {
			return m, nil
		}
	}
	return "", &MethodError{Name: s}
}

// Defaults applied by Solve to the zero fields of Options.
const (
	DefaultTol     = 1e-13
	DefaultMaxIter = 100000
)

// Options tune a solve. The zero value means auto, tolerance 1e-13 and a
// default iteration cap.
type Options struct {
	Method Method
	// Tol is the target of the residual ||pi P - pi||_1 for the iterative
	// methods (power, gauss-seidel, iad, gmres). Zero means DefaultTol;
	// otherwise it must be finite, below 2 and at least MinTol of the
	// chain (a *TolError otherwise).
	Tol float64
	// MaxIter caps the iterations of the iterative methods. Zero means
	// DefaultMaxIter.
	MaxIter int
	// Init, when not nil, is the vector the iterative methods (power,
	// gauss-seidel, iad) start from instead of the uniform one: one entry per
	// state, finite and >= 0 with a positive sum (it is normalised). A
	// vector near the answer, such as the distribution of a similar chain,
	// saves iterations; the answer still meets Tol. Other methods ignore it.
	Init []float64
	// Context, when not nil, bounds the solve: the iterative methods check
	// it between sweeps and return its error (wrapped) once it is done, so
	// a caller's deadline or cancellation stops a long solve.
	Context context.Context
	// Fallback lets an explicitly chosen gauss-seidel or power solve do
	// what MethodAuto does when it crawls: after SwitchSweeps sweeps, or
	// sooner when the residual stalls or falls too slowly, it switches to
	// banded GTH (when the band is narrow) or GMRES, starting from the
	// last iterate. Diagnostics.Method then reads "gauss-seidel->gmres"
	// and Diagnostics.Fallback says why. MethodAuto always falls back.
	Fallback bool
}

// Diagnostics accompany every stationary distribution.
type Diagnostics struct {
	Method     Method  `json:"method"`
	Iterations int     `json:"iterations"`
	Residual   float64 `json:"residual"` // ||pi P - pi||_1
	Balance    float64 `json:"balance"`  // max over states |flow out - flow in|
	// BalanceState is the state where the worst balance violation occurs.
	BalanceState int `json:"balance_state"`
	States       int `json:"states"`
	NonZeros     int `json:"nonzeros"`

	// Transient is the number of transient states (given probability 0).
	Transient int `json:"transient"`
	// Period is the period of the closed class (1: aperiodic).
	Period int `json:"period"`
	// Lazy reports that the power method iterated the lazy chain (I+P)/2
	// because the chain is periodic.
	Lazy bool `json:"lazy,omitempty"`
	// Fallback, when not empty, says why the method first tried gave way
	// to another (Method is then "first->second"): an iterative method
	// that crawled, or a result with a non-finite or negative component.
	Fallback string `json:"fallback,omitempty"`
}

// Result is a stationary distribution with its diagnostics.
type Result struct {
	Pi          []float64
	Diagnostics Diagnostics
}
