// Package policies holds the replenishment policies (base-stock, s-S, s-nQ),
// the Markov chain each induces in backorder and lost-sales mode, exact
// evaluation from the stationary distribution, and the search for the
// cheapest policy.
package policies
