package report

import (
	"errors"
	"fmt"
	"html/template"
	"math"
	"runtime"
	"strings"
	"sync"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/uncertainty"
)

// SKUInput is what the page for one SKU is built from.
type SKUInput struct {
	SKU     string // shown in the title; may be empty
	System  inventory.System
	Current *policies.Policy // the policy in use, if given
	// Kind is the family searched for the recommendation; "" means the
	// family of Current, or s-S when Current is nil.
	Kind        policies.Kind
	MinFillRate float64 // floor for the recommendation; 0 for none
	Options     policies.Options
	// DemandSource says where the demand model came from, e.g.
	// "--demand" or "fitted to history.csv".
	DemandSource string
	History      *History // optional
	// Simulate, when set, simulates a policy for the exact-versus-simulated
	// table; it is called for the recommended and the current policy.
	Simulate func(policies.Policy) (*Simulated, error)
	Version  string // of the program, for the page footer
	// Uncertainty, when set, is the resampling analysis of the SKU
	// (policies/uncertainty.Analyze, with its resamples kept): the page
	// adds the level distribution's spread over the resampled models and
	// the fill rate of the recommendation as a distribution.
	Uncertainty *uncertainty.Result
}

// History is the demand history of one SKU with its fitted model.
type History struct {
	File     string
	SKU      string
	Period   string   // "day", "week", "month" or "period"
	Labels   []string // label of each period
	Demand   []int    // demand of each period
	Fitted   inventory.Distribution
	Model    string // name of the fitted family
	Pattern  string
	Mean     float64
	Variance float64
	ADI, CV2 float64
	Warnings []string
}

// Simulated holds simulated figures with their confidence half-widths.
type Simulated struct {
	Mean, HalfWidth inventory.Figures
	Level           float64 // confidence level, e.g. 0.95
	Periods         int
	Warmup          int
	Replications    int
	Seed            uint64
}

// Chart is one rendered chart with its caption.
type Chart struct {
	ID      string
	Title   string
	SVG     template.HTML
	Caption string
	Note    string // why the chart is missing, when SVG is empty
}

// SKUPage is the gathered and rendered content of one SKU's page.
type SKUPage struct {
	In          SKUInput
	Optimum     *policies.Optimum
	Current     *policies.Evaluation
	Levels      []levelSeries
	LevelMass   float64 // probability outside the levels drawn
	Grid        *costGrid
	Fill        []fillCurve
	SimCurrent  *Simulated
	SimOptimum  *Simulated
	Charts      []Chart
	Notes       []string
	GridEvals   int
	GridMethod  string // "renewal" (backorder mode) or "chain" (each cell by Evaluate)
	FillEvals   int
	MeanDemand  float64
	LevelName   string
	evaluate    evalFunc
	optimize    optFunc
	concurrency int
}

type (
	evalFunc func(inventory.System, policies.Policy, policies.Options) (*policies.Evaluation, error)
	optFunc  func(inventory.System, policies.Kind, policies.SearchOptions) (*policies.Optimum, error)
)

// BuildSKU evaluates the current policy (if any), finds the cheapest policy
// of the family, computes the level distributions, the cost grid and the
// fill-rate curves, and renders the charts. An error means the page cannot
// be made (the system or the current policy cannot be evaluated, or the
// search fails); a chart that cannot be drawn leaves a note instead.
func BuildSKU(in SKUInput) (*SKUPage, error) {
	return buildSKU(in, policies.Evaluate, policies.Optimize)
}

