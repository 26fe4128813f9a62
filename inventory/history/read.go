package history

import (
	"cmp"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"ergostock/inventory/tabular"
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
// lacks a required column (it is tabular.ErrMissingColumn).
var ErrMissingColumn = tabular.ErrMissingColumn

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
	// width lists the rows of Errors whose number of fields differs from
	// the header's (see FieldCountError).
	width []*RowError
	// LeftOut lists the usable rows left out of Demand because they lie
	// far from the bulk of the SKU's rows, or of the file's (see the
	// package documentation), in order of date.
	LeftOut []*Outlier
	// Err, when not nil, is why the SKU has no series although some of its
	// rows are usable: its rows have no clear bulk, every one of them was
	// left out, or its series would span more than MaxSpan periods.
	Err error

	// Location is the location of the series when the history is read
	// by location (Options.ByLocation), else "".
	Location string
	// Returns counts the rows read as returns and ReturnUnits their units
	// (in the history's scaled unit): left out under ReturnsIgnore, netted
	// under ReturnsNet.
	Returns, ReturnUnits int
	// ReturnsMode is how the returns were read.
	ReturnsMode Returns

	// unit says the unit of a scaled history, for the warnings.
	unit string

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

	// Dialect says how the file was read, for a summary line: the table's
	// dialect, the decimal mark and the date layout.
	Dialect string
	// Dates is the layout of the date column, and DatesFound whether it
	// was found from the dates rather than given.
	Dates      tabular.DateLayout
	DatesFound bool
	// Location is true when the series are keyed by sku and location.
	Location bool
	// Scale is the factor the quantities were multiplied by (1 when none).
	Scale float64
	// Notes are what the reader assumed or left out for the file as a
	// whole (one line each, naming the file).
	Notes []string
	// PartialRows counts the rows left out with a partial first or last
	// period (see the package documentation).
	PartialRows int
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
	key   string // the SKU, or SKU NUL location
	net   bool   // some record holds a return to net
	sku   *SKU
	recs  []rec
	total int // the sum of the quantities, at most maxExact
}

// Read reads a demand history from r with the zero Options: see ReadWith.
func Read(r io.Reader, name string, p Period) (*History, error) {
	return ReadWith(r, name, p, Options{})
}

