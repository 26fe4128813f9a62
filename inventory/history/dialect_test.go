package history

import (
	"fmt"
	"reflect"
	"strings"
	"testing"
	"unicode/utf16"

	"ergostock/inventory/tabular"
)

func readOpt(t *testing.T, data string, p Period, opt Options) *History {
	t.Helper()
	h, err := ReadWith(strings.NewReader(data), "h.csv", p, opt)
	if err != nil {
		t.Fatal(err)
	}
	return h
}

// utf16LE encodes s as UTF-16 little-endian with a byte-order mark, as a
// spreadsheet's "Unicode text" export does.
func utf16LE(s string) string {
	var b strings.Builder
	b.WriteString("\xff\xfe")
	for _, u := range utf16.Encode([]rune(s)) {
		b.WriteByte(byte(u))
		b.WriteByte(byte(u >> 8))
	}
	return b.String()
}

// The same history in the dialects a planner's programs write reads as
// the same series (issue 11, items 1-3 and 9).
func TestReadDialects(t *testing.T) {
	const plain = "sku,date,quantity\nA,2026-01-05,3\nA,2026-01-13,4\nB,2026-01-21,1\nA,2026-01-30,2\n"
	want := series(mustRead(t, plain, Week))
	for _, c := range []struct {
		name, data string
		opt        Options
		dialect    string
	}{
		{"semicolon BOM CRLF dotted dates", "\ufeffSKU;Date;Quantity\r\nA;05.01.2026;3\r\nA;13.01.2026;4\r\nB;21.01.2026;1\r\nA;30.01.2026;2\r\n", Options{}, "';'-delimited, UTF-8 with BOM, decimal point, dates DD.MM.YYYY (found)"},
		{"tab slashes", "sku\tdate\tquantity\nA\t01/05/2026\t3\nA\t01/13/2026\t4\nB\t01/21/2026\t1\nA\t01/30/2026\t2\n", Options{}, "tab-delimited, UTF-8, decimal point, dates MM/DD/YYYY (found)"},
		{"pipe compact", "sku|date|quantity\nA|20260105|3\nA|20260113|4\nB|20260121|1\nA|20260130|2\n", Options{}, "dates YYYYMMDD (found)"},
		{"serial", "sku,date,quantity\nA,46027,3\nA,46035,4\nB,46043,1\nA,46052,2\n", Options{}, "dates serial (found)"},
		{"timestamps", "sku,date,quantity\nA,2026-01-05 14:05:00,3\nA,2026-01-13T08:00:00Z,4\nB,2026-01-21 00:00,1\nA,2026-01-30T23:59:59Z,2\n", Options{}, "dates YYYY-MM-DD (found)"},
		{"sep line and title", "sep=;\nDemand export, January\nsku;date;quantity\nA;2026-01-05;3\nA;2026-01-13;4\nB;2026-01-21;1\nA;2026-01-30;2\n", Options{}, "sep= line"},
		{"title line", "Stores demand export\nsku;date;quantity\nA;2026-01-05;3\nA;2026-01-13;4\nB;2026-01-21;1\nA;2026-01-30;2\n", Options{}, "1 title line(s) skipped"},
		{"title line, delimiter given", "Stores demand export, all depots\nsku;date;quantity\nA;2026-01-05;3\nA;2026-01-13;4\nB;2026-01-21;1\nA;2026-01-30;2\n", Options{Table: tabular.Options{Delimiter: ';'}}, "1 title line(s) skipped"},
		{"utf-16", utf16LE("sku\tdate\tquantity\r\nA\t2026-01-05\t3\r\nA\t2026-01-13\t4\r\nB\t2026-01-21\t1\r\nA\t2026-01-30\t2\r\n"), Options{}, "UTF-16LE with BOM"},
		{"windows-1252", "sku;date;quantity;note\nA;2026-01-05;3;caf\xe9\nA;2026-01-13;4;\nB;2026-01-21;1;\nA;2026-01-30;2;\n", Options{}, "windows-1252"},
		{"trailing empty columns, blank lines", "sku,date,quantity,,\nA,2026-01-05,3,,\n\nA,2026-01-13,4,,\nB,2026-01-21,1,,\n\n\nA,2026-01-30,2,,\n", Options{}, "','-delimited"},
		{"decimal comma and scale 1", "sku;date;quantity\nA;2026-01-05;3,0\nA;2026-01-13;4\nB;2026-01-21;1\nA;2026-01-30;2\n", Options{}, "decimal comma"},
		{"grouping", "sku;date;quantity\nA;2026-01-05;3\nA;2026-01-13;4\nB;2026-01-21;1\nA;2026-01-30;2\n", Options{Decimal: ','}, "decimal comma"},
		{"column map", "Item No,Posting Date,Qty\nA,2026-01-05,3\nA,2026-01-13,4\nB,2026-01-21,1\nA,2026-01-30,2\n",
			Options{Columns: map[string]string{"sku": "Item No", "date": "posting date", "quantity": "QTY"}}, "dates YYYY-MM-DD"},
		{"loose names", "Sku , posting_date,QUANTITY\nA,2026-01-05,3\nA,2026-01-13,4\nB,2026-01-21,1\nA,2026-01-30,2\n",
			Options{Columns: map[string]string{"date": "Posting-Date"}}, "dates YYYY-MM-DD"},
	} {
		h, err := ReadWith(strings.NewReader(c.data), "h.csv", Week, c.opt)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if got := series(h); !reflect.DeepEqual(got, want) {
			t.Errorf("%s: series %v, want %v", c.name, got, want)
		}
		if !strings.Contains(h.Dialect, c.dialect) {
			t.Errorf("%s: dialect %q, want it to say %q", c.name, h.Dialect, c.dialect)
		}
	}
}

