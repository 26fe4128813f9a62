package history

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
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

// MaxSpan is the largest number of periods a history may span, first to
// last (about 359 years of days). A row that would stretch the history
// beyond it is a bad row; the limit keeps the memory of a mistyped year
// (0206 for 2026) bounded.
const MaxSpan = 1 << 17

// SKU is the demand history of one item, summed into periods.
type SKU struct {
	SKU string
	// Start is the period number of the item's first record; Demand[i] is
	// the demand of period Start+i, up to the last period present anywhere
	// in the file. Periods without records hold zero.
	Start  int
	Demand []int
	// Records counts the usable rows; Errors lists the unusable rows that
	// name this SKU, in file order.
	Records int
	Errors  []*RowError
}

// History is a demand history file read into per-SKU series.
type History struct {
	File   string
	Period Period // Index when the file has a period column instead of date
	// Last is the last period present in the file (meaningful when some SKU
	// has a usable record).
	Last int
	// SKUs are in order of first appearance in the file (including SKUs
	// whose every row was unusable: they have no Demand and some Errors).
	SKUs []*SKU
	// Errors lists unusable rows whose sku cell is empty.
	Errors []*RowError
	// Rows counts the data rows read.
	Rows int
}

// Label names period number n in the history's period.
func (h *History) Label(n int) string { return h.Period.Label(n) }

// accum collects one SKU's sums while reading: buf[i] is the demand of
// period base+i; lo is the first period with a record (valid when seen).
type accum struct {
	sku  *SKU
	base int
	lo   int
	buf  []int
	seen bool
}

func (a *accum) add(p, q int) bool {
	switch {
	case !a.seen:
		a.base, a.lo, a.seen = p, p, true
		a.buf = append(a.buf[:0], 0)
	case p < a.base:
		// Grow at the front by at least the current length, so that a
		// file in reverse date order costs amortised O(1) per row.
		grow := max(a.base-p, len(a.buf), 8)
		nb := make([]int, grow+len(a.buf), grow+cap(a.buf))
		copy(nb[grow:], a.buf)
		a.buf, a.base = nb, a.base-grow
	case p >= a.base+len(a.buf):
		n := p - a.base + 1
		if n <= cap(a.buf) {
			a.buf = a.buf[:n]
		} else {
			a.buf = append(a.buf, make([]int, n-len(a.buf))...)
		}
	}
	if p < a.lo {
		a.lo = p
	}
	i := p - a.base
	if a.buf[i] > math.MaxInt-q {
		return false
	}
	a.buf[i] += q
	return true
}

