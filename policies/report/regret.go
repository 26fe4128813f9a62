package report

import (
	"fmt"
	"sort"
)

// ResultUncertainty is the resampling part of a results row (the columns
// of batch.UncertaintyHeader that the batch page uses).
type ResultUncertainty struct {
	RegretMean, RegretP95            float64
	ExpectedFillRate, FillRateP05    float64
	ReorderPointP05, ReorderPointP95 float64
	HasReorderPoint                  bool
	Used                             int
}

// readUncertainty reads the resampling columns of a row, when the file
// has them and the row holds them; nil otherwise.
func readUncertainty(col map[string]int, number func(string) (float64, bool, error)) (*ResultUncertainty, error) {
	if _, ok := col["regret_p95"]; !ok {
		return nil, nil
	}
	var u ResultUncertainty
	var ok bool
	var err error
	if u.RegretP95, ok, err = number("regret_p95"); err != nil || !ok {
		return nil, err
	}
	for _, c := range []struct {
		name string
		dst  *float64
	}{{"regret_mean", &u.RegretMean}, {"expected_fill_rate", &u.ExpectedFillRate}, {"fill_rate_p05", &u.FillRateP05}} {
		if *c.dst, _, err = number(c.name); err != nil {
			return nil, err
		}
	}
	if _, has := col["reorder_point_p05"]; has {
		var a, b bool
		if u.ReorderPointP05, a, err = number("reorder_point_p05"); err != nil {
			return nil, err
		}
		if u.ReorderPointP95, b, err = number("reorder_point_p95"); err != nil {
			return nil, err
		}
		u.HasReorderPoint = a && b
	}
	if _, has := col["resamples_used"]; has {
		v, _, err := number("resamples_used")
		if err != nil {
			return nil, err
		}
		u.Used = int(v)
	}
	return &u, nil
}

// regretRow is one line of the batch page's regret ranking.
type regretRow struct {
	SKU, Pattern, Levels string
	Mean, P95            string
	Fill, Expected       string
	FillP05, Band        string
}

// maxRegretRows caps the ranking on the page.
const maxRegretRows = 25

// regretRows ranks the planned items of a run with --uncertainty by the
// 95th percentile of their regret (ties by mean regret, then file order),
// the first maxRegretRows of them; nil without such columns.
func regretRows(rows []ResultRow) ([]regretRow, string) {
	var idx []int
	for i, r := range rows {
		if r.Uncertainty != nil && r.Figures != nil && r.Policy != nil {
			idx = append(idx, i)
		}
	}
	if len(idx) == 0 {
		return nil, ""
	}
	sort.SliceStable(idx, func(a, b int) bool {
		ua, ub := rows[idx[a]].Uncertainty, rows[idx[b]].Uncertainty
		if ua.RegretP95 != ub.RegretP95 {
			return ua.RegretP95 > ub.RegretP95
		}
		return ua.RegretMean > ub.RegretMean
	})
	n := len(idx)
	idx = idx[:min(n, maxRegretRows)]
	var out []regretRow
	for _, i := range idx {
		r := rows[i]
		u := r.Uncertainty
		band := ""
		if u.HasReorderPoint {
			band = fmt.Sprintf("%g to %g", u.ReorderPointP05, u.ReorderPointP95)
		}
		out = append(out, regretRow{SKU: r.Name(), Pattern: r.Pattern, Levels: levels(*r.Policy),
			Mean: money(u.RegretMean), P95: money(u.RegretP95), Fill: pct(r.Figures.FillRate),
			Expected: pct(u.ExpectedFillRate), FillP05: pct(u.FillRateP05), Band: band})
	}
	note := fmt.Sprintf("The %d items (of %d with resampling figures) whose recommendation may cost most over the optimum of the demand law the history could equally have come from: regret is the recommended policy's cost minus each resampled model's own optimal cost, per period (bootstrap; Efron & Tibshirani 1993). A high regret or a fill rate to expect well below the point model's says that more history, or a closer look at the item, pays.", len(out), n)
	return out, note
}
