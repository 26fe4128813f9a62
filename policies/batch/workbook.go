package batch

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"
)

// The sheets of a results workbook (see WorkbookWriter).
const (
	ResultsSheet  = "results"  // one row per item, the columns of the CSV
	WarningsSheet = "warnings" // one row per warning: sku, item, warning
	RunSheet      = "run"      // the header record and its fields, one per row
)

// maxSheetRows is the most rows a worksheet holds (the Office Open XML
// limit, 2^20), the header row included.
const maxSheetRows = excelize.TotalRows

// WorkbookWriter writes the results as an .xlsx workbook (Office Open
// XML, ECMA-376) with three sheets: ResultsSheet holds the columns of the
// results CSV, the header row frozen, numbers stored as numbers (the full
// float64, or rounded to Format.Digits) under a display format by kind
// (percentages for shares, two decimals with grouping for costs,
// scientific for the solver diagnostics); WarningsSheet lists every
// warning with its SKU and item position; RunSheet holds the header
// record, whole in its first cell and field by field below, and the
// record is the workbook's description too. Text cells are guarded as in
// the CSV (see Guard), so that a sheet saved back to CSV stays safe.
//
// Rows are streamed to a temporary part of the workbook; nothing reaches
// the output before Flush, which writes the whole archive.
type WorkbookWriter struct {
	out    io.Writer
	format Format
	f      *excelize.File
	sw     *excelize.StreamWriter
	header []string
	kinds  []CellKind
	styles map[string]int // by column name
	rows   int            // written to the results sheet, header included
	warns  [][]any        // rows of the warnings sheet
	meta   *Meta
	carry  []string // carried item columns
	unc    *bool    // the --uncertainty columns, with the robust policy's if true
	rec    []string
	err    error
}

// NewWorkbookWriter returns a WorkbookWriter on w. Of f only Digits
// applies (a workbook has no delimiter, and the decimal mark shown is the
// spreadsheet's); a delimiter or decimal mark other than the plain ones
// is refused.
func NewWorkbookWriter(w io.Writer, f Format) (*WorkbookWriter, error) {
	if err := f.Validate(); err != nil {
		return nil, err
	}
	if f.comma() != ',' || f.decimal() != '.' {
		return nil, fmt.Errorf("--out-delimiter and --out-decimal apply to CSV results: a workbook stores numbers as numbers and shows them in the spreadsheet's own locale; leave them out")
	}
	x := excelize.NewFile()
	if err := x.SetSheetName(x.GetSheetName(0), ResultsSheet); err != nil {
		x.Close()
		return nil, err
	}
	return &WorkbookWriter{out: w, format: f, f: x}, nil
}

// Display formats of the results sheet (Office Open XML number formats).
const (
	fmtPercent    = "0.00%"
	fmtCost       = "#,##0.00"
	fmtQuantity   = "#,##0.000"
	fmtDiagnostic = "0.00E+00"
	fmtWhole      = "0"
)

// displayFormat returns the number format of a column.
func displayFormat(name string, k CellKind) string {
	switch {
	case k == PercentCell:
		return fmtPercent
	case k == WholeCell:
		return fmtWhole
	case k != FigureCell:
		return ""
	case strings.HasSuffix(name, "_cost") || name == "saving":
		return fmtCost
	case name == "residual" || name == "balance" || name == "neglected":
		return fmtDiagnostic
	}
	return fmtQuantity
}

// SetUncertainty adds the --uncertainty columns, as Writer.SetUncertainty.
func (w *WorkbookWriter) SetUncertainty(robust bool) { w.unc = &robust }

// Carry names the item columns carried to the results, as Writer.Carry.
func (w *WorkbookWriter) Carry(names []string) { w.carry = names }

// WriteMeta records the header record; it is written to RunSheet at Flush.
func (w *WorkbookWriter) WriteMeta(m Meta) error {
	m.Cells = Format{Digits: w.format.Digits}
	w.meta = &m
	return nil
}

