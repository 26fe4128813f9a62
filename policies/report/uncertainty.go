package report

import (
	"fmt"
	"html/template"
	"math"
	"slices"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/uncertainty"
)

// renderUncertainty adds the charts of the resampling analysis (SKUInput's
// Uncertainty), when there is one: the stationary level distribution of
// the recommendation under the point model with the spread over the
// resampled models, and the distribution of its fill rate over them.
func (pg *SKUPage) renderUncertainty() {
	u := pg.In.Uncertainty
	if u == nil || u.Point == nil {
		return
	}
	add := func(c Chart, err error) {
		if err != nil {
			c.SVG, c.Note = "", err.Error()
		}
		pg.Charts = append(pg.Charts, c)
	}
	sys := pg.In.System
	pol := u.Point.Policy
	what := "net inventory at the end of a period (units; negative: backordered)"
	if sys.Mode == inventory.Lost {
		what = "stock on hand at the end of a period (units)"
	}
	{
		c := Chart{ID: "level-band", Title: "Stock levels under the point model and the resampled models"}
		svg, used, err := levelBandChart(sys, pol, u, what, c.Title)
		c.SVG = svg
		c.Caption = fmt.Sprintf("Bars: the long-run probability of each level of %s for %v under the model fitted to the whole history. Orange ranges: from the 5th to the 95th percentile of the same probability over %d models refitted to %s resamples of the history (bootstrap; Efron & Tibshirani 1993), the policy held fixed. Wide ranges say the history does not pin the level distribution down.",
			what, pol, used, u.Scheme)
		add(c, err)
	}
	{
		c := Chart{ID: "fill-band", Title: "Fill rate of the recommendation over the resampled models"}
		svg, err := fillBandChart(u, pg.In.MinFillRate, c.Title)
		c.SVG = svg
		c.Caption = fmt.Sprintf("Share of the %d resampled models under which %v has each fill rate; the blue line is its fill rate under the point model. Mean %s, 5th percentile %s, 95th %s.",
			u.Used, pol, percent(u.FillRate.Mean), percent(u.FillRate.P05), percent(u.FillRate.P95))
		if pg.In.MinFillRate > 0 {
			c.Caption += fmt.Sprintf(" It meets the floor of %s in %.0f%% of the models.", percent(pg.In.MinFillRate), 100*u.FloorShare)
		}
		c.Caption += fmt.Sprintf(" Regret (extra cost over each model's own optimum): mean %s, 95th percentile %s per period.", num4(u.Regret.Mean), num4(u.Regret.P95))
		if rb := u.Robust; rb != nil {
			c.Caption += fmt.Sprintf(" The robust policy %v meets the floor in %.0f%% of the models for %s per period more on average.", rb.Policy, 100*rb.FloorShare, num4(rb.ExtraCost))
		}
		add(c, err)
	}
}

func num4(v float64) string { return fmt.Sprintf("%.4g", v) }

