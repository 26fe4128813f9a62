package history

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
)

// RowError is a data row that cannot be used. It names the file, the line,
// the field and its value, in the style of encoding/csv's ParseError:
//
//	history.csv:17: quantity "abc": want a whole number >= 0
type RowError struct {
	File  string
	Line  int
	Field string // the column name: "sku", "date", "period" or "quantity"
	Value string
	Want  string
}

func (e *RowError) Error() string {
	return fmt.Sprintf("%s:%d: %s %q: %s", e.File, e.Line, e.Field, e.Value, e.Want)
}

// ErrMissingColumn is wrapped by the error Read returns when the header
// lacks a required column.
var ErrMissingColumn = errors.New("missing column")

// SKU is the demand history of one item, summed into periods.
type SKU struct {
	SKU string
	// Start is the period number of the first record of the item's series;
	// Demand[i] is the demand of period Start+i, up to History.Last, the last
	// period of the file's series. Periods without records hold zero.
	Start  int
	Demand []int
	// Records counts the rows summed into Demand; Errors lists the
	// unusable rows that name this SKU, in file order.
	Records int
	Errors  []*RowError
	// LeftOut lists the usable rows left out of Demand because they lie
	// far from the bulk of the SKU's rows, or of the file's (see the
	// package documentation), in order of date.
	LeftOut []*Outlier
	// Err, when not nil, is why the SKU has no series although some of its
	// rows are usable: its rows have no clear bulk, every one of them was
	// left out, or its series would span more than MaxSpan periods.
	Err error

	// peakFile:peakLine is the first row of the period of largest demand.
	peakFile string
	peakLine int
}

// History is a demand history file read into per-SKU series.
type History struct {
	File   string
	Period Period // Index when the file has a period column instead of date
	// Last is the last period of the series (meaningful when some SKU has
	// a series): the latest period holding a record that was not left out.
	Last int
	// SKUs are in order of first appearance in the file (including SKUs
	// whose every row was unusable: they have no Demand and some Errors).
	SKUs []*SKU
	// Errors lists unusable rows whose sku cell is empty or unusable.
	Errors []*RowError
	// Rows counts the data rows read.
	Rows int
}

// Label names period number n in the history's period.
func (h *History) Label(n int) string { return h.Period.Label(n) }

// rec is one time (day or period number) of a SKU while reading: the sum
// q of its rows, their count and the line of the first of them.
type rec struct {
	t, q, line, rows int
}

// acc collects one SKU's records while reading.
type acc struct {
	sku   *SKU
	recs  []rec
	total int // the sum of the quantities, at most maxExact
}

