package batch

import (
	"fmt"
	"strings"

	"ergostock/inventory/tabular"

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
		if key := PlanKey(k.SKU, k.Location); need == nil || need(key) {
			bySKU[key] = k
		}
	}
	file := h.File
	fit = func(sku string) (*Fitted, error) {
		k := bySKU[sku]
		if k == nil {
			s, loc, _ := strings.Cut(sku, "\x00")
			if loc != "" {
				return nil, fmt.Errorf("no history for sku %q at location %q in %s%s", s, loc, file, nearHint(h, s, loc))
			}
			return nil, fmt.Errorf("no history for sku %q in %s%s", sku, file, nearHint(h, sku, ""))
		}
		if err := k.FieldCountError(); err != nil {
			return nil, err // the same message as fit's
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
			return nil, fmt.Errorf("%s: sku %q: %w", file, k.SKU, err)
		}
		if s.Demand == nil {
			return nil, fmt.Errorf("%s: sku %q: no demand model fitted", file, k.SKU)
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

// nearHint names the SKUs of h that the items file may have meant by sku
// (the same but for letter case or surrounding spaces, or with leading
// zeros lost), as "; did you mean ...?"; "" when none.
func nearHint(h *history.History, sku, loc string) string {
	var have []string
	seen := map[string]bool{}
	for _, k := range h.SKUs {
		if !seen[k.SKU] && (loc == "" || k.Location == loc || k.SKU != sku) {
			seen[k.SKU] = true
			have = append(have, k.SKU)
		}
	}
	near := tabular.Near(sku, have)
	if len(near) == 0 {
		if loc != "" && seen[sku] {
			var locs []string
			for _, k := range h.SKUs {
				if k.SKU == sku {
					locs = append(locs, fmt.Sprintf("%q", k.Location))
				}
			}
			if len(locs) > 5 {
				locs = append(locs[:5], "...")
			}
			return fmt.Sprintf(" (the history has it at %s)", strings.Join(locs, ", "))
		}
		return ""
	}
	q := make([]string, len(near))
	for i, n := range near {
		q[i] = fmt.Sprintf("%q", n)
	}
	return "; did you mean " + strings.Join(q, " or ") + "?"
}