// WriteHeader starts the results sheet with its header row, frozen.
func (w *WorkbookWriter) WriteHeader() error {
	if w.err != nil {
		return w.err
	}
	sw, err := w.f.NewStreamWriter(ResultsSheet)
	if err != nil {
		return w.fail(err)
	}
	w.sw = sw
	if err := sw.SetPanes(&excelize.Panes{Freeze: true, YSplit: 1, TopLeftCell: "A2", ActivePane: "bottomLeft"}); err != nil {
		return w.fail(err)
	}
	bold, err := w.f.NewStyle(&excelize.Style{Font: &excelize.Font{Bold: true}})
	if err != nil {
		return w.fail(err)
	}
	w.header = Header()
	if w.unc != nil {
		w.header = append(w.header, UncertaintyHeader(*w.unc)...)
	}
	w.header = append(w.header, w.carry...)
	w.kinds = make([]CellKind, len(w.header))
	w.styles = map[string]int{}
	cells := make([]any, len(w.header))
	for i, name := range w.header {
		w.kinds[i] = ColumnKind(name)
		if nf := displayFormat(name, w.kinds[i]); nf != "" {
			id, err := w.f.NewStyle(&excelize.Style{CustomNumFmt: &nf})
			if err != nil {
				return w.fail(err)
			}
			w.styles[name] = id
		}
		width := float64(max(len(name)+2, 10))
		switch name {
		case "sku", "demand":
			width = 24
		case "warnings", "error":
			width = 40
		}
		if err := sw.SetColWidth(i+1, i+1, width); err != nil {
			return w.fail(err)
		}
		cells[i] = excelize.Cell{StyleID: bold, Value: name}
	}
	w.rows = 1
	return w.fail(sw.SetRow("A1", cells))
}

// Write adds one row to the results sheet, and its warnings to the
// warnings sheet.
func (w *WorkbookWriter) Write(r *Row) error {
	if w.err != nil {
		return w.err
	}
	if w.sw == nil {
		if err := w.WriteHeader(); err != nil {
			return err
		}
	}
	if w.rows >= maxSheetRows {
		return w.fail(fmt.Errorf("a worksheet holds at most %d rows: write the results of %d or more items as CSV", maxSheetRows, maxSheetRows))
	}
	w.rec = r.appendRecord(w.rec[:0])
	if w.unc != nil {
		w.rec = r.Uncertainty.appendCells(w.rec, *w.unc)
	}
	w.rec = appendCarried(w.rec, r.Carried, len(w.carry))
	cells := make([]any, len(w.rec))
	for i, s := range w.rec {
		cells[i] = w.cell(i, s)
	}
	w.rows++
	if err := w.sw.SetRow("A"+strconv.Itoa(w.rows), cells); err != nil {
		return w.fail(err)
	}
	for _, msg := range r.Warnings {
		w.warns = append(w.warns, []any{Guard(r.SKU), r.Item, Guard(msg)})
	}
	return nil
}

// cell converts the plain CSV cell s of column i to a workbook value.
func (w *WorkbookWriter) cell(i int, s string) any {
	if s == "" {
		return nil
	}
	k := TextCell
	if i < len(w.kinds) {
		k = w.kinds[i]
	}
	var v any = s
	switch k {
	case WholeCell:
		if n, err := strconv.Atoi(s); err == nil {
			v = n
		}
	case FigureCell, PercentCell:
		if x, err := strconv.ParseFloat(s, 64); err == nil {
			if w.format.Digits > 0 && x != 0 {
				x = RoundDigits(x, w.format.Digits)
			}
			v = x
		}
	}
	if id, ok := w.styles[w.header[i]]; ok && k != TextCell {
		return excelize.Cell{StyleID: id, Value: v}
	}
	return v
}

func (w *WorkbookWriter) fail(err error) error {
	if err != nil && w.err == nil {
		w.err = err
	}
	return err
}

