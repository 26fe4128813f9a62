// Package chain holds finite discrete-time Markov chains: dense and sparse
// (CSR) storage with validation, structure (communicating classes, closed
// classes, periods), stationary solvers selectable by name, and the balance
// checks that accompany every answer. It knows nothing about inventory.
package chain
