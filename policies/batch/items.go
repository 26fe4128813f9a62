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
	"ergostock/inventory/tabular"
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

	// Location is the row's location when the file has a location column
	// (the planning key is then sku and location), else "".
	Location string
	// Warnings are notes of the reader about the row (a lead time rounded
	// up to whole periods), carried to the results.
	Warnings []string
}

// Key is the item's planning key: its SKU, or SKU NUL location when the
// items file has a location column. Planner.Fit and Planner.Pattern are
// called with it (HistoryFit keys a history read by location the same way).
func (it Item) Key() string { return PlanKey(it.SKU, it.Location) }

// PlanKey joins a SKU and a location into a planning key ("" location: the
// SKU itself).
func PlanKey(sku, location string) string {
	if location == "" {
		return sku
	}
	return sku + "\x00" + location
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
// lacks a required column (it is tabular.ErrMissingColumn).
var ErrMissingColumn = tabular.ErrMissingColumn

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
	colLocation       = "location"
	colLeadTimeDays   = "lead_time_days"
	colReviewPeriod   = "review_period"
	colLeadTimeModel  = "lead_time_model"
	requiredColumnsNo = 4
)

var itemColumns = []string{
	colSKU, colLeadTime, colHolding, colShortage, // required, in this order
	colOrderCost, colUnitCost, colUnmet, colPolicy, colMinFillRate, colDemand,
	colCurReorder, colCurOrderUpTo, colCurMultiple, colLocation, colLeadTimeDays, colReviewPeriod,
	colLeadTimeModel,
}

// ItemColumns lists the columns the items reader knows, in normal form (see
// tabular.Normalize); a column map (--items-columns) may name any of them.
func ItemColumns() []string { return append([]string(nil), itemColumns...) }

// ReadOptions change how ReadCatalogue reads an items file. The zero value
// finds the dialect and the decimal mark from the file.
type ReadOptions struct {
	// Table fixes the delimiter, the encoding or the sheet of a workbook.
	Table tabular.Options
	// Decimal is the decimal mark, '.' or ','; 0 finds it (a comma only
	// when the delimiter is not one).
	Decimal byte
	// Columns maps the reader's column names to the file's headers;
	// ColumnsFlag names the option that gave it, for messages.
	Columns     map[string]string
	ColumnsFlag string
	// PeriodDays is the length of a planning period in days (1, 7, or
	// 365.2425/12 for a month), for the lead_time_days column; 0 refuses
	// that column.
	PeriodDays float64
	// PeriodName names the planning period in warnings ("week").
	PeriodName string
	// ReviewPeriod is the review period of the rows whose review_period
	// cell is empty or absent (batch --review-period); 0 means every
	// period.
	ReviewPeriod int
	// LeadTimeModel is the lead-time model of the rows whose
	// lead_time_model cell is empty or absent (batch --lead-time-model);
	// "" means sequential.
	LeadTimeModel inventory.LeadTimeModel
}

// Catalogue is an items file as read.
type Catalogue struct {
	Items []Item
	// Dialect says how the file was read, for a summary line.
	Dialect string
	// ByLocation is true when the file has a location column: the
	// planning key is then (sku, location).
	ByLocation bool
	// Currency is the one currency the cost cells name ("EUR", "$"), ""
	// when none does.
	Currency string
}

// ReadItems reads the items file from r with the zero ReadOptions; see
// ReadCatalogue.
func ReadItems(r io.Reader, name string, keep func(index int) bool) ([]Item, error) {
	c, err := ReadCatalogue(r, name, keep, ReadOptions{})
	if err != nil {
		return nil, err
	}
	return c.Items, nil
}

