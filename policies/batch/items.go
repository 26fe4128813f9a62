package batch

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/policies"
)

// Item is one row of the items file.
type Item struct {
	Index int    // 0-based position among the data rows of the file
	File  string // the items file's name, for errors
	Line  int    // line of the row in the file
	SKU   string

	// System holds the item's lead time, costs and mode; its Demand is set
	// only when the row gives a demand column, and is otherwise fitted.
	System inventory.System
	// Kind is the policy type to search; "" means the default (s-S when
	// the order cost is positive, else base-stock).
	Kind        policies.Kind
	MinFillRate float64          // 0 means no floor
	Current     *policies.Policy // the policy in use, nil when none is given
	Err         error            // why the row cannot be planned, or nil
	Row         RowCells         // the row as read, for columns carried to the results (see Carry)
	Carried     []string         // the cells Carry chose, in its order
}

// LineError is an error of one row of an input file, printed in the style
// of encoding/csv's ParseError: "items.csv:12: holding_cost "-3": want a
// finite cost >= 0".
type LineError struct {
	File string
	Line int
	Err  error
}

func (e *LineError) Error() string {
	var fe *inventory.FieldError
	if errors.As(e.Err, &fe) && fe == e.Err {
		msg := fmt.Sprintf("%s:%d: %s %q: want %s", e.File, e.Line, fe.Field, fe.Value, fe.Want)
		if fe.Err != nil {
			msg += ": " + fe.Err.Error()
		}
		return msg
	}
	return fmt.Sprintf("%s:%d: %v", e.File, e.Line, e.Err)
}
func (e *LineError) Unwrap() error { return e.Err }

// ErrMissingColumn is wrapped by the error ReadItems returns when the header
// lacks a required column.
var ErrMissingColumn = errors.New("missing column")

// The columns of the items file.
const (
	colSKU            = "sku"
	colLeadTime       = "lead_time"
	colHolding        = "holding_cost"
	colShortage       = "shortage_cost"
	colOrderCost      = "order_cost"
	colUnitCost       = "unit_cost"
	colUnmet          = "unmet"
	colPolicy         = "policy"
	colMinFillRate    = "min_fill_rate"
	colDemand         = "demand"
	colCurReorder     = "current_reorder_point"
	colCurOrderUpTo   = "current_order_up_to"
	colCurMultiple    = "current_order_multiple"
	colReviewPeriod   = "review_period"
	requiredColumnsNo = 4
)

var itemColumns = []string{
	colSKU, colLeadTime, colHolding, colShortage, // required, in this order
	colOrderCost, colUnitCost, colUnmet, colPolicy, colMinFillRate, colDemand,
	colCurReorder, colCurOrderUpTo, colCurMultiple, colReviewPeriod,
}

