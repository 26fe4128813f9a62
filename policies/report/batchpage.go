package report

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/policies"
)

type itemRow struct {
	SKU, Pattern, Policy, Levels      string
	Location                          string // in a run by (sku, location)
	Mean, Fill, Cost, Current, Saving cell
	CurrentFill                       cell // fill rate of the policy in use, when the results give it
	Warnings                          int
	Failed                            bool
	// Lead is the timing the item was planned under (lead time or law,
	// model when independent, review period when above 1), LeadFull its
	// whole text when Lead is cut; shown only when some row has a law or
	// a review period.
	Lead, LeadFull string
}

// cell is a table cell with its sort key.
type cell struct {
	Text string
	Key  string // data-v; "" sorts last
}

type skuMessage struct {
	SKU, Text string
}

type batchView struct {
	Title, Version string
	Sortable       bool
	ByLocation     bool // the items table has a location column
	SubTitle       string
	Glance         []string
	Totals         []kv
	Charts         []Chart
	Items          []itemRow
	Errors         []skuMessage
	Warnings       []skuMessage
	LeftOut        []string
	Notes          []string
	Regret         []regretRow // items ranked by regret (--uncertainty runs)
	RegretNote     string
	// Timing holds the cautions of random lead times and review periods
	// (see skuView); empty: the line of a fixed lead time.
	Timing []string
}

var batchTemplate = mustTemplate("batch", `{{template "head" .}}
<h1>{{.Title}}</h1>
<p class="sub">{{.SubTitle}}</p>
<div class="glance">
{{range .Glance}}<p>{{.}}</p>
{{end}}</div>
<table class="kv"><tbody>
{{range .Totals}}<tr><th>{{.Key}}</th><td>{{.Value}}</td></tr>
{{end}}</tbody></table>
<h2 id="charts">Charts</h2>
{{range .Charts}}{{template "figure" .}}{{end}}
{{if .LeftOut}}<p>Left out of the exchange curve:</p>
<ul>{{range .LeftOut}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{if .Notes}}<ul>{{range .Notes}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{if .Regret}}<h2 id="regret">Where more history pays: items ranked by regret</h2>
<p>{{.RegretNote}}</p>
<table class="items">
<thead><tr><th>SKU</th><th>pattern</th><th>levels</th><th class="num">regret, mean</th><th class="num">regret, 95%</th><th class="num">fill rate, point model</th><th class="num">fill rate to expect</th><th class="num">fill rate, 5%</th><th>reorder point band</th></tr></thead>
<tbody>
{{range .Regret}}<tr><td class="sku">{{.SKU}}</td><td>{{.Pattern}}</td><td class="lv">{{.Levels}}</td><td class="num">{{.Mean}}</td><td class="num">{{.P95}}</td><td class="num">{{.Fill}}</td><td class="num">{{.Expected}}</td><td class="num">{{.FillP05}}</td><td class="lv">{{.Band}}</td></tr>
{{end}}</tbody></table>{{end}}
<h2 id="items" class="pagebreak">Items</h2>
<p>One row per item, in the order of the results file{{if .Sortable}}; click a column head to sort (optional script){{end}}. Costs are per period; the saving is the current policy's total cost minus the recommended one's.</p>
<table class="items sortable">
<thead><tr><th>SKU</th>{{if .ByLocation}}<th>location</th>{{end}}<th>pattern</th><th class="num">mean demand</th><th>policy</th><th>levels</th>{{if $.Timing}}<th>lead time</th>{{end}}<th class="num">fill rate</th><th class="num">total cost</th><th class="num">current cost</th><th class="num">current fill rate</th><th class="num">saving</th><th class="num">warnings</th></tr></thead>
<tbody>
{{range .Items}}<tr{{if .Failed}} class="warn"{{end}}><td class="sku">{{.SKU}}</td>{{if $.ByLocation}}<td>{{.Location}}</td>{{end}}<td>{{.Pattern}}</td><td class="num" data-v="{{.Mean.Key}}">{{.Mean.Text}}</td><td>{{.Policy}}</td><td class="lv">{{.Levels}}</td>{{if $.Timing}}<td class="lv"{{if .LeadFull}} title="{{.LeadFull}}"{{end}}>{{.Lead}}</td>{{end}}<td class="num" data-v="{{.Fill.Key}}">{{.Fill.Text}}</td><td class="num" data-v="{{.Cost.Key}}">{{.Cost.Text}}</td><td class="num" data-v="{{.Current.Key}}">{{.Current.Text}}</td><td class="num" data-v="{{.CurrentFill.Key}}">{{.CurrentFill.Text}}</td><td class="num" data-v="{{.Saving.Key}}">{{.Saving.Text}}</td><td class="num" data-v="{{.Warnings}}">{{if .Warnings}}{{.Warnings}}{{end}}</td></tr>
{{end}}</tbody></table>
<h2 id="errors">Errors</h2>
{{if .Errors}}<p>These items could not be planned; their rows in the results file carry no figures.</p>
<ul>{{range .Errors}}<li><strong>{{.SKU}}</strong>: {{.Text}}</li>{{end}}</ul>{{else}}<p>No item failed.</p>{{end}}
<h2 id="warnings">Warnings</h2>
{{if .Warnings}}<p>These items were planned, but their inputs deserve a look.</p>
<ul>{{range .Warnings}}<li><strong>{{.SKU}}</strong>: {{.Text}}</li>{{end}}</ul>{{else}}<p>No warnings.</p>{{end}}
{{template "cautions" .}}
{{template "foot" .}}`)