// ReadCatalogue reads the items file from r, delimited text in any dialect
// package tabular reads or an .xlsx workbook; name is the file name used
// in errors. Only the items whose position keep accepts are returned (nil
// keeps all), in file order; every row is still read, so that a SKU seen
// before on a row outside the kept set is still a duplicate.
//
// Header names are compared ignoring case, surrounding spaces and the
// difference between space, '_' and '-' ("Order Cost" is order_cost), or
// mapped by opt.Columns; an unknown column close to a known name is
// refused, naming both. The returned error is for the file as a whole: a
// missing header or required column, a column named twice, a CSV syntax
// error, cost cells in more than one currency, or a read error; it names
// the file and a line. Errors of single rows are in Item.Err, as
// *LineError values that wrap an *inventory.FieldError where one column
// is at fault. A row with an empty SKU, or a SKU holding a line break, or
// a number of fields other than the header's, is still an item (with an
// error), so that positions are kept.
//
// Numbers follow package tabular's Numbers (the decimal mark given or
// found, grouping where unambiguous; underscores, hexadecimal, inf and nan
// refused). Costs may carry a currency sign or code (€12.50, 12,50 EUR,
// $3); min_fill_rate may be a percentage (98%, 98,5 %). Whole-number
// columns (lead_time, current_*) take such a number when it is whole
// ("2", "2.0", "2e0") and below 2^53 in magnitude. lead_time_days, when
// lead_time is absent or empty, is converted to planning periods and
// rounded up, with a warning, when not whole. unmet and policy ignore
// letter case.
func ReadCatalogue(r io.Reader, name string, keep func(index int) bool, opt ReadOptions) (*Catalogue, error) {
	topt := opt.Table
	topt.Reuse = true // no record is kept
	tr, err := tabular.Open(r, name, topt)
	if err != nil {
		if te, ok := err.(*tabular.Error); ok && strings.Contains(te.Err.Error(), "empty") {
			return nil, fmt.Errorf("%s:1: empty file, want a header line with columns %s: %w",
				name, strings.Join(itemColumns[:requiredColumnsNo], ", "), ErrMissingColumn)
		}
		return nil, atLine(err, 1)
	}
	name = tr.Name
	flag := opt.ColumnsFlag
	if flag == "" {
		flag = "--items-columns"
	}
	cols, err := tabular.Columns{Known: itemColumns,
		Required: []string{colSKU, colLeadTime + "|" + colLeadTimeDays, colHolding, colShortage},
		Map:      opt.Columns, MapFlag: flag}.Index(tr)
	if err != nil {
		return nil, atLine(err, tr.HeaderLine)
	}
	idx := make([]int, len(itemColumns))
	for i, c := range itemColumns {
		idx[i] = -1
		if j, ok := cols[c]; ok {
			idx[i] = j
		}
	}
	nums := &tabular.Numbers{Decimal: opt.Decimal, File: name}
	if nums.Decimal == 0 && tr.Dialect.Format == "csv" && tr.Dialect.Delimiter == ',' {
		nums.Decimal = '.'
	}
	cat := &Catalogue{ByLocation: idx[13] >= 0}
	cur := currency{}
	first := make(map[string]int) // sku (and location) -> line of its first row
	for index := 0; ; index++ {
		rec, line, err := tr.Read()
		if err == io.EOF {
			break
		}
		width := err != nil
		if err != nil && !errors.Is(err, tabular.ErrFieldCount) {
			return nil, atLine(err, line)
		}
		cell := func(c int) string {
			if j := idx[c]; j >= 0 && j < len(rec) {
				return strings.TrimSpace(rec[j])
			}
			return ""
		}
		sku := cell(0)
		key := sku
		if cat.ByLocation {
			key = sku + "\x00" + cell(13)
		}
		var dupOf int
		breaks := strings.ContainsAny(sku, "\r\n")
		if sku != "" && !breaks {
			if l, seen := first[key]; seen {
				dupOf = l
			} else {
				first[strings.Clone(key)] = line
			}
		}
		if !width {
			// The currencies of every row count, kept or not, whatever
			// else is wrong with it, so that every shard agrees.
			if err := cur.scan(name, line, nums, cell); err != nil {
				return nil, err
			}
			// The decimal mark, when found from the file, is found from
			// every row in file order, kept or not, for the same reason.
			markFrom(nums, cell, line)
		}
		if keep != nil && !keep(index) {
			continue
		}
		it := Item{Index: index, File: name, Line: line, SKU: strings.Clone(sku)}
		if cat.ByLocation {
			it.Location = strings.Clone(cell(13))
		}
		it.Row = rowCells(tr.Header, rec) // tr.Header is the reader's own copy
		switch {
		case sku == "":
			it.Err = &inventory.FieldError{Field: colSKU, Want: "a non-empty SKU"}
		case breaks:
			it.Err = &inventory.FieldError{Field: colSKU, Value: sku, Want: "a SKU without line breaks (CR or LF)"}
		case width:
			it.Err = fmt.Errorf("%d fields, want %d as in the header (sku %q)", len(rec), len(tr.Header), sku)
		case dupOf > 0:
			what := "a SKU given once"
			if cat.ByLocation {
				what = fmt.Sprintf("a SKU given once per location (location %q)", it.Location)
			}
			it.Err = &inventory.FieldError{Field: colSKU, Value: sku, Want: fmt.Sprintf("%s (it is first given on line %d)", what, dupOf)}
		default:
			it.Err = parseItem(&it, cell, nums, line, opt)
		}
		if it.Err != nil {
			it.Err = &LineError{File: name, Line: line, Err: it.Err}
		}
		cat.Items = append(cat.Items, it)
	}
	cat.Currency = cur.code
	cat.Dialect = tr.Dialect.String() + ", " + nums.Describe()
	if cur.code != "" {
		cat.Dialect += ", costs in " + cur.code
	}
	return cat, nil
}