// Quantities: a decimal comma, grouping when unambiguous, a scale that
// makes them whole, and refusals naming the line (issue 11, items 1 and 4).
func TestReadQuantities(t *testing.T) {
	h := readOpt(t, "sku;date;quantity\nA;2026-01-05;0,5\nA;2026-01-06;1.200,5\nA;2026-01-13;2\n", Week, Options{Scale: 10})
	if got := h.SKUs[0].Demand; !reflect.DeepEqual(got, []int{12010, 20}) {
		t.Errorf("scaled: %v, want [12010 20]", got)
	}
	if u := UnitNote(10); u != "quantities in units of 0.1" {
		t.Errorf("unit note %q", u)
	}
	for _, c := range []struct {
		name, data string
		opt        Options
		want       string
	}{
		{"fraction", "sku,date,quantity\nA,2026-01-05,2.5\n", Options{}, `h.csv:2: quantity "2.5": want a whole number >= 0 (or give --quantity-scale 10 to plan in units of 0.1)`},
		{"scale too coarse", "sku,date,quantity\nA,2026-01-05,2.25\n", Options{Scale: 10}, `h.csv:2: quantity "2.25": want a whole number >= 0 once multiplied by the quantity scale 10 (or give --quantity-scale 100 to plan in units of 0.01)`},
		{"ambiguous grouping", "sku;date;quantity\nA;2026-01-05;1.200\n", Options{}, `h.csv:2: quantity "1.200": want a whole number >= 0: a point that may be a decimal point or digit grouping`},
		{"mark contradicted", "sku;date;quantity\nA;2026-01-05;1,5\nA;2026-01-06;2.5\n", Options{Scale: 10}, `h.csv:3: quantity "2.5": want a whole number >= 0: written with a decimal point, but line 2 ("1,5") showed the file uses a decimal comma`},
		{"unquoted decimal comma", "sku,date,quantity\nA,2026-01-05,1,5\n", Options{}, `h.csv:2: row "A,2026-01-05,1,5": want 3 fields as in the header (line 1), not 4 (a decimal comma or a thousands separator in an unquoted number?`},
		{"return error", "sku,date,quantity\nA,2026-01-05,-2\n", Options{Returns: ReturnsError}, `h.csv:2: quantity "-2": want a whole number >= 0 (a return: give --returns ignore or net to read returns)`},
	} {
		h := readOpt(t, c.data, Week, c.opt)
		var got string
		for _, k := range h.SKUs {
			for _, e := range k.Errors {
				got = e.Error()
			}
		}
		if !strings.HasPrefix(got, c.want) {
			t.Errorf("%s: error %q, want prefix %q", c.name, got, c.want)
		}
	}
}

