package report

import (
	"ergostock/inventory"

	"fmt"
	"html/template"
	"image/color"
	"math"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// seriesColours are assigned in order to the policies on a chart: the
// recommended policy first, the current one second.
var seriesColours = []color.RGBA{okBlue, okOrange, okGreen, okPurple}

// levelSeries is the probability of each stock level for one policy:
// P[i] is the probability of level Lo+i.
type levelSeries struct {
	Name string
	Lo   int
	P    []float64
}

// levelChart draws the stationary distribution of net inventory or on-hand
// as grouped bars, one colour per policy, binned when the range is wide.
func levelChart(series []levelSeries, xlabel, title string, zeroLine bool) (template.HTML, error) {
	lo, hi := math.MaxInt, math.MinInt
	for _, s := range series {
		if len(s.P) == 0 {
			continue
		}
		lo = min(lo, s.Lo)
		hi = max(hi, s.Lo+len(s.P)-1)
	}
	if lo > hi {
		return "", fmt.Errorf("chart %q: no levels to draw", title)
	}
	w := niceWidth(hi-lo+1, 80)
	ylabel := "probability"
	if w > 1 {
		ylabel = fmt.Sprintf("probability per %d units", w)
	}
	p := newPlot(title, xlabel, ylabel)
	p.X.Tick.Marker = ticks{Integer: true}
	p.Y.Min = 0
	k := len(series)
	// Bins start at multiples of w so that 0 starts a bin.
	start := floorDiv(lo, w) * w
	for si, s := range series {
		col := seriesColours[si%len(seriesColours)]
		bins := map[int]float64{}
		for i, v := range s.P {
			bins[floorDiv(s.Lo+i, w)*w] += v
		}
		r := &rects{Thumb: col}
		for b := start; b <= hi; b += w {
			v := bins[b]
			if v == 0 {
				continue
			}
			// Bin b covers levels b..b+w-1, drawn over [b-0.5, b+w-0.5].
			x0 := float64(b) - 0.5 + float64(w)*(0.1+0.8*float64(si)/float64(k))
			x1 := x0 + float64(w)*0.8/float64(k)
			r.Rects = append(r.Rects, rect{X0: x0, X1: x1, Y0: 0, Y1: v, Fill: col})
		}
		p.Add(r)
		p.Legend.Add(s.Name, r)
	}
	if zeroLine && lo < 0 {
		l := &vline{At: -0.5, Style: draw.LineStyle{Color: okVermilion, Width: 1.2, Dashes: []vg.Length{4, 2}}}
		p.Add(l)
		p.Legend.Add("zero: backorders to the left", l)
	}
	p.Y.Max *= 1.1 + 0.08*float64(len(series)+1) // room for the legend
	return plotSVG(p, title)
}

// niceWidth returns the smallest of 1, 2, 5, 10, 20, 50, ... that cuts a
// range of n integers into at most max bins.
func niceWidth(n, max int) int {
	for mag := 1; ; mag *= 10 {
		for _, m := range []int{1, 2, 5} {
			if w := m * mag; (n+w-1)/w <= max {
				return w
			}
		}
		if mag > 1e15 {
			return mag
		}
	}
}

func floorDiv(a, b int) int {
	q := a / b
	if a%b != 0 && (a < 0) != (b < 0) {
		q--
	}
	return q
}

// costGrid is the total cost over a grid of two policy levels.
type costGrid struct {
	XName, YName string      // axis labels with units
	X, Y         []int       // the levels, increasing
	Cost         [][]float64 // Cost[iy][ix]; NaN where no policy exists
	Opt, Cur     *[2]int     // marked policies (x, y), if any
	OptName      string
	CurName      string
}

// heatChart draws a cost grid as a heat map with a colour bar; light cells
// are cheap. Costs above the 90th percentile share the darkest colour so the
// valley around the optimum keeps its contrast.
func heatChart(g costGrid, title string) (template.HTML, error) {
	var vals []float64
	for _, row := range g.Cost {
		for _, v := range row {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				vals = append(vals, v)
			}
		}
	}
	if len(vals) == 0 || len(g.X) == 0 || len(g.Y) == 0 {
		return "", fmt.Errorf("chart %q: no costs to draw", title)
	}
	sort.Float64s(vals)
	lo := vals[0]
	hi := vals[int(math.Ceil(0.9*float64(len(vals)-1)))]
	if !(hi > lo) {
		hi = vals[len(vals)-1]
	}
	if !(hi > lo) {
		hi = lo + math.Max(1e-9, math.Abs(lo)*1e-9)
	}
	dx, dy := gridStep(g.X), gridStep(g.Y)
	p := newPlot(title, g.XName, g.YName)
	p.X.Tick.Marker = ticks{Integer: true}
	p.Y.Tick.Marker = ticks{Integer: true}
	cells := &rects{}
	for iy, y := range g.Y {
		for ix, x := range g.X {
			v := g.Cost[iy][ix]
			var col color.Color = lightGrey
			if !math.IsNaN(v) {
				col = costColour(math.Min(v, hi), lo, hi)
			}
			cells.Rects = append(cells.Rects, rect{
				X0: float64(x) - dx/2, X1: float64(x) + dx/2,
				Y0: float64(y) - dy/2, Y1: float64(y) + dy/2, Fill: col})
		}
	}
	p.Add(cells)
	entries := 0
	if g.Cur != nil {
		entries++
		fill, _ := plotter.NewScatter(plotter.XYs{{X: float64(g.Cur[0]), Y: float64(g.Cur[1])}})
		fill.GlyphStyle = draw.GlyphStyle{Shape: draw.BoxGlyph{}, Radius: 5, Color: okOrange}
		ring, _ := plotter.NewScatter(plotter.XYs{{X: float64(g.Cur[0]), Y: float64(g.Cur[1])}})
		ring.GlyphStyle = draw.GlyphStyle{Shape: draw.SquareGlyph{}, Radius: 5, Color: okBlack}
		p.Add(fill, ring)
		p.Legend.Add(g.CurName, fill, ring)
	}
	if g.Opt != nil {
		entries++
		fill, _ := plotter.NewScatter(plotter.XYs{{X: float64(g.Opt[0]), Y: float64(g.Opt[1])}})
		fill.GlyphStyle = draw.GlyphStyle{Shape: draw.CircleGlyph{}, Radius: 5, Color: white}
		ring, _ := plotter.NewScatter(plotter.XYs{{X: float64(g.Opt[0]), Y: float64(g.Opt[1])}})
		ring.GlyphStyle = draw.GlyphStyle{Shape: draw.RingGlyph{}, Radius: 5, Color: okBlack}
		cross, _ := plotter.NewScatter(plotter.XYs{{X: float64(g.Opt[0]), Y: float64(g.Opt[1])}})
		cross.GlyphStyle = draw.GlyphStyle{Shape: draw.CrossGlyph{}, Radius: 3, Color: okBlack}
		p.Add(fill, ring, cross)
		p.Legend.Add(g.OptName, fill, ring, cross)
	}
	p.Legend.Top = true
	p.Legend.Left = false
	// The legend sits in a white band above the cells, so that it stays
	// readable whatever the colours below.
	p.X.Min, p.X.Max = float64(g.X[0])-dx/2, float64(g.X[len(g.X)-1])+dx/2
	p.Y.Min, p.Y.Max = float64(g.Y[0])-dy/2, float64(g.Y[len(g.Y)-1])+dy/2
	p.Y.Max += (p.Y.Max - p.Y.Min) * 0.04 * float64(entries+1)

	bar := newPlot("", "", "total cost per period (top: "+thousands(hi)+" or more)")
	bar.HideX()
	bar.Y.Tick.Marker = ticks{Format: thousands}
	strip := &rects{}
	const steps = 64
	for i := range steps {
		a := lo + (hi-lo)*float64(i)/steps
		b := lo + (hi-lo)*float64(i+1)/steps
		// Each band overlaps the next a little, so no seams show.
		strip.Rects = append(strip.Rects, rect{X0: 0, X1: 1, Y0: a, Y1: b + (hi-lo)/(4*steps), Fill: costColour((a+b)/2, lo, hi)})
	}
	bar.Add(strip)
	bar.Y.Min, bar.Y.Max = lo, hi
	bar.X.Min, bar.X.Max = 0, 1

	return svgOf(chartWidth, 100*vg.Millimeter, title, func(dc draw.Canvas) (err error) {
		defer func() {
			if r := recover(); r != nil {
				err = fmt.Errorf("chart %q: %v", title, r)
			}
		}()
		barW := 30 * vg.Millimeter
		main := draw.Crop(dc, 0, -barW, 0, 0)
		side := draw.Crop(dc, chartWidth-barW+4*vg.Millimeter, 0, 12*vg.Millimeter, -10*vg.Millimeter)
		p.Draw(main)
		bar.Draw(side)
		return nil
	})
}

