// Package inventory holds the single-item inventory system: demand
// distributions on the non-negative integers and their text grammar
// (Parse, String), lead-time demand (Sum, SumUpTo), partial expectations
// (LossTable, NormalLoss), the system's costs and mode (System), and the
// Figures record every evaluation reports.
//
// The demand families are Poisson, NegBin (negative binomial), Normal and
// Gamma (both discretised by rounding) and Table (an explicit pmf, or a
// convolution). Every family gives its tail P(D >= k) from a closed form
// (regularised incomplete gamma or beta functions, or the normal survival
// function) that keeps full relative accuracy far out; where a table has
// to be cut, the mass left out is at most 1e-12 and Neglected reports it.
package inventory
