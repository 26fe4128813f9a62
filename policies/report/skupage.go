package report

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"ergostock/inventory"
	"ergostock/policies"
)

type kv struct{ Key, Value string }

type figureRow struct {
	Label, Unit   string
	Rec, Cur, Dif string
}

type simRow struct {
	Label, Unit string
	Exact       string
	Sim         string
	Mark        string // "" when the exact value is inside the interval
}

type simTable struct {
	Policy string
	Setup  string
	Rows   []simRow
	Misses int
}

type skuView struct {
	Title, Version string
	Sortable       bool
	SubTitle       string
	System         []kv
	Glance         []string
	Saving         string
	SavingGood     bool
	HasCurrent     bool
	Figures        []figureRow
	FiguresNote    string
	Charts         []Chart
	Sims           []simTable
	Diagnostics    []kv
	History        []kv
	HistWarnings   []string
	Notes          []string
	// Timing replaces the caution about a fixed lead time when the item
	// has a lead-time law or a review period (see timingCautions).
	Timing []string
}

var skuTemplate = mustTemplate("sku", `{{template "head" .}}
<h1>{{.Title}}</h1>
<p class="sub">{{.SubTitle}}</p>
<div class="glance">
{{range .Glance}}<p>{{.}}</p>
{{end}}{{if .Saving}}<p class="{{if .SavingGood}}good{{else}}bad{{end}}">{{.Saving}}</p>{{end}}
</div>
<h2 id="system">The item</h2>
<table class="kv"><tbody>
{{range .System}}<tr><th>{{.Key}}</th><td>{{.Value}}</td></tr>
{{end}}</tbody></table>
<h2 id="figures">Key figures</h2>
<p>{{.FiguresNote}}</p>
<table class="figures">
<thead><tr><th>figure</th><th>unit</th><th class="num">recommended</th>{{if .HasCurrent}}<th class="num">current</th><th class="num">recommended − current</th>{{end}}</tr></thead>
<tbody>
{{range .Figures}}<tr><td>{{.Label}}</td><td>{{.Unit}}</td><td class="num">{{.Rec}}</td>{{if $.HasCurrent}}<td class="num">{{.Cur}}</td><td class="num">{{.Dif}}</td>{{end}}</tr>
{{end}}</tbody></table>
<h2 id="charts">Charts</h2>
{{range .Charts}}{{template "figure" .}}{{end}}
{{if .History}}<h3>Demand history</h3>
<table class="kv"><tbody>
{{range .History}}<tr><th>{{.Key}}</th><td>{{.Value}}</td></tr>
{{end}}</tbody></table>
{{if .HistWarnings}}<ul class="warn">{{range .HistWarnings}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{end}}
{{if .Sims}}<h2 id="simulation">Exact against simulated</h2>
<p>The same policies run through an independent period-by-period simulation of the same rules. An exact value outside its interval is marked; at a 95% level about one figure in twenty falls outside by chance.</p>
{{range .Sims}}<h3>{{.Policy}}</h3>
<p class="sub">{{.Setup}}</p>
<table>
<thead><tr><th>figure</th><th>unit</th><th class="num">exact</th><th class="num">simulated (mean ± half-width)</th><th></th></tr></thead>
<tbody>
{{range .Rows}}<tr><td>{{.Label}}</td><td>{{.Unit}}</td><td class="num">{{.Exact}}</td><td class="num">{{.Sim}}</td><td class="warn">{{.Mark}}</td></tr>
{{end}}</tbody></table>
{{end}}{{end}}
<h2 id="method">How the figures were computed</h2>
<table class="kv"><tbody>
{{range .Diagnostics}}<tr><th>{{.Key}}</th><td>{{.Value}}</td></tr>
{{end}}</tbody></table>
{{if .Notes}}<ul>{{range .Notes}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{template "cautions" .}}
{{template "foot" .}}`)

