package batch

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"ergostock/inventory"
)

// Format says how the cells of a results file are written. The zero value
// is the plain form: comma-delimited, decimal point, every figure at full
// precision (the shortest decimal that reads back to the same float64).
//
// A spreadsheet in a locale whose decimal mark is a comma reads a
// semicolon-delimited file with decimal commas (Delimiter ';', Decimal
// ','); a comma-delimited file with decimal commas is ambiguous and is
// refused by Validate. Digits rounds every figure (not the levels, counts
// or item positions, which are whole numbers) to that many significant
// digits; rounding happens once, from the full-precision value.
type Format struct {
	Delimiter rune // ',' (0 means ','), ';' or '\t'
	Decimal   byte // '.' (0 means '.') or ','
	Digits    int  // significant digits of figures, 1 to 17; 0 is full precision
}

// MaxDigits is the largest useful Digits: 17 significant digits identify
// every float64.
const MaxDigits = 17

// comma and decimal return the effective delimiter and decimal mark.
func (f Format) comma() rune {
	if f.Delimiter == 0 {
		return ','
	}
	return f.Delimiter
}

func (f Format) decimal() byte {
	if f.Decimal == 0 {
		return '.'
	}
	return f.Decimal
}

// Plain reports whether f writes the plain form (the zero value's).
func (f Format) Plain() bool {
	return f.comma() == ',' && f.decimal() == '.' && f.Digits == 0
}

// Validate refuses a delimiter other than ',' ';' and tab, a decimal mark
// other than '.' and ',', a comma as both, and Digits outside 0..17. The
// messages name the flags of the batch command.
func (f Format) Validate() error {
	switch f.comma() {
	case ',', ';', '\t':
	default:
		return fmt.Errorf("--out-delimiter %q: want , ; or tab", string(f.comma()))
	}
	switch f.decimal() {
	case '.', ',':
	default:
		return fmt.Errorf("--out-decimal %q: want . or ,", string(f.decimal()))
	}
	if f.comma() == ',' && f.decimal() == ',' {
		return fmt.Errorf("--out-delimiter , with --out-decimal ,: a comma cannot be both; use --out-delimiter ';' (or tab) for decimal commas")
	}
	if f.Digits < 0 || f.Digits > MaxDigits {
		return fmt.Errorf("--digits %d: want 1 to %d significant digits, or 0 for full precision", f.Digits, MaxDigits)
	}
	return nil
}

// Float writes v as a figure cell under f: rounded to f.Digits significant
// digits (if set), printed as the shortest decimal of that value ('g'
// form: an exponent below 1e-4 and from 1e21), with f's decimal mark.
func (f Format) Float(v float64) string {
	if f.Digits > 0 && v != 0 && !math.IsNaN(v) && !math.IsInf(v, 0) {
		v = RoundDigits(v, f.Digits)
	}
	s := formatFloat(v)
	if f.decimal() == ',' {
		s = strings.Replace(s, ".", ",", 1)
	}
	return s
}

// RoundDigits rounds v to n >= 1 significant digits (round half to even on
// the decimal digits, as strconv does).
func RoundDigits(v float64, n int) float64 {
	r, err := strconv.ParseFloat(strconv.FormatFloat(v, 'e', n-1, 64), 64)
	if err != nil {
		return v
	}
	return r
}

// CellKind says what a column of the results holds, for writers that
// format cells by kind (the results CSV under a Format, workbooks).
type CellKind int

const (
	TextCell    CellKind = iota // text, written as it is (guarded, see Guard)
	WholeCell                   // a whole number: levels, counts, positions
	FigureCell                  // a figure (real number); Digits and Decimal apply
	PercentCell                 // a figure that is a share of 1 (fill rate, stockout probability)
)

// shareColumns are the figure columns that are shares of 1.
var shareColumns = map[string]bool{
	"fill_rate": true, "stockout_probability": true, "current_fill_rate": true,
	// --uncertainty (see UncertaintyHeader)
	"expected_fill_rate": true, "fill_rate_p05": true, "fill_rate_p95": true,
	"expected_stockout_probability": true, "share_meeting_min_fill_rate": true,
	"robust_share_meeting_min_fill_rate": true,
}

