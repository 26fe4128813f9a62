package batch

import (
	"fmt"

	"ergostock/inventory/history"
)

// HistoryFit returns, for a Planner, the fit of each SKU's series in h and
// the pattern of its history. When need is not nil, only the SKUs it
// accepts are kept, so that the series of the others (those of the other
// shards) can be freed once the caller drops h.
//
// An item fails when its SKU has no rows in the history, when any of its
// rows is bad (the error names the first bad row's file and line and counts
// the others: a plan should not rest on a history known to be wrong), or
// when no model fits (a series without demand).
func HistoryFit(h *history.History, need func(sku string) bool) (fit func(sku string) (*Fitted, error), pattern func(sku string) string) {
	bySKU := make(map[string]*history.SKU)
	for _, k := range h.SKUs {
		if need == nil || need(k.SKU) {
			bySKU[k.SKU] = k
		}
	}
	file := h.File
	fit = func(sku string) (*Fitted, error) {
		k := bySKU[sku]
		if k == nil {
			return nil, fmt.Errorf("no history for sku %q in %s", sku, file)
		}
		if n := len(k.Errors); n > 0 {
			more := ""
			if n > 1 {
				more = fmt.Sprintf(" (and %d more bad rows for this sku)", n-1)
			}
			return nil, fmt.Errorf("bad history: %w%s", k.Errors[0], more)
		}
		s, err := k.Fit()
		if err != nil {
			return nil, fmt.Errorf("%s: sku %q: %w", file, sku, err)
		}
		if s.Demand == nil {
			return nil, fmt.Errorf("%s: sku %q: no demand model fitted", file, sku)
		}
		return &Fitted{Demand: s.Demand, Pattern: string(s.Pattern), Warnings: s.Warnings, Series: k.Demand}, nil
	}
	pattern = func(sku string) string {
		k := bySKU[sku]
		if k == nil || len(k.Errors) > 0 {
			return ""
		}
		return string(history.Summarize(k.Demand).Pattern)
	}
	return fit, pattern
}