// ReadItems reads the items file from r; name is the file name used in
// errors. Only the items whose position keep accepts are returned (nil
// keeps all), in file order; every row is still read, so that a SKU seen
// before on a row outside the kept set is still a duplicate.
//
// The returned error is for the file as a whole: a missing header or
// required column, a column named twice, a CSV syntax error or a read
// error; it names the file and a line. Errors of single rows are in
// Item.Err, as *LineError values that wrap an *inventory.FieldError where
// one column is at fault. A row with an empty SKU, or a SKU holding a line
// break, is still an item (with an error), so that positions are kept.
//
// Numbers follow one rule (parseNumber): a plain decimal with an optional
// sign, fraction and exponent; underscores, hexadecimal, inf and nan are
// refused. Whole-number columns (lead_time, review_period, current_*) take such a number
// when it is whole ("2", "2.0", "2e0") and below 2^53 in magnitude. unmet
// and policy ignore letter case.
func ReadItems(r io.Reader, name string, keep func(index int) bool) ([]Item, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fmt.Errorf("%s:1: empty file, want a header line with columns %s: %w",
			name, strings.Join(itemColumns[:requiredColumnsNo], ", "), ErrMissingColumn)
	}
	if err != nil {
		return nil, csvErr(name, 1, err)
	}
	idx, err := itemHeader(name, header)
	if err != nil {
		return nil, err
	}
	header = append([]string(nil), header...) // kept by every item's Row; the reader reuses its records

	var items []Item
	first := make(map[string]int) // sku -> line of its first row
	line := 1
	for index := 0; ; index++ {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(name, line+1, err)
		}
		line, _ = cr.FieldPos(0)
		cell := func(c int) string {
			if j := idx[c]; j >= 0 && j < len(rec) {
				return strings.TrimSpace(rec[j])
			}
			return ""
		}
		sku := cell(0)
		var dupOf int
		breaks := strings.ContainsAny(sku, "\r\n")
		if sku != "" && !breaks {
			if l, seen := first[sku]; seen {
				dupOf = l
			} else {
				first[strings.Clone(sku)] = line
			}
		}
		if keep != nil && !keep(index) {
			continue
		}
		it := Item{Index: index, File: name, Line: line, SKU: strings.Clone(sku)}
		it.Row = rowCells(header, rec)
		switch {
		case sku == "":
			it.Err = &inventory.FieldError{Field: colSKU, Want: "a non-empty SKU"}
		case breaks:
			it.Err = &inventory.FieldError{Field: colSKU, Value: sku, Want: "a SKU without line breaks (CR or LF)"}
		case len(rec) != len(header):
			it.Err = fmt.Errorf("%d fields, want %d as in the header (sku %q)", len(rec), len(header), sku)
		case dupOf > 0:
			it.Err = &inventory.FieldError{Field: colSKU, Value: sku, Want: fmt.Sprintf("a SKU given once (it is first given on line %d)", dupOf)}
		default:
			it.Err = parseItem(&it, cell)
		}
		if it.Err != nil {
			it.Err = &LineError{File: name, Line: line, Err: it.Err}
		}
		items = append(items, it)
	}
	return items, nil
}

// itemHeader finds the columns of the items file in the header: idx[i]
// is the field of itemColumns[i], -1 when absent.
func itemHeader(name string, header []string) ([]int, error) {
	col := make(map[string]int, len(itemColumns))
	for i, h := range header {
		if i == 0 {
			h = strings.TrimPrefix(h, "\ufeff")
		}
		h = strings.ToLower(strings.TrimSpace(h))
		if j, dup := col[h]; dup && isItemColumn(h) {
			return nil, fmt.Errorf("%s:1: column %q appears twice (fields %d and %d), want each column once", name, h, j+1, i+1)
		}
		col[h] = i
	}
	for _, c := range itemColumns[:requiredColumnsNo] {
		if _, ok := col[c]; !ok {
			want := strings.Join(itemColumns[:requiredColumnsNo], ", ")
			if d, ok := history.ForeignDelimiter(header); ok {
				return nil, fmt.Errorf("%s:1: %w %q: the header %q looks %s-delimited; want comma-separated columns %s (and optional ones)",
					name, ErrMissingColumn, c, strings.TrimPrefix(header[0], "\ufeff"), d, want)
			}
			return nil, fmt.Errorf("%s:1: %w %q (the header names %s; want columns %s)", name, ErrMissingColumn, c, quoteList(header), want)
		}
	}
	idx := make([]int, len(itemColumns))
	for i, c := range itemColumns {
		if j, ok := col[c]; ok {
			idx[i] = j
		} else {
			idx[i] = -1
		}
	}
	return idx, nil
}

func isItemColumn(h string) bool {
	for _, c := range itemColumns {
		if c == h {
			return true
		}
	}
	return false
}

func quoteList(h []string) string {
	q := make([]string, len(h))
	for i, s := range h {
		q[i] = strconv.Quote(strings.TrimSpace(strings.TrimPrefix(s, "\ufeff")))
	}
	return strings.Join(q, ", ")
}

// csvErr names the file in an encoding/csv error and says what the CSV
// syntax wants; line is the line reached, for errors without a position.
func csvErr(name string, line int, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		want := ""
		switch {
		case errors.Is(pe.Err, csv.ErrQuote):
			want = `; want a quoted field closed by " and each " inside it doubled`
		case errors.Is(pe.Err, csv.ErrBareQuote):
			want = `; want a field holding " enclosed in quotes, with the " doubled`
		}
		return fmt.Errorf("%s:%d:%d: %w%s", name, pe.Line, pe.Column, pe.Err, want)
	}
	return fmt.Errorf("%s:%d: %w", name, line, err)
}

