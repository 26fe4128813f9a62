package report

import (
	"bytes"
	"fmt"
	"html/template"
	"regexp"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Chart sizes: the page's text column is at most 180 mm wide, so charts are
// drawn at 170 mm and scale with the page through their viewBox.
const (
	chartWidth  = 170 * vg.Millimeter
	chartHeight = 85 * vg.Millimeter
)

// sans is the typeface of every chart: Liberation Sans, which has the
// metrics of Arial and Helvetica, so text measured by gonum/plot fits when a
// browser substitutes either.
var sans = font.Font{Typeface: "Liberation", Variant: "Sans"}

// newPlot returns a plot with sans-serif text at sizes that stay readable
// when a 170 mm chart is printed at its natural size.
func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = font.From(sans, 11)
	p.Title.Padding = 4
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sans, 10)
		a.Tick.Label.Font = font.From(sans, 9)
		a.Tick.Length = 4
		a.Tick.Marker = ticks{}
	}
	p.Legend.TextStyle.Font = font.From(sans, 9)
	p.Legend.Top = true
	p.Legend.ThumbnailWidth = 12
	p.Legend.Padding = 1.5
	return p
}

// svgOf draws fn on a w x h canvas and returns the SVG for inline use in
// HTML: without the XML prolog, comment, namespaces and fixed size, so that
// it scales to its container through the viewBox.
func svgOf(w, h vg.Length, label string, fn func(dc draw.Canvas) error) (template.HTML, error) {
	c := vgsvg.New(w, h)
	dc := draw.New(c)
	if err := fn(dc); err != nil {
		return "", err
	}
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return "", fmt.Errorf("chart %q: %w", label, err)
	}
	return template.HTML(inlineSVG(buf.String(), label)), nil
}

// plotSVG draws one plot at the standard chart size.
func plotSVG(p *plot.Plot, label string) (template.HTML, error) {
	return plotSVGSize(p, chartWidth, chartHeight, label)
}

func plotSVGSize(p *plot.Plot, w, h vg.Length, label string) (template.HTML, error) {
	return svgOf(w, h, label, func(dc draw.Canvas) (err error) {
		defer func() {
			// gonum/plot panics on degenerate input (for example an axis
			// range it cannot tick); turn that into an error for this chart.
			if r := recover(); r != nil {
				err = fmt.Errorf("chart %q: %v", label, r)
			}
		}()
		// A little room on the right for the last tick label.
		p.Draw(draw.Crop(dc, 0, -3*vg.Millimeter, 0, 0))
		return nil
	})
}

var (
	reProlog  = regexp.MustCompile(`(?s)^\s*<\?xml[^>]*\?>\s*`)
	reComment = regexp.MustCompile(`(?s)<!--.*?-->\s*`)
	reSVGOpen = regexp.MustCompile(`(?s)<svg\b[^>]*?viewBox="([^"]*)"[^>]*>`)
	reFamily  = regexp.MustCompile(`font-family:Liberation Sans;`)
)

// inlineSVG rewrites a standalone SVG document for inline use.
func inlineSVG(doc, label string) string {
	doc = reProlog.ReplaceAllString(doc, "")
	doc = reComment.ReplaceAllString(doc, "")
	doc = reSVGOpen.ReplaceAllStringFunc(doc, func(open string) string {
		vb := reSVGOpen.FindStringSubmatch(open)[1]
		return fmt.Sprintf(`<svg class="chart" viewBox="%s" preserveAspectRatio="xMidYMid meet" role="img" aria-label="%s">`,
			vb, template.HTMLEscapeString(label))
	})
	doc = reFamily.ReplaceAllString(doc, `font-family:'Liberation Sans',Arial,Helvetica,sans-serif;`)
	return strings.TrimSpace(doc)
}