// markFrom passes the number cells of a row through nums, so that a
// decimal mark still to be found is found from this row as from any other
// (the values are read again, and judged, by parseItem).
func markFrom(nums *tabular.Numbers, cell func(int) string, line int) {
	if _, found := nums.Mark(); found {
		return
	}
	for i, c := range itemColumns {
		v := cell(i)
		if v == "" {
			continue
		}
		switch c {
		case colHolding, colShortage, colOrderCost, colUnitCost:
			nums.Money(v, line)
		case colMinFillRate:
			nums.Fraction(v, line)
		case colLeadTime, colLeadTimeDays, colCurReorder, colCurOrderUpTo, colCurMultiple:
			if c == colLeadTime && isLaw(v) {
				continue // a law's numbers use the grammar's decimal point
			}
			nums.Parse(v, line)
		}
	}
}

// currency holds the one currency of a file's cost cells.
type currency struct {
	code, column string
	line         int
}

// costColumns are the indices in itemColumns of the money columns.
var costColumns = []int{2, 3, 4, 5}

// scan refuses a row whose cost cells name a currency other than the
// file's.
func (c *currency) scan(name string, line int, nums *tabular.Numbers, cell func(int) string) error {
	for _, i := range costColumns {
		s := cell(i)
		if s == "" {
			continue
		}
		probe := tabular.Numbers{Decimal: nums.Decimal}
		if probe.Decimal == 0 {
			probe.Decimal = '.'
		}
		_, code, err := probe.Money(s, line)
		if err != nil {
			probe.Decimal = ','
			if _, code, err = probe.Money(s, line); err != nil {
				continue // the row's own parse names the cell
			}
		}
		switch {
		case code == "":
		case c.code == "":
			c.code, c.column, c.line = code, itemColumns[i], line
		case code != c.code:
			return fmt.Errorf("%s:%d: %s %q: costs in %s, but line %d (%s) is in %s: want one currency per file", name, line, itemColumns[i], s, code, c.line, c.column, c.code)
		}
	}
	return nil
}

// csvErr names the file in an encoding/csv error and says what the CSV
// syntax wants; line is the line reached, for errors without a position
// (used by the readers that still read plain CSV, such as the decisions
// file).
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

// quoteList lists header names for a message: "sku", "lead_time".
func quoteList(h []string) string {
	q := make([]string, len(h))
	for i, s := range h {
		q[i] = strconv.Quote(strings.TrimSpace(strings.TrimPrefix(s, "\ufeff")))
	}
	return strings.Join(q, ", ")
}