// maxWhole is 2^53: whole-number cells must be below it in magnitude, so
// that they are exact in a float64 and fit an int everywhere.
const maxWhole = 1 << 53

var errNumber = errors.New("want a plain decimal number")

// parseNumber reads a number in the one form the project's files accept: a
// plain decimal with an optional sign, digits with an optional fraction
// (at least one digit in all) and an optional exponent, such as 12, -3,
// 0.25, .5, 1e6 or 2.5E-3. Underscores, hexadecimal, "inf", "nan",
// spaces and overflow to infinity are refused.
//
// It stands in for inventory.ParseNumber, the shared form of this rule,
// until that lands.
func parseNumber(s string) (float64, error) {
	i, n := 0, len(s)
	if i < n && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
		digits++
	}
	if i < n && s[i] == '.' {
		for i++; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
			digits++
		}
	}
	if digits == 0 {
		return 0, errNumber
	}
	if i < n && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < n && (s[i] == '+' || s[i] == '-') {
			i++
		}
		exp := 0
		for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
			exp++
		}
		if exp == 0 {
			return 0, errNumber
		}
	}
	if i != n {
		return 0, errNumber
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, errNumber
	}
	return v, nil
}

// parseWhole reads a whole number by the rule of parseNumber; big is true
// when the cell is a whole number too large in magnitude (>= 2^53).
func parseWhole(s string) (n int, big bool, ok bool) {
	v, err := parseNumber(s)
	if err != nil || v != math.Trunc(v) {
		return 0, false, false
	}
	if math.Abs(v) >= maxWhole {
		return 0, true, false
	}
	return int(v), false, true
}

// parseItem fills it from the row's cells; cell(i) is the trimmed cell of
// itemColumns[i], "" when absent.
func parseItem(it *Item, cell func(int) string) error {
	raw := make(map[string]string, len(itemColumns))
	for i, c := range itemColumns {
		raw[c] = cell(i)
	}
	sys := &it.System
	// Numbers that do not parse become values that System.Validate refuses
	// (NaN, -1), so that its messages are the one source of what is wanted;
	// the error then shows the cell as written.
	num := func(c string, optional bool) float64 {
		s := raw[c]
		if s == "" && optional {
			return 0
		}
		v, err := parseNumber(s)
		if err != nil {
			return math.NaN()
		}
		return v
	}
	sys.LeadTime = -1
	if l, big, ok := parseWhole(raw[colLeadTime]); ok {
		sys.LeadTime = l
	} else if big {
		return &inventory.FieldError{Field: colLeadTime, Value: raw[colLeadTime],
			Want: fmt.Sprintf("a whole number of periods >= 0 below %d (2^53)", maxWhole)}
	}
	sys.Holding = num(colHolding, false)
	sys.Shortage = num(colShortage, false)
	sys.OrderCost = num(colOrderCost, true)
	sys.UnitCost = num(colUnitCost, true)
	sys.Mode = inventory.Backorder
	if s := raw[colUnmet]; s != "" {
		m, err := inventory.ParseMode(strings.ToLower(s))
		if err != nil {
			return withCell(err, raw)
		}
		sys.Mode = m
	}
	if s := raw[colDemand]; s != "" {
		d, err := inventory.Parse(s)
		if err != nil {
			return withCell(err, raw)
		}
		sys.Demand = d
	}
	if s := raw[colReviewPeriod]; s != "" {
		// Reviews every R periods (empty: every period); Validate checks R.
		r, _, ok := parseWhole(s)
		if !ok || r < 1 {
			return &inventory.FieldError{Field: colReviewPeriod, Value: s, Want: "a whole number of periods >= 1 between reviews"}
		}
		sys.ReviewPeriod = r
	}
	check := *sys
	if check.Demand == nil {
		check.Demand = placeholderDemand{}
	}
	if err := check.Validate(); err != nil {
		return withCell(err, raw)
	}

	if s := raw[colPolicy]; s != "" {
		k, ok := parseKind(s)
		if !ok {
			return &inventory.FieldError{Field: colPolicy, Value: s, Want: "base-stock, s-S or s-nQ"}
		}
		it.Kind = k
	}
	if s := raw[colMinFillRate]; s != "" {
		f, err := parseNumber(s)
		if err != nil || !(f >= 0 && f < 1) {
			return &inventory.FieldError{Field: colMinFillRate, Value: s, Want: "a fraction in [0, 1)"}
		}
		it.MinFillRate = f
	}
	cur, err := parseCurrent(raw, sys.Mode)
	if err != nil {
		return err
	}
	it.Current = cur
	return nil
}