func buildSKU(in SKUInput, ev evalFunc, opt optFunc) (*SKUPage, error) {
	if err := in.System.Validate(); err != nil {
		return nil, err
	}
	pg := &SKUPage{In: in, evaluate: ev, optimize: opt, concurrency: runtime.GOMAXPROCS(0)}
	kind := in.Kind
	if kind == "" {
		kind = policies.SS
		if in.Current != nil {
			kind = in.Current.Kind
		}
	}
	pg.In.Kind = kind
	pg.MeanDemand = in.System.Demand.Mean()
	if in.Current != nil {
		e, err := ev(in.System, *in.Current, in.Options)
		if err != nil {
			return nil, fmt.Errorf("current policy %v: %w", *in.Current, err)
		}
		pg.Current = e
	}
	o, err := opt(in.System, kind, policies.SearchOptions{MinFillRate: in.MinFillRate, Eval: in.Options})
	if err != nil {
		return nil, fmt.Errorf("search for the cheapest %s policy: %w", kind, err)
	}
	pg.Optimum = o
	for _, e := range []*policies.Evaluation{pg.Current, &o.Evaluation} {
		if e == nil {
			continue
		}
		if err := finiteFigures(in.System, e); err != nil {
			return nil, err
		}
	}
	pg.gatherLevels()
	if err := pg.gatherGrid(); err != nil {
		return nil, err
	}
	pg.gatherFill()
	if in.Simulate != nil {
		if s, err := in.Simulate(o.Policy); err != nil {
			if e := simRefused(o.Policy, err); e != nil {
				return nil, e
			}
			pg.Notes = append(pg.Notes, fmt.Sprintf("simulation of %v failed: %v", o.Policy, err))
		} else {
			pg.SimOptimum = s
		}
		if in.Current != nil && *in.Current != o.Policy {
			if s, err := in.Simulate(*in.Current); err != nil {
				if e := simRefused(*in.Current, err); e != nil {
					return nil, e
				}
				pg.Notes = append(pg.Notes, fmt.Sprintf("simulation of %v failed: %v", *in.Current, err))
			} else {
				pg.SimCurrent = s
			}
		}
	}
	pg.render()
	return pg, nil
}

// finiteFigures refuses an evaluation with a non-finite figure (costs so
// large that a cost per period overflows float64), naming the costs.
func finiteFigures(sys inventory.System, e *policies.Evaluation) error {
	for _, f := range e.Figures.Fields() {
		if !math.IsInf(f.Value, 0) && !(math.IsNaN(f.Value) && f.Name != "fill_rate" && f.Name != "mean_order_quantity") {
			continue
		}
		var names []string
		for _, c := range []struct {
			flag string
			v    float64
		}{{"--holding-cost", sys.Holding}, {"--shortage-cost", sys.Shortage}, {"--order-cost", sys.OrderCost}, {"--unit-cost", sys.UnitCost}} {
			if c.v != 0 {
				names = append(names, fmt.Sprintf("%s %g", c.flag, c.v))
			}
		}
		return fmt.Errorf("%s: the %s of %v overflows float64: want costs whose figures stay below 1.8e308 (state them in larger money units)",
			strings.Join(names, ", "), f.Label, e.Policy)
	}
	return nil
}

// simRefused turns a simulation refused for its size, its time budget or
// the range of its sums (the inputs, not the policy, are at fault) into the
// page's error naming the flag; nil for any other error, which leaves a
// note on the page.
func simRefused(p policies.Policy, err error) error {
	// The simulator's *LimitError and *RangeError carry the message
	// with the flag; report does not import policies/sim.
	var le interface{ FlagMessage() string }
	if errors.As(err, &le) {
		return fmt.Errorf("--simulate: %s, simulating %v", le.FlagMessage(), p)
	}
	return nil
}

// policiesShown lists the recommended policy and, if different, the
// current one, with their names for legends.
func (pg *SKUPage) policiesShown() ([]policies.Policy, []string) {
	ps := []policies.Policy{pg.Optimum.Policy}
	names := []string{"recommended " + pg.Optimum.Policy.String()}
	if pg.Current != nil && pg.Current.Policy != pg.Optimum.Policy {
		ps = append(ps, pg.Current.Policy)
		names = append(names, "current "+pg.Current.Policy.String())
	}
	return ps, names
}

