package report

import (
	"fmt"
	"html"
	"html/template"
	"io"
	"math"
	"strconv"
	"strings"

	"ergostock/policies/network"
)

// NetworkInput is what the network page shows: the levels planned for the
// whole network and the same network planned one location at a time.
type NetworkInput struct {
	Title   string // "" for a title from the centre's name
	Version string
	Plan    *network.Plan      // network.Optimize (or the file's levels, evaluated)
	Alone   *network.AlonePlan // network.Alone
	// Check says how the approximation's error was measured, for networks
	// of several stores ("" when exact or not measured).
	Check string
}

type networkRow struct {
	Location, Parent, Lead              string
	Own, Echelon, AloneOwn              string
	Fill, AloneFill, Promised           string
	OnHand, Backorders, Cost, AloneCost string
}

type networkView struct {
	Title, Version, SubTitle string
	Sortable                 bool
	Glance                   []string
	Tree                     template.HTML
	Rows                     []networkRow
	Notes                    []string
}

var networkTemplate = mustTemplate("network", `{{template "head" .}}
<h1>{{.Title}}</h1>
<p class="sub">{{.SubTitle}}</p>
<div class="glance">
{{range .Glance}}<p>{{.}}</p>
{{end}}</div>
<h2 id="tree">The network</h2>
<figure id="tree-diagram">{{.Tree}}
<figcaption><strong>Planned as a network.</strong> Each box shows a location's base-stock level on its own position (and, at the centre, on its echelon: everything at and below it) and the fill rate it gives; each line the lead time in periods.</figcaption>
</figure>
<h2 id="compare">Planned as a network or each location alone</h2>
<p>"Alone" plans every store for its lead time from the centre as if the centre never ran short, and the centre against the stores' total demand; both plans are then evaluated as the network they form. Costs are per period.</p>
<h3>Planned as a network</h3>
<table>
<thead><tr><th>location</th><th>parent</th><th class="num">lead time</th><th class="num">level</th><th class="num">echelon level</th><th class="num">fill rate</th><th class="num">on hand</th><th class="num">backorders</th><th class="num">cost</th></tr></thead>
<tbody>
{{range .Rows}}<tr><td>{{.Location}}</td><td>{{.Parent}}</td><td class="num">{{.Lead}}</td><td class="num">{{.Own}}</td><td class="num">{{.Echelon}}</td><td class="num">{{.Fill}}</td><td class="num">{{.OnHand}}</td><td class="num">{{.Backorders}}</td><td class="num">{{.Cost}}</td></tr>
{{end}}</tbody></table>
<h3>Each location planned alone</h3>
<table>
<thead><tr><th>location</th><th class="num">level</th><th class="num">fill rate its own plan promises</th><th class="num">fill rate in the network</th><th class="num">cost in the network</th></tr></thead>
<tbody>
{{range .Rows}}<tr><td>{{.Location}}</td><td class="num">{{.AloneOwn}}</td><td class="num">{{.Promised}}</td><td class="num">{{.AloneFill}}</td><td class="num">{{.AloneCost}}</td></tr>
{{end}}</tbody></table>
{{if .Notes}}<ul>{{range .Notes}}<li>{{.}}</li>{{end}}</ul>{{end}}
<h2 id="assumptions">Assumptions and cautions</h2>
<div class="cautions">
<p>The figures on this page come from a model, not from observation. They hold to the extent its assumptions hold:</p>
<ul>
<li>Two levels: one centre, replenished by a supplier that always delivers in full after a fixed lead time, and the stores it replenishes; no transfers between stores.</li>
<li>Every location follows a base-stock rule reviewed every period; the stores order before the centre reviews; the centre serves the stores' orders first come, first served.</li>
<li>Demand at each store is independent from period to period and between stores, with the same distribution in every period; unmet demand is backordered.</li>
<li>Holding costs are charged on stock on hand at each location, not on stock in transit; a store's shortage cost per unit backordered per period.</li>
<li>With one store the figures are exact; with several they are an approximation, with its error measured by simulation as stated above.</li>
</ul>
<p>Check the results against local practice, contracts and regulations before acting, and take particular care with critical items such as medicines and safety spares.</p>
</div>
{{template "foot" .}}`)