// withCell replaces the Value of a *inventory.FieldError about a column of
// the row by the cell as written.
func withCell(err error, raw map[string]string) error {
	var fe *inventory.FieldError
	if errors.As(err, &fe) {
		if v, ok := raw[fe.Field]; ok {
			c := *fe
			c.Value = v
			return &c
		}
	}
	return err
}

// parseKind reads a policy type, ignoring letter case.
func parseKind(s string) (policies.Kind, bool) {
	for _, k := range []policies.Kind{policies.BaseStock, policies.SS, policies.SNQ} {
		if strings.EqualFold(s, string(k)) {
			return k, true
		}
	}
	return "", false
}

// parseCurrent reads the policy in use from the current_* cells:
// current_order_up_to alone is base-stock; with current_reorder_point it is
// s-S; current_reorder_point with current_order_multiple is s-nQ.
func parseCurrent(raw map[string]string, mode inventory.Mode) (*policies.Policy, error) {
	var v [3]int
	var has [3]bool
	for i, c := range []string{colCurReorder, colCurOrderUpTo, colCurMultiple} {
		s := raw[c]
		if s == "" {
			continue
		}
		n, big, ok := parseWhole(s)
		if !ok {
			want := "a whole number"
			if big {
				want = fmt.Sprintf("a whole number below %d (2^53) in magnitude", maxWhole)
			}
			return nil, &inventory.FieldError{Field: c, Value: s, Want: want}
		}
		v[i], has[i] = n, true
	}
	var p policies.Policy
	switch {
	case !has[0] && !has[1] && !has[2]:
		return nil, nil
	case has[1] && has[2]:
		return nil, fmt.Errorf("%s and %s: give one of them, not both", colCurOrderUpTo, colCurMultiple)
	case has[1] && !has[0]:
		p = policies.Policy{Kind: policies.BaseStock, OrderUpTo: v[1]}
	case has[1]:
		p = policies.Policy{Kind: policies.SS, ReorderPoint: v[0], OrderUpTo: v[1]}
	case has[2] && has[0]:
		p = policies.Policy{Kind: policies.SNQ, ReorderPoint: v[0], OrderMultiple: v[2]}
	case has[2]:
		return nil, fmt.Errorf("%s needs %s", colCurMultiple, colCurReorder)
	default:
		return nil, fmt.Errorf("%s needs %s (s-S) or %s (s-nQ)", colCurReorder, colCurOrderUpTo, colCurMultiple)
	}
	if err := p.Validate(mode); err != nil {
		return nil, fmt.Errorf("current policy %v: %w", p, err)
	}
	return &p, nil
}

// placeholderDemand stands in for a demand still to be fitted while the
// other fields of a system are validated.
type placeholderDemand struct{}

func (placeholderDemand) PMF(k int) float64 {
	if k == 1 {
		return 1
	}
	return 0
}
func (placeholderDemand) CDF(k int) float64 {
	if k >= 1 {
		return 1
	}
	return 0
}
func (placeholderDemand) Tail(k int) float64 {
	if k <= 1 {
		return 1
	}
	return 0
}
func (placeholderDemand) Mean() float64     { return 1 }
func (placeholderDemand) Variance() float64 { return 0 }
func (placeholderDemand) Bound(float64) int { return 1 }
func (placeholderDemand) String() string    { return "pmf:1=1" }
