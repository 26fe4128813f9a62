package policies

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"testing"

	"ergostock/inventory"
)

// goldenFile holds the figures of goldenCases as computed by the code
// before the speed work of issue 14 (commit 9a85cca), written with
// ERGOSTOCK_WRITE_GOLDEN=1. The speed-ups must leave every figure equal to
// 1e-12 (relative to max(1, |value|)) and every policy the same.
const goldenFile = "testdata/speed_golden.json"

// goldenCase is one evaluation or search.
type goldenCase struct {
	name   string
	demand string
	lead   string // fixed number or a law for ParseLeadTime
	review int
	model  inventory.LeadTimeModel
	mode   inventory.Mode
	k      float64
	p      *Policy // evaluate p; nil: optimize kind
	kind   Kind
	floor  float64
}

func goldenCases() []goldenCase {
	ss := func(s, S int) *Policy { return &Policy{Kind: SS, ReorderPoint: s, OrderUpTo: S} }
	bs := func(S int) *Policy { return &Policy{Kind: BaseStock, OrderUpTo: S} }
	nq := func(s, q int) *Policy { return &Policy{Kind: SNQ, ReorderPoint: s, OrderMultiple: q} }
	bo, lost := inventory.Backorder, inventory.Lost
	var cs []goldenCase
	demands := []string{"poisson:mean=400", "poisson:mean=8.4", "negbin:mean=12,var=40", "normal:mean=50,sd=12",
		"gamma:mean=30,sd=20", "pmf:0=0.5,1=0.2,3=0.2,10=0.1", "poisson:mean=0.3"}
	for _, d := range demands {
		for _, L := range []string{"0", "1", "3"} {
			cs = append(cs,
				goldenCase{name: "opt-ss", demand: d, lead: L, mode: bo, k: 50, kind: SS},
				goldenCase{name: "opt-ss-floor", demand: d, lead: L, mode: bo, k: 50, kind: SS, floor: 0.99},
				goldenCase{name: "opt-bs-floor", demand: d, lead: L, mode: bo, kind: BaseStock, floor: 0.98},
				goldenCase{name: "opt-snq", demand: d, lead: L, mode: bo, k: 50, kind: SNQ},
			)
		}
	}
	cs = append(cs,
		goldenCase{name: "eval-ss-2000", demand: "poisson:mean=400", lead: "3", mode: bo, k: 500, p: ss(1500, 3500)},
		goldenCase{name: "eval-ss-8000", demand: "poisson:mean=400", lead: "3", mode: bo, k: 500, p: ss(1500, 9500)},
		goldenCase{name: "eval-ss-low", demand: "poisson:mean=400", lead: "3", mode: bo, k: 500, p: ss(-200, 300)},
		goldenCase{name: "eval-ss-negbin", demand: "negbin:mean=40,var=300", lead: "2", mode: bo, k: 5, p: ss(60, 400)},
		goldenCase{name: "eval-bs-normal", demand: "normal:mean=50,sd=12", lead: "4", mode: bo, p: bs(280)},
		goldenCase{name: "eval-snq", demand: "poisson:mean=20", lead: "2", mode: bo, k: 5, p: nq(40, 30)},
		goldenCase{name: "eval-law", demand: "poisson:mean=50", lead: "pmf:1=0.1,2=0.1,3=0.1,4=0.1,5=0.1,6=0.1,7=0.1,8=0.1,9=0.1,10=0.1", mode: bo, k: 5, p: ss(300, 500)},
		goldenCase{name: "eval-law-r7", demand: "poisson:mean=50", lead: "pmf:1=0.1,2=0.1,3=0.1,4=0.1,5=0.1,6=0.1,7=0.1,8=0.1,9=0.1,10=0.1", review: 7, mode: bo, k: 5, p: ss(300, 500)},
		goldenCase{name: "eval-indep", demand: "poisson:mean=5", lead: "pmf:1=0.25,2=0.25,3=0.25,4=0.25", model: inventory.Independent, mode: bo, p: bs(40)},
		goldenCase{name: "opt-law-floor", demand: "poisson:mean=50", lead: "pmf:1=0.1,2=0.1,3=0.1,4=0.1,5=0.1,6=0.1,7=0.1,8=0.1,9=0.1,10=0.1", mode: bo, k: 500, kind: SS, floor: 0.995},
		goldenCase{name: "opt-r7", demand: "negbin:mean=12,var=40", lead: "2", review: 7, mode: bo, k: 50, kind: SS, floor: 0.95},
		goldenCase{name: "lost-bs", demand: "poisson:mean=5", lead: "2", mode: lost, p: bs(25)},
		goldenCase{name: "lost-ss", demand: "poisson:mean=4", lead: "1", mode: lost, k: 20, p: ss(6, 30)},
		goldenCase{name: "lost-opt-bs", demand: "poisson:mean=3", lead: "2", mode: lost, kind: BaseStock},
		goldenCase{name: "lost-opt-ss-floor", demand: "poisson:mean=3", lead: "1", mode: lost, k: 20, kind: SS, floor: 0.97},
	)
	return cs
}

