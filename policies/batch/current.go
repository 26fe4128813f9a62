package batch

import (
	"strconv"

	"ergostock/policies"
)

// currentColumns follow the diagnostics and the item position in the
// results: the policy in use, as the items file gave it, and the fill rate
// it delivers, beside the recommended policy's columns. They are empty for
// an item without a current policy and for a failed item. (Its total cost
// is current_total_cost, an older column.)
var currentColumns = []string{"current_policy", "current_reorder_point", "current_order_up_to",
	"current_order_multiple", "current_fill_rate"}

// levelCells returns the cells of p's reorder point, order-up-to level and
// order multiple, empty where p's type has none.
func levelCells(p *policies.Policy) (s, S, Q string) {
	switch p.Kind {
	case policies.BaseStock:
		S = strconv.Itoa(p.OrderUpTo)
	case policies.SS:
		s, S = strconv.Itoa(p.ReorderPoint), strconv.Itoa(p.OrderUpTo)
	case policies.SNQ:
		s, Q = strconv.Itoa(p.ReorderPoint), strconv.Itoa(p.OrderMultiple)
	}
	return s, S, Q
}

// appendCurrent appends the cells of currentColumns.
func (r *Row) appendCurrent(rec []string) []string {
	if r.Err != nil || r.Figures == nil || r.Current == nil {
		return append(rec, "", "", "", "", "")
	}
	s, S, Q := levelCells(r.Current)
	fr := ""
	if r.CurrentFillRate != nil {
		fr = formatFloat(*r.CurrentFillRate)
	}
	return append(rec, string(r.Current.Kind), s, S, Q, fr)
}
