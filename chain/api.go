package chain

// Matrix is a square row-stochastic matrix in some storage.
// Row calls fn for every stored entry (j, p) of row i, in increasing j.
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
)

// Options tune a solve. The zero value means auto, tolerance 1e-13 and a
// default iteration cap.
type Options struct {
	Method  Method
	Tol     float64
	MaxIter int
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
}

// Result is a stationary distribution with its diagnostics.
type Result struct {
	Pi          []float64
	Diagnostics Diagnostics
}