// gatherLevels computes the level law of each policy shown and keeps the
// range that holds all but 1e-4 of the probability on each side.
func (pg *SKUPage) gatherLevels() {
	sys := pg.In.System
	pg.LevelName = "net inventory at the end of a period (units; negative: backordered)"
	if sys.Mode == inventory.Lost {
		pg.LevelName = "stock on hand at the end of a period (units)"
	}
	ps, names := pg.policiesShown()
	var laws []levelLaw
	for _, p := range ps {
		l, err := stockLevels(sys, p)
		if err != nil {
			pg.Notes = append(pg.Notes, fmt.Sprintf("level distribution of %v: %v", p, err))
			return
		}
		laws = append(laws, l)
	}
	const cut = 1e-4
	lo, hi := math.MaxInt, math.MinInt
	for _, l := range laws {
		a, b := 0, len(l.P)-1
		for c := 0.0; a < b && c+l.P[a] < cut; a++ {
			c += l.P[a]
		}
		for c := 0.0; b > a && c+l.P[b] < cut; b-- {
			c += l.P[b]
		}
		lo, hi = min(lo, l.Lo+a), max(hi, l.Lo+b)
	}
	outside := 0.0
	for i, l := range laws {
		var p []float64
		for k := lo; k <= hi; k++ {
			v := 0.0
			if j := k - l.Lo; j >= 0 && j < len(l.P) {
				v = l.P[j]
			}
			p = append(p, v)
		}
		in := 0.0
		for _, v := range p {
			in += v
		}
		outside = math.Max(outside, 1-in)
		pg.Levels = append(pg.Levels, levelSeries{Name: names[i], Lo: lo, P: p})
	}
	pg.LevelMass = math.Max(0, outside)
}

// gridSize is the number of levels per axis of the cost grid.
const gridSize = 25

// axisLevels returns n levels spaced step apart that contain centre and
// cover [lo, hi] if they can, never going below floor.
func axisLevels(centre, lo, hi, floor, n int) []int {
	lo, hi = min(lo, centre), max(hi, centre)
	step := max(1, int(math.Ceil(float64(hi-lo)/float64(n-1))))
	left := (centre - lo + step - 1) / step
	left = min(left, n-1)
	start := centre - left*step
	for start < floor {
		start += step
	}
	v := make([]int, n)
	for i := range v {
		v[i] = start + i*step
	}
	return v
}

// Limits of the cost map's own work (backorder mode; in lost mode every
// cell is an evaluation and the map is kept near 1e6 states in all):
// weighted operations (a multiply-add counts 1, a call of G 5, a pmf or
// tail of the law 50) and bytes.
const (
	gridOpsLimit   = 2e10
	gridBytesLimit = 1 << 30
	// gridSpanLimit bounds the half-width of an axis, in units, before any
	// level is computed in int.
	gridSpanLimit = 1 << 40
)

// gridError reports a cost map too large for the one-SKU page; it names
// the inputs behind the size.
func (pg *SKUPage) gridError(what string, size, limit string) error {
	sys := pg.In.System
	lead := fmt.Sprint(sys.LeadTime)
	if sys.LeadTimeLaw != nil {
		lead = sys.LeadTimeLaw.String()
	}
	return fmt.Errorf("--demand %s with --lead-time %s: the cost map around %v would take %s (%s), over the one-SKU page's limit of %s",
		sys.Demand, lead, pg.Optimum.Policy, size, what, limit)
}

// longestLead is the longest lead time of sys: the fixed lead time or the
// last point of its law.
func longestLead(sys inventory.System) int {
	if sys.LeadTimeLaw == nil {
		return sys.LeadTime
	}
	w, _, err := sys.LeadTimeWeights()
	if err != nil {
		return sys.LeadTime
	}
	return len(w) - 1
}

// gridWork estimates the weighted operations and bytes of the renewal
// cost map in backorder mode over the axes xs, ys: the demand over L+1
// periods by repeated convolution (b^2 L(L+1)/2 multiply-adds for a
// one-period demand cut at b), the renewal mass over the levels spanned
// (n^2/2 multiply-adds and n pmf values), and the cells (S - s calls of G
// each for s-S, Q calls of G and of the tail for s-nQ).
func gridWork(sys inventory.System, xs, ys []int, snq bool) (ops, bytes, b, n float64) {
	b = float64(sys.Demand.Bound(levelEps)) + 1
	L := float64(sys.LeadTime)
	ops = b*b*L*(L+1)/2 + 50*b
	bytes = 8 * 5 * (L + 1) * b
	n = math.Max(1, float64(ys[len(ys)-1])-float64(xs[0]))
	ops += n*n/2 + 50*n
	bytes += 16 * n
	for _, y := range ys {
		for _, x := range xs {
			switch {
			case snq:
				ops += 55 * float64(y)
			case x < y:
				ops += 5 * float64(y-x)
			}
		}
	}
	return ops, bytes, b, n
}