// render draws the charts of the page; a chart that fails leaves a note.
func (pg *SKUPage) render() {
	sys := pg.In.System
	add := func(c Chart, err error) {
		if err != nil {
			c.SVG, c.Note = "", err.Error()
		}
		pg.Charts = append(pg.Charts, c)
	}
	// Stock levels.
	{
		c := Chart{ID: "levels", Title: "Stationary distribution of net inventory"}
		what := "net inventory (on hand minus backorders) at the end of a period"
		if sys.Mode == inventory.Lost {
			c.Title = "Stationary distribution of stock on hand"
			what = "stock on hand at the end of a period"
		}
		var err error
		if len(pg.Levels) > 0 {
			c.SVG, err = levelChart(pg.Levels, pg.LevelName, c.Title, sys.Mode == inventory.Backorder)
		} else {
			err = fmt.Errorf("the level distribution is not available (see the notes below)")
		}
		c.Caption = fmt.Sprintf("Long-run probability of each level of %s. ", what)
		if sys.Mode == inventory.Backorder {
			c.Caption += "Bars left of the dashed line are periods that end with backorders; their total is the stockout probability. "
		} else {
			c.Caption += "The bar at 0 includes every period that ends empty. "
		}
		if pg.LevelMass > 1e-12 {
			c.Caption += fmt.Sprintf("Levels with a total probability of %s lie outside the range drawn.", sci(pg.LevelMass))
		}
		add(c, err)
	}
	// Cost map.
	{
		c := Chart{ID: "cost-map", Title: "Total cost around the recommended policy"}
		var err error
		if pg.Grid != nil {
			c.SVG, err = heatChart(*pg.Grid, c.Title)
			yname := "order-up-to level S"
			if pg.Optimum.Policy.Kind == policies.SNQ {
				yname = "order multiple Q"
			}
			grey := ", grey cells are not valid policies (s must lie below S)"
			if pg.Optimum.Policy.Kind == policies.SNQ {
				grey = ""
			}
			how := "each evaluated exactly on its Markov chain"
			if pg.GridMethod == "renewal" {
				how = "each computed exactly by the renewal-reward formula (Veinott & Wagner 1965; Zheng & Federgruen 1991)"
			}
			c.Caption = fmt.Sprintf("Expected total cost per period of %d policies over the reorder point s and the %s, %s; light cells are cheap%s. Costs above the 90th percentile of the map share the darkest colour. The ringed cross marks the recommended policy", pg.GridEvals, yname, how, grey)
			if pg.Grid.Cur != nil {
				c.Caption += ", the orange square the current one"
			}
			c.Caption += "."
			if pg.Optimum.Policy.Kind == policies.BaseStock {
				c.Caption += " A base-stock policy with level S sits on the diagonal s = S − 1."
			}
		} else {
			err = fmt.Errorf("the cost map was not computed (see the notes below)")
		}
		add(c, err)
	}
	// Fill rate.
	{
		c := Chart{ID: "fill-rate", Title: "Fill rate against the reorder point"}
		c.SVG, c.Note = "", ""
		svg, err := fillChart(pg.Fill, pg.In.MinFillRate, "reorder point s (units of inventory position)", c.Title)
		c.SVG = svg
		c.Caption = "Fraction of demand served at once from stock as the reorder point moves while the order quantity stays as in the policy; rings mark each policy itself. Read off the reorder point a service target needs, and what one unit more or less of safety stock buys."
		add(c, err)
	}
	if h := pg.In.History; h != nil {
		unit := h.Period
		if unit == "" || unit == "index" {
			unit = "period"
		}
		qty := make([]float64, len(h.Demand))
		for i, v := range h.Demand {
			qty[i] = float64(v)
		}
		c := Chart{ID: "history", Title: "Demand history of " + h.SKU}
		svg, err := seriesChart(h.Labels, qty, unit, c.Title)
		c.SVG = svg
		c.Caption = fmt.Sprintf("Demand per %s from %s, %d periods; periods without records count as zero demand.", unit, h.File, len(h.Demand))
		add(c, err)
		fit, what := h.Fitted, "fitted: "
		if fit == nil {
			fit, what = sys.Demand, "model in use: "
		}
		if fit != nil {
			c := Chart{ID: "history-fit", Title: "Observed demand per " + unit + " against the fitted distribution"}
			svg, err := histChart(h.Demand, fit, what+shortSpec(fit), unit, c.Title)
			c.SVG = svg
			c.Caption = "Bars: the share of periods with each demand. Points: the probability the fitted model gives to the same demand. Large gaps between the two say the model misdescribes this item."
			if sys.Demand != nil && fit.String() != sys.Demand.String() {
				c.Caption += " Note: the figures on this page use " + sys.Demand.String() + ", not this fit."
			}
			add(c, err)
		}
	}
	pg.leadTimeChart(add)
	pg.renderUncertainty()
}

