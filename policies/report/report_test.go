package report

import (
	"bytes"
	"encoding/xml"
	"io"
	"math"
	"os"
	"regexp"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/batch"
)

func mustParse(t *testing.T, spec string) inventory.Distribution {
	t.Helper()
	d, err := inventory.Parse(spec)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// The classical test problem of Zheng & Federgruen (1991), Operations
// Research 39(4): Poisson demand of mean 10, K = 64, h = 1, b = 9, zero lead
// time, optimum s = 6, S = 40 with cost about 35.02 (the figure as recalled
// in the project's issue, from memory).
func TestRenewalZhengFedergruen(t *testing.T) {
	sys := inventory.System{Demand: mustParse(t, "poisson:mean=10"), Holding: 1, Shortage: 9, OrderCost: 64, Mode: inventory.Backorder}
	r := newRenewalCost(sys)
	r.mass(60)
	got := r.ss(6, 40)
	if math.Abs(got-35.02) > 0.01 {
		t.Errorf("c(6, 40) = %.4f, want about 35.02", got)
	}
	for s := 0; s <= 12; s++ {
		for S := s + 1; S <= 60; S++ {
			if c := r.ss(s, S); c < got-1e-9 {
				t.Errorf("c(%d, %d) = %.6f below c(6, 40) = %.6f", s, S, c, got)
			}
		}
	}
}

// The renewal formulas of the cost map against the exact chain evaluation,
// an independent path through package policies.
func TestRenewalMatchesEvaluate(t *testing.T) {
	for _, c := range []struct {
		spec string
		L    int
		p    []policies.Policy
	}{
		{"poisson:mean=10", 0, []policies.Policy{{Kind: policies.SS, ReorderPoint: 6, OrderUpTo: 40}, {Kind: policies.SS, ReorderPoint: -3, OrderUpTo: 9}, {Kind: policies.SNQ, ReorderPoint: 8, OrderMultiple: 25}}},
		{"negbin:mean=4,var=11", 2, []policies.Policy{{Kind: policies.SS, ReorderPoint: 10, OrderUpTo: 30}, {Kind: policies.SNQ, ReorderPoint: 12, OrderMultiple: 7}}},
		{"gamma:mean=3,sd=2", 3, []policies.Policy{{Kind: policies.SS, ReorderPoint: 11, OrderUpTo: 12}, {Kind: policies.SNQ, ReorderPoint: 9, OrderMultiple: 1}}},
		// Demand in packs of 10: an s-nQ policy with Q = 20 visits only
		// every tenth position.
		{"pmf:0=0.3,10=0.5,20=0.2", 1, []policies.Policy{{Kind: policies.SNQ, ReorderPoint: 15, OrderMultiple: 20}, {Kind: policies.SS, ReorderPoint: 12, OrderUpTo: 47}}},
	} {
		sys := inventory.System{Demand: mustParse(t, c.spec), LeadTime: c.L, Holding: 1.5, Shortage: 12, OrderCost: 40, UnitCost: 3, Mode: inventory.Backorder}
		r := newRenewalCost(sys)
		for _, p := range c.p {
			e, err := policies.Evaluate(sys, p, policies.Options{})
			if err != nil {
				t.Fatal(err)
			}
			var got float64
			if p.Kind == policies.SNQ {
				got = r.snq(p.ReorderPoint, p.OrderMultiple)
			} else {
				got = r.ss(p.ReorderPoint, p.OrderUpTo)
			}
			if want := e.Figures.TotalCost; math.Abs(got-want) > 1e-9*math.Max(1, want) {
				t.Errorf("%s L=%d %v: renewal %.12g, Evaluate %.12g", c.spec, c.L, p, got, want)
			}
		}
	}
}

// Base-stock S with zero lead time: net inventory is S - D, so its law is
// that of demand reflected (the newsvendor; Porteus 2002, Foundations of
// Stochastic Inventory Theory, ch. 1), checked against gonum's Poisson.
func TestStockLevelsNewsvendor(t *testing.T) {
	sys := inventory.System{Demand: mustParse(t, "poisson:mean=4"), Holding: 1, Shortage: 4, Mode: inventory.Backorder}
	l, err := stockLevels(sys, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 6})
	if err != nil {
		t.Fatal(err)
	}
	ref := distuv.Poisson{Lambda: 4}
	for i, p := range l.P {
		k := 6 - (l.Lo + i)
		if want := ref.Prob(float64(k)); math.Abs(p-want) > 1e-14 {
			t.Errorf("P(NI = %d) = %g, want %g", l.Lo+i, p, want)
		}
	}
	if l.Neglected > 1e-12 {
		t.Errorf("neglected %g", l.Neglected)
	}
}