// gridStep is the spacing of an increasing grid of integers (1 if single).
func gridStep(v []int) float64 {
	if len(v) < 2 {
		return 1
	}
	return float64(v[1] - v[0])
}

// fillCurve is fill rate against reorder point for one family of policies.
type fillCurve struct {
	Name string
	X    []int
	Fill []float64
	Mark int // the reorder point of the policy itself
}

// fillChart draws fill rate against reorder point, one line per policy
// family, with the policy itself marked and an optional floor.
func fillChart(curves []fillCurve, floor float64, xlabel, title string) (template.HTML, error) {
	p := newPlot(title, xlabel, "fill rate (% of demand served from stock)")
	p.X.Tick.Marker = ticks{Integer: true}
	p.Y.Tick.Marker = ticks{Format: percent}
	p.Legend.Top = false
	p.Legend.Left = false
	p.Legend.XOffs = -4
	p.Legend.YOffs = 4
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{}, draw.CrossGlyph{}}
	n := 0
	for ci, c := range curves {
		if len(c.X) == 0 {
			continue
		}
		col := seriesColours[ci%len(seriesColours)]
		pts := make(plotter.XYs, len(c.X))
		for i := range c.X {
			pts[i] = plotter.XY{X: float64(c.X[i]), Y: c.Fill[i]}
		}
		l, s, err := plotter.NewLinePoints(pts)
		if err != nil {
			return "", fmt.Errorf("chart %q: %w", title, err)
		}
		l.Color = col
		l.Width = 1.5
		if ci > 0 {
			l.Dashes = []vg.Length{5, 2}
		}
		s.GlyphStyle = draw.GlyphStyle{Shape: shapes[ci%len(shapes)], Radius: 1.8, Color: col}
		p.Add(l, s)
		p.Legend.Add(c.Name, l, s)
		for i, x := range c.X {
			if x == c.Mark {
				m, _ := plotter.NewScatter(plotter.XYs{pts[i]})
				m.GlyphStyle = draw.GlyphStyle{Shape: draw.RingGlyph{}, Radius: 5, Color: okBlack}
				p.Add(m)
			}
		}
		n++
	}
	if n == 0 {
		return "", fmt.Errorf("chart %q: no points to draw", title)
	}
	if floor > 0 {
		l := &vline{At: floor, Horizontal: true, Style: draw.LineStyle{Color: okVermilion, Width: 1, Dashes: []vg.Length{3, 2}}}
		p.Add(l)
		p.Legend.Add("fill-rate floor "+percent(floor), l)
	}
	p.Y.Max = math.Min(1, p.Y.Max+0.02)
	p.Y.Min = math.Max(0, p.Y.Min-0.02)
	if p.Y.Max-p.Y.Min < 0.02 {
		p.Y.Min = math.Max(0, p.Y.Max-0.02)
	}
	return plotSVG(p, title)
}