// wholeColumns are the columns of whole numbers.
var wholeColumns = map[string]bool{
	"reorder_point": true, "order_up_to": true, "order_multiple": true,
	"states": true, "policies_evaluated": true, "item": true, "review_period": true,
	"current_reorder_point": true, "current_order_up_to": true, "current_order_multiple": true,
	// --uncertainty (see UncertaintyHeader)
	"resamples_used": true, "robust_reorder_point": true, "robust_order_up_to": true, "robust_order_multiple": true,
}

// figureColumns are the other figure columns. A column added to the
// results that holds a real number must be listed here (or in
// shareColumns), or it is written as text.
var figureColumns = func() map[string]bool {
	m := map[string]bool{
		"demand_mean": true, "demand_variance": true,
		"current_total_cost": true, "saving": true,
		"residual": true, "balance": true, "neglected": true,
		// --uncertainty (see UncertaintyHeader): level quantiles and costs
		"expected_total_cost": true, "total_cost_p95": true, "regret_mean": true, "regret_p95": true,
		"robust_mean_total_cost": true, "plug_in_mean_total_cost": true, "robust_extra_cost": true,
	}
	for _, l := range []string{"reorder_point", "order_up_to", "order_multiple"} {
		for _, q := range []string{"_p05", "_p50", "_p95"} {
			m[l+q] = true
		}
	}
	for _, fd := range (inventory.Figures{}).Fields() {
		m[fd.Name] = true
	}
	return m
}()

// ColumnKind returns the kind of a results column by its name; names it
// does not know (carried item columns among them) are text, and so is
// lead_time, which holds a whole number of periods or a law.
func ColumnKind(name string) CellKind {
	switch {
	case shareColumns[name]:
		return PercentCell
	case wholeColumns[name]:
		return WholeCell
	case figureColumns[name]:
		return FigureCell
	}
	return TextCell
}

// reformat rewrites, under f, the figure cells of a record written in the
// plain form; kinds gives each column's kind. Plain cells read back
// exactly, so the value rounded is the full-precision one.
func (f Format) reformat(rec []string, kinds []CellKind) {
	for i, k := range kinds {
		if i >= len(rec) || rec[i] == "" || (k != FigureCell && k != PercentCell) {
			continue
		}
		v, err := strconv.ParseFloat(rec[i], 64)
		if err != nil {
			continue
		}
		rec[i] = f.Float(v)
	}
}

// NewFormatWriter returns a Writer on w that writes cells under f (see
// Format); NewWriter is NewFormatWriter with the zero Format. A file in a
// spreadsheet dialect (a delimiter other than ',' or a decimal comma)
// starts with a UTF-8 byte-order mark, by which spreadsheets recognise
// UTF-8 text (common practice); the header record follows it.
func NewFormatWriter(w io.Writer, f Format) (*Writer, error) {
	if err := f.Validate(); err != nil {
		return nil, err
	}
	bw := NewWriter(w)
	bw.format = f
	bw.w.Comma = f.comma()
	return bw, nil
}

// bom reports whether f's files start with a byte-order mark.
func (f Format) bom() bool { return f.comma() != ',' || f.decimal() != '.' }

// header returns the column names the writer writes, and records their
// kinds for reformat.
func (w *Writer) header() []string {
	h := Header()
	if w.Uncertainty != nil {
		h = append(h, UncertaintyHeader(*w.Uncertainty)...)
	}
	h = append(h, w.carry...)
	w.kinds = w.kinds[:0]
	for _, name := range h {
		w.kinds = append(w.kinds, ColumnKind(name))
	}
	return h
}

// start writes the byte-order mark, once, when the format has one.
func (w *Writer) start() error {
	if w.started {
		return nil
	}
	w.started = true
	if !w.format.bom() {
		return nil
	}
	_, err := io.WriteString(w.out, "\ufeff")
	return err
}

// Carry names the item columns carried to the results (the names Carry
// returned), written after every results column as text cells. Call it
// before WriteHeader.
func (w *Writer) Carry(names []string) { w.carry, w.kinds = names, nil }

// appendCarried appends a row's n carried cells (guarded text; empty
// where the row has fewer).
func appendCarried(rec, carried []string, n int) []string {
	for i := 0; i < n; i++ {
		c := ""
		if i < len(carried) {
			c = Guard(carried[i])
		}
		rec = append(rec, c)
	}
	return rec
}

// SetUncertainty appends the columns of UncertaintyHeader(robust) after
// the standard ones (and before any carried columns), as setting
// Writer.Uncertainty does. Call it before WriteHeader.
func (w *Writer) SetUncertainty(robust bool) { w.Uncertainty, w.kinds = &robust, nil }