// The level laws give the same mean on hand, backorders and stockout
// probability as the exact evaluation.
func TestStockLevelsMatchEvaluate(t *testing.T) {
	for _, c := range []struct {
		spec string
		L    int
		mode inventory.Mode
		p    policies.Policy
	}{
		{"poisson:mean=10", 0, inventory.Backorder, policies.Policy{Kind: policies.SS, ReorderPoint: 6, OrderUpTo: 40}},
		{"negbin:mean=4,var=11", 2, inventory.Backorder, policies.Policy{Kind: policies.SS, ReorderPoint: 10, OrderUpTo: 30}},
		{"poisson:mean=3", 1, inventory.Backorder, policies.Policy{Kind: policies.SNQ, ReorderPoint: 4, OrderMultiple: 5}},
		{"normal:mean=5,sd=2", 3, inventory.Backorder, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 25}},
		{"poisson:mean=3", 0, inventory.Lost, policies.Policy{Kind: policies.SS, ReorderPoint: 2, OrderUpTo: 9}},
		{"negbin:mean=2,var=5", 0, inventory.Lost, policies.Policy{Kind: policies.SNQ, ReorderPoint: 1, OrderMultiple: 4}},
		{"pmf:0=0.3,10=0.5,20=0.2", 1, inventory.Backorder, policies.Policy{Kind: policies.SNQ, ReorderPoint: 15, OrderMultiple: 20}},
		{"poisson:mean=3", 2, inventory.Lost, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 9}},
		{"poisson:mean=3", 1, inventory.Lost, policies.Policy{Kind: policies.SS, ReorderPoint: 3, OrderUpTo: 12}},
	} {
		sys := inventory.System{Demand: mustParse(t, c.spec), LeadTime: c.L, Holding: 1, Shortage: 9, OrderCost: 20, Mode: c.mode}
		l, err := stockLevels(sys, c.p)
		if err != nil {
			t.Fatal(err)
		}
		e, err := policies.Evaluate(sys, c.p, policies.Options{})
		if err != nil {
			t.Fatal(err)
		}
		var onHand, back, short, total float64
		for i, p := range l.P {
			v := float64(l.Lo + i)
			total += p
			if v > 0 {
				onHand += v * p
			} else if v < 0 {
				back -= v * p
				short += p
			}
		}
		f := e.Figures
		check := func(name string, got, want float64) {
			if math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) {
				t.Errorf("%s %v %s: levels give %.12g, Evaluate %.12g", c.spec, c.p, name, got, want)
			}
		}
		check("total probability", total, 1)
		check("mean on hand", onHand, f.MeanOnHand)
		check("mean backorders", back, f.MeanBackorders)
		if c.mode == inventory.Backorder {
			check("stockout probability", short, f.StockoutProbability)
		}
	}
}

func TestAxisLevels(t *testing.T) {
	for _, c := range []struct {
		centre, lo, hi, floor, n int
	}{
		{10, -2, 22, -100, 25}, {10, 0, 1000, -100, 25}, {3, -9, 15, -1, 25}, {500, 20, 530, 0, 25},
	} {
		v := axisLevels(c.centre, c.lo, c.hi, c.floor, c.n)
		has := false
		for i, x := range v {
			if x == c.centre {
				has = true
			}
			if x < c.floor || (i > 0 && x <= v[i-1]) {
				t.Errorf("axisLevels%v = %v: not increasing above the floor", c, v)
				break
			}
		}
		if !has || len(v) != c.n {
			t.Errorf("axisLevels%v = %v: want %d levels through the centre", c, v, c.n)
		}
	}
}

var (
	reExternal = regexp.MustCompile(`(?i)https?://|\bsrc\s*=|@import|url\(`)
	reSVG      = regexp.MustCompile(`(?s)<svg\b.*?</svg>`)
	reTag      = regexp.MustCompile(`<(/?)([a-zA-Z][a-zA-Z0-9]*)\b[^>]*?(/?)>`)
)