// ReadWith reads a demand history from r, delimited text in any dialect
// that package tabular reads or an .xlsx workbook; name is the file name
// used in errors. The header names the columns, compared ignoring case,
// surrounding spaces and the difference between space, '_' and '-' (or
// mapped by opt.Columns): sku, date (in the layout opt.Dates, or the one
// layout that reads every date, in the years MinYear to MaxYear; a time
// after the date counts on its date) and quantity, or sku, period (a
// whole number) and quantity; location optionally; other columns are
// ignored, unless close to one of these names (then the read is refused,
// naming both). When both date and period are present, date is used.
// Dates are summed into periods of p; integer periods are taken as they
// are.
//
// Rows for the same SKU and period are summed. A row that cannot be used
// (an empty sku or one holding a line break, a number of fields other than
// the header's, an unreadable or out-of-range date or period, a quantity
// that is not a whole number below 2^53 once multiplied by opt.Scale, a
// quantity that would take the SKU's total to 2^53, a return under
// ReturnsError) does not stop the read: it is recorded as a *RowError
// against its SKU, or in History.Errors when the sku cell is unusable.
// Negative quantities are returns: left out and counted (ReturnsIgnore),
// or netted within their period (ReturnsNet). Rows far from the bulk of
// their SKU's rows are left out and listed in SKU.LeftOut (the rule is in
// the package documentation). Numbers follow package tabular's Numbers:
// the decimal mark given or found, grouping where unambiguous, no
// underscores, hexadecimal, inf or nan.
//
// A missing header or column, a CSV syntax error, a read error, dates in
// no one layout, a history already summed into periods other than p, or
// series that would hold more than MaxCells periods in all fail the whole
// read; such errors name the file and a line. Memory is proportional to
// the rows read plus the periods of the series, which are counted before
// they are allocated.
func ReadWith(r io.Reader, name string, p Period, opt Options) (*History, error) {
	topt := opt.Table
	topt.Reuse = true // no record is kept
	tr, err := tabular.Open(r, name, topt)
	if err != nil {
		if te, ok := err.(*tabular.Error); ok && strings.Contains(te.Err.Error(), "empty") {
			return nil, fmt.Errorf("%s:1: empty file, want a header line with columns %s: %w", name, historyColumns, ErrMissingColumn)
		}
		return nil, atLine(err, 1)
	}
	name = tr.Name
	cols, err := readHeader(tr, opt)
	if err != nil {
		return nil, err
	}
	if p < Day || p > Index {
		return nil, fmt.Errorf("%s:%d: period %v: want day, week or month", name, tr.HeaderLine, p)
	}
	asked := p // before a period column overrides it
	switch {
	case cols.year >= 0 && p == Day:
		return nil, fmt.Errorf("%s:%d: columns %s and %s count weeks or months of a year, which cannot be split into days: give --period week (or month)", name, tr.HeaderLine, tr.Header[cols.year], tr.Header[cols.time])
	case cols.year >= 0:
		cols.yearly = p
	case cols.timeName == "period":
		p = Index
	}
	restart := map[string][2]int{} // key -> last period number, its line
	labels := Period(-1)           // a period column of labels: Week or Month once seen; Index for numbers
	errs := map[int]*RowError{}    // row -> why it cannot be used
	widths := map[int]bool{}       // rows of errs whose field count differs from the header's
	qerrs := map[int]*RowError{}   // row -> why its quantity cannot (after the date)
	nums := tabular.Numbers{Decimal: opt.Decimal, File: name}
	if nums.Decimal == 0 && tr.Dialect.Format == "csv" && tr.Dialect.Delimiter == ',' {
		nums.Decimal = '.'
	}
	scale := opt.Scale
	if scale == 0 {
		scale = 1
	}

	h := &History{File: name, Period: p, Location: cols.loc >= 0 && opt.ByLocation, Scale: scale}
	accs := map[string]*acc{}
	var order []*acc
	var last *acc // rows usually come grouped by SKU
	var rows rowStore
	dates := map[string]int32{}
	var dateTexts []tabular.DateSample
	for {
		rec, line, err := tr.Read()
		if err == io.EOF {
			break
		}
		var width string
		if err != nil {
			if !errors.Is(err, tabular.ErrFieldCount) {
				return nil, atLine(err, line)
			}
			width = fmt.Sprintf("want %d fields as in the header (line %d), not %d", len(tr.Header), tr.HeaderLine, len(rec))
			if tr.Dialect.Format == "csv" && tr.Dialect.Delimiter == ',' && len(rec) > len(tr.Header) {
				width += " (a decimal comma or a thousands separator in an unquoted number? quote the field, or write the file with ';')"
			}
		}
		h.Rows++
		field := func(i int) string {
			if i >= 0 && i < len(rec) {
				return strings.TrimSpace(rec[i])
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
		key := sku
		loc := ""
		if h.Location {
			loc = field(cols.loc)
			key = sku + "\x00" + loc
		}
		a := last
		if a == nil || a.key != key {
			a = accs[key]
			if a == nil {
				a = &acc{key: strings.Clone(key), sku: &SKU{SKU: strings.Clone(sku), Location: strings.Clone(loc)}}
				accs[a.key] = a
				order = append(order, a)
			}
			last = a
		}
		rw := row{a: a, line: line}
		idx := rows.n
		if width != "" {
			widths[idx] = true
			if len(rec) < len(tr.Header) {
				short := fmt.Sprintf(" (the row has %d fields, the header %d)", len(rec), len(tr.Header))
				switch {
				case cols.time >= len(rec):
					errs[idx] = &RowError{name, line, cols.timeName, "", cols.timeWant() + short}
				default:
					errs[idx] = &RowError{name, line, "quantity", "", "want a whole number >= 0" + short}
				}
			} else {
				errs[idx] = &RowError{name, line, "row", strings.Join(rec, string(tr.Dialect.Delimiter)), width}
			}
			rows.add(rw)
			continue
		}
		ts := field(cols.time)
		if cols.timeName == "date" {
			id, ok := dates[ts]
			if !ok {
				id = int32(len(dateTexts))
				dates[strings.Clone(ts)] = id
				dateTexts = append(dateTexts, tabular.DateSample{Text: strings.Clone(ts), Line: line})
			}
			rw.v = int(id)
		} else if cols.year >= 0 {
			ys := field(cols.year)
			t, f, want := cols.yearTime(ys, ts)
			if want != "" {
				v := ts
				if f == "year" {
					v = ys
				}
				errs[idx] = &RowError{name, line, f, strings.Clone(v), want}
				rows.add(rw)
				continue
			}
			rw.v = t
		} else if lp, ys, ns, ok := periodLabel(ts); ok && labels != Index {
			// "2025-W03" or "2025-03": a week or a month by its label.
			if labels < 0 {
				if lp != asked {
					return nil, fmt.Errorf("%s:%d: column %s: period %q is a %s, but the history is planned by the %s: give --period %s", name, line, tr.Header[cols.time], ts, lp, asked, lp)
				}
				labels, cols.yearly, h.Period = lp, lp, lp
			}
			t, _, want := cols.yearTime(ys, ns)
			if lp != labels {
				want = fmt.Sprintf("want a period labelled like the file's others (a %s)", labels)
			} else if want != "" {
				want = "want a period such as 2025-W03 (an ISO week) or 2025-03 (a month) in the years 1900 to 2200"
			}
			if want != "" {
				errs[idx] = &RowError{name, line, cols.timeName, strings.Clone(ts), want}
				rows.add(rw)
				continue
			}
			rw.v = t
		} else {
			if labels == Week || labels == Month {
				errs[idx] = &RowError{name, line, cols.timeName, strings.Clone(ts), fmt.Sprintf("want a period labelled like the file's others (a %s, such as %s)", labels, labels.Label(periodOfDay(labels, 20000)))}
				rows.add(rw)
				continue
			}
			labels = Index
			t, want := cols.timeOf(ts)
			if want != "" {
				errs[idx] = &RowError{name, line, cols.timeName, strings.Clone(ts), want}
				rows.add(rw)
				continue
			}
			// A period column that restarts (52, then 1) counts weeks or
			// months of the year: summing it would add the years together.
			k := key + "\x00" + field(cols.loc)
			if prev, ok := restart[k]; ok && prev[0] >= 12 && t <= 2 && t < prev[0]-9 {
				return nil, fmt.Errorf("%s:%d: column %s: period %d follows period %d (line %d) for sku %q: the periods seem to restart each year, and summing them would add the years together; give the year in a column named year (with --period week or month), or number the periods without restarting",
					name, line, tr.Header[cols.time], t, prev[0], prev[1], sku)
			}
			restart[k] = [2]int{t, line}
			rw.v = t
		}
		qs := field(cols.qty)
		q, want := quantityWith(qs, line, &nums, scale)
		if want != "" {
			qerrs[idx] = &RowError{name, line, "quantity", strings.Clone(qs), want}
		}
		if cols.ret >= 0 && strings.EqualFold(field(cols.ret), opt.ReturnsValue) && q > 0 {
			q = -q
		}
		if q < 0 && opt.Returns == ReturnsError && want == "" {
			qerrs[idx] = &RowError{name, line, "quantity", strings.Clone(qs), "want a whole number >= 0 (a return: give --returns ignore or net to read returns)"}
		}
		rw.q = q
		rows.add(rw)
	}

	// The dates: one layout for the column, then each distinct date once.
	days := make([]int, len(dateTexts))
	dayWant := make([]string, len(dateTexts))
	if cols.timeName == "date" {
		layout := opt.Dates
		if layout == "" || layout == tabular.DateAuto {
			var shaped []tabular.DateSample
			for _, d := range dateTexts {
				if readsSome(d.Text) {
					shaped = append(shaped, d)
				}
			}
			layout, err = tabular.DetectDates(name, tr.Header[cols.time], shaped)
			if err != nil {
				return nil, atLine(err, tr.HeaderLine)
			}
			h.DatesFound = true
		}
		h.Dates = layout
		for i, d := range dateTexts {
			days[i], dayWant[i] = dateOf(layout, d.Text)
		}
		if err := h.checkAggregated(name, tr.Header[cols.time], dateTexts, days, dayWant); err != nil {
			return nil, err
		}
	}

	dated := cols.timeName == "date"
	for i := range rows.n {
		rw := rows.at(i)
		a := rw.a
		bad := func(e *RowError) { a.sku.Errors = append(a.sku.Errors, e) }
		if e := errs[i]; e != nil {
			bad(e)
			if widths[i] {
				a.sku.width = append(a.sku.width, e)
			}
			continue
		}
		t := rw.v
		if dated {
			if w := dayWant[rw.v]; w != "" {
				bad(&RowError{name, rw.line, "date", dateTexts[rw.v].Text, w})
				continue
			}
			t = days[rw.v]
		}
		if e := qerrs[i]; e != nil {
			bad(e)
			continue
		}
		q := rw.q
		if q < 0 {
			switch opt.Returns {
			case ReturnsIgnore:
				a.sku.Returns++
				a.sku.ReturnUnits -= q
				continue
			}
			a.sku.Returns++
			a.sku.ReturnUnits -= q
			a.net = true
		}
		if a.total+max(q, 0) >= maxExact {
			bad(&RowError{name, rw.line, "quantity", strconv.Itoa(q), fmt.Sprintf("want a quantity that keeps the SKU's total below %d (2^53); it is %d before this row", maxExact, a.total)})
			continue
		}
		a.total += max(q, 0)
		if n := len(a.recs); n > 0 && a.recs[n-1].t == t {
			a.recs[n-1].q += q
			a.recs[n-1].rows++
		} else {
			a.recs = append(a.recs, rec{t: t, q: q, line: rw.line, rows: 1})
		}
	}
	h.Dialect = tr.Dialect.String() + ", " + nums.Describe()
	if cols.timeName == "date" {
		how := "given"
		if h.DatesFound {
			how = "found"
		}
		h.Dialect += fmt.Sprintf(", dates %s (%s)", h.Dates, how)
	}
	for _, a := range order {
		a.sku.ReturnsMode = opt.Returns
		a.sku.unit = UnitNote(scale)
	}
	if err := h.build(order, cols); err != nil {
		return nil, err
	}
	return h, nil
}

// checkAggregated refuses a dated history that is already summed into
// periods other than h.Period: at least four distinct dates, all the first
// (or all the last day) of a month and four weeks or more apart (monthly
// totals), or all on one
// weekday and a week or more apart (weekly totals). Summing monthly totals
// into weeks would put each month's demand in one week of four.
func (h *History) checkAggregated(name, col string, texts []tabular.DateSample, days []int, want []string) error {
	if h.Period == Index {
		return nil
	}
	type day struct{ d, line int }
	var ds []day
	seen := map[int]bool{}
	for i, t := range texts {
		if want[i] == "" && !seen[days[i]] {
			seen[days[i]] = true
			ds = append(ds, day{days[i], t.Line})
		}
	}
	if len(ds) < 4 {
		return nil
	}
	slices.SortFunc(ds, func(a, b day) int { return cmp.Compare(a.d, b.d) })
	first, last, weekday, gap := true, true, true, ds[len(ds)-1].d-ds[0].d
	for i, x := range ds {
		if _, _, d := civilFromDays(x.d); d != 1 {
			first = false
		}
		if _, _, d := civilFromDays(x.d + 1); d != 1 {
			last = false
		}
		if (x.d-ds[0].d)%7 != 0 {
			weekday = false
		}
		if i > 0 {
			gap = min(gap, x.d-ds[i-1].d)
		}
	}
	span := fmt.Sprintf("%d distinct dates from %s (line %d) to %s", len(ds), Day.Label(ds[0].d), ds[0].line, Day.Label(ds[len(ds)-1].d))
	switch {
	case (first || last) && gap >= 28 && h.Period != Month:
		which := "first"
		if !first {
			which = "last day"
		}
		return fmt.Errorf("%s:%d: column %s: every date is the %s of a month (%s): the history looks summed into months already, and summing it into %ss would put each month in one %s; give --period month",
			name, ds[0].line, col, which, span, h.Period, h.Period)
	case weekday && gap >= 7 && !first && !last && h.Period != Week:
		what := "would spread nothing over the days between"
		if h.Period == Month {
			what = "cannot be split exactly at the month ends"
		}
		return fmt.Errorf("%s:%d: column %s: every date falls on a %s, a week or more apart (%s): the history looks summed into weeks already, and weekly totals %s; give --period week",
			name, ds[0].line, col, weekdayName(ds[0].d), span, what)
	}
	return nil
}

// weekdayName names the weekday of day number d (1970-01-01 was a Thursday).
func weekdayName(d int) string {
	return [...]string{"Thursday", "Friday", "Saturday", "Sunday", "Monday", "Tuesday", "Wednesday"}[((d%7)+7)%7]
}

// rowStore keeps the rows in chunks of rowChunk, so that storing a million
// rows costs their 32 MB and no copies of a growing slice.
type rowStore struct {
	chunks [][]row
	n      int
}

const rowChunk = 1 << 13

func (s *rowStore) add(r row) {
	if s.n%rowChunk == 0 {
		s.chunks = append(s.chunks, make([]row, 0, rowChunk))
	}
	c := &s.chunks[len(s.chunks)-1]
	*c = append(*c, r)
	s.n++
}

func (s *rowStore) at(i int) row { return s.chunks[i/rowChunk][i%rowChunk] }

// row is one data row between the two passes of ReadWith (32 bytes; the
// rare errors are kept beside, by row).
type row struct {
	a    *acc
	line int
	v    int // the index of the date text, or the time of a period column
	q    int // signed: a return is negative
}

var (
	reWeekLabel  = regexp.MustCompile(`^([0-9]{4})-?[Ww]([0-9]{1,2})$`)
	reMonthLabel = regexp.MustCompile(`^([0-9]{4})-([0-9]{1,2})$`)
)

// periodLabel reads a period cell written as a label, "2025-W03" (an ISO
// week; "2025W03" too) or "2025-03" (a month), into its period and the year
// and number.
func periodLabel(s string) (Period, string, string, bool) {
	if m := reWeekLabel.FindStringSubmatch(s); m != nil {
		return Week, m[1], m[2], true
	}
	if m := reMonthLabel.FindStringSubmatch(s); m != nil {
		return Month, m[1], m[2], true
	}
	return 0, "", "", false
}

// readsSome reports whether a date text reads in some layout: only such
// dates take part in the choice of the layout; the others are bad rows.
func readsSome(s string) bool {
	for _, l := range tabular.DateLayouts {
		if t, err := l.Parse(s); err == nil && (l != tabular.DateSerial || t.Year() < 2200) {
			return true
		}
	}
	return false
}

// dateOf reads a date in layout l as a day number, or says what is wanted.
func dateOf(l tabular.DateLayout, s string) (int, string) {
	if l == tabular.DateISO && len(s) == 10 {
		return columns{timeName: "date"}.timeOf(s)
	}
	want := fmt.Sprintf("want a date %s in the years %d to %d", l, MinYear, MaxYear)
	t, err := l.Parse(s)
	if err != nil {
		return 0, want
	}
	y, m, d := t.Date()
	if y < MinYear || y > MaxYear {
		return 0, want
	}
	return daysFromCivil(y, int(m), d), ""
}

// atLine gives a file-level *tabular.Error without a line the line n, so
// that every message names one.
func atLine(err error, n int) error {
	var te *tabular.Error
	if errors.As(err, &te) && te.Line == 0 {
		c := *te
		c.Line = max(n, 1)
		return &c
	}
	return err
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

// quantityWith reads a signed quantity under the table's decimal mark and
// multiplies it by scale; the result must be whole and below 2^53 in
// magnitude. It returns what is wanted when the cell is unusable.
func quantityWith(s string, line int, nums *tabular.Numbers, scale float64) (int, string) {
	if scale == 1 {
		if n := len(s); n > 0 && n <= 15 {
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
	}
	const want = "want a whole number >= 0"
	v, err := nums.Parse(s, line)
	if err != nil {
		msg := strings.TrimPrefix(err.Error(), strconv.Quote(s)+": ")
		if s == "" || strings.HasPrefix(msg, "want a number") {
			return 0, want
		}
		return 0, want + ": " + msg
	}
	x := v * scale
	r := math.Round(x)
	if math.Abs(r) >= maxExact {
		return 0, fmt.Sprintf("%s below %d (2^53)", want, maxExact)
	}
	if math.Abs(x-r) > 1e-9*math.Max(1, math.Abs(r)) {
		hint := ""
		for k := 10.0; k <= 1e6; k *= 10 {
			y := x * k
			if math.Abs(y-math.Round(y)) <= 1e-9*math.Max(1, math.Abs(y)) {
				hint = fmt.Sprintf(" (or give --quantity-scale %g to plan in units of %g)", scale*k, 1/(scale*k))
				break
			}
		}
		if scale != 1 {
			return 0, fmt.Sprintf("%s once multiplied by the quantity scale %g%s", want, scale, hint)
		}
		return 0, want + hint
	}
	return int(r), ""
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

// FieldCountError returns, when some row of the SKU has a number of fields
// other than the header's, an error naming the first such row's file and
// line and counting the others; nil when there is none.
//
// Such a row fails its SKU, in fit and batch alike: its cells do not line
// up with the header (an unquoted decimal comma or thousands separator in
// a comma-delimited file, a stray delimiter in a name), so the rows around
// it may be misread in the same way and no figure of the SKU can be
// trusted. Rows with other faults (a bad date, a fractional quantity) are
// reported by each command as before: fit leaves them out with a
// warning, batch fails the SKU.
func (k *SKU) FieldCountError() error {
	if len(k.width) == 0 {
		return nil
	}
	more := ""
	if n := len(k.width); n > 1 {
		more = fmt.Sprintf(" (and %d more rows of this sku with another number of fields)", n-1)
	}
	return fmt.Errorf("%w%s: a row whose fields do not line up with the header fails its sku", k.width[0], more)
}