// gatherGrid evaluates total cost over a grid of reorder point (x) and
// order-up-to level or order multiple (y) around the optimum. It estimates
// its work first and refuses a map over gridOpsLimit or gridBytesLimit.
func (pg *SKUPage) gatherGrid() error {
	sys := pg.In.System
	opt := pg.Optimum.Policy
	sd := math.Sqrt(sys.Demand.Variance() * float64(sys.LeadTime+1))
	if !sys.FixedTiming() {
		// The demand over the lead time, the period and the review
		// phase, mixed over the lead-time law.
		if x, err := inventory.MixedDemand(sys, 1); err == nil {
			sd = math.Sqrt(x.Variance())
		}
		if sys.LeadTimeLaw != nil && sys.Model() == inventory.Independent {
			pg.Notes = append(pg.Notes, "The cost map is left out: with independent lead times only base-stock policies are evaluated exactly, and the map's cells are s-S or s-nQ policies (the simulation, when asked for, checks the recommended policy).")
			return nil
		}
	}
	snq := opt.Kind == policies.SNQ
	ox, oy := opt.ReorderPoint, opt.OrderUpTo
	if opt.Kind == policies.BaseStock {
		ox = opt.OrderUpTo - 1
	}
	if snq {
		oy = opt.OrderMultiple
	}
	gap := float64(oy) - float64(ox)
	if snq {
		gap = float64(oy)
	}
	fx := math.Ceil(math.Max(12, math.Max(2.5*sd, 0.6*gap)))
	fy := math.Ceil(math.Max(12, math.Max(2.5*sd, 0.8*gap)))
	if m := math.Max(fx, fy); !(m <= gridSpanLimit) || math.Abs(float64(ox))+m > math.MaxInt64/4 || math.Abs(float64(oy))+m > math.MaxInt64/4 {
		return pg.gridError(fmt.Sprintf("axes %.3g units wide (2.5 sd of demand over the lead time plus review, or the order size)", 2*m),
			fmt.Sprintf("%.3g units per axis", 2*m), fmt.Sprintf("%.3g", float64(2*gridSpanLimit)))
	}
	hx, hy := int(fx), int(fy)
	xlo, xhi, ylo, yhi := ox-hx, ox+hx, oy-hy, oy+hy
	base := [4]int{xlo, xhi, ylo, yhi} // the axes without the current policy
	var cur *[2]int
	if c := pg.Current; c != nil {
		cp := c.Policy
		cx, cy := cp.ReorderPoint, cp.OrderUpTo
		if cp.Kind == policies.BaseStock {
			cx = cp.OrderUpTo - 1
		}
		if snq == (cp.Kind == policies.SNQ) {
			if snq {
				cy = cp.OrderMultiple
			}
			cur = &[2]int{cx, cy}
			xlo, xhi = min(xlo, cx-2), max(xhi, cx+2)
			ylo, yhi = min(ylo, cy-2), max(yhi, cy+2)
		}
	}
	xfloor, yfloor := math.MinInt/2, math.MinInt/2
	if sys.Mode == inventory.Lost {
		xfloor, yfloor = -1, 0
	}
	if snq {
		yfloor = 1
	}
	n := gridSize
	// A lost-sales chain has about C(S+L+1, L+1) states: keep the work of
	// the grid near a few million states.
	if L := longestLead(sys); sys.Mode == inventory.Lost && L > 0 {
		top := yhi
		if snq {
			top = xhi + yhi
		}
		st := lostStates(top, L)
		for n > 5 && float64(n*n)*st > 1e6 {
			n -= 2
		}
		if float64(n*n)*st > 1e6 {
			pg.Notes = append(pg.Notes, fmt.Sprintf("The cost map is left out: its lost-sales chains would have up to about %.3g states each.", st))
			return nil
		}
	}
	xs := axisLevels(ox, xlo, xhi, xfloor, n)
	ys := axisLevels(oy, ylo, yhi, yfloor, n)
	if !sys.FixedTiming() && sys.Mode == inventory.Backorder {
		// The renewal formulas assume a fixed lead time and review every
		// period: each cell is evaluated on its chain instead, on a
		// coarser grid.
		n = min(n, 13)
		xs = axisLevels(ox, xlo, xhi, xfloor, n)
		ys = axisLevels(oy, ylo, yhi, yfloor, n)
	}
	if sys.Mode == inventory.Backorder && sys.FixedTiming() {
		ops, bytes, b, span := gridWork(sys, xs, ys, snq)
		if cur != nil && (bytes > gridBytesLimit || ops > gridOpsLimit) {
			// A current policy far from the optimum stretches the axes:
			// leave it off the map rather than refuse the page.
			pg.Notes = append(pg.Notes, fmt.Sprintf("The cost map leaves out the current policy %v: axes covering it too would span %.0f levels (about %.2g operations).", pg.Current.Policy, span, ops))
			cur = nil
			xs = axisLevels(ox, base[0], base[1], xfloor, n)
			ys = axisLevels(oy, base[2], base[3], yfloor, n)
			ops, bytes, b, span = gridWork(sys, xs, ys, snq)
		}
		what := fmt.Sprintf("demand over %d periods cut at %.0f units per period, %.0f levels spanned", sys.LeadTime+1, b-1, span)
		switch {
		case bytes > gridBytesLimit:
			return pg.gridError(what, fmt.Sprintf("%.3g GB", bytes/1e9), fmt.Sprintf("%.3g GB", gridBytesLimit/1e9))
		case ops > gridOpsLimit:
			return pg.gridError(what, fmt.Sprintf("about %.2g operations", ops), fmt.Sprintf("%.0g", gridOpsLimit))
		}
	}
	cost := make([][]float64, len(ys))
	type cell struct{ ix, iy int }
	var cells []cell
	for iy := range ys {
		cost[iy] = make([]float64, len(xs))
		for ix := range xs {
			cost[iy][ix] = math.NaN()
			if snq || xs[ix] < ys[iy] {
				cells = append(cells, cell{ix, iy})
			}
		}
	}
	if sys.Mode == inventory.Backorder && sys.FixedTiming() {
		// The renewal formulas give every cell in O(S - s) or O(Q).
		r := newRenewalCost(sys)
		r.mass(max(1, ys[len(ys)-1]-xs[0]))
		for _, c := range cells {
			if snq {
				cost[c.iy][c.ix] = r.snq(xs[c.ix], ys[c.iy])
			} else {
				cost[c.iy][c.ix] = r.ss(xs[c.ix], ys[c.iy])
			}
		}
		pg.GridMethod = "renewal"
		cells = nil
	}
	pg.forEach(len(cells), func(i int) {
		c := cells[i]
		p := policies.Policy{Kind: policies.SS, ReorderPoint: xs[c.ix], OrderUpTo: ys[c.iy]}
		if snq {
			p = policies.Policy{Kind: policies.SNQ, ReorderPoint: xs[c.ix], OrderMultiple: ys[c.iy]}
		}
		if e, err := pg.evaluate(sys, p, pg.In.Options); err == nil {
			cost[c.iy][c.ix] = e.Figures.TotalCost
		}
	})
	if pg.GridMethod == "" {
		pg.GridMethod = "chain"
		pg.GridEvals = len(cells)
	} else {
		pg.GridEvals = 0
		for iy := range cost {
			for ix := range cost[iy] {
				if !math.IsNaN(cost[iy][ix]) {
					pg.GridEvals++
				}
			}
		}
	}
	g := &costGrid{
		XName:   "reorder point s (units of inventory position)",
		YName:   "order-up-to level S (units)",
		X:       xs,
		Y:       ys,
		Cost:    cost,
		Opt:     &[2]int{ox, oy},
		OptName: "recommended " + opt.String(),
		Cur:     cur,
	}
	if snq {
		g.YName = "order multiple Q (units)"
	}
	if cur != nil {
		g.CurName = "current " + pg.Current.Policy.String()
	}
	pg.Grid = g
	return nil
}