func (pg *BatchPage) render() {
	add := func(c Chart, err error) {
		if err != nil {
			c.SVG, c.Note = "", err.Error()
		}
		pg.Charts = append(pg.Charts, c)
	}
	if ex := pg.Exchange; ex != nil {
		c := Chart{ID: "exchange", Title: "Exchange curve: inventory against service"}
		var err error
		if len(ex.Points) > 0 {
			c.SVG, err = exchangeChart(ex.Points, ex.Batch, ex.Axis, c.Title)
		} else {
			err = fmt.Errorf("no item could be optimised under the targets")
		}
		what := "inventory investment, the sum over items of unit cost × mean on hand"
		if !ex.UnitCost {
			what = "holding cost per period, the sum over items of h × mean on hand (unit costs are missing for some items, so investment at cost cannot be summed)"
		}
		c.Caption = fmt.Sprintf("Each blue point re-optimises all %d items for the cheapest policy meeting one common fill-rate target (the label), and plots the demand-weighted aggregate fill rate against %s (Silver, Pyke & Thomas, Inventory and Production Management in Supply Chains, 4th ed., 2017). The orange triangle is the batch as planned. Points to the upper left of the curve waste stock; the curve shows what each extra point of service costs in stock.", ex.Items, what)
		add(c, err)
	}
	{
		c := Chart{ID: "saving-by-pattern", Title: "Saving by demand pattern"}
		n := 0
		for _, p := range pg.Patterns {
			n += p.Items
		}
		svg, err := savingChart(pg.Patterns, c.Title)
		if len(pg.Patterns) == 0 {
			err = fmt.Errorf("no item has a current policy to compare with")
		}
		c.SVG = svg
		c.Caption = fmt.Sprintf("Total saving per period from moving the %d items that have a current policy to the recommended one, by demand pattern (green: saving, red: the recommendation costs more, e.g. to meet a fill-rate floor).", n)
		add(c, err)
	}
	if pg.In.History != nil {
		c := Chart{ID: "pattern-map", Title: "Demand patterns of the history"}
		svg, err := patternChart(pg.Scatter, history.ADICutoff, history.CV2Cutoff, c.Title)
		c.SVG = svg
		c.Caption = fmt.Sprintf("Each SKU of %s by the average interval between periods with demand (ADI) and the squared coefficient of variation of its non-zero demands (CV²). The dashed lines are the cut-offs ADI = %v and CV² = %v of Syntetos, Boylan & Croston (2005), Journal of the Operational Research Society 56(5).", pg.In.History.File, history.ADICutoff, history.CV2Cutoff)
		add(c, err)
	}
}