// WriteNetworkPage writes the network page to w.
func WriteNetworkPage(w io.Writer, in NetworkInput) error {
	if in.Plan == nil || in.Alone == nil {
		return fmt.Errorf("report: network page: want both the network plan and the plan of each location alone")
	}
	p, a := in.Plan.Result, in.Alone.Result
	n := in.Plan.Network
	v := networkView{Title: in.Title, Version: in.Version}
	if v.Title == "" {
		v.Title = fmt.Sprintf("Network plan: %s and %d store(s)", n.Centre.Name, len(n.Stores))
	}
	kind := "exact"
	if !p.Exact {
		kind = "an approximation"
	}
	v.SubTitle = fmt.Sprintf("Figures are %s (%s). Levels found by: %s.", kind, p.Method, in.Plan.Search)
	diff := a.TotalCost - p.TotalCost
	rel := ""
	if p.TotalCost > 0 {
		rel = fmt.Sprintf(" (%s more)", pct(diff/p.TotalCost))
	}
	v.Glance = append(v.Glance,
		fmt.Sprintf("Planned as a network: total cost %s per period.", money(p.TotalCost)),
		fmt.Sprintf("Each location planned alone: %s per period%s.", money(a.TotalCost), rel))
	worst, worstName := 0.0, ""
	for i := range n.Stores {
		if d := in.Alone.Expected[i] - a.Locations[i+1].FillRate; d > worst {
			worst, worstName = d, n.Stores[i].Name
		}
	}
	if worst > 0.0005 {
		v.Glance = append(v.Glance, fmt.Sprintf("Planned alone, %s would get a fill rate %s below what its own plan promises, because the centre is not always in stock.", worstName, pct(worst)))
	}
	if in.Check != "" {
		v.Glance = append(v.Glance, in.Check)
	}
	for i, l := range p.Locations {
		al := a.Locations[i]
		r := networkRow{Location: l.Location, Parent: dashIfEmpty(l.Parent), Lead: fmt.Sprint(l.LeadTime),
			Own: fmt.Sprint(l.InstallationLevel), Echelon: fmt.Sprint(l.EchelonLevel), AloneOwn: fmt.Sprint(al.InstallationLevel),
			Fill: pct(l.FillRate), AloneFill: pct(al.FillRate), OnHand: short(l.MeanOnHand), Backorders: short(l.MeanBackorders),
			Cost: money(l.TotalCost), AloneCost: money(al.TotalCost), Promised: ""}
		if i > 0 {
			r.Promised = pct(in.Alone.Expected[i-1])
		}
		v.Rows = append(v.Rows, r)
	}
	v.Rows = append(v.Rows, networkRow{Location: "total", Cost: money(p.TotalCost), AloneCost: money(a.TotalCost), Parent: ""})
	v.Notes = append(v.Notes, "At the centre, the fill rate is the share of the stores' orders shipped in the period they are placed, and backorders are the units it owes the stores.")
	v.Tree = networkTree(p)
	return execute(networkTemplate, w, v)
}

// short writes a mean with four significant digits.
func short(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

func dashIfEmpty(s string) string {
	if s == "" {
		return "—"
	}
	return s
}

// networkTree draws the tree as inline SVG: the supplier, the centre, and
// the stores in rows of at most six.
func networkTree(r *network.Result) template.HTML {
	const (
		width   = 680.0
		boxW    = 104.0
		boxH    = 52.0
		perRow  = 6
		rowGap  = 40.0
		topY    = 8.0
		centreY = 78.0
	)
	stores := r.Locations[1:]
	rows := int(math.Ceil(float64(len(stores)) / perRow))
	height := centreY + boxH + float64(rows)*(boxH+rowGap) + 20
	var b strings.Builder
	fmt.Fprintf(&b, `<svg class="chart" xmlns="http://www.w3.org/2000/svg" viewBox="0 0 %g %g" role="img" aria-label="tree of the network: the centre and its stores">`, width, height)
	b.WriteString(`<style>text{font-family:'Liberation Sans',Arial,sans-serif;font-size:10px;fill:#1b1b1b}.n{font-weight:bold}.m{fill:#555}</style>`)
	cx := width / 2
	c := r.Locations[0]
	// Supplier and centre.
	fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="middle" class="m">supplier</text>`, cx, topY+10)
	fmt.Fprintf(&b, `<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="#0072b2" stroke-width="1.5"/>`, cx, topY+14, cx, centreY)
	fmt.Fprintf(&b, `<text x="%g" y="%g" class="m">lead time %d</text>`, cx+6, (topY+14+centreY)/2+3, c.LeadTime)
	box := func(x, y float64, l network.Figures, centre bool) {
		fmt.Fprintf(&b, `<rect x="%g" y="%g" width="%g" height="%g" rx="4" fill="#f2f7fb" stroke="#0072b2"/>`, x-boxW/2, y, boxW, boxH)
		fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="middle" class="n">%s</text>`, x, y+14, html.EscapeString(shorten(l.Location, 18)))
		lv := fmt.Sprintf("level %d", l.InstallationLevel)
		if centre {
			lv = fmt.Sprintf("level %d, echelon %d", l.InstallationLevel, l.EchelonLevel)
		}
		fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="middle">%s</text>`, x, y+29, lv)
		fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="middle">fill rate %s</text>`, x, y+44, pct(l.FillRate))
	}
	box(cx, centreY, c, true)
	for i, l := range stores {
		row, col := i/perRow, i%perRow
		inRow := min(perRow, len(stores)-row*perRow)
		gap := width / float64(inRow)
		x := gap*float64(col) + gap/2
		y := centreY + boxH + rowGap + float64(row)*(boxH+rowGap)
		fmt.Fprintf(&b, `<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="#9bbfd9" stroke-width="1"/>`, cx, centreY+boxH, x, y)
		fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="middle" class="m">L=%d</text>`, x, y-3, l.LeadTime)
		box(x, y, l, false)
	}
	b.WriteString(`</svg>`)
	return template.HTML(b.String())
}

func shorten(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}
