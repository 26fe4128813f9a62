package policies

import (
	"errors"

	"ergostock/chain"
	"ergostock/inventory"
)

// DefaultMaxStates is the largest lost-sales chain built by default.
const DefaultMaxStates = 5_000_000

// Options tune an evaluation. The zero value uses the defaults.
type Options struct {
	MaxStates int           // largest lost-sales chain to build; 0 means DefaultMaxStates
	Chain     chain.Options // solver choice for the chain
}

// Evaluation is what a policy delivers, with the chain it came from.
type Evaluation struct {
	Policy      Policy
	Figures     inventory.Figures
	States      int               // states of the solved chain
	Diagnostics chain.Diagnostics // of the stationary solve
	Neglected   float64           // probability mass neglected by any truncation
}

// Evaluate computes every figure of policy p on system sys exactly from the
// stationary distribution of the chain the policy induces (placeholder).
func Evaluate(sys inventory.System, p Policy, opt Options) (*Evaluation, error) {
	return nil, errors.New("evaluate: not implemented yet")
}