// leadTimeChart adds the chart of the lead-time law, drawn beside the
// demand history (after it when there is one).
func (pg *SKUPage) leadTimeChart(add func(Chart, error)) {
	sys := pg.In.System
	if sys.LeadTimeLaw == nil {
		return
	}
	w, negl, err := sys.LeadTimeWeights()
	c := Chart{ID: "lead-time", Title: "Lead-time law"}
	if err == nil {
		c.SVG, err = leadChart(w, c.Title)
	}
	c.Caption = fmt.Sprintf("Probability of each lead time in periods, %s (mean %s). ", sys.LeadTimeLaw, num(sys.LeadTimeLaw.Mean()))
	if sys.Model() == inventory.Independent {
		c.Caption += "Each order draws its own lead time from this law, so orders may overtake each other."
	} else {
		c.Caption += "Orders arrive in the order placed; each one's lead time has this law (Kaplan 1970)."
	}
	if negl > 0 {
		c.Caption += fmt.Sprintf(" Tails of total probability %s are joined to the end points.", sci(negl))
	}
	add(c, err)
}

// WriteHTML writes the page.
func (pg *SKUPage) WriteHTML(w io.Writer) error {
	return execute(skuTemplate, w, pg.view())
}

func (pg *SKUPage) view() skuView {
	sys := pg.In.System
	o := pg.Optimum
	v := skuView{Version: pg.In.Version, Charts: pg.Charts, Notes: pg.Notes}
	v.Title = "Replenishment report"
	if pg.In.SKU != "" {
		v.Title += ": " + pg.In.SKU
	}
	v.SubTitle = fmt.Sprintf("Periodic review, one item at one location; unmet demand is %s. All figures are per review period.", map[inventory.Mode]string{inventory.Backorder: "backordered", inventory.Lost: "lost"}[sys.Mode])
	if r := sys.Review(); r > 1 {
		v.SubTitle = fmt.Sprintf("Periodic review every %d periods, one item at one location; unmet demand is %s. All figures and costs are per period (an order every review is an order frequency of 1/%d).", r, map[inventory.Mode]string{inventory.Backorder: "backordered", inventory.Lost: "lost"}[sys.Mode], r)
	}
	src := pg.In.DemandSource
	if src == "" {
		src = "given"
	}
	v.System = []kv{
		{"demand per period", fmt.Sprintf("%s (mean %s, variance %s; %s)", sys.Demand.String(), num(sys.Demand.Mean()), num(sys.Demand.Variance()), src)},
		{"lead time", leadTimeText(sys)},
		{"lead-time model", leadModelText(sys)},
		{"review period", reviewText(sys)},
		{"holding cost h", num(sys.Holding) + " per unit on hand per period"},
		{"shortage cost b", num(sys.Shortage) + map[inventory.Mode]string{inventory.Backorder: " per unit backordered per period", inventory.Lost: " per unit of demand lost"}[sys.Mode]},
		{"fixed order cost K", num(sys.OrderCost) + " per order"},
		{"unit cost c", num(sys.UnitCost) + " per unit"},
		{"policy family searched", string(pg.In.Kind)},
	}
	if pg.In.MinFillRate > 0 {
		v.System = append(v.System, kv{"fill-rate floor", pct(pg.In.MinFillRate)})
	}
	f := o.Figures
	v.Glance = append(v.Glance, fmt.Sprintf("Recommended: %s, %s. It serves %s of demand from stock at a total cost of %s per period.",
		o.Policy.String(), describe(o.Policy), pct(f.FillRate), money(f.TotalCost)))
	if c := pg.Current; c != nil {
		v.HasCurrent = true
		v.Glance = append(v.Glance, fmt.Sprintf("Current: %s serves %s at %s per period.", c.Policy.String(), pct(c.Figures.FillRate), money(c.Figures.TotalCost)))
		d := c.Figures.TotalCost - f.TotalCost
		switch {
		case c.Policy == o.Policy:
			v.Saving = "The current policy is already the recommended one."
			v.SavingGood = true
		case d >= 0:
			share := ""
			if c.Figures.TotalCost > 0 {
				share = fmt.Sprintf(" (%s of the current cost)", pct(d/c.Figures.TotalCost))
			}
			v.Saving = fmt.Sprintf("Changing to the recommended policy saves %s per period%s.", money(d), share)
			v.SavingGood = true
		default:
			v.Saving = fmt.Sprintf("The current policy costs %s per period less than the recommendation; it likely fails the fill-rate floor or lies outside the family searched.", money(-d))
		}
	}
	v.Timing = timingCautions(sys)
	v.FiguresNote = "Long-run averages per review period, exact from the stationary distribution of the policy's Markov chain."
	if !sys.FixedTiming() {
		v.FiguresNote = "Long-run averages per period, exact from the stationary distribution of the inventory position at reviews, mixed over the lead-time law and the periods of the review cycle."
	}
	cur := inventory.Figures{}
	if pg.Current != nil {
		cur = pg.Current.Figures
	}
	cf := cur.Fields()
	for i, fd := range f.Fields() {
		r := figureRow{Label: fd.Label, Unit: fd.Unit, Rec: figureValue(fd.Name, fd.Value)}
		if pg.Current != nil {
			r.Cur = figureValue(fd.Name, cf[i].Value)
			r.Dif = signed(fd.Name, fd.Value-cf[i].Value)
		}
		v.Figures = append(v.Figures, r)
	}
	sims := []struct {
		p   policies.Policy
		e   inventory.Figures
		s   *Simulated
		tag string
	}{{o.Policy, o.Figures, pg.SimOptimum, "recommended"}}
	if pg.Current != nil {
		sims = append(sims, struct {
			p   policies.Policy
			e   inventory.Figures
			s   *Simulated
			tag string
		}{pg.Current.Policy, pg.Current.Figures, pg.SimCurrent, "current"})
	}
	for _, s := range sims {
		if s.s == nil {
			continue
		}
		t := simTable{Policy: s.tag + " " + s.p.String(),
			Setup: fmt.Sprintf("%d replications of %d periods (first %d discarded as warm-up), seed %d; intervals at %s confidence.",
				s.s.Replications, s.s.Periods, s.s.Warmup, s.s.Seed, pct(levelOr(s.s.Level)))}
		mf, hf := s.s.Mean.Fields(), s.s.HalfWidth.Fields()
		for i, fd := range s.e.Fields() {
			r := simRow{Label: fd.Label, Unit: fd.Unit, Exact: num(fd.Value),
				Sim: num(mf[i].Value) + " ± " + num(hf[i].Value)}
			if m, h := mf[i].Value, hf[i].Value; !math.IsNaN(h) && math.Abs(m-fd.Value) > h+1e-12*math.Max(1, math.Abs(fd.Value)) {
				r.Mark = "outside"
				t.Misses++
			}
			t.Rows = append(t.Rows, r)
		}
		v.Sims = append(v.Sims, t)
	}
	v.Diagnostics = diagRows("recommended", &o.Evaluation)
	v.Diagnostics = append(v.Diagnostics,
		kv{"search", fmt.Sprintf("%s; %d policies evaluated", orDash(o.Search.Method), o.Search.Evaluated)})
	if o.Search.Guarantee != "" {
		v.Diagnostics = append(v.Diagnostics, kv{"what the search guarantees", o.Search.Guarantee})
	}
	if pg.Current != nil {
		v.Diagnostics = append(v.Diagnostics, diagRows("current", pg.Current)...)
	}
	v.Diagnostics = append(v.Diagnostics, kv{"charts", fmt.Sprintf("cost map: %d policies (%s); fill-rate curves: %d exact evaluations", pg.GridEvals, pg.GridMethod, pg.FillEvals)})
	if h := pg.In.History; h != nil {
		v.History = []kv{
			{"file", h.File},
			{"periods", fmt.Sprintf("%d (%s)", len(h.Demand), h.Period)},
			{"mean, variance", num(h.Mean) + ", " + num(h.Variance)},
			{"ADI, CV²", num(h.ADI) + ", " + num(h.CV2)},
			{"pattern (Syntetos, Boylan & Croston 2005)", orDash(h.Pattern)},
		}
		if h.Fitted != nil {
			v.History = append(v.History, kv{"fitted model (least AIC)", h.Fitted.String()})
		}
		v.HistWarnings = h.Warnings
	}
	return v
}

