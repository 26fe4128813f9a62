package report

import (
	"html/template"
	"io"
)

// pageCSS is the page's inline style sheet: one column at most 180 mm wide,
// which prints on A4 with 15 mm margins; charts scale with the column.
const pageCSS = `
:root { --ink: #1b1b1b; --muted: #555; --rule: #cfcfcf; --accent: #0072b2; --warn: #d55e00; }
* { box-sizing: border-box; }
html { background: #fff; }
body { font-family: 'Liberation Sans', Arial, Helvetica, sans-serif; color: var(--ink);
  max-width: 180mm; margin: 0 auto; padding: 8mm 6mm 12mm; line-height: 1.45; font-size: 10.5pt; }
h1 { font-size: 17pt; margin: 0 0 1mm; line-height: 1.2; }
h2 { font-size: 12.5pt; margin: 8mm 0 2mm; padding-bottom: 1mm; border-bottom: 1px solid var(--rule);
  break-after: avoid; page-break-after: avoid; }
h3 { font-size: 11pt; margin: 5mm 0 1mm; break-after: avoid; page-break-after: avoid; }
p { margin: 1.5mm 0; }
.sub { color: var(--muted); margin: 0 0 3mm; }
.glance { border-left: 4px solid var(--accent); background: #f2f7fb; padding: 2.5mm 4mm; margin: 3mm 0; }
.glance p { margin: 1mm 0; }
.good { color: #00704f; font-weight: bold; }
.bad { color: var(--warn); font-weight: bold; }
table { border-collapse: collapse; width: 100%; font-size: 9.5pt; margin: 2mm 0; }
th, td { padding: 0.8mm 1.8mm; border-bottom: 1px solid #e6e6e6; text-align: left; vertical-align: top; }
thead th { border-bottom: 1.5px solid #888; font-weight: bold; background: #fafafa; }
.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
table.items { font-size: 8.3pt; }
table.items td, table.items th { padding: 0.6mm 1mm; white-space: nowrap; }
table.items td.sku { white-space: normal; overflow-wrap: anywhere; min-width: 24mm; }
table.items th { white-space: normal; vertical-align: bottom; }
table.kv th { width: 45%; font-weight: normal; color: var(--muted); }
table.sortable thead th { cursor: pointer; }
table.sortable thead th[aria-sort=ascending]::after { content: " \25B2"; }
table.sortable thead th[aria-sort=descending]::after { content: " \25BC"; }
figure { margin: 4mm 0 5mm; break-inside: avoid; page-break-inside: avoid; }
svg.chart { display: block; width: 100%; height: auto; }
figcaption { font-size: 9pt; color: var(--muted); margin-top: 1mm; }
.note { font-size: 9pt; color: var(--muted); border: 1px dashed var(--rule); padding: 2mm 3mm; }
.warn { color: var(--warn); }
ul { margin: 1mm 0; padding-left: 6mm; }
li { margin: 0.5mm 0; }
.cautions { font-size: 9.5pt; background: #fbfaf4; border: 1px solid #e5e0c8; padding: 2mm 4mm; break-inside: avoid; page-break-inside: avoid; }
footer { margin-top: 8mm; font-size: 8.5pt; color: var(--muted); border-top: 1px solid var(--rule); padding-top: 2mm; }
code { font-family: 'Liberation Mono', 'Courier New', monospace; font-size: 92%; overflow-wrap: anywhere; }
@page { size: A4; margin: 14mm 15mm; }
@media print {
  body { max-width: none; padding: 0; font-size: 10pt; }
  .glance { background: none; }
  thead { display: table-header-group; }
  tr, li { break-inside: avoid; page-break-inside: avoid; }
  h2 { break-before: auto; }
  .pagebreak { break-before: page; page-break-before: always; }
  table.sortable thead th::after { content: none !important; }
}
`

