package history

import (
	"encoding/csv"
	"errors"
	"fmt"
	"strconv"
	"strings"
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

// missingColumn is the error of a header without a required column: it
// names the header found and, when the header looks delimited by another
// character, says so and what the reader wants.
func missingColumn(name, column, header string, fields []string) error {
	if d, ok := ForeignDelimiter(fields); ok {
		return fmt.Errorf("%s:1: %w %q: the header %q looks %s-delimited; want comma-separated columns %s",
			name, ErrMissingColumn, column, strings.TrimPrefix(fields[0], "\ufeff"), d, header)
	}
	return fmt.Errorf("%s:1: %w %q (the header names %s; want columns %s)", name, ErrMissingColumn, column, quoteHeader(fields), header)
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

// The columns the history reader knows, as a message lists them.
const historyColumns = "sku, date (YYYY-MM-DD) or period (a whole number), and quantity"

// columns is where the reader finds its fields in a row. Issue-level
// extensions (other names, other date layouts) belong here: the row loop
// only asks for the cells and for timeOf.
type columns struct {
	sku, qty, time int
	timeName       string // "date" or "period"
	need           int    // the largest of the indices
	width          int    // the number of fields of the header
}

// readHeader finds the columns in the header fields.
func readHeader(name string, header []string) (columns, error) {
	col := map[string]int{}
	for i, h := range header {
		if i == 0 {
			h = strings.TrimPrefix(h, "\ufeff")
		}
		h = strings.ToLower(strings.TrimSpace(h))
		if j, dup := col[h]; dup && (h == "sku" || h == "date" || h == "period" || h == "quantity") {
			return columns{}, fmt.Errorf("%s:1: column %q appears twice (fields %d and %d): want each of sku, date or period, and quantity once", name, h, j+1, i+1)
		}
		col[h] = i
	}
	c := columns{timeName: "date", width: len(header)}
	var ok bool
	if c.sku, ok = col["sku"]; !ok {
		return c, missingColumn(name, "sku", historyColumns, header)
	}
	if c.qty, ok = col["quantity"]; !ok {
		return c, missingColumn(name, "quantity", historyColumns, header)
	}
	if c.time, ok = col["date"]; !ok {
		if c.time, ok = col["period"]; !ok {
			return c, missingColumn(name, "date", historyColumns, header)
		}
		c.timeName = "period"
	}
	c.need = max(c.sku, c.qty, c.time)
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
	if c.timeName == "period" {
		return strconv.Itoa(t)
	}
	return Day.Label(t)
}