// Read reads a demand history in CSV from r; name is the file name used in
// errors. The header names the columns, in any order and any letter case:
// sku, date (YYYY-MM-DD, in the years MinYear to MaxYear) and quantity, or
// sku, period (a whole number) and quantity; other columns are ignored.
// When both date and period are present, date is used. Dates are summed
// into periods of p; integer periods are taken as they are.
//
// Rows for the same SKU and period are summed. A row that cannot be used
// (an empty sku or one holding a line break, an unreadable or out-of-range
// date or period, a quantity that is not a whole number >= 0 below 2^53,
// a quantity that would take the SKU's total to 2^53) does not stop the
// read: it is recorded as a *RowError against its SKU, or in
// History.Errors when the sku cell is unusable. Rows far from the bulk of
// their SKU's rows are left out and listed in SKU.LeftOut (the rule is in
// the package documentation). Numbers follow one rule: a plain decimal
// (sign, digits, fraction, exponent), no underscores, hexadecimal, inf or
// nan.
//
// A missing header or column, a CSV syntax error, a read error, or series
// that would hold more than MaxCells periods in all fail the whole read;
// such errors name the file and a line. Memory is proportional to the rows
// read plus the periods of the series, which are counted before they are
// allocated.
func Read(r io.Reader, name string, p Period) (*History, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fmt.Errorf("%s:1: empty file, want a header line with columns %s: %w", name, historyColumns, ErrMissingColumn)
	}
	if err != nil {
		return nil, csvErr(name, 1, err)
	}
	cols, err := readHeader(name, header)
	if err != nil {
		return nil, err
	}
	if cols.timeName == "period" {
		p = Index
	}
	if p < Day || p > Index {
		return nil, fmt.Errorf("%s:1: period %v: want day, week or month", name, p)
	}

	h := &History{File: name, Period: p}
	accs := map[string]*acc{}
	var order []*acc
	var last *acc // rows usually come grouped by SKU
	line := 1
	for {
		row, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(name, line+1, err)
		}
		h.Rows++
		line, _ = cr.FieldPos(0)
		field := func(i int) string {
			if i < len(row) {
				return strings.TrimSpace(row[i])
			}
			return ""
		}
		sku := field(cols.sku)
		if sku == "" || hasLineBreak(sku) {
			want := "want a non-empty SKU"
			if sku != "" {
				want = "want a SKU without line breaks (CR or LF)"
			}
			h.Errors = append(h.Errors, &RowError{name, line, "sku", strings.Clone(sku), want})
			continue
		}
		a := last
		if a == nil || a.sku.SKU != sku {
			a = accs[sku]
			if a == nil {
				a = &acc{sku: &SKU{SKU: strings.Clone(sku)}}
				accs[a.sku.SKU] = a
				order = append(order, a)
			}
			last = a
		}
		bad := func(f, v, want string) {
			a.sku.Errors = append(a.sku.Errors, &RowError{name, line, f, strings.Clone(v), want})
		}
		if len(row) <= cols.need {
			// A short row: name the first missing field.
			short := fmt.Sprintf(" (the row has %d fields, the header %d)", len(row), cols.width)
			switch {
			case cols.time >= len(row):
				bad(cols.timeName, "", cols.timeWant()+short)
			default:
				bad("quantity", "", "want a whole number >= 0"+short)
			}
			continue
		}
		ts := field(cols.time)
		t, want := cols.timeOf(ts)
		if want != "" {
			bad(cols.timeName, ts, want)
			continue
		}
		qs := field(cols.qty)
		q, want := quantityOf(qs)
		if want != "" {
			bad("quantity", qs, want)
			continue
		}
		if a.total+q >= maxExact {
			bad("quantity", qs, fmt.Sprintf("want a quantity that keeps the SKU's total below %d (2^53); it is %d before this row", maxExact, a.total))
			continue
		}
		a.total += q
		if n := len(a.recs); n > 0 && a.recs[n-1].t == t {
			a.recs[n-1].q += q
			a.recs[n-1].rows++
		} else {
			a.recs = append(a.recs, rec{t: t, q: q, line: line, rows: 1})
		}
	}
	if err := h.build(order, cols); err != nil {
		return nil, err
	}
	return h, nil
}

// quantityOf reads a quantity: a whole number >= 0 below 2^53, by the
// rule of parseNumber ("12.0" and "1.2e1" are 12). It returns what is
// wanted when the cell is unusable.
func quantityOf(s string) (int, string) {
	const want = "want a whole number >= 0"
	if n := len(s); n > 0 && n <= 15 {
		// The common case, plain digits, without the float path.
		v := 0
		for i := 0; i < n; i++ {
			c := s[i]
			if c < '0' || c > '9' {
				v = -1
				break
			}
			v = v*10 + int(c-'0')
		}
		if v >= 0 {
			return v, ""
		}
	}
	v, err := parseNumber(s)
	switch {
	case err != nil || v < 0 || v != math.Trunc(v):
		return 0, want
	case v >= maxExact:
		return 0, fmt.Sprintf("%s below %d (2^53)", want, maxExact)
	}
	return int(v), ""
}

// hasLineBreak reports whether s holds a CR or an LF.
func hasLineBreak(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] == '\n' || s[i] == '\r' {
			return true
		}
	}
	return false
}