// voidElements have no closing tag in HTML.
var voidElements = map[string]bool{"meta": true, "br": true, "hr": true, "img": true, "input": true, "link": true, "col": true, "wbr": true}

// checkPage checks a page's structure: the charts with the given ids are
// present as inline SVG that is well-formed XML, nothing refers to the
// network or to any external resource, and the HTML tags outside the SVG
// and the script balance.
func checkPage(t *testing.T, page string, charts []string, texts []string) {
	t.Helper()
	if !strings.HasPrefix(page, "<!DOCTYPE html>") || !strings.Contains(page, "</html>") {
		t.Errorf("not a complete HTML document")
	}
	if m := reExternal.FindString(page); m != "" {
		t.Errorf("page refers to an external resource: %q", m)
	}
	for _, id := range charts {
		re := regexp.MustCompile(`(?s)<figure id="` + regexp.QuoteMeta(id) + `">\s*<svg\b`)
		if !re.MatchString(page) {
			t.Errorf("chart %q missing or not drawn", id)
		}
	}
	for _, s := range texts {
		if !strings.Contains(page, s) {
			t.Errorf("page lacks %q", s)
		}
	}
	svgs := reSVG.FindAllString(page, -1)
	if len(svgs) < len(charts) {
		t.Errorf("%d SVG elements, want at least %d", len(svgs), len(charts))
	}
	for i, s := range svgs {
		d := xml.NewDecoder(strings.NewReader(s))
		for {
			_, err := d.Token()
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Errorf("SVG %d is not well-formed XML: %v", i, err)
				break
			}
		}
		if !strings.Contains(s, "viewBox=") || strings.Contains(s[:strings.Index(s, ">")], "width=") {
			t.Errorf("SVG %d does not scale by its viewBox", i)
		}
	}
	rest := reSVG.ReplaceAllString(page, "")
	rest = regexp.MustCompile(`(?s)<script>.*?</script>|<style>.*?</style>`).ReplaceAllString(rest, "")
	var stack []string
	for _, m := range reTag.FindAllStringSubmatch(rest, -1) {
		name := strings.ToLower(m[2])
		switch {
		case voidElements[name] || m[3] == "/":
		case m[1] == "":
			stack = append(stack, name)
		default:
			if len(stack) == 0 || stack[len(stack)-1] != name {
				t.Fatalf("unbalanced </%s>; open: %v", name, stack)
			}
			stack = stack[:len(stack)-1]
		}
	}
	if len(stack) > 0 {
		t.Errorf("unclosed tags: %v", stack)
	}
}