// goldenResult is what is compared.
type goldenResult struct {
	Key     string
	Err     string             `json:",omitempty"`
	Policy  string             `json:",omitempty"`
	Figures map[string]float64 `json:",omitempty"`
}

func runGolden(t *testing.T, c goldenCase) goldenResult {
	t.Helper()
	key := fmt.Sprintf("%s %s L=%s R=%d %s %s k=%g kind=%s floor=%g", c.name, c.demand, c.lead, c.review, c.model, c.mode, c.k, c.kind, c.floor)
	if c.p != nil {
		key += " " + c.p.String()
	}
	d, err := inventory.Parse(c.demand)
	if err != nil {
		t.Fatal(err)
	}
	L, law, err := inventory.ParseLeadTime(c.lead)
	if err != nil {
		t.Fatal(err)
	}
	sys := inventory.System{Demand: d, LeadTime: L, LeadTimeLaw: law, LeadTimeModel: c.model, ReviewPeriod: c.review,
		Holding: 1, Shortage: 19, OrderCost: c.k, UnitCost: 2, Mode: c.mode}
	var ev *Evaluation
	if c.p != nil {
		ev, err = Evaluate(sys, *c.p, Options{})
	} else {
		var o *Optimum
		o, err = Optimize(sys, c.kind, SearchOptions{MinFillRate: c.floor})
		if o != nil {
			ev = &o.Evaluation
		}
	}
	r := goldenResult{Key: key}
	if err != nil {
		r.Err = err.Error()
		return r
	}
	r.Policy = ev.Policy.String()
	r.Figures = map[string]float64{"neglected": ev.Neglected, "flow_balance": ev.FlowBalance, "states": float64(ev.States)}
	for _, f := range ev.Figures.Fields() {
		r.Figures[f.Name] = f.Value
	}
	return r
}

