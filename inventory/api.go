package inventory

// Distribution is the law of demand in one period: a random variable on the
// non-negative integers 0, 1, 2, ...
//
// Implementations are immutable value types whose String method prints the
// text grammar that Parse reads back to the same distribution.
type Distribution interface {
	// PMF returns P(D = k); 0 for k < 0.
	PMF(k int) float64
	// CDF returns P(D <= k); 0 for k < 0.
	CDF(k int) float64
	// Tail returns P(D >= k), from a closed form where one exists (never
	// as 1 - CDF where that would lose precision); 1 for k <= 0.
	Tail(k int) float64
	Mean() float64
	Variance() float64
	// Bound returns the smallest k with P(D > k) <= eps, for eps in (0, 1).
	Bound(eps float64) int
	String() string
}

// Parse reads a distribution in the text grammar (placeholder until the
// distributions land).
func Parse(spec string) (Distribution, error) {
	return nil, &FieldError{Field: "demand", Value: spec, Want: "not implemented yet"}
}
