package main

import (
	"fmt"
	"strings"

	"github.com/urfave/cli/v2"

	"ergostock/inventory/history"
	"ergostock/inventory/tabular"
	"ergostock/policies/batch"
)

// The flags that say how the input tables are read, shared by fit, batch
// and report (one set, one meaning). Everything left at its default is
// found from the files themselves; the summary line says what was found.

// readFlags are the reader flags of a command that reads both inputs.
func readFlags() []cli.Flag {
	return append(append(tableFlags(), historyReadFlags()...), itemsReadFlags()...)
}

// tableFlags are the flags of both inputs: the dialect of the text.
func tableFlags() []cli.Flag {
	return []cli.Flag{
		&cli.StringFlag{Name: "delimiter", Usage: "field separator of the input files: auto (found from the header line), ',', ';', tab or '|'", Value: "auto"},
		&cli.StringFlag{Name: "decimal", Usage: "decimal mark of the input numbers: auto, . or , (auto: a comma only when the delimiter is not one and the numbers use it)", Value: "auto"},
		&cli.StringFlag{Name: "encoding", Usage: "text encoding of the input files, e.g. utf-8, utf-16le, windows-1252, iso-8859-15 (default: a byte-order mark, else UTF-8, else windows-1252)"},
	}
}

// historyReadFlags are the flags of the history reader.
func historyReadFlags() []cli.Flag {
	return []cli.Flag{
		&cli.StringFlag{Name: "date-format", Usage: "layout of the history's dates: auto, YYYY-MM-DD, DD.MM.YYYY, DD/MM/YYYY, MM/DD/YYYY, YYYYMMDD or serial (spreadsheet day numbers, 1900 system); a time after the date counts on its date", Value: "auto"},
		&cli.StringFlag{Name: "history-columns", Usage: "history columns under other names, e.g. \"sku=Item No,date=Posting Date,quantity=Qty,location=Site\""},
		&cli.StringFlag{Name: "returns", Usage: "negative quantities (returns, corrections): ignore (left out, counted in the warnings), net (subtracted within their period, floored at 0) or error (bad rows)", Value: "ignore"},
		&cli.StringFlag{Name: "returns-column", Usage: "mark returns by a column: COLUMN=VALUE, e.g. type=RETURN (rows whose COLUMN holds VALUE are returns whatever their sign)"},
		&cli.StringFlag{Name: "quantity-scale", Usage: "multiply every history quantity by `X` before it must be whole (10 plans in tenths of the file's unit); the results then count in units of 1/X"},
		&cli.StringFlag{Name: "history-sheet", Usage: "sheet of an .xlsx history to read (default: the first)"},
	}
}

// itemsReadFlags are the flags of the items reader.
func itemsReadFlags() []cli.Flag {
	return []cli.Flag{
		&cli.StringFlag{Name: "items-columns", Usage: "items columns under other names, e.g. \"sku=Item No,holding_cost=Carrying Cost\""},
		&cli.StringFlag{Name: "items-sheet", Usage: "sheet of an .xlsx items file to read (default: the first)"},
	}
}

// tableOptions reads the flags of tableFlags.
func tableOptions(c *cli.Context) (tabular.Options, byte, error) {
	var opt tabular.Options
	d, err := tabular.ParseDelimiter(c.String("delimiter"))
	if err != nil {
		return opt, 0, usageErr("--delimiter %q: %v", c.String("delimiter"), err)
	}
	opt.Delimiter = d
	dec, err := tabular.ParseDecimal(c.String("decimal"))
	if err != nil {
		return opt, 0, usageErr("--decimal %q: %v", c.String("decimal"), err)
	}
	if dec == ',' && d == ',' {
		return opt, 0, usageErr("--decimal , with --delimiter ',': a comma cannot be both; give --delimiter ';' (or the file's own)")
	}
	opt.Encoding = c.String("encoding")
	return opt, dec, nil
}