func diagRows(tag string, e *policies.Evaluation) []kv {
	d := e.Diagnostics
	rows := []kv{{tag + ": chain", fmt.Sprintf("%d states, solved by %s; residual ‖πP − π‖₁ = %s, worst balance %s",
		e.States, orDash(string(d.Method)), sci(d.Residual), sci(d.Balance))}}
	if e.Neglected > 0 {
		rows = append(rows, kv{tag + ": neglected mass", sci(e.Neglected)})
	}
	return rows
}

// describe says in words what a policy does.
func describe(p policies.Policy) string {
	switch p.Kind {
	case policies.BaseStock:
		return fmt.Sprintf("order up to %d whenever the inventory position is below %d", p.OrderUpTo, p.OrderUpTo)
	case policies.SS:
		return fmt.Sprintf("when the inventory position is at or below %d, order up to %d", p.ReorderPoint, p.OrderUpTo)
	case policies.SNQ:
		return fmt.Sprintf("when the inventory position is at or below %d, order the least multiple of %d that lifts it above %d", p.ReorderPoint, p.OrderMultiple, p.ReorderPoint)
	}
	return string(p.Kind)
}

// signed prints a difference with an explicit sign; differences of
// probabilities also in percentage points.
func signed(name string, d float64) string {
	if d == 0 {
		return "0"
	}
	sign := ""
	if d > 0 {
		sign = "+"
	}
	switch name {
	case "fill_rate", "stockout_probability", "order_frequency":
		return sign + num(d) + " (" + sign + strconv.FormatFloat(100*d, 'f', 2, 64) + " pp)"
	}
	return sign + figureValue(name, d)
}