func TestSKUPage(t *testing.T) {
	cur := policies.Policy{Kind: policies.SS, ReorderPoint: 3, OrderUpTo: 20}
	for _, c := range []struct {
		name    string
		sys     inventory.System
		kind    policies.Kind
		charts  []string
		texts   []string
		hist    bool
		current *policies.Policy
	}{
		{"backorder s-S with history", inventory.System{Demand: mustParse(t, "poisson:mean=4"), LeadTime: 1, Holding: 0.5, Shortage: 9, OrderCost: 30, UnitCost: 12, Mode: inventory.Backorder},
			policies.SS, []string{"levels", "cost-map", "fill-rate", "history", "history-fit"}, []string{"net inventory"}, true, &cur},
		{"backorder s-nQ", inventory.System{Demand: mustParse(t, "negbin:mean=20,var=60"), LeadTime: 2, Holding: 1, Shortage: 19, OrderCost: 100, Mode: inventory.Backorder},
			policies.SNQ, []string{"levels", "cost-map", "fill-rate"}, []string{"order multiple Q"}, false, nil},
		{"lost base-stock", inventory.System{Demand: mustParse(t, "poisson:mean=3"), Holding: 1, Shortage: 20, Mode: inventory.Lost},
			policies.BaseStock, []string{"levels", "cost-map", "fill-rate"}, []string{"stock on hand"}, false, &cur},
		// Issue 12: a lead-time law under sequential deliveries with weekly
		// review of daily demand; the law is drawn beside the history.
		{"backorder s-S, lead-time law, weekly review", inventory.System{Demand: mustParse(t, "poisson:mean=4"), LeadTimeLaw: mustParse(t, "pmf:1=0.2,2=0.5,3=0.3"), ReviewPeriod: 7,
			Holding: 0.5, Shortage: 9, OrderCost: 30, Mode: inventory.Backorder},
			policies.SS, []string{"levels", "cost-map", "fill-rate", "history", "history-fit", "lead-time"},
			[]string{"pmf:1=0.2,2=0.5,3=0.3 (mean 2.1 periods", "sequential: orders arrive in the order placed", "every 7 periods", "Kaplan (1970)", "All figures and costs are per period", "Long-run averages per period"}, true, &cur},
		{"backorder base-stock, independent lead times", inventory.System{Demand: mustParse(t, "poisson:mean=4"), LeadTimeLaw: mustParse(t, "pmf:0=0.2,1=0.3,4=0.5"), LeadTimeModel: inventory.Independent,
			Holding: 0.5, Shortage: 9, Mode: inventory.Backorder},
			policies.BaseStock, []string{"levels", "fill-rate", "lead-time"}, []string{"independent: each order draws its own lead time", "The cost map is left out", "a later order may arrive first"}, false, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			in := SKUInput{SKU: "BRAKE-PAD-07", System: c.sys, Kind: c.kind, Current: c.current, Version: "test"}
			if c.hist {
				in.History = &History{File: "history.csv", SKU: "BRAKE-PAD-07", Period: "week",
					Labels: []string{"2026-W01", "2026-W02", "2026-W03", "2026-W04", "2026-W05", "2026-W06"},
					Demand: []int{3, 5, 4, 0, 6, 4}, Fitted: c.sys.Demand, Model: "poisson"}
			}
			in.Simulate = func(p policies.Policy) (*Simulated, error) {
				e, err := policies.Evaluate(c.sys, p, policies.Options{})
				if err != nil {
					return nil, err
				}
				return &Simulated{Mean: e.Figures, Periods: 10, Replications: 2}, nil
			}
			pg, err := BuildSKU(in)
			if err != nil {
				t.Fatal(err)
			}
			var buf bytes.Buffer
			if err := pg.WriteHTML(&buf); err != nil {
				t.Fatal(err)
			}
			texts := append([]string{"Key figures", "Assumptions and cautions", "medicines and safety spares", "Exact against simulated"}, c.texts...)
			for _, f := range (inventory.Figures{}).Fields() {
				texts = append(texts, "<td>"+f.Label+"</td><td>"+f.Unit+"</td>")
			}
			checkPage(t, buf.String(), c.charts, texts)
			if strings.Contains(buf.String(), "<script") {
				t.Errorf("a one-SKU page needs no script")
			}
			for _, n := range pg.Notes {
				t.Logf("note: %s", n)
			}
		})
	}
}