// lostStates estimates the states of a lost-sales chain with order-up-to
// level top and lead time L: C(top+L+1, L+1).
func lostStates(top, L int) float64 {
	lg, _ := math.Lgamma(float64(top + L + 2))
	la, _ := math.Lgamma(float64(L + 2))
	lb, _ := math.Lgamma(float64(top + 1))
	return math.Exp(lg - la - lb)
}

// gatherFill evaluates fill rate against the reorder point for each policy
// shown, keeping its order quantity (S - s, or Q) fixed.
func (pg *SKUPage) gatherFill() {
	sys := pg.In.System
	ps, names := pg.policiesShown()
	var xs []int
	if pg.Grid != nil {
		xs = pg.Grid.X
	} else {
		s, _ := pg.Optimum.Policy.Levels()
		floor := math.MinInt / 2
		if sys.Mode == inventory.Lost {
			floor = -1
		}
		xs = axisLevels(s, s-12, s+12, floor, gridSize)
		if sys.Mode == inventory.Lost && longestLead(sys) > 0 {
			xs = axisLevels(s, s-6, s+6, floor, 13)
		}
	}
	// Cover every policy's reorder point with evenly spaced points, and
	// make each one a point of its curve.
	lo, hi := xs[0], xs[len(xs)-1]
	for _, p := range ps {
		s, _ := p.Levels()
		lo, hi = min(lo, s), max(hi, s)
	}
	if lo < xs[0] || hi > xs[len(xs)-1] {
		s, _ := pg.Optimum.Policy.Levels()
		xs = axisLevels(s, lo, hi, lo, len(xs))
	}
	for _, p := range ps {
		s, _ := p.Levels()
		xs = insertSorted(xs, s)
	}
	curves := make([]fillCurve, len(ps))
	for ci, p := range ps {
		s0, _ := p.Levels()
		curves[ci] = fillCurve{Name: names[ci] + fillFamily(p), Mark: s0}
		fills := make([]float64, len(xs))
		ok := make([]bool, len(xs))
		pg.forEach(len(xs), func(i int) {
			q := shiftTo(p, xs[i])
			if q.Validate(sys.Mode) != nil {
				return
			}
			if e, err := pg.evaluate(sys, q, pg.In.Options); err == nil {
				fills[i], ok[i] = e.Figures.FillRate, true
			}
		})
		pg.FillEvals += len(xs)
		for i := range xs {
			if ok[i] {
				curves[ci].X = append(curves[ci].X, xs[i])
				curves[ci].Fill = append(curves[ci].Fill, fills[i])
			}
		}
	}
	pg.Fill = curves
}