// Returns: ignored and counted, netted within the period and floored at
// 0, or marked by a column whatever their sign (issue 11, items 4 and 9).
func TestReadReturns(t *testing.T) {
	const data = "sku,date,quantity,type\nA,2026-01-05,5,sale\nA,2026-01-06,-2,sale\nA,2026-01-13,1,sale\nA,2026-01-14,3,RETURN\nA,2026-01-20,4,sale\n"
	for _, c := range []struct {
		name          string
		opt           Options
		demand        []int
		returns, unit int
		warn          string
	}{
		{"ignore", Options{}, []int{5, 4, 4}, 1, 2, "returns ignored: 1 rows with negative quantities (2 units)"},
		{"net", Options{Returns: ReturnsNet}, []int{3, 4, 4}, 1, 2, "returns netted: 1 rows (2 units)"},
		{"column ignore", Options{ReturnsColumn: "Type", ReturnsValue: "return"}, []int{5, 1, 4}, 2, 5, "returns ignored: 2 rows"},
		{"column net floored", Options{Returns: ReturnsNet, ReturnsColumn: "type", ReturnsValue: "RETURN"}, []int{3, 0, 4}, 2, 5, "returns netted: 2 rows (5 units)"},
	} {
		h := readOpt(t, data, Week, c.opt)
		k := h.SKUs[0]
		if !reflect.DeepEqual(k.Demand, c.demand) || k.Returns != c.returns || k.ReturnUnits != c.unit {
			t.Errorf("%s: demand %v, returns %d (%d units); want %v, %d (%d)", c.name, k.Demand, k.Returns, k.ReturnUnits, c.demand, c.returns, c.unit)
		}
		s, _ := k.Fit()
		if !strings.Contains(strings.Join(s.Warnings, "; "), c.warn) {
			t.Errorf("%s: warnings %q, want %q", c.name, s.Warnings, c.warn)
		}
	}
}

// History already summed into months or weeks must match the period, or
// is refused (issue 11, item 9: monthly totals run weekly would put each
// month in one week of four).
func TestReadAggregated(t *testing.T) {
	var monthly, weekly strings.Builder
	monthly.WriteString("sku,date,quantity\n")
	weekly.WriteString("sku,date,quantity\n")
	for m := 1; m <= 12; m++ {
		fmt.Fprintf(&monthly, "A,2025-%02d-01,%d\nB,2025-%02d-01,%d\n", m, 40+m, m, 10)
	}
	for w := 0; w < 20; w++ {
		fmt.Fprintf(&weekly, "A,%s,%d\n", Day.Label(daysFromCivil(2025, 1, 6)+7*w), 5+w%3)
	}
	for _, c := range []struct {
		name, data string
		p          Period
		want       string
	}{
		{"monthly as weeks", monthly.String(), Week, `h.csv:2: column date: every date is the first of a month (12 distinct dates from 2025-01-01 (line 2) to 2025-12-01): the history looks summed into months already, and summing it into weeks would put each month in one week; give --period month`},
		{"monthly as days", monthly.String(), Day, `give --period month`},
		{"month ends as weeks", "sku,date,quantity\nA,2025-01-31,3\nA,2025-02-28,4\nA,2025-03-31,5\nA,2025-04-30,6\n", Week, `h.csv:2: column date: every date is the last day of a month (4 distinct dates from 2025-01-31 (line 2) to 2025-04-30)`},
		{"weekly as days", weekly.String(), Day, `every date falls on a Monday, a week or more apart (20 distinct dates from 2025-01-06 (line 2) to 2025-05-19): the history looks summed into weeks already`},
		{"weekly as months", weekly.String(), Month, `weekly totals cannot be split exactly at the month ends; give --period week`},
		{"monthly as months", monthly.String(), Month, ""},
		{"weekly as weeks", weekly.String(), Week, ""},
	} {
		_, err := Read(strings.NewReader(c.data), "h.csv", c.p)
		if got := errText(err); (c.want == "" && err != nil) || !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.name, got, c.want)
		}
	}
}

