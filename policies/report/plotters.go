package report

import (
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// rect is an axis-aligned rectangle in data coordinates.
type rect struct {
	X0, X1, Y0, Y1 float64
	Fill           color.Color
}

// rects draws filled rectangles in data coordinates: bars, histogram bins
// and heat-map cells. It implements plot.Plotter, plot.DataRanger and
// plot.Thumbnailer.
type rects struct {
	Rects  []rect
	Stroke draw.LineStyle // outline; zero width for none
	Thumb  color.Color    // legend swatch
}

func (r *rects) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, b := range r.Rects {
		pts := []vg.Point{
			{X: trX(b.X0), Y: trY(b.Y0)}, {X: trX(b.X1), Y: trY(b.Y0)},
			{X: trX(b.X1), Y: trY(b.Y1)}, {X: trX(b.X0), Y: trY(b.Y1)},
		}
		if b.Fill != nil {
			c.FillPolygon(b.Fill, c.ClipPolygonXY(pts))
		}
		if r.Stroke.Width > 0 {
			c.StrokeLines(r.Stroke, c.ClipLinesXY(append(pts, pts[0]))...)
		}
	}
}

func (r *rects) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, ymin = math.Inf(1), math.Inf(1)
	xmax, ymax = math.Inf(-1), math.Inf(-1)
	for _, b := range r.Rects {
		xmin = math.Min(xmin, math.Min(b.X0, b.X1))
		xmax = math.Max(xmax, math.Max(b.X0, b.X1))
		ymin = math.Min(ymin, math.Min(b.Y0, b.Y1))
		ymax = math.Max(ymax, math.Max(b.Y0, b.Y1))
	}
	return
}

func (r *rects) Thumbnail(c *draw.Canvas) {
	pts := []vg.Point{
		{X: c.Min.X, Y: c.Min.Y}, {X: c.Max.X, Y: c.Min.Y},
		{X: c.Max.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Max.Y},
	}
	col := r.Thumb
	if col == nil && len(r.Rects) > 0 {
		col = r.Rects[0].Fill
	}
	if col != nil {
		c.FillPolygon(col, c.ClipPolygonY(pts))
	}
	if r.Stroke.Width > 0 {
		c.StrokeLines(r.Stroke, append(pts, pts[0]))
	}
}

// vline is a vertical (or, with Horizontal, horizontal) reference line
// across the whole plot at data coordinate At.
type vline struct {
	At         float64
	Horizontal bool
	Style      draw.LineStyle
}

func (l *vline) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	if l.Horizontal {
		y := trY(l.At)
		c.StrokeLines(l.Style, c.ClipLinesY([]vg.Point{{X: c.Min.X, Y: y}, {X: c.Max.X, Y: y}})...)
		return
	}
	x := trX(l.At)
	c.StrokeLines(l.Style, c.ClipLinesX([]vg.Point{{X: x, Y: c.Min.Y}, {X: x, Y: c.Max.Y}})...)
}

func (l *vline) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(l.Style, c.Min.X, y, c.Max.X, y)
}

// ticks marks a linear axis with about six labelled ticks at steps of 1, 2
// or 5 times a power of ten, and unlabelled minor ticks between them.
// Integer keeps the steps whole; Format (if set) prints the labels.
type ticks struct {
	Integer bool
	Format  func(v float64) string
}

func (t ticks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) || math.IsInf(max-min, 0) {
		return plot.DefaultTicks{}.Ticks(min, max)
	}
	step, minor := niceStep((max - min) / 6)
	if t.Integer && step < 1 {
		step, minor = 1, 1
	}
	if t.Integer && minor < 1 {
		minor = step
	}
	var out []plot.Tick
	first := math.Ceil(min/minor-1e-9) * minor
	for i := 0; ; i++ {
		v := first + float64(i)*minor
		if v > max+1e-9*minor || i > 1000 {
			break
		}
		if math.Abs(v) < 1e-12*step {
			v = 0
		}
		tk := plot.Tick{Value: v}
		if r := v / step; math.Abs(r-math.Round(r)) < 1e-6 {
			switch {
			case t.Format != nil:
				tk.Label = t.Format(v)
			case t.Integer:
				tk.Label = strconv.FormatFloat(v, 'f', 0, 64)
			default:
				tk.Label = strconv.FormatFloat(v, 'f', -1, 64)
				if len(tk.Label) > 8 {
					tk.Label = strconv.FormatFloat(v, 'g', 4, 64)
				}
			}
		}
		out = append(out, tk)
	}
	return out
}

// niceStep returns the least of 1, 2, 5 times a power of ten at or above
// raw, and a minor step that divides it.
func niceStep(raw float64) (step, minor float64) {
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*mag >= raw*(1-1e-9) {
			step = m * mag
			if m == 2 {
				return step, step / 2
			}
			return step, step / 5
		}
	}
	return 10 * mag, 2 * mag
}

// percent prints a fraction as a percentage with just enough digits.
func percent(v float64) string {
	return strconv.FormatFloat(math.Round(1e6*v)/1e4, 'f', -1, 64) + "%"
}

// thousands prints v with a thin grouping of thousands and no decimals when
// large, a few significant digits when small.
func thousands(v float64) string {
	if math.Abs(v) < 1000 {
		return strconv.FormatFloat(v, 'g', 4, 64)
	}
	s := strconv.FormatFloat(math.Round(v), 'f', 0, 64)
	neg := s[0] == '-'
	if neg {
		s = s[1:]
	}
	var out []byte
	for i := range len(s) {
		if i > 0 && (len(s)-i)%3 == 0 {
			out = append(out, ',')
		}
		out = append(out, s[i])
	}
	if neg {
		return "-" + string(out)
	}
	return string(out)
}

// diamondGlyph is a filled diamond, a fourth solid marker shape beside
// gonum/plot's circle, box and pyramid.
type diamondGlyph struct{}

func (diamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius * 1.25
	c.FillPolygon(sty.Color, []vg.Point{
		{X: pt.X, Y: pt.Y + r}, {X: pt.X + r, Y: pt.Y}, {X: pt.X, Y: pt.Y - r}, {X: pt.X - r, Y: pt.Y},
	})
}