// seriesChart draws demand per period as bars, with the labels of a few
// periods on the x axis.
func seriesChart(labels []string, qty []float64, unit, title string) (template.HTML, error) {
	if len(qty) == 0 {
		return "", fmt.Errorf("chart %q: no periods to draw", title)
	}
	p := newPlot(title, "", "demand (units per "+unit+")")
	r := &rects{}
	for i, q := range qty {
		if q != 0 {
			r.Rects = append(r.Rects, rect{X0: float64(i) - 0.4, X1: float64(i) + 0.4, Y0: 0, Y1: q, Fill: okBlue})
		}
	}
	if len(r.Rects) == 0 {
		r.Rects = append(r.Rects, rect{X0: 0, X1: 0, Y0: 0, Y1: 1})
	}
	p.Add(r)
	p.X.Min, p.X.Max = -0.5, float64(len(qty))-0.5
	p.Y.Min = 0
	step := max(1, (len(qty)+7)/8)
	p.X.Tick.Marker = plot.TickerFunc(func(min, max float64) []plot.Tick {
		var t []plot.Tick
		for i := 0; i < len(labels); i += step {
			t = append(t, plot.Tick{Value: float64(i), Label: labels[i]})
		}
		return t
	})
	return plotSVG(p, title)
}

// leadChart draws a lead-time law as bars, w[l] = P(L = l), over the
// lead times that carry probability (small: at most a few hundred bars).
func leadChart(w []float64, title string) (template.HTML, error) {
	lo, hi := -1, -1
	for l, p := range w {
		if p > 0 {
			if lo < 0 {
				lo = l
			}
			hi = l
		}
	}
	if lo < 0 {
		return "", fmt.Errorf("chart %q: a law without mass", title)
	}
	p := newPlot(title, "lead time (periods)", "probability")
	p.X.Tick.Marker = ticks{Integer: true}
	r := &rects{}
	for l := lo; l <= hi; l++ {
		if w[l] > 0 {
			r.Rects = append(r.Rects, rect{X0: float64(l) - 0.4, X1: float64(l) + 0.4, Y0: 0, Y1: w[l], Fill: okGreen})
		}
	}
	p.Add(r)
	p.X.Min, p.X.Max = float64(lo)-0.6, float64(hi)+0.6
	p.Y.Min = 0
	p.Y.Max *= 1.1
	return plotSVG(p, title)
}