// Partial first and last periods of daily rows are left out with a note;
// sparse files and short ones are kept whole.
func TestPartialPeriods(t *testing.T) {
	var b strings.Builder
	b.WriteString("sku,date,quantity\n")
	start := daysFromCivil(2026, 1, 9) // a Friday: week 2026-W02 is partial
	end := daysFromCivil(2026, 6, 3)   // a Wednesday: week 2026-W23 is partial
	for d := start; d <= end; d++ {
		fmt.Fprintf(&b, "A,%s,1\n", Day.Label(d))
	}
	h := mustRead(t, b.String(), Week)
	k := h.SKUs[0]
	if h.Label(k.Start) != "2026-W03" || h.Label(h.Last) != "2026-W22" || k.Demand[0] != 7 || h.PartialRows != 3+3 {
		t.Errorf("weeks %s .. %s, %v, %d rows left out", h.Label(k.Start), h.Label(h.Last), k.Demand, h.PartialRows)
	}
	if len(h.Notes) != 2 || !strings.Contains(h.Notes[0], "h.csv: the first week, 2026-W02, left out as partial: its rows start on 2026-01-09 (3 rows)") {
		t.Errorf("notes %q", h.Notes)
	}
	// Months: January starts on the 9th (kept: more than half), June
	// ends on the 3rd (left out).
	h = mustRead(t, b.String(), Month)
	if h.Label(h.SKUs[0].Start) != "2026-01" || h.Label(h.Last) != "2026-05" || h.PartialRows != 3 {
		t.Errorf("months %s .. %s", h.Label(h.SKUs[0].Start), h.Label(h.Last))
	}
	// Too short a file keeps every period.
	h = mustRead(t, "sku,date,quantity\nA,2026-01-08,1\nA,2026-01-09,1\nA,2026-01-12,1\n", Week)
	if h.PartialRows != 0 || len(h.SKUs[0].Demand) != 2 {
		t.Errorf("short file: %d rows left out, %v", h.PartialRows, h.SKUs[0].Demand)
	}
}

// Locations: by location, one series per (sku, location); otherwise the
// locations of a SKU are summed (issue 11, item 5).
func TestReadLocations(t *testing.T) {
	const data = "sku,date,quantity,site\nA,2026-01-05,1,north\nA,2026-01-05,10,south\nA,2026-01-12,2,north\nB,2026-01-12,5,north\n"
	opt := Options{Columns: map[string]string{"location": "site"}}
	h := readOpt(t, data, Week, opt)
	if len(h.SKUs) != 2 || !reflect.DeepEqual(h.SKUs[0].Demand, []int{11, 2}) || h.Location {
		t.Errorf("summed: %+v", h.SKUs)
	}
	opt.ByLocation = true
	h = readOpt(t, data, Week, opt)
	var got []string
	for _, k := range h.SKUs {
		got = append(got, fmt.Sprintf("%s@%s%v", k.SKU, k.Location, k.Demand))
	}
	if want := []string{"A@north[1 2]", "A@south[10 0]", "B@north[5]"}; !reflect.DeepEqual(got, want) || !h.Location {
		t.Errorf("by location: %v, want %v", got, want)
	}
}

// The date layout given is used; a date in another layout is a bad row.
func TestReadDateGiven(t *testing.T) {
	h := readOpt(t, "sku,date,quantity\nA,04/03/2026,1\nA,05/03/2026,2\nA,2026-03-06,1\n", Day, Options{Dates: tabular.DateDMY})
	k := h.SKUs[0]
	if k.Records != 2 || len(k.Errors) != 1 || k.Errors[0].Error() != `h.csv:4: date "2026-03-06": want a date DD/MM/YYYY in the years 1900 to 2200` {
		t.Errorf("records %d, errors %v", k.Records, k.Errors)
	}
	if h.Label(k.Start) != "2026-03-04" || h.DatesFound {
		t.Errorf("start %s, found %v", h.Label(k.Start), h.DatesFound)
	}
}