// TestSpeedGolden checks the figures of goldenCases against those recorded
// before the speed work (see goldenFile).
func TestSpeedGolden(t *testing.T) {
	var got []goldenResult
	for _, c := range goldenCases() {
		got = append(got, runGolden(t, c))
	}
	if os.Getenv("ERGOSTOCK_WRITE_GOLDEN") != "" {
		b, err := json.MarshalIndent(got, "", " ")
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(goldenFile, append(b, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	b, err := os.ReadFile(goldenFile)
	if err != nil {
		t.Fatal(err)
	}
	var want []goldenResult
	if err := json.Unmarshal(b, &want); err != nil {
		t.Fatal(err)
	}
	if len(want) != len(got) {
		t.Fatalf("%d results, %d recorded", len(got), len(want))
	}
	c2 := goldenCases()
	sys := func(c goldenCase) inventory.System {
		d, err := inventory.Parse(c.demand)
		if err != nil {
			t.Fatal(err)
		}
		return inventory.System{Demand: d}
	}
	worst, worstAt := 0.0, ""
	for i, w := range want {
		g := got[i]
		if g.Key != w.Key || g.Err != w.Err || g.Policy != w.Policy {
			t.Errorf("%s: got %q %q, recorded %q %q", w.Key, g.Policy, g.Err, w.Policy, w.Err)
			continue
		}
		for name, wv := range w.Figures {
			scale := max(1, math.Abs(wv))
			if name == "flow_balance" {
				// A round-off check |E[ordered] - E[D]|, not a figure: its
				// scale is the mean demand.
				scale = max(scale, sys(c2[i]).Demand.Mean())
			}
			gv := g.Figures[name]
			if d := math.Abs(gv-wv) / scale; d > worst {
				worst, worstAt = d, w.Key+" "+name
			}
			if math.Abs(gv-wv) > 1e-12*scale {
				t.Errorf("%s: %s = %.17g, recorded %.17g (difference %.3g)", w.Key, name, gv, wv, gv-wv)
			}
		}
	}
	t.Logf("largest difference %.3g (relative to max(1, |value|)) at %s", worst, worstAt)
}

// TestDemandTables checks that evaluations through shared DemandTables
// equal those without, bit for bit, also when the tables last held another
// system's laws, and that a kind refused under independent lead times is
// refused through the tables too.
func TestDemandTables(t *testing.T) {
	pois := func(m float64) inventory.Distribution {
		d, _ := inventory.Parse(fmt.Sprintf("poisson:mean=%g", m))
		return d
	}
	_, law, err := inventory.ParseLeadTime("pmf:1=0.5,3=0.5")
	if err != nil {
		t.Fatal(err)
	}
	base := inventory.System{Demand: pois(20), LeadTime: 2, Holding: 1, Shortage: 9, OrderCost: 30, Mode: inventory.Backorder}
	other := base
	other.Demand = pois(21)
	withLaw := base
	withLaw.LeadTimeLaw = law
	indep := withLaw
	indep.LeadTimeModel = inventory.Independent
	review := base
	review.ReviewPeriod = 3
	ss := Policy{Kind: SS, ReorderPoint: 50, OrderUpTo: 120}
	bs := Policy{Kind: BaseStock, OrderUpTo: 90}
	tabs := NewDemandTables()
	for _, c := range []struct {
		name string
		sys  inventory.System
		p    Policy
	}{
		{"first", base, ss}, {"again", base, bs}, {"other demand", other, ss}, {"back", base, ss},
		{"law", withLaw, ss}, {"independent", indep, bs}, {"independent s-S", indep, ss}, {"review", review, ss},
	} {
		want, werr := Evaluate(c.sys, c.p, Options{})
		got, gerr := Evaluate(c.sys, c.p, Options{Tables: tabs})
		if (werr == nil) != (gerr == nil) || (werr != nil && werr.Error() != gerr.Error()) {
			t.Errorf("%s: error %v through the tables, %v without", c.name, gerr, werr)
			continue
		}
		if werr != nil {
			continue
		}
		if got.Figures != want.Figures || got.Neglected != want.Neglected || got.FlowBalance != want.FlowBalance {
			t.Errorf("%s: figures %+v through the tables, %+v without", c.name, got.Figures, want.Figures)
		}
	}
}

// TestSharedSearchModel checks that base-stock and s-S searches of one
// system under several floors, run through one DemandTables (which hands
// the search model of one to the next), give the same policies, figures
// and search records, bit for bit, as searches run alone; also when the
// tables switch between two systems and kinds.
func TestSharedSearchModel(t *testing.T) {
	floors := []float64{0.95, 0, 0.9, 0.99, 0.999, 0.98, 0.9999}
	for _, spec := range []string{"poisson:mean=8.4", "negbin:mean=12,var=40", "pmf:0=0.5,1=0.2,3=0.2,10=0.1", "normal:mean=50,sd=12"} {
		d, err := inventory.Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		a := inventory.System{Demand: d, LeadTime: 2, Holding: 1, Shortage: 19, OrderCost: 50, UnitCost: 2, Mode: inventory.Backorder}
		b := a
		b.OrderCost = 5
		tabs := NewDemandTables()
		for _, f := range floors {
			for _, c := range []struct {
				sys  inventory.System
				kind Kind
			}{{a, SS}, {a, BaseStock}, {a, SS}, {b, SS}} {
				want, werr := Optimize(c.sys, c.kind, SearchOptions{MinFillRate: f})
				so := SearchOptions{MinFillRate: f}
				so.Eval.Tables = tabs
				got, gerr := Optimize(c.sys, c.kind, so)
				if (werr == nil) != (gerr == nil) {
					t.Fatalf("%s %s floor %g: error %v shared, %v alone", spec, c.kind, f, gerr, werr)
				}
				if werr != nil {
					continue
				}
				if got.Policy != want.Policy || got.Figures != want.Figures || got.Search.Evaluated != want.Search.Evaluated ||
					got.Search.Method != want.Search.Method || fmt.Sprint(got.Search.Bounds) != fmt.Sprint(want.Search.Bounds) {
					t.Errorf("%s %s K=%g floor %g: shared %v %+v %+v, alone %v %+v %+v", spec, c.kind, c.sys.OrderCost, f,
						got.Policy, got.Figures, got.Search, want.Policy, want.Figures, want.Search)
				}
			}
		}
	}
}

// TestLeadTimeDemandOnce checks that a batch item's search (in either
// mode), the evaluation of its optimum and that of a current policy compute
// the lead-time demand laws once when they share DemandTables, as
// batch.Planner.Plan has them do.
func TestLeadTimeDemandOnce(t *testing.T) {
	d, err := inventory.Parse("negbin:mean=12,var=40")
	if err != nil {
		t.Fatal(err)
	}
	for _, mode := range []inventory.Mode{inventory.Backorder, inventory.Lost} {
		for _, kind := range []Kind{SS, BaseStock, SNQ} {
			if mode == inventory.Lost && kind == SNQ {
				continue
			}
			sys := inventory.System{Demand: d, LeadTime: 2, Holding: 1, Shortage: 19, OrderCost: 50, UnitCost: 2, Mode: mode}
			tabs := NewDemandTables()
			so := SearchOptions{MinFillRate: 0.95}
			so.Eval.Tables = tabs
			if _, err := Optimize(sys, kind, so); err != nil {
				t.Fatal(err)
			}
			if _, err := Evaluate(sys, Policy{Kind: SS, ReorderPoint: 20, OrderUpTo: 60}, Options{Tables: tabs}); err != nil {
				t.Fatal(err)
			}
			if tabs.built != 1 {
				t.Errorf("%s %s: lead-time demand computed %d times, want once", mode, kind, tabs.built)
			}
		}
	}
}