// levelBandChart draws the point model's level law as bars and, per
// level (or bin of levels), the 5th-95th percentile range of its
// probability over the resampled models.
func levelBandChart(sys inventory.System, pol policies.Policy, u *uncertainty.Result, xlabel, title string) (template.HTML, int, error) {
	point, err := stockLevels(sys, pol)
	if err != nil {
		return "", 0, err
	}
	var laws []levelLaw
	for _, r := range u.Resamples {
		if r.Err != nil || r.Demand == nil {
			continue
		}
		s := sys
		s.Demand = r.Demand
		l, err := stockLevels(s, pol)
		if err != nil {
			return "", 0, fmt.Errorf("level distribution under resampled model %d: %w", r.Index, err)
		}
		laws = append(laws, l)
	}
	if len(laws) == 0 {
		return "", 0, fmt.Errorf("chart %q: no resampled model kept its models (the batch keeps only summaries)", title)
	}
	// The range drawn: where the point law or the median resampled law has
	// mass above 1e-4 at the ends.
	const cut = 1e-4
	trim := func(l levelLaw) (int, int) {
		a, b := 0, len(l.P)-1
		for c := 0.0; a < b && c+l.P[a] < cut; a++ {
			c += l.P[a]
		}
		for c := 0.0; b > a && c+l.P[b] < cut; b-- {
			c += l.P[b]
		}
		return l.Lo + a, l.Lo + b
	}
	lo, hi := trim(point)
	for _, l := range laws {
		a, b := trim(l)
		lo, hi = min(lo, a), max(hi, b)
	}
	w := niceWidth(hi-lo+1, 60)
	start := floorDiv(lo, w) * w
	nb := (hi-start)/w + 1
	binned := func(l levelLaw) []float64 {
		v := make([]float64, nb)
		for i, p := range l.P {
			if b := (floorDiv(l.Lo+i, w)*w - start) / w; b >= 0 && b < nb {
				v[b] += p
			}
		}
		return v
	}
	pb := binned(point)
	all := make([][]float64, len(laws))
	for i, l := range laws {
		all[i] = binned(l)
	}
	ylabel := "probability"
	if w > 1 {
		ylabel = fmt.Sprintf("probability per %d units", w)
	}
	p := newPlot(title, xlabel, ylabel)
	p.X.Tick.Marker = ticks{Integer: true}
	p.Y.Min = 0
	bars := &rects{Thumb: okBlue}
	band := &rects{Thumb: okOrange}
	col := make([]float64, len(all))
	for b := range nb {
		x := float64(start + b*w)
		if pb[b] > 0 {
			bars.Rects = append(bars.Rects, rect{X0: x - 0.5 + 0.1*float64(w), X1: x - 0.5 + 0.9*float64(w), Y0: 0, Y1: pb[b], Fill: okBlue})
		}
		for i := range all {
			col[i] = all[i][b]
		}
		slices.Sort(col)
		q05, q95 := uncertainty.Quantile(col, 0.05), uncertainty.Quantile(col, 0.95)
		if q95 > 0 {
			mid := x - 0.5 + 0.5*float64(w)
			half := math.Max(0.12*float64(w), 0.12)
			band.Rects = append(band.Rects, rect{X0: mid - half, X1: mid + half, Y0: q05, Y1: q95, Fill: okOrange})
		}
	}
	p.Add(bars, band)
	p.Legend.Add("point model", bars)
	p.Legend.Add("5%-95% over resampled models", band)
	if sys.Mode == inventory.Backorder && lo < 0 {
		l := &vline{At: -0.5, Style: draw.LineStyle{Color: okVermilion, Width: 1.2, Dashes: []vg.Length{4, 2}}}
		p.Add(l)
		p.Legend.Add("zero: backorders to the left", l)
	}
	p.Y.Max *= 1.3
	svg, err := plotSVG(p, title)
	return svg, len(laws), err
}

// fillBandChart draws the fill rates of the recommendation over the
// resampled models as a histogram (share of models per bin), with the
// point model's fill rate and the floor.
func fillBandChart(u *uncertainty.Result, floor float64, title string) (template.HTML, error) {
	var f []float64
	for _, r := range u.Resamples {
		if r.Err == nil {
			f = append(f, r.Held.FillRate)
		}
	}
	if len(f) == 0 {
		return "", fmt.Errorf("chart %q: no resampled models kept", title)
	}
	lo, hi := slices.Min(f), slices.Max(f)
	pt := u.Point.Figures.FillRate
	lo, hi = math.Min(lo, pt), math.Max(hi, pt)
	if floor > 0 {
		lo, hi = math.Min(lo, floor), math.Max(hi, floor)
	}
	if !(hi > lo) {
		lo, hi = lo-0.005, hi+0.005
	}
	const bins = 24
	width := (hi - lo) / bins
	count := make([]float64, bins)
	for _, v := range f {
		b := min(bins-1, int((v-lo)/width))
		count[b] += 1 / float64(len(f))
	}
	p := newPlot(title, "fill rate (% of demand served from stock)", "share of resampled models")
	p.X.Tick.Marker = ticks{Format: percent}
	p.Y.Min = 0
	r := &rects{Thumb: okSkyBlue}
	for b, c := range count {
		if c > 0 {
			x0 := lo + float64(b)*width
			r.Rects = append(r.Rects, rect{X0: x0, X1: x0 + width, Y0: 0, Y1: c, Fill: okSkyBlue})
		}
	}
	p.Add(r)
	p.Legend.Add("resampled models", r)
	pl := &vline{At: pt, Style: draw.LineStyle{Color: okBlue, Width: 1.5}}
	p.Add(pl)
	p.Legend.Add(fmt.Sprintf("point model %.1f%%", 100*pt), pl)
	if floor > 0 {
		l := &vline{At: floor, Style: draw.LineStyle{Color: okVermilion, Width: 1.2, Dashes: []vg.Length{3, 2}}}
		p.Add(l)
		p.Legend.Add("fill-rate floor "+percent(floor), l)
	}
	p.Legend.Left = true
	p.Y.Max *= 1.3
	return plotSVG(p, title)
}