// histChart draws the observed frequency of each demand size per period
// against the fitted probability mass function, binned when wide. The
// work is O(periods + bins) whatever the support: the range ends at the
// largest observation or the fitted law's 0.999 quantile (at most 3 times
// the largest observation plus 50), and each bin's probability is a
// difference of the CDF.
func histChart(obs []int, fit inventory.Distribution, fitName, unit, title string) (template.HTML, error) {
	if len(obs) == 0 {
		return "", fmt.Errorf("chart %q: no periods to draw", title)
	}
	hi := 0
	for _, v := range obs {
		hi = max(hi, v)
	}
	// Extend the range to where the fitted law has almost all its mass.
	if hi < math.MaxInt/4 {
		hi = max(hi, min(fit.Bound(1-0.999), hi*3+50))
	}
	w := niceWidth(hi+1, 40)
	ylabel := "fraction of periods"
	if w > 1 {
		ylabel = fmt.Sprintf("fraction of periods per %d units", w)
	}
	p := newPlot(title, fmt.Sprintf("demand in one %s (units)", unit), ylabel)
	p.X.Tick.Marker = ticks{Integer: true}
	counts := map[int]int{}
	for _, v := range obs {
		counts[v/w*w]++
	}
	bars := &rects{Thumb: okSkyBlue}
	for b := 0; b <= hi; b += w {
		if c := counts[b]; c > 0 {
			bars.Rects = append(bars.Rects, rect{X0: float64(b) - 0.5 + 0.05*float64(w), X1: float64(b) - 0.5 + 0.95*float64(w),
				Y0: 0, Y1: float64(c) / float64(len(obs)), Fill: okSkyBlue})
		}
	}
	p.Add(bars)
	p.Legend.Add(fmt.Sprintf("observed (%d periods)", len(obs)), bars)
	var pts plotter.XYs
	for b := 0; b <= hi; b += w {
		m := fit.PMF(b)
		if w > 1 { // P(b <= D < b+w), in the tail where it is smaller
			if b > 0 && fit.CDF(b-1) > 0.5 {
				m = fit.Tail(b) - fit.Tail(b+w)
			} else {
				m = fit.CDF(b+w-1) - fit.CDF(b-1)
			}
		}
		pts = append(pts, plotter.XY{X: float64(b) - 0.5 + float64(w)/2, Y: m})
	}
	l, s, err := plotter.NewLinePoints(pts)
	if err != nil {
		return "", fmt.Errorf("chart %q: %w", title, err)
	}
	l.Color, l.Width = okVermilion, 1.2
	s.GlyphStyle = draw.GlyphStyle{Shape: draw.CircleGlyph{}, Radius: 2, Color: okVermilion}
	p.Add(l, s)
	p.Legend.Add(fitName, l, s)
	p.Legend.Left = false
	p.Y.Min = 0
	p.Y.Max *= 1.15
	return plotSVG(p, title)
}