// leadTimeText describes the lead time: "3 periods", or the law with its
// mean and standard deviation.
func leadTimeText(sys inventory.System) string {
	if d := sys.LeadTimeLaw; d != nil {
		return fmt.Sprintf("%s (mean %s periods, standard deviation %s)", d.String(), num(d.Mean()), num(math.Sqrt(d.Variance())))
	}
	return plural(sys.LeadTime, "period")
}

// timingCautions states the assumptions of a lead-time law and a review
// period in plain words; nil for a fixed lead time reviewed every period.
func timingCautions(sys inventory.System) []string {
	if sys.FixedTiming() {
		return nil
	}
	var c []string
	switch {
	case sys.LeadTimeLaw == nil:
		c = append(c, "The lead time is fixed, a whole number of periods; suppliers always deliver in full.")
	case sys.Model() == inventory.Independent:
		c = append(c, "Lead times are random with the law shown, drawn for each order independently of other orders and of demand, so a later order may arrive first; suppliers always deliver in full.",
			"With independent lead times only base-stock policies in backorder mode are evaluated exactly; other figures for this item come from simulation and are estimates.")
	default:
		c = append(c, "Lead times are random with the law shown, independent of demand, and orders arrive in the order they were placed (one supplier, one route). This is the model of Kaplan (1970); it fits only laws whose chance of arriving in the next period, for an order still out, does not fall as the order ages.",
			"Suppliers always deliver in full.")
	}
	if r := sys.Review(); r > 1 {
		c = append(c, fmt.Sprintf("The stock is reviewed, and an order placed, only every %d periods, at fixed times; between reviews nothing is ordered whatever happens. Costs and figures are per period.", r))
	}
	return c
}

// leadModelText says how the lead times of successive orders relate.
func leadModelText(sys inventory.System) string {
	if sys.LeadTimeLaw == nil {
		return "fixed lead time: every order takes the same time"
	}
	if sys.Model() == inventory.Independent {
		return "independent: each order draws its own lead time, so a later order may arrive first"
	}
	return "sequential: orders arrive in the order placed (Kaplan 1970: each period a random cut-off decides that every order older than it arrives)"
}

// reviewText describes the review period.
func reviewText(sys inventory.System) string {
	if r := sys.Review(); r > 1 {
		return fmt.Sprintf("every %d periods: the position is reviewed and an order placed only then; costs accrue every period", r)
	}
	return "every period"
}

// plural prints "1 period" or "3 periods".
func plural(n int, unit string) string {
	if n == 1 {
		return "1 " + unit
	}
	return strconv.Itoa(n) + " " + unit + "s"
}

// shortSpec describes a distribution briefly for a legend: its family and
// its mean and standard deviation to four digits.
func shortSpec(d inventory.Distribution) string {
	fam, _, _ := strings.Cut(d.String(), ":")
	return fmt.Sprintf("%s, mean %.4g, sd %.4g", fam, d.Mean(), math.Sqrt(d.Variance()))
}

func orDash(s string) string {
	if s == "" {
		return "—"
	}
	return s
}

func levelOr(l float64) float64 {
	if l == 0 {
		return 0.95
	}
	return l
}