// fillFamily describes how a fill-rate curve moves the policy.
func fillFamily(p policies.Policy) string {
	switch p.Kind {
	case policies.SS:
		return fmt.Sprintf(", S - s = %d kept", p.OrderUpTo-p.ReorderPoint)
	case policies.SNQ:
		return fmt.Sprintf(", Q = %d kept", p.OrderMultiple)
	}
	return ", S = s + 1"
}

// shiftTo moves policy p to reorder point s, keeping its order quantity.
func shiftTo(p policies.Policy, s int) policies.Policy {
	switch p.Kind {
	case policies.BaseStock:
		p.OrderUpTo = s + 1
	case policies.SS:
		p.OrderUpTo += s - p.ReorderPoint
		p.ReorderPoint = s
	case policies.SNQ:
		p.ReorderPoint = s
	}
	return p
}

func insertSorted(xs []int, v int) []int {
	out := make([]int, 0, len(xs)+1)
	done := false
	for _, x := range xs {
		if !done && v <= x {
			if v != x {
				out = append(out, v)
			}
			done = true
		}
		out = append(out, x)
	}
	if !done {
		out = append(out, v)
	}
	return out
}

// forEach runs fn(0..n-1) on a few goroutines; results go into slots the
// caller indexes by i, so the outcome does not depend on the scheduling.
func (pg *SKUPage) forEach(n int, fn func(i int)) {
	w := max(1, min(pg.concurrency, n))
	var wg sync.WaitGroup
	next := make(chan int)
	for range w {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				fn(i)
			}
		}()
	}
	for i := range n {
		next <- i
	}
	close(next)
	wg.Wait()
}