// exchangePoint is one point of the exchange curve.
type exchangePoint struct {
	Label      string  // e.g. "95%"
	FillRate   float64 // demand-weighted aggregate fill rate
	Investment float64 // sum of unit cost x mean on hand (or of holding cost)
}

// exchangeChart draws inventory investment against aggregate fill rate,
// with the batch's own recommendation as a separate point.
func exchangeChart(curve []exchangePoint, batch *exchangePoint, ylabel, title string) (template.HTML, error) {
	if len(curve) == 0 {
		return "", fmt.Errorf("chart %q: no points to draw", title)
	}
	p := newPlot(title, "aggregate fill rate (demand-weighted, % of demand served from stock)", ylabel)
	p.X.Tick.Marker = ticks{Format: percent}
	p.Y.Tick.Marker = ticks{Format: thousands}
	pts := make(plotter.XYs, len(curve))
	for i, c := range curve {
		pts[i] = plotter.XY{X: c.FillRate, Y: c.Investment}
	}
	// Targets already met by cheaper policies give the same point: label
	// such a run of points once, as "80%-95%".
	lab := plotter.XYLabels{}
	x0, x1, y0, y1 := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, q := range pts {
		x0, x1, y0, y1 = math.Min(x0, q.X), math.Max(x1, q.X), math.Min(y0, q.Y), math.Max(y1, q.Y)
	}
	near := func(a, b plotter.XY) bool {
		return math.Abs(a.X-b.X) <= 0.03*(x1-x0)+1e-6 && math.Abs(a.Y-b.Y) <= 0.03*(y1-y0)+1e-6*math.Abs(y1)
	}
	for i := 0; i < len(curve); {
		j := i
		for j+1 < len(curve) && near(pts[j+1], pts[i]) {
			j++
		}
		text := curve[i].Label
		if j > i {
			text += "–" + curve[j].Label
		}
		lab.XYs = append(lab.XYs, pts[j])
		lab.Labels = append(lab.Labels, text)
		i = j + 1
	}
	l, s, err := plotter.NewLinePoints(pts)
	if err != nil {
		return "", fmt.Errorf("chart %q: %w", title, err)
	}
	l.Color, l.Width = okBlue, 1.5
	s.GlyphStyle = draw.GlyphStyle{Shape: draw.CircleGlyph{}, Radius: 2.5, Color: okBlue}
	p.Add(l, s)
	p.Legend.Add("cheapest policies for a common fill-rate target (label: the target)", l, s)
	labels, err := plotter.NewLabels(lab)
	if err == nil {
		for i := range labels.TextStyle {
			labels.TextStyle[i].Font = p.Legend.TextStyle.Font
			labels.TextStyle[i].XAlign = draw.XRight
		}
		labels.Offset = vg.Point{X: -4, Y: 3}
		p.Add(labels)
	}
	if batch != nil {
		b, _ := plotter.NewScatter(plotter.XYs{{X: batch.FillRate, Y: batch.Investment}})
		b.GlyphStyle = draw.GlyphStyle{Shape: draw.PyramidGlyph{}, Radius: 4, Color: okOrange}
		p.Add(b)
		p.Legend.Add(batch.Label, b)
	}
	p.Legend.Left = true
	span := p.Y.Max - p.Y.Min
	if span <= 0 {
		span = math.Max(1, math.Abs(p.Y.Max)*0.1)
	}
	p.Y.Max += 0.35 * span // room for the legend
	p.Y.Min = math.Max(0, p.Y.Min-0.1*span)
	xs := p.X.Max - p.X.Min
	p.X.Min = math.Max(0, p.X.Min-0.15*xs-0.001)
	p.X.Max = math.Min(1, p.X.Max+0.05*xs+0.001)
	return plotSVG(p, title)
}