// Read reads a demand history in CSV from r; name is the file name used in
// errors. The header names the columns, in any order and any letter case:
// sku, date (YYYY-MM-DD) and quantity, or sku, period (an integer) and
// quantity; other columns are ignored. When both date and period are
// present, date is used. Dates are summed into periods of p; integer
// periods are taken as they are.
//
// Rows for the same SKU and period are summed. A row that cannot be used
// (an empty sku, an unreadable date or period, a quantity that is not a
// whole number >= 0, a date more than MaxSpan periods away from the other
// rows) does not stop the read: it is recorded as a *RowError
// against its SKU, or in History.Errors when the sku cell is empty. A
// missing header or column, or a CSV syntax error, fails the whole read.
//
// Memory is proportional to the history: one integer per SKU and period
// spanned.
func Read(r io.Reader, name string, p Period) (*History, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fmt.Errorf("%s: empty file, want a header with columns sku, date and quantity: %w", name, ErrMissingColumn)
	}
	if err != nil {
		return nil, csvErr(name, err)
	}
	col := map[string]int{}
	for i, h := range header {
		if i == 0 {
			h = strings.TrimPrefix(h, "\ufeff")
		}
		h = strings.ToLower(strings.TrimSpace(h))
		if _, dup := col[h]; dup && (h == "sku" || h == "date" || h == "period" || h == "quantity") {
			return nil, fmt.Errorf("%s:1: column %q appears twice", name, h)
		}
		col[h] = i
	}
	skuCol, ok := col["sku"]
	if !ok {
		return nil, fmt.Errorf("%s:1: %w \"sku\"", name, ErrMissingColumn)
	}
	qCol, ok := col["quantity"]
	if !ok {
		return nil, fmt.Errorf("%s:1: %w \"quantity\"", name, ErrMissingColumn)
	}
	tCol, ok := col["date"]
	tName := "date"
	if !ok {
		if tCol, ok = col["period"]; !ok {
			return nil, fmt.Errorf("%s:1: %w \"date\" (or an integer \"period\")", name, ErrMissingColumn)
		}
		tName, p = "period", Index
	}
	if p < Day || p > Index {
		return nil, fmt.Errorf("%s: %v: want day, week or month", name, p)
	}

	h := &History{File: name, Period: p}
	accs := map[string]*accum{}
	var order []*accum
	var last *accum // rows usually come grouped by SKU
	haveLast := false
	lo, hi := 0, 0 // the periods spanned so far
	need := max(skuCol, qCol, tCol)
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(name, err)
		}
		h.Rows++
		line, _ := cr.FieldPos(0)
		field := func(i int) string {
			if i < len(rec) {
				return strings.TrimSpace(rec[i])
			}
			return ""
		}
		sku := field(skuCol)
		if sku == "" {
			h.Errors = append(h.Errors, &RowError{name, line, "sku", "", "want a non-empty SKU"})
			continue
		}
		a := last
		if a == nil || a.sku.SKU != sku {
			a = accs[sku]
			if a == nil {
				a = &accum{sku: &SKU{SKU: strings.Clone(sku)}}
				accs[a.sku.SKU] = a
				order = append(order, a)
			}
			last = a
		}
		bad := func(f, v, want string) {
			a.sku.Errors = append(a.sku.Errors, &RowError{name, line, f, strings.Clone(v), want})
		}
		if len(rec) <= need {
			// A short row: name the first missing field.
			tWant := "want a date YYYY-MM-DD"
			if tName == "period" {
				tWant = "want an integer period number"
			}
			for _, c := range []struct {
				i    int
				f, w string
			}{{tCol, tName, tWant}, {qCol, "quantity", "want a whole number >= 0"}} {
				if c.i >= len(rec) {
					bad(c.f, "", c.w)
					break
				}
			}
			continue
		}
		var per int
		ts := field(tCol)
		if tName == "date" {
			y, m, d, ok := parseDate(ts)
			if !ok {
				bad("date", ts, "want a date YYYY-MM-DD")
				continue
			}
			per = periodOf(p, y, m, d)
		} else {
			n, err := strconv.Atoi(ts)
			if err != nil || n < -1<<40 || n > 1<<40 {
				bad("period", ts, "want an integer period number")
				continue
			}
			per = n
		}
		qs := field(qCol)
		q, ok := parseQuantity(qs)
		if !ok {
			bad("quantity", qs, "want a whole number >= 0")
			continue
		}
		if haveLast && (max(hi, per)-min(lo, per) >= MaxSpan) {
			bad(tName, ts, fmt.Sprintf("want a %s within %d %ss of the other rows", tName, MaxSpan, p))
			continue
		}
		if !a.add(per, q) {
			bad("quantity", qs, "want a total that fits in an integer")
			continue
		}
		a.sku.Records++
		if !haveLast {
			lo, hi, haveLast = per, per, true
		}
		lo, hi = min(lo, per), max(hi, per)
		h.Last = hi
	}
	h.SKUs = make([]*SKU, len(order))
	for i, a := range order {
		s := a.sku
		if a.seen {
			s.Start = a.lo
			s.Demand = make([]int, h.Last-a.lo+1)
			copy(s.Demand, a.buf[a.lo-a.base:])
		}
		a.buf = nil
		h.SKUs[i] = s
	}
	return h, nil
}

// parseQuantity reads a whole number >= 0; a decimal point followed only by
// zeros ("12.0") is accepted, as spreadsheets write whole numbers so.
func parseQuantity(s string) (int, bool) {
	if i := strings.IndexByte(s, '.'); i >= 0 {
		if i == 0 || strings.Trim(s[i+1:], "0") != "" {
			return 0, false
		}
		s = s[:i]
	}
	if s == "" || s[0] == '-' {
		return 0, false
	}
	n, err := strconv.ParseUint(strings.TrimPrefix(s, "+"), 10, 63)
	if err != nil {
		return 0, false
	}
	return int(n), true
}

// csvErr names the file in an encoding/csv error.
func csvErr(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return fmt.Errorf("%s:%d:%d: %w", name, pe.Line, pe.Column, pe.Err)
	}
	return fmt.Errorf("%s: %w", name, err)
}