// historyOptions reads the flags of the history reader; period is the
// planning period (for messages only).
func historyOptions(c *cli.Context) (history.Options, error) {
	t, dec, err := tableOptions(c)
	if err != nil {
		return history.Options{}, err
	}
	opt := history.Options{Table: t, Decimal: dec, ColumnsFlag: "--history-columns"}
	opt.Table.Sheet = c.String("history-sheet")
	if opt.Dates, err = tabular.ParseDateLayout(c.String("date-format")); err != nil {
		return opt, usageErr("--date-format %q: %v", c.String("date-format"), err)
	}
	if opt.Columns, err = tabular.ParseColumnMap("--history-columns", c.String("history-columns"), history.HistoryColumns); err != nil {
		return opt, usageErr("%v", err)
	}
	if opt.Returns, err = history.ParseReturns(c.String("returns")); err != nil {
		return opt, usageErr("--returns %q: %v", c.String("returns"), err)
	}
	if opt.ReturnsColumn, opt.ReturnsValue, err = history.ParseReturnsColumn(c.String("returns-column")); err != nil {
		return opt, usageErr("--returns-column %v", err)
	}
	if s := c.String("quantity-scale"); s != "" {
		if opt.Scale, err = history.ParseScale(s); err != nil {
			return opt, usageErr("--quantity-scale %v", err)
		}
	}
	return opt, nil
}

// periodDays is the length of a planning period in days, for
// lead_time_days: a month is the mean Gregorian month, 365.2425/12 days.
func periodDays(p history.Period) float64 {
	switch p {
	case history.Day:
		return 1
	case history.Week:
		return 7
	case history.Month:
		return 365.2425 / 12
	}
	return 0
}

// itemsOptions reads the flags of the items reader.
func itemsOptions(c *cli.Context, p history.Period) (batch.ReadOptions, error) {
	t, dec, err := tableOptions(c)
	if err != nil {
		return batch.ReadOptions{}, err
	}
	opt := batch.ReadOptions{Table: t, Decimal: dec, ColumnsFlag: "--items-columns", PeriodDays: periodDays(p), PeriodName: p.String()}
	opt.Table.Sheet = c.String("items-sheet")
	if opt.Columns, err = tabular.ParseColumnMap("--items-columns", c.String("items-columns"), batch.ItemColumns()); err != nil {
		return opt, usageErr("%v", err)
	}
	return opt, nil
}

// historyNotes says, for a summary line, how a history was read and what
// was assumed: "read as ','-delimited, UTF-8, decimal point, dates
// YYYY-MM-DD (found)" and the unit and returns when they apply.
func historyNotes(h *history.History, opt history.Options) string {
	parts := []string{h.Dialect}
	if u := history.UnitNote(h.Scale); u != "" {
		parts = append(parts, u)
	}
	rows, units := 0, 0
	for _, k := range h.SKUs {
		rows += k.Returns
		units += k.ReturnUnits
	}
	if rows > 0 {
		parts = append(parts, fmt.Sprintf("returns %s: %d rows, %d units", opt.Returns, rows, units))
	}
	if h.Location {
		parts = append(parts, "by location")
	}
	parts = append(parts, h.Notes...)
	return strings.Join(parts, ", ")
}

// readingFlags are the reader flags whose values can change what is read
// from the inputs; a run that sets any records their digest (Meta.Reading).
var readingFlags = []string{"decimal", "encoding", "date-format", "history-columns", "items-columns",
	"returns", "returns-column", "quantity-scale", "history-sheet", "items-sheet"}

// readingDigest returns the digest of the reader flags set away from their
// defaults, in a fixed order, or "" when none is.
func readingDigest(c *cli.Context) string {
	var b strings.Builder
	for _, f := range readingFlags {
		if c.IsSet(f) {
			fmt.Fprintf(&b, "%s=%q\n", f, c.String(f))
		}
	}
	if b.Len() == 0 {
		return ""
	}
	h := batch.NewDigest()
	h.Write([]byte(b.String()))
	return batch.DigestSum(h)
}

// unitOf writes the unit of a quantity scale for the header record: "0.1"
// for 10; "" for none.
func unitOf(scale float64) string {
	if scale == 0 || scale == 1 {
		return ""
	}
	return strings.TrimPrefix(history.UnitNote(scale), "quantities in units of ")
}

// warnReading warns on stderr when the reader flags of c are not those the
// results at path were planned with (their header record's reading=): the
// inputs may then be read otherwise than the batch read them.
func warnReading(c *cli.Context, m *batch.Meta, path string) {
	if m == nil {
		return
	}
	if got := readingDigest(c); got != m.Reading {
		want := "none"
		if m.Reading != "" {
			want = "reading=" + m.Reading
		}
		fmt.Fprintf(c.App.ErrWriter, "ergostock: warning: the reader flags given are not those %s was planned with (%s on its line 1): give the batch's reader flags, or the inputs may be read otherwise\n", path, want)
	}
}