// patternSaving is the total saving of the items of one demand pattern.
type patternSaving struct {
	Pattern string
	Items   int
	Saving  float64
}

// savingChart draws the saving by demand pattern as bars.
func savingChart(ps []patternSaving, title string) (template.HTML, error) {
	if len(ps) == 0 {
		return "", fmt.Errorf("chart %q: no patterns to draw", title)
	}
	p := newPlot(title, "demand pattern (Syntetos, Boylan & Croston 2005)", "saving (cost per period)")
	names := make([]string, len(ps))
	r := &rects{}
	for i, s := range ps {
		names[i] = fmt.Sprintf("%s (%d items)", s.Pattern, s.Items)
		col := okGreen
		if s.Saving < 0 {
			col = okVermilion
		}
		r.Rects = append(r.Rects, rect{X0: float64(i) - 0.35, X1: float64(i) + 0.35, Y0: 0, Y1: s.Saving, Fill: col})
	}
	p.Add(r)
	p.NominalX(names...)
	p.X.Min, p.X.Max = -0.6, float64(len(ps))-0.4
	p.X.Label.Text = "demand pattern (Syntetos, Boylan & Croston 2005)"
	p.Y.Tick.Marker = ticks{Format: thousands}
	p.Y.Min = math.Min(0, p.Y.Min)
	p.Y.Max = math.Max(0, p.Y.Max) * 1.1
	if p.Y.Max == p.Y.Min {
		p.Y.Max = p.Y.Min + 1
	}
	zero := &vline{At: 0, Horizontal: true, Style: draw.LineStyle{Color: okBlack, Width: 0.8}}
	p.Add(zero)
	return plotSVGSize(p, chartWidth, 70*vg.Millimeter, title)
}

// patternChart draws each SKU's average inter-demand interval against the
// squared coefficient of variation of its non-zero demands, with the
// cut-offs of Syntetos, Boylan & Croston (2005) that split the four
// patterns.
func patternChart(pts []patternPoint, adiCut, cv2Cut float64, title string) (template.HTML, error) {
	if len(pts) == 0 {
		return "", fmt.Errorf("chart %q: no SKU with demand", title)
	}
	p := newPlot(title, "ADI: average interval between periods with demand (periods, log scale)", "CV² of the non-zero demands")
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = plot.LogTicks{Prec: -1}
	names := []string{"smooth", "erratic", "intermittent", "lumpy"}
	cols := []color.RGBA{okBlue, okOrange, okGreen, okVermilion}
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{}, diamondGlyph{}}
	for i, n := range names {
		var xy plotter.XYs
		for _, q := range pts {
			if q.Pattern == n {
				xy = append(xy, plotter.XY{X: q.ADI, Y: q.CV2})
			}
		}
		if len(xy) == 0 {
			continue
		}
		s, err := plotter.NewScatter(xy)
		if err != nil {
			return "", fmt.Errorf("chart %q: %w", title, err)
		}
		s.GlyphStyle = draw.GlyphStyle{Shape: shapes[i], Radius: 2.3, Color: cols[i]}
		p.Add(s)
		p.Legend.Add(fmt.Sprintf("%s (%d)", n, len(xy)), s)
	}
	cut := draw.LineStyle{Color: midGrey, Width: 1, Dashes: []vg.Length{4, 2}}
	p.Add(&vline{At: adiCut, Style: cut}, &vline{At: cv2Cut, Horizontal: true, Style: cut})
	p.X.Min = math.Min(p.X.Min, 1)
	p.X.Max = math.Max(p.X.Max, 2)
	p.Y.Min = 0
	p.Y.Max = math.Max(p.Y.Max, 1) * 1.1
	p.Legend.Left = false
	return plotSVG(p, title)
}
