// Package chain holds finite discrete-time Markov chains: dense and sparse
// (CSR) storage with validation, structure (communicating classes, closed
// classes, periods), stationary solvers selectable by name, and the balance
// checks that accompany every answer. It knows nothing about inventory.
//
// # Storage
//
// Dense keeps P row-major; CSR keeps compressed sparse rows and is built
// from (i, j, p) triplets by a Builder (duplicates summed). Constructors
// check that the matrix is square, that entries are finite and in [0,1],
// and that every row sums to 1 within RowSumTol = 1e-9. Labeled attaches
// state labels for messages only. Read, ReadDense and ReadList parse CSV
// files; their errors are *ReadError values naming file, line and column.
//
// # Structure
//
// Classify finds the communicating classes (strongly connected components,
// Tarjan 1972), the closed classes, their periods and the transient
// states. The stationary distribution pi (pi P = pi, sum pi = 1) is unique
// iff there is exactly one closed class; Solve then solves on that class
// and gives transient states probability 0, and otherwise returns a
// *ReducibleError listing the closed classes.
//
// # Methods
//
//   - gth: Grassmann, Taksar & Heyman (Operations Research 33(5), 1985),
//     subtraction-free state reduction; dense O(n^3), or O(n w^2) on a
//     matrix of bandwidth w. Componentwise accurate even when blocks are
//     coupled by 1e-10.
//   - forward: exact O(nnz) substitution when P(i,j) = 0 for i > j >= 1.
//   - uniform: 1/n for a doubly stochastic irreducible chain (checked).
//   - direct: pi (P - I) = 0 with one equation replaced by sum pi = 1,
//     dense LU (gonum mat).
//   - eigen: left eigenvector of eigenvalue 1 (gonum mat.Eigen).
//   - power: x <- x P; on a periodic chain the lazy chain (I + P)/2.
//   - gauss-seidel: sweeps on pi (I - P) = 0 using the transpose.
//   - iad: iterative aggregation/disaggregation (Koury, McAllister &
//     Stewart, SIAM J. Algebraic Discrete Methods 5(2), 1984) on a nearly
//     completely decomposable chain: aggregate, solve the block chain by
//     GTH, disaggregate, one block Gauss-Seidel sweep with exact GTH block
//     solves. The blocks are the strongly connected components left after
//     dropping the entries below a gap of magnitude (ncdPartition).
//   - gmres: restarted GMRES with an ILU(0) preconditioner on the system
//     with one state fixed (Saad & Schultz 1986; Saad 2003; Philippe,
//     Saad & Stewart 1992), for slowly mixing chains.
//
// Power and Gauss-Seidel follow Stewart, Introduction to the Numerical
// Solution of Markov Chains (Princeton, 1994), ch. 3; they stop when the
// residual ||pi P - pi||_1 reaches Options.Tol and report failure with the
// residual reached. Auto picks forward, then uniform, then GTH (dense up to
// AutoDenseStates, banded when the band is narrow), then IAD when the
// chain has nearly decomposable blocks (at most AutoCoupling of a row's
// mass leaving its block), then Gauss-Seidel. An automatic solve whose
// Gauss-Seidel (or power, or IAD) crawls or stalls switches on its own to
// GTH when that is cheap, else to GMRES (Diagnostics.Method
// "gauss-seidel->gmres", Diagnostics.Fallback says why); Options.Fallback
// does the same for an explicit gauss-seidel or power. No method returns a
// non-finite or negative probability: the substitutions of GTH and forward
// run in extended range when float64 would overflow, round-off negatives
// of direct and eigen are set to 0, and any other bad answer is re-solved
// by GTH (or Gauss-Seidel), or the solve fails. Options.Tol must lie in
// [MinTol(m), 2).
//
// # Checks
//
// Every Result carries Diagnostics: the residual, the largest global
// balance violation max_i |pi_i sum_{k!=i} P(i,k) - sum_{k!=i} pi_k P(k,i)|
// and where it occurs, sizes, iterations and the period. Check computes the
// same figures for any vector, and CutFlow the flows across a cut.
package chain