// sortJS makes the tables of class "sortable" sortable by clicking (or
// pressing Enter on) a column head. Optional: without JavaScript the table
// stays in input order. Cells sort by their data-v attribute when present
// (numbers), else by their text; empty cells go last.
const sortJS = `
(function () {
  var tables = document.querySelectorAll('table.sortable');
  Array.prototype.forEach.call(tables, function (t) {
    var heads = t.tHead.rows[0].cells;
    Array.prototype.forEach.call(heads, function (th, col) {
      th.tabIndex = 0;
      th.title = 'sort by this column';
      var go = function () {
        var asc = th.getAttribute('aria-sort') !== 'ascending';
        Array.prototype.forEach.call(heads, function (h) { h.removeAttribute('aria-sort'); });
        th.setAttribute('aria-sort', asc ? 'ascending' : 'descending');
        var body = t.tBodies[0];
        var rows = Array.prototype.slice.call(body.rows);
        var key = function (r) {
          var c = r.cells[col];
          var v = c.getAttribute('data-v');
          if (v !== null) { return v === '' ? null : parseFloat(v); }
          var s = c.textContent.trim();
          return s === '' ? null : s.toLowerCase();
        };
        rows.sort(function (a, b) {
          var x = key(a), y = key(b);
          if (x === null || y === null) { return (x === null) - (y === null); }
          var d = (typeof x === 'number' && typeof y === 'number') ? x - y : (x < y ? -1 : x > y ? 1 : 0);
          return asc ? d : -d;
        });
        rows.forEach(function (r) { body.appendChild(r); });
      };
      th.addEventListener('click', go);
      th.addEventListener('keydown', function (e) {
        if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); go(); }
      });
    });
  });
})();
`

var funcs = template.FuncMap{
	"num":   num,
	"pct":   pct,
	"money": money,
	"sci":   sci,
	"fig":   figureValue,
	"css":   func() template.CSS { return template.CSS(pageCSS) },
	"js":    func() template.JS { return template.JS(sortJS) },
}

// layout is shared by both pages: head, CSS, footer with the cautions.
const layout = `{{define "head"}}<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}}</title>
<style>{{css}}</style>
</head>
<body>
{{end}}
{{define "figure"}}<figure id="{{.ID}}">
{{if .SVG}}{{.SVG}}
<figcaption><strong>{{.Title}}.</strong> {{.Caption}}</figcaption>
{{else}}<p class="note"><strong>{{.Title}}:</strong> not drawn: {{.Note}}.</p>{{end}}
</figure>
{{end}}
{{define "cautions"}}<h2 id="assumptions">Assumptions and cautions</h2>
<div class="cautions">
<p>The figures on this page come from a model, not from observation. They hold to the extent its assumptions hold:</p>
<ul>
<li>Demand in each review period is independent of other periods and has the same distribution in every period (stationary): no trend, no season, no promotions.</li>
{{if .Timing}}{{range .Timing}}<li>{{.}}</li>
{{end}}{{else}}<li>The lead time is fixed, a whole number of review periods; suppliers always deliver in full.</li>{{end}}
<li>One item at one location; no substitution between items, no transfers between stores.</li>
<li>Costs are linear: a holding cost per unit and period, a shortage cost per unit, a fixed cost per order and a unit price, with no quantity discounts or capacity limits.</li>
<li>Unmet demand is either backordered or lost, as stated, for every customer.</li>
</ul>
<p>Results are model figures: check them against local practice, contracts and regulations before acting, and take particular care with critical items such as medicines and safety spares, where the cost of a shortage is not well described by a price per unit.</p>
</div>
{{end}}
{{define "foot"}}<footer>Made by ergostock{{if .Version}} {{.Version}}{{end}}. Every chart is drawn inline; the page loads nothing from the network and reads without JavaScript{{if .Sortable}} (a few lines of optional script only sort the item table){{end}}.</footer>
{{if .Sortable}}<script>{{js}}</script>
{{end}}</body>
</html>
{{end}}`

func mustTemplate(name, body string) *template.Template {
	return template.Must(template.Must(template.New(name).Funcs(funcs).Parse(layout)).Parse(body))
}

// execute writes a page template.
func execute(t *template.Template, w io.Writer, data any) error {
	return t.Execute(w, data)
}