// WriteHTML writes the page.
func (pg *BatchPage) WriteHTML(w io.Writer) error {
	return execute(batchTemplate, w, pg.view())
}

func (pg *BatchPage) view() batchView {
	in := pg.In
	v := batchView{Title: "Replenishment report: batch", Version: in.Version, Sortable: true, Charts: pg.Charts, Notes: pg.Notes}
	v.SubTitle = "From " + in.ResultsFile
	if in.ItemsFile != "" {
		v.SubTitle += " with the items of " + in.ItemsFile
	}
	if in.History != nil {
		v.SubTitle += " and the history of " + in.History.File
	}
	if in.Period != "" {
		v.SubTitle += ". Planned by the " + in.Period + "; costs are per " + in.Period + "."
	} else {
		v.SubTitle += ". Costs are per review period."
	}
	var done, failed, withCur int
	var cost, curCost, saving, demand, served, curDemand, curServed float64
	for _, r := range in.Rows {
		sku := r.SKU
		if sku == "" {
			sku = fmt.Sprintf("(no SKU, line %d)", r.Line)
		}
		row := itemRow{SKU: sku, Location: r.Location, Pattern: r.Pattern, Warnings: len(r.Warnings)}
		row.Lead, row.LeadFull = leadText(r)
		if r.Location != "" {
			v.ByLocation = true
			sku += " @ " + r.Location // in the lists of errors and warnings
		}
		if r.Demand != "" {
			row.Mean = cell{strconv.FormatFloat(r.DemandMean, 'g', 4, 64), fkey(r.DemandMean)}
		}
		if r.Err != "" || r.Figures == nil {
			failed++
			row.Failed = true
			row.Policy = "failed"
			v.Errors = append(v.Errors, skuMessage{sku, r.Err})
		} else {
			done++
			f := r.Figures
			row.Policy = string(r.Policy.Kind)
			row.Levels = levels(*r.Policy)
			row.Fill = cell{pct(f.FillRate), fkey(f.FillRate)}
			row.Cost = cell{money(f.TotalCost), fkey(f.TotalCost)}
			cost += f.TotalCost
			demand += r.DemandMean
			served += r.DemandMean * f.FillRate
			if r.CurrentCost != nil {
				withCur++
				curCost += *r.CurrentCost
				row.Current = cell{money(*r.CurrentCost), fkey(*r.CurrentCost)}
			}
			if r.CurrentFillRate != nil {
				row.CurrentFill = cell{pct(*r.CurrentFillRate), fkey(*r.CurrentFillRate)}
				curDemand += r.DemandMean
				curServed += r.DemandMean * *r.CurrentFillRate
			}
			if r.Saving != nil {
				saving += *r.Saving
				row.Saving = cell{money(*r.Saving), fkey(*r.Saving)}
			}
		}
		for _, w := range r.Warnings {
			v.Warnings = append(v.Warnings, skuMessage{r.Name(), w})
		}
		v.Items = append(v.Items, row)
	}
	v.Glance = append(v.Glance, fmt.Sprintf("%d items: %d planned, %d failed.", len(in.Rows), done, failed))
	if withCur > 0 {
		share := ""
		if curCost > 0 {
			share = " (" + pct(saving/curCost) + " of their current cost)"
		}
		v.Glance = append(v.Glance, fmt.Sprintf("Moving the %d items with a current policy to the recommendations saves %s per period%s.", withCur, money(saving), share))
	}
	v.Totals = []kv{
		{"total cost of the recommended policies", money(cost) + " per period"},
	}
	if withCur > 0 {
		v.Totals = append(v.Totals, kv{"current cost of the items with a current policy", money(curCost) + " per period"})
	}
	if demand > 0 {
		v.Totals = append(v.Totals, kv{"aggregate fill rate of the recommendations (demand-weighted)", pct(served / demand)})
	}
	if curDemand > 0 {
		v.Totals = append(v.Totals, kv{"aggregate fill rate of the current policies, where given (demand-weighted)", pct(curServed / curDemand)})
	}
	v.Timing = batchTimingCautions(in.Rows)
	if ex := pg.Exchange; ex != nil {
		v.LeftOut = ex.LeftOut
		if len(v.LeftOut) > 25 {
			v.LeftOut = append(v.LeftOut[:25:25], fmt.Sprintf("and %d more", len(ex.LeftOut)-25))
		}
		v.Totals = append(v.Totals, kv{"exchange curve", fmt.Sprintf("%d items re-optimised at %d targets (%d searches)", ex.Items, len(in.Targets), ex.Optimized)})
	} else {
		v.Notes = append(v.Notes, "The exchange curve needs the items file (--items), to re-optimise every item under common fill-rate targets.")
	}
	v.Regret, v.RegretNote = regretRows(in.Rows)
	return v
}