// atLine gives a file-level *tabular.Error without a line the line n.
func atLine(err error, n int) error {
	var te *tabular.Error
	if errors.As(err, &te) && te.Line == 0 {
		c := *te
		c.Line = max(n, 1)
		return &c
	}
	return err
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
// itemColumns[i], "" when absent. Numbers are read by nums (line is the
// row's, for its decision of the decimal mark).
func parseItem(it *Item, cell func(int) string, nums *tabular.Numbers, line int, opt ReadOptions) error {
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
		v, _, err := nums.Money(s, line)
		if err != nil {
			return math.NaN()
		}
		return v
	}
	whole := func(s string) (n int, big bool, ok bool) {
		v, err := nums.Parse(s, line)
		if err != nil || v != math.Trunc(v) {
			return 0, false, false
		}
		if math.Abs(v) >= maxWhole {
			return 0, true, false
		}
		return int(v), false, true
	}
	sys.LeadTime = -1
	if raw[colLeadTime] == "" && raw[colLeadTimeDays] != "" {
		l, warn, err := leadTimeDays(raw[colLeadTimeDays], nums, line, opt)
		if err != nil {
			return err
		}
		sys.LeadTime = l
		if warn != "" {
			it.Warnings = append(it.Warnings, warn)
		}
	} else if isLaw(raw[colLeadTime]) {
		// A law in the demand grammar, read as --lead-time reads it; a
		// one-point law is the fixed lead time. Validate below checks that
		// the model can realise it.
		fixed, law, err := inventory.ParseLeadTime(raw[colLeadTime])
		if err != nil {
			return withCell(err, raw)
		}
		sys.LeadTime, sys.LeadTimeLaw = fixed, law
	} else if l, big, ok := whole(raw[colLeadTime]); ok {
		sys.LeadTime = l
	} else if big {
		return &inventory.FieldError{Field: colLeadTime, Value: raw[colLeadTime],
			Want: fmt.Sprintf("a whole number of periods >= 0 below %d (2^53)", maxWhole)}
	} else if raw[colLeadTime] != "" {
		return &inventory.FieldError{Field: colLeadTime, Value: raw[colLeadTime],
			Want: "a whole number of periods >= 0 (at most 1000000000), or a lead-time law such as pmf:2=0.2,3=0.5,5=0.3 or poisson:mean=4 (quoted where it holds commas)"}
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
		s, err := decimalCommaSpec(s, nums) // see demandcomma.go
		if err != nil {
			return err
		}
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
	} else {
		sys.ReviewPeriod = opt.ReviewPeriod
	}
	sys.LeadTimeModel = opt.LeadTimeModel
	if s := raw[colLeadTimeModel]; s != "" {
		m, err := inventory.ParseLeadTimeModel(s)
		if err != nil {
			return withCell(err, raw)
		}
		sys.LeadTimeModel = m
	}
	check := *sys
	if check.Demand == nil {
		check.Demand = placeholderDemand{}
	}
	if err := check.Validate(); err != nil {
		return itemsWording(withCell(err, raw))
	}

	if s := raw[colPolicy]; s != "" {
		k, ok := parseKind(s)
		if !ok {
			return &inventory.FieldError{Field: colPolicy, Value: s, Want: "base-stock, s-S or s-nQ"}
		}
		it.Kind = k
	}
	if s := raw[colMinFillRate]; s != "" {
		f, _, err := nums.Fraction(s, line)
		if err != nil || !(f >= 0 && f < 1) {
			return &inventory.FieldError{Field: colMinFillRate, Value: s, Want: "a fraction in [0, 1) or a percentage below 100%"}
		}
		it.MinFillRate = f
	}
	cur, err := parseCurrent(raw, sys.Mode, whole)
	if err != nil {
		return err
	}
	it.Current = cur
	return nil
}

// leadTimeDays converts a lead_time_days cell to whole planning periods,
// rounding up (with a warning) when the days are not a whole number of
// periods.
func leadTimeDays(s string, nums *tabular.Numbers, line int, opt ReadOptions) (int, string, error) {
	v, err := nums.Parse(s, line)
	if err != nil || !(v >= 0) || v > 1e6 {
		return 0, "", &inventory.FieldError{Field: colLeadTimeDays, Value: s, Want: "a number of days >= 0 (at most 1000000)"}
	}
	if opt.PeriodDays <= 0 {
		return 0, "", &inventory.FieldError{Field: colLeadTimeDays, Value: s, Want: "a lead time in periods (lead_time): the planning period's length in days is not known here"}
	}
	p := v / opt.PeriodDays
	n := math.Round(p)
	if math.Abs(p-n) <= 1e-9*math.Max(1, n) {
		return int(n), "", nil
	}
	up := math.Ceil(p)
	per := opt.PeriodName
	if per == "" {
		per = "period"
	}
	return int(up), fmt.Sprintf("lead_time_days %s is %.3g %ss: rounded up to %d (a whole number of periods)", s, p, per, int(up)), nil
}

// isLaw reports whether a lead_time cell holds a law in the demand
// grammar (family:parameters) rather than a whole number.
func isLaw(s string) bool { return strings.Contains(s, ":") }

// itemsWording speaks of the items file's columns where an engine message
// names the command-line option of the same setting.
func itemsWording(err error) error {
	var fe *inventory.FieldError
	if errors.As(err, &fe) && fe.Field == colLeadTime && strings.Contains(fe.Want, "--lead-time-model independent") {
		c := *fe
		c.Want = strings.ReplaceAll(c.Want, "--lead-time-model independent", "lead_time_model independent")
		return &c
	}
	return err
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
func parseCurrent(raw map[string]string, mode inventory.Mode, parseWhole func(string) (int, bool, bool)) (*policies.Policy, error) {
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