// A period column with a year column counts weeks (or months) of that
// year; one that restarts without a year is refused, never summed across
// years (issue 11, item 9).
func TestReadYearPeriods(t *testing.T) {
	var b strings.Builder
	b.WriteString("sku,year,period,quantity\n")
	for _, yw := range [][2]int{{2024, 51}, {2024, 52}, {2025, 1}, {2025, 2}, {2025, 3}, {2025, 53}} {
		fmt.Fprintf(&b, "A,%d,%d,%d\n", yw[0], yw[1], yw[1])
	}
	_, err := Read(strings.NewReader(b.String()), "h.csv", Week)
	if want := `h.csv:7: period "53": want an ISO week of the year, 1 to 52 or 53 (with the year column)`; err != nil {
		t.Fatal(err)
	} else {
		h := mustRead(t, b.String(), Week)
		k := h.SKUs[0]
		if len(k.Errors) != 1 || k.Errors[0].Error() != want {
			t.Errorf("errors %v, want %s", k.Errors, want)
		}
		if h.Period != Week || h.Label(k.Start) != "2024-W51" || !reflect.DeepEqual(k.Demand, []int{51, 52, 1, 2, 3}) {
			t.Errorf("period %v, start %s, %v", h.Period, h.Label(k.Start), k.Demand)
		}
	}
	m := mustRead(t, "sku,year,period,quantity\nA,2025,11,4\nA,2025,12,5\nA,2026,1,6\n", Month)
	if m.Period != Month || m.Label(m.SKUs[0].Start) != "2025-11" || !reflect.DeepEqual(m.SKUs[0].Demand, []int{4, 5, 6}) {
		t.Errorf("months: %v %s %v", m.Period, m.Label(m.SKUs[0].Start), m.SKUs[0].Demand)
	}
	var r strings.Builder
	r.WriteString("sku,period,quantity\n")
	for w := 40; w <= 52; w++ {
		fmt.Fprintf(&r, "A,%d,3\n", w)
	}
	r.WriteString("A,1,4\n")
	_, err = Read(strings.NewReader(r.String()), "h.csv", Week)
	if want := `h.csv:15: column period: period 1 follows period 52 (line 14) for sku "A": the periods seem to restart each year`; !strings.HasPrefix(errText(err), want) {
		t.Errorf("restart: %v, want %s", err, want)
	}
}

// A period column of labels ("2025-W52", "2026-W01", "2025-11") reads as
// ISO weeks or months, across the turn of the year; it must match the
// planning period.
func TestReadPeriodLabels(t *testing.T) {
	h := mustRead(t, "sku,period,quantity\nA,2025-W51,1\nA,2025-W52,2\nA,2026-W01,3\nA,2026W03,4\nA,7,5\n", Week)
	k := h.SKUs[0]
	if h.Period != Week || h.Label(k.Start) != "2025-W51" || !reflect.DeepEqual(k.Demand, []int{1, 2, 3, 0, 4}) {
		t.Errorf("weeks: %v %s %v", h.Period, h.Label(k.Start), k.Demand)
	}
	if len(k.Errors) != 1 || k.Errors[0].Error() != `h.csv:6: period "7": want a period labelled like the file's others (a week, such as 2024-W40)` {
		t.Errorf("errors %v", k.Errors)
	}
	m := mustRead(t, "sku,period,quantity\nA,2025-11,4\nA,2025-12,5\nA,2026-01,6\n", Month)
	if m.Period != Month || m.Label(m.SKUs[0].Start) != "2025-11" || !reflect.DeepEqual(m.SKUs[0].Demand, []int{4, 5, 6}) {
		t.Errorf("months: %v %s %v", m.Period, m.Label(m.SKUs[0].Start), m.SKUs[0].Demand)
	}
	_, err := Read(strings.NewReader("sku,period,quantity\nA,2025-11,4\n"), "h.csv", Week)
	if want := `h.csv:2: column period: period "2025-11" is a month, but the history is planned by the week: give --period month`; errText(err) != want {
		t.Errorf("mismatch: %v", err)
	}
}