// batchTimingCautions states the lead-time assumptions of a batch whose
// rows carry a lead-time law or a review period above 1 (the columns
// lead_time, lead_time_model, review_period); nil when every row has a
// fixed lead time reviewed every period, or the file predates the columns.
func batchTimingCautions(rows []ResultRow) []string {
	var laws, indep, reviews int
	for _, r := range rows {
		if r.LeadTime != "" {
			if _, law, err := inventory.ParseLeadTime(r.LeadTime); err == nil && law != nil {
				laws++
				if r.LeadTimeModel == string(inventory.Independent) {
					indep++
				}
			}
		}
		if r.ReviewPeriod > 1 {
			reviews++
		}
	}
	if laws == 0 && reviews == 0 {
		return nil
	}
	c := []string{"Lead times are as in each row's lead_time column: a whole number of periods, or a random lead time with the law given there, independent of demand; suppliers always deliver in full."}
	if laws > indep {
		c = append(c, fmt.Sprintf("Random lead times with sequential deliveries (Kaplan 1970) for %s: orders arrive in the order placed.", plural(laws-indep, "item")))
	}
	if indep > 0 {
		c = append(c, fmt.Sprintf("Independent lead times for %s: each order draws its own, and a later order may arrive first.", plural(indep, "item")))
	}
	if reviews > 0 {
		c = append(c, fmt.Sprintf("Review only every few periods (review_period) for %s: orders are placed only at reviews, and costs and figures stay per period.", plural(reviews, "item")))
	}
	return c
}

// leadText writes the timing of a results row for the items table: the
// lead time or its law (cut after 40 characters, with the whole text
// returned as full), "independent" when orders may cross, and "R=7" for a
// review period above 1.
func leadText(r ResultRow) (text, full string) {
	text = r.LeadTime
	if len(text) > 40 {
		full = text
		cut := strings.LastIndexByte(text[:40], ',') + 1
		if cut == 0 {
			cut = 40
		}
		text = text[:cut] + "…"
	}
	if r.LeadTimeModel == string(inventory.Independent) && strings.Contains(r.LeadTime, ":") {
		text += ", independent"
	}
	if r.ReviewPeriod > 1 {
		text += fmt.Sprintf(", R=%d", r.ReviewPeriod)
	}
	return strings.TrimPrefix(text, ", "), full
}

func levels(p policies.Policy) string {
	switch p.Kind {
	case policies.BaseStock:
		return fmt.Sprintf("S=%d", p.OrderUpTo)
	case policies.SS:
		return fmt.Sprintf("s=%d, S=%d", p.ReorderPoint, p.OrderUpTo)
	case policies.SNQ:
		return fmt.Sprintf("s=%d, Q=%d", p.ReorderPoint, p.OrderMultiple)
	}
	return ""
}

func fkey(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