// Flush finishes the sheets and writes the workbook to the output.
func (w *WorkbookWriter) Flush() error {
	defer w.f.Close()
	if w.err != nil {
		return w.err
	}
	if w.sw == nil {
		if err := w.WriteHeader(); err != nil {
			return err
		}
	}
	if err := w.sw.Flush(); err != nil {
		return w.fail(err)
	}
	if err := w.writeWarnings(); err != nil {
		return w.fail(err)
	}
	if err := w.writeRun(); err != nil {
		return w.fail(err)
	}
	w.f.SetActiveSheet(0)
	return w.fail(w.f.Write(w.out))
}

// writeWarnings fills the warnings sheet. It is written in memory, not
// streamed: with one stream only, the parts of the archive come in a fixed
// order and a run's workbook is repeatable byte for byte.
func (w *WorkbookWriter) writeWarnings() error {
	const sheet = WarningsSheet
	if _, err := w.f.NewSheet(sheet); err != nil {
		return err
	}
	if err := w.f.SetPanes(sheet, &excelize.Panes{Freeze: true, YSplit: 1, TopLeftCell: "A2", ActivePane: "bottomLeft"}); err != nil {
		return err
	}
	for _, c := range []struct {
		col   string
		width float64
	}{{"A", 24}, {"B", 8}, {"C", 80}} {
		if err := w.f.SetColWidth(sheet, c.col, c.col, c.width); err != nil {
			return err
		}
	}
	bold, err := w.f.NewStyle(&excelize.Style{Font: &excelize.Font{Bold: true}})
	if err != nil {
		return err
	}
	if err := w.f.SetSheetRow(sheet, "A1", &[]any{"sku", "item", "warning"}); err != nil {
		return err
	}
	if err := w.f.SetCellStyle(sheet, "A1", "C1", bold); err != nil {
		return err
	}
	if len(w.warns)+1 > maxSheetRows {
		return fmt.Errorf("%d warnings: a worksheet holds at most %d rows; write the results as CSV", len(w.warns), maxSheetRows-1)
	}
	for i := range w.warns {
		if err := w.f.SetSheetRow(sheet, "A"+strconv.Itoa(i+2), &w.warns[i]); err != nil {
			return err
		}
	}
	return nil
}

// writeRun writes the header record: whole in A1, then one field a row.
func (w *WorkbookWriter) writeRun() error {
	if w.meta == nil {
		return nil
	}
	if _, err := w.f.NewSheet(RunSheet); err != nil {
		return err
	}
	m := w.meta
	rec := m.String()
	rows := [][]any{
		{rec},
		{},
		{"field", "value", "meaning"},
		{"format", m.Format, "results format version"},
		{"period", m.Period, "planning period: every figure is a long-run average per " + m.Period},
		{"costs", "per " + m.Period, "costs are money per " + m.Period + ", in the currency of the items file"},
		{"run", m.Run, "digest of everything that shapes the figures"},
		{"items", m.Items, "digest of the items file"},
		{"history", m.History, "digest of the history file (none: planned from demand columns)"},
		{"max_states", m.MaxStates, "largest lost-sales chain built"},
		{"shard", m.Shard.String(), "part K/N of the catalogue"},
		{"version", m.Version, "ergostock version"},
	}
	if m.Cells.Digits > 0 {
		rows = append(rows, []any{"digits", m.Cells.Digits, "significant digits of the figures"})
	}
	for i, row := range rows {
		if len(row) == 0 {
			continue
		}
		cell, _ := excelize.CoordinatesToCellName(1, i+1)
		if err := w.f.SetSheetRow(RunSheet, cell, &row); err != nil {
			return err
		}
	}
	if err := w.f.SetColWidth(RunSheet, "A", "A", 14); err != nil {
		return err
	}
	if err := w.f.SetColWidth(RunSheet, "B", "B", 22); err != nil {
		return err
	}
	return w.f.SetDocProps(&excelize.DocProperties{
		Title:       "ergostock results",
		Creator:     "ergostock " + m.Version,
		Description: rec,
		// Created and Modified keep excelize's fixed template dates, so
		// that the workbook of a run is repeatable byte for byte.
	})
}
