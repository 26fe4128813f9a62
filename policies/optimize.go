package policies

import (
	"errors"

	"ergostock/inventory"
)

// SearchOptions tune the search for the cheapest policy.
type SearchOptions struct {
	MinFillRate float64 // 0 means no floor
	MaxStockout float64 // 0 means no ceiling on stockout probability
	Eval        Options
}

// Search records how a search ran.
type Search struct {
	Evaluated int               `json:"policies_evaluated"`
	Method    string            `json:"method"`
	Bounds    map[string][2]int `json:"bounds"`
	Guarantee string            `json:"guarantee"`
}

// Optimum is the cheapest policy found with its evaluation.
type Optimum struct {
	Evaluation
	Search Search
}

// Optimize finds the cheapest policy of the given kind (placeholder).
func Optimize(sys inventory.System, kind Kind, opt SearchOptions) (*Optimum, error) {
	return nil, errors.New("optimize: not implemented yet")
}
