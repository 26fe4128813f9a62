package history

import (
	"fmt"
	"strconv"
	"strings"

	"ergostock/inventory/tabular"
)

// ForeignDelimiter reports whether a header line read as comma-separated
// CSV (header, its fields) is in fact delimited by something else: it holds
// a single field with a semicolon, a tab or a vertical bar in it. It names
// the most frequent of them ("';'", "tab", "'|'"). Both readers of the
// project (history and items) use it to say why a column is missing.
func ForeignDelimiter(header []string) (string, bool) {
	if len(header) != 1 {
		return "", false
	}
	best, n := "", 0
	for _, d := range []struct{ c, name string }{{";", "';'"}, {"\t", "tab"}, {"|", "'|'"}} {
		if k := strings.Count(header[0], d.c); k > n {
			best, n = d.name, k
		}
	}
	return best, n > 0
}

// quoteHeader lists the fields of a header for a message:
// "sku", "date", "qty".
func quoteHeader(header []string) string {
	q := make([]string, len(header))
	for i, s := range header {
		q[i] = strconv.Quote(strings.TrimSpace(strings.TrimPrefix(s, "\ufeff")))
	}
	return strings.Join(q, ", ")
}

// The columns the history reader knows, as a message lists them.
const historyColumns = "sku, date (YYYY-MM-DD) or period (a whole number), and quantity"

// columns is where the reader finds its fields in a row. Issue-level
// extensions (other names, other date layouts) belong here: the row loop
// only asks for the cells and for timeOf.
type columns struct {
	sku, qty, time int
	loc, ret       int    // -1 when absent
	timeName       string // "date" or "period"
	// year is the year column beside a period column that counts weeks
	// or months of the year (-1 when absent); yearly is then Week or
	// Month, and times are day numbers (the Monday of the ISO week, the
	// first of the month).
	year   int
	yearly Period
}

// HistoryColumns are the columns the history reader knows, in normal form
// (see tabular.Normalize); a column map may name any of them.
var HistoryColumns = []string{"sku", "date", "period", "quantity", "location", "year"}

// readHeader finds the columns in the header of tr.
func readHeader(tr *tabular.Reader, opt Options) (columns, error) {
	known := append([]string(nil), HistoryColumns...)
	ret := ""
	if opt.ReturnsColumn != "" {
		ret = tabular.Normalize(opt.ReturnsColumn)
		known = append(known, ret)
	}
	flag := opt.ColumnsFlag
	if flag == "" {
		flag = "--history-columns"
	}
	idx, err := tabular.Columns{Known: known, Required: []string{"sku", "quantity", "date|period"},
		Map: opt.Columns, MapFlag: flag}.Index(tr)
	if err != nil {
		return columns{}, atLine(err, tr.HeaderLine)
	}
	at := func(k string) int {
		if i, ok := idx[k]; ok {
			return i
		}
		return -1
	}
	c := columns{sku: at("sku"), qty: at("quantity"), loc: at("location"), ret: -1, timeName: "date", time: at("date"), year: -1}
	if c.time < 0 {
		c.time, c.timeName, c.year = at("period"), "period", at("year")
	}
	if ret != "" {
		if c.ret = at(ret); c.ret < 0 {
			return c, fmt.Errorf("%s:%d: --returns-column %s=%s: the header has no column %q: it has %s", tr.Name, tr.HeaderLine, opt.ReturnsColumn, opt.ReturnsValue, opt.ReturnsColumn, quoteHeader(tr.Header))
		}
	}
	return c, nil
}

// The sane range of dates: a date outside these years is a typo.
const (
	MinYear = 1900
	MaxYear = 2200
)

// MaxPeriodNumber bounds the magnitude of a period column's numbers.
const MaxPeriodNumber = 1 << 40

// timeWant is what the time cell should hold.
func (c columns) timeWant() string {
	if c.yearly == Month {
		return "want a month of the year, 1 to 12 (with the year column)"
	}
	if c.yearly == Week {
		return "want an ISO week of the year, 1 to 52 or 53 (with the year column)"
	}
	if c.timeName == "period" {
		return fmt.Sprintf("want a whole period number between -%d and %d", MaxPeriodNumber, MaxPeriodNumber)
	}
	return fmt.Sprintf("want a date YYYY-MM-DD in the years %d to %d", MinYear, MaxYear)
}

// timeOf reads a time cell: a day number (days from 1970-01-01) for a
// date, the number itself for a period column. It returns what is wanted
// when the cell is unusable.
func (c columns) timeOf(s string) (int, string) {
	if c.timeName == "period" {
		n, ok := parseWhole(s, MaxPeriodNumber+1)
		if !ok {
			return 0, c.timeWant()
		}
		return n, ""
	}
	y, m, d, ok := parseDate(s)
	if !ok {
		if len(s) == 10 && s[4] == '-' && s[7] == '-' {
			if y, m, _, ok := parseDate(s[:8] + "01"); ok {
				return 0, fmt.Sprintf("want a date YYYY-MM-DD (%04d-%02d has %d days)", y, m, daysIn(y, m))
			}
		}
		return 0, c.timeWant()
	}
	if y < MinYear || y > MaxYear {
		return 0, c.timeWant()
	}
	return daysFromCivil(y, m, d), ""
}

// timeLabel writes a time back as the row gave it.
func (c columns) timeLabel(t int) string {
	if c.yearly == Week || c.yearly == Month {
		return c.yearly.Label(periodOfDay(c.yearly, t))
	}
	if c.timeName == "period" {
		return strconv.Itoa(t)
	}
	return Day.Label(t)
}

// yearTime reads a year cell and a week or month of that year as a day
// number: the Monday of the ISO week (ISO 8601: week 1 holds 4 January),
// or the first of the month.
func (c columns) yearTime(ys, ps string) (int, string, string) {
	y, ok := parseWhole(ys, MaxYear+1)
	if !ok || y < MinYear {
		return 0, "year", fmt.Sprintf("want a year %d to %d", MinYear, MaxYear)
	}
	n, ok := parseWhole(ps, 54)
	if c.yearly == Month {
		if !ok || n < 1 || n > 12 {
			return 0, "period", c.timeWant()
		}
		return daysFromCivil(y, n, 1), "", ""
	}
	jan4 := daysFromCivil(y, 1, 4)
	monday := jan4 - ((jan4+3)%7+7)%7 + 7*(n-1)
	if !ok || n < 1 || periodOfDay(Week, monday+3) != periodOfDay(Week, monday) || Week.Label(periodOfDay(Week, monday))[:4] != strconv.Itoa(y) {
		return 0, "period", c.timeWant()
	}
	return monday, "", ""
}
