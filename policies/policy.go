package policies

import (
	"fmt"
	"math"
	"strconv"

	"ergostock/inventory"
)

// Kind names a family of replenishment policies.
type Kind string

// The policy families.
const (
	BaseStock Kind = "base-stock" // order S - IP whenever IP < S
	SS        Kind = "s-S"        // if IP <= s, order S - IP
	SNQ       Kind = "s-nQ"       // if IP <= s, order the least multiple of Q lifting IP above s
)

// Policy is a replenishment rule applied to inventory position at review.
// Base-stock uses OrderUpTo only; s-S uses ReorderPoint and OrderUpTo;
// s-nQ uses ReorderPoint and OrderMultiple.
type Policy struct {
	Kind          Kind `json:"type"`
	ReorderPoint  int  `json:"reorder_point"`
	OrderUpTo     int  `json:"order_up_to"`
	OrderMultiple int  `json:"order_multiple"`
}

// Order returns the quantity the policy orders at inventory position ip.
func (p Policy) Order(ip int) int {
	switch p.Kind {
	case BaseStock:
		if ip < p.OrderUpTo {
			return p.OrderUpTo - ip
		}
	case SS:
		if ip <= p.ReorderPoint {
			return p.OrderUpTo - ip
		}
	case SNQ:
		if ip <= p.ReorderPoint {
			n := (p.ReorderPoint-ip)/p.OrderMultiple + 1
			return n * p.OrderMultiple
		}
	}
	return 0
}

// Levels returns the reorder point s and the highest inventory position after
// an order, so that positions after review lie in s+1..top.
func (p Policy) Levels() (s, top int) {
	switch p.Kind {
	case BaseStock:
		return p.OrderUpTo - 1, p.OrderUpTo
	case SS:
		return p.ReorderPoint, p.OrderUpTo
	default:
		return p.ReorderPoint, p.ReorderPoint + p.OrderMultiple
	}
}

// Validate checks the policy's levels against the mode.
func (p Policy) Validate(mode inventory.Mode) error {
	switch p.Kind {
	case BaseStock:
		if p.OrderUpTo == math.MinInt {
			return &inventory.FieldError{Field: "order_up_to", Value: strconv.Itoa(p.OrderUpTo),
				Want: fmt.Sprintf("an order-up-to level above %d (base-stock S orders when the position is at most S - 1)", math.MinInt)}
		}
		if mode == inventory.Lost && p.OrderUpTo < 0 {
			return fmt.Errorf("order-up-to level %d: want >= 0 in lost mode", p.OrderUpTo)
		}
	case SS:
		if p.ReorderPoint >= p.OrderUpTo {
			return fmt.Errorf("reorder point %d must be below the order-up-to level %d", p.ReorderPoint, p.OrderUpTo)
		}
		if mode == inventory.Lost && p.ReorderPoint < -1 {
			return fmt.Errorf("reorder point %d: want >= -1 in lost mode (inventory position never falls below 0)", p.ReorderPoint)
		}
	case SNQ:
		if p.OrderMultiple < 1 {
			return fmt.Errorf("order multiple %d: want >= 1", p.OrderMultiple)
		}
		if p.ReorderPoint > math.MaxInt-p.OrderMultiple {
			return &inventory.FieldError{Field: "reorder_point", Value: strconv.Itoa(p.ReorderPoint),
				Want: fmt.Sprintf("a reorder point whose highest position s + Q stays within the int range (at most %d for Q = %d)", math.MaxInt-p.OrderMultiple, p.OrderMultiple)}
		}
		if mode == inventory.Lost && p.ReorderPoint < -1 {
			return fmt.Errorf("reorder point %d: want >= -1 in lost mode (inventory position never falls below 0)", p.ReorderPoint)
		}
	default:
		return fmt.Errorf("policy type %q: want base-stock, s-S or s-nQ", p.Kind)
	}
	return nil
}

// String prints the policy as "s-S(s=3,S=10)" and the like.
func (p Policy) String() string {
	switch p.Kind {
	case BaseStock:
		return fmt.Sprintf("base-stock(S=%d)", p.OrderUpTo)
	case SS:
		return fmt.Sprintf("s-S(s=%d,S=%d)", p.ReorderPoint, p.OrderUpTo)
	case SNQ:
		return fmt.Sprintf("s-nQ(s=%d,Q=%d)", p.ReorderPoint, p.OrderMultiple)
	}
	return string(p.Kind)
}