func readFixture(t *testing.T, name string) []ResultRow {
	t.Helper()
	f, err := os.Open("../../testdata/report/" + name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := ReadResults(f, name)
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

func TestReadResults(t *testing.T) {
	rows := readFixture(t, "results.csv")
	if len(rows) != 6 {
		t.Fatalf("%d rows, want 6", len(rows))
	}
	r := rows[2]
	if r.SKU != "DOOR-SENSOR-4" || r.Policy == nil || r.Policy.Kind != policies.SNQ || r.Figures == nil || r.Saving == nil {
		t.Errorf("row 3 = %+v", r)
	}
	if last := rows[5]; last.Err == "" || last.Figures != nil {
		t.Errorf("failed item read as %+v", last)
	}
	for _, c := range []struct{ name, data, want string }{
		{"empty.csv", "", "empty.csv: empty file"},
		{"history.csv", "date,sku,quantity\n2026-01-05,A,3\n", "history.csv:1: missing columns demand"},
		{"header.csv", strings.Join(append(append([]string(nil), resultColumns...), resultTail...), ",") + "\n", "header.csv: no items"},
		{"bad.csv", strings.Join(append(append([]string(nil), resultColumns...), resultTail...), ",") + "\nA,poisson:mean=2,2,2,,s-S,1,x,,0.9,0.1,1,0,0,1,1,0,0,0,0,0,,,,\n", `bad.csv:2: order_up_to "x": want a whole number`},
	} {
		_, err := ReadResults(strings.NewReader(c.data), c.name)
		if err == nil || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: err = %v, want one line containing %q", c.name, err, c.want)
		}
	}
}

func TestBatchPage(t *testing.T) {
	rows := readFixture(t, "results.csv")
	f, err := os.Open("../../testdata/report/items.csv")
	if err != nil {
		t.Fatal(err)
	}
	items, err := batch.ReadItems(f, "items.csv", nil)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	pg, err := BuildBatch(BatchInput{ResultsFile: "results.csv", Rows: rows, ItemsFile: "items.csv", Items: items,
		Targets: []float64{0.9, 0.95, 0.99}, Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	if ex := pg.Exchange; ex == nil || len(ex.Points) != 3 || ex.UnitCost {
		t.Fatalf("exchange curve %+v: want 3 points by holding cost (an item has no unit cost)", pg.Exchange)
	}
	// Every item meets the common target, so the demand-weighted aggregate
	// meets it too, and it does not fall as the target rises.
	for i, p := range pg.Exchange.Points {
		if target := []float64{0.9, 0.95, 0.99}[i]; p.FillRate < target-1e-9 {
			t.Errorf("point %d %+v: aggregate fill rate below the target %v", i, p, target)
		}
		if i > 0 && p.FillRate < pg.Exchange.Points[i-1].FillRate-1e-12 {
			t.Errorf("point %d %+v after %+v: fill rate fell", i, p, pg.Exchange.Points[i-1])
		}
	}
	var buf bytes.Buffer
	if err := pg.WriteHTML(&buf); err != nil {
		t.Fatal(err)
	}
	checkPage(t, buf.String(), []string{"exchange", "saving-by-pattern"},
		[]string{"COUPLER-PIN-3", "holding_cost", "table class=\"items sortable\"", "Assumptions and cautions", "holding cost per period"})
}

// The exchange curve reuses answers that already meet a higher target
// (backorder base-stock and s-S); it must give the points that searching
// every item at every target gives.
func TestExchangeReuseMatchesSearch(t *testing.T) {
	rows := readFixture(t, "results.csv")
	f, err := os.Open("../../testdata/report/items.csv")
	if err != nil {
		t.Fatal(err)
	}
	items, err := batch.ReadItems(f, "items.csv", nil)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	targets := []float64{0.99, 0.9, 0.97}
	searches := 0
	opt := func(sys inventory.System, k policies.Kind, o policies.SearchOptions) (*policies.Optimum, error) {
		searches++
		return policies.Optimize(sys, k, o)
	}
	pg, err := buildBatch(BatchInput{ResultsFile: "results.csv", Rows: rows, Items: items, Targets: targets, Workers: 1}, opt)
	if err != nil {
		t.Fatal(err)
	}
	if searches >= 5*len(targets) {
		t.Errorf("%d searches for 5 items at %d targets: nothing reused", searches, len(targets))
	}
	// Direct: every usable item searched at every target.
	byRow := map[string]ResultRow{}
	for _, r := range rows {
		byRow[r.SKU] = r
	}
	for ti, target := range targets {
		var inv, fill, demand float64
		for _, it := range items {
			r, ok := byRow[it.SKU]
			if it.Err != nil || !ok || r.Figures == nil {
				continue
			}
			sys := it.System
			sys.Demand = mustParse(t, r.Demand)
			kind := it.Kind
			if kind == "" {
				kind = batch.DefaultKind(sys)
			}
			so := policies.SearchOptions{MinFillRate: target}
			if sys.Mode == inventory.Lost {
				so.Eval.MaxStates, so.MaxEvaluations = exchangeMaxStates, exchangeMaxEvaluations
			}
			o, err := policies.Optimize(sys, kind, so)
			if err != nil {
				t.Fatalf("%s at %v: %v", it.SKU, target, err)
			}
			inv += sys.Holding * o.Figures.MeanOnHand
			w := sys.Demand.Mean()
			fill += w * o.Figures.FillRate
			demand += w
		}
		p := pg.Exchange.Points[ti]
		if math.Abs(p.Investment-inv) > 1e-9*inv || math.Abs(p.FillRate-fill/demand) > 1e-12 {
			t.Errorf("target %v: curve (%.12g, %.12g), direct search (%.12g, %.12g)", target, p.FillRate, p.Investment, fill/demand, inv)
		}
	}
}
