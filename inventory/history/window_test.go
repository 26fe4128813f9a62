package history

import (
	"errors"
	"fmt"
	"reflect"
	"strings"
	"testing"
)

// bulkRows returns n rows of sku, one every step days from 2025-01-06
// (day 20094), with quantities 1..7 in turn.
func bulkRows(sku string, n, step int) []string {
	rows := make([]string, n)
	for i := range rows {
		rows[i] = fmt.Sprintf("%s,%s,%d", sku, Day.Label(20094+i*step), i%7+1)
	}
	return rows
}

// file joins a header and rows, inserting extra rows at position at.
func file(rows []string, at int, extra ...string) string {
	all := append(append(append([]string{}, rows[:at]...), extra...), rows[at:]...)
	return "sku,date,quantity\n" + strings.Join(all, "\n") + "\n"
}

func outliers(s *SKU) []string {
	var o []string
	for _, x := range s.LeftOut {
		o = append(o, x.String())
	}
	return o
}

// The bulk rule of the package documentation, case by case. Each message
// names the file and the line; the series are those of the bulk alone.
func TestBulkRule(t *testing.T) {
	bulk := bulkRows("A", 200, 3) // 2025-01-06 .. 2026-08-26, 86 ISO weeks
	seasonal := []string{}
	for y := 2023; y <= 2025; y++ { // December to February, every other day
		for d := 0; d < 90; d += 2 {
			seasonal = append(seasonal, fmt.Sprintf("S,%s,%d", Day.Label(daysFromCivil(y, 12, 1)+d), 1+d%3))
		}
	}
	slow := []string{}
	for i := 0; i < 12; i++ { // a spare issued every 61 days
		slow = append(slow, fmt.Sprintf("P,%s,1", Day.Label(20094+61*i)))
	}
	twenty := bulkRows("Q", 20, 30) // 2025-01-06 .. 2026-07-30
	for _, c := range []struct {
		name     string
		data     string
		periods  int      // of the first SKU's series (0: none)
		leftOut  []string // of the first SKU
		err      string   // of the first SKU, as a prefix
		rowError string   // the first SKU's first row error
	}{
		{name: "typo year 0001 first", data: file(bulk, 0, "A,0001-01-01,3"), periods: 86,
			rowError: `h.csv:2: date "0001-01-01": want a date YYYY-MM-DD in the years 1900 to 2200`},
		{name: "1900 first", data: file(bulk, 0, "A,1900-01-01,3"), periods: 86,
			leftOut: []string{`h.csv:2: date "1900-01-01" (quantity 3) left out: 45661 days before 2025-01-06 .. 2026-08-26, the span holding the bulk of this SKU's rows`}},
		{name: "1900 in the middle", data: file(bulk, 120, "A,1900-01-01,3"), periods: 86,
			leftOut: []string{`h.csv:122: date "1900-01-01" (quantity 3) left out: 45661 days before 2025-01-06 .. 2026-08-26, the span holding the bulk of this SKU's rows`}},
		{name: "1900 last, twice", data: file(bulk, 200, "A,1900-01-01,3", "A,1900-01-01,2"), periods: 86,
			leftOut: []string{`h.csv:202: date "1900-01-01" (quantity 5, 2 rows from this line) left out: 45661 days before 2025-01-06 .. 2026-08-26, the span holding the bulk of this SKU's rows`}},
		{name: "typo year in the future", data: file(bulk, 50, "A,2062-08-20,4"), periods: 86,
			leftOut: []string{`h.csv:52: date "2062-08-20" (quantity 4) left out: 13143 days after 2025-01-06 .. 2026-08-26, the span holding the bulk of this SKU's rows`}},
		{name: "a far row on each side", data: file(bulk, 10, "A,2016-01-04,1", "A,2036-01-07,2"), periods: 86,
			leftOut: []string{
				`h.csv:12: date "2016-01-04" (quantity 1) left out: 3290 days before 2025-01-06 .. 2026-08-26, the span holding the bulk of this SKU's rows`,
				`h.csv:13: date "2036-01-07" (quantity 2) left out: 3421 days after 2025-01-06 .. 2026-08-26, the span holding the bulk of this SKU's rows`}},
		{name: "two rows far apart", data: "sku,date,quantity\nA,1900-01-01,3\nA,2026-01-05,2\n",
			err: `no clear bulk of rows: its 2 rows fall in 2 spans separated by gaps of more than 3653 days and none holds 90% of them (1900-01-01: 1 row at h.csv:2; 2026-01-05: 1 row at h.csv:3); check the dates`},
		{name: "two eras", data: file(append(bulkRows("A", 10, 7), bulkRows("A", 10, 7)...), 0) + strings.ReplaceAll(strings.Join(bulkRows("A", 10, 7), "\n"), "A,2025", "A,2015") + "\n",
			err: `no clear bulk of rows: its 30 rows fall in 2 spans separated by gaps of more than 366 days and none holds 90% of them (2015-01-06 .. 2015-03-10: 10 rows, the first at h.csv:22; 2025-01-06 .. 2025-03-10: 20 rows, the first at h.csv:2)`},
		{name: "seasonal", data: "sku,date,quantity\n" + strings.Join(seasonal, "\n") + "\n", periods: 118},
		{name: "slow mover", data: "sku,date,quantity\n" + strings.Join(slow, "\n") + "\n", periods: 96},
		{name: "slow mover, one more after five years", data: file(twenty, 20, "Q,2031-06-02,1"), periods: 82,
			leftOut: []string{`h.csv:22: date "2031-06-02" (quantity 1) left out: 1768 days after 2025-01-06 .. 2026-07-30, the span holding the bulk of this SKU's rows`}},
		{name: "only far rows", data: "sku,date,quantity\nA,1990-01-01,1\nA,2005-01-03,1\nA,2020-01-06,1\n",
			err: "no clear bulk of rows: its 3 rows fall in 3 spans"},
	} {
		h := mustRead(t, c.data, Week)
		s := h.SKUs[0]
		if len(s.Demand) != c.periods {
			t.Errorf("%s: %d periods, want %d", c.name, len(s.Demand), c.periods)
		}
		if got := outliers(s); !reflect.DeepEqual(got, c.leftOut) {
			t.Errorf("%s: left out\n%q\nwant\n%q", c.name, got, c.leftOut)
		}
		if got := errText(s.Err); !strings.HasPrefix(got, c.err) || (c.err == "") != (s.Err == nil) || (s.Err != nil && !errors.Is(s.Err, ErrNoBulk)) {
			t.Errorf("%s: error\n%s\nwant prefix\n%s", c.name, got, c.err)
		}
		if c.rowError != "" && (len(s.Errors) == 0 || s.Errors[0].Error() != c.rowError) {
			t.Errorf("%s: row errors %v, want %s", c.name, s.Errors, c.rowError)
		}
		if c.periods > 0 {
			// What is left out is said in the fit's warnings, with the line.
			f, _ := s.Fit()
			for _, o := range c.leftOut {
				if !strings.Contains(strings.Join(f.Warnings, "\n"), o) {
					t.Errorf("%s: warnings %q lack %q", c.name, f.Warnings, o)
				}
			}
		}
	}
}

// The order of the rows never changes the series or what is left out.
func TestBulkRuleOrder(t *testing.T) {
	rows := append(bulkRows("A", 200, 3), "A,1900-01-01,3", "A,2062-08-20,4")
	var want *SKU
	for k, perm := range [][]int{nil, {201, 200}, {100, 201, 0, 200}} {
		rs := append([]string{}, rows...)
		for i := 0; i+1 < len(perm); i += 2 {
			rs[perm[i]], rs[perm[i+1]] = rs[perm[i+1]], rs[perm[i]]
		}
		if k == 2 { // and the whole file reversed
			for i, j := 0, len(rs)-1; i < j; i, j = i+1, j-1 {
				rs[i], rs[j] = rs[j], rs[i]
			}
		}
		s := mustRead(t, file(rs, 0), Day).SKUs[0]
		if want == nil {
			want = s
			continue
		}
		if !reflect.DeepEqual(s.Demand, want.Demand) || s.Start != want.Start || len(s.LeftOut) != 2 ||
			s.LeftOut[0].Value != "1900-01-01" || s.LeftOut[1].Value != "2062-08-20" {
			t.Errorf("order %d: start %d, %d periods, left out %v", k, s.Start, len(s.Demand), outliers(s))
		}
	}
}

// A SKU whose rows all lie far from the bulk of the file's rows is left
// without a series, and the file's last period is not stretched.
func TestBulkRuleFile(t *testing.T) {
	data := file(append(bulkRows("A", 200, 3), bulkRows("B", 100, 5)...), 300, "C,2062-08-20,4")
	h := mustRead(t, data, Week)
	if got := h.Label(h.Last); got != "2026-W35" {
		t.Errorf("last period %s, want 2026-W35", got)
	}
	c := h.SKUs[2]
	want := `no clear bulk of rows: all 1 usable rows were left out, far from 2025-01-06 .. 2026-08-26, the span holding the bulk of the file's rows (first h.csv:302: date "2062-08-20" (quantity 4) left out: 13143 days after`
	if c.SKU != "C" || c.Demand != nil || !strings.HasPrefix(errText(c.Err), want) || !errors.Is(c.Err, ErrNoBulk) {
		t.Errorf("C: %v, error %v", c.Demand, c.Err)
	}
	if _, err := c.Fit(); err != c.Err {
		t.Errorf("C: fit error %v", err)
	}
}

// Period numbers that would make a series longer than MaxSpan, or all
// series together longer than MaxCells, are refused before allocation.
func TestSpanLimits(t *testing.T) {
	// Two SKUs of five rows each, a million periods apart: no bulk of the
	// file, so A's series would reach B's last period.
	var b strings.Builder
	b.WriteString("sku,period,quantity\n")
	for i := 0; i < 5; i++ {
		fmt.Fprintf(&b, "A,%d,1\n", i)
	}
	for i := 0; i < 5; i++ {
		fmt.Fprintf(&b, "B,%d,1\n", 1000000+i)
	}
	h := mustRead(t, b.String(), Week)
	want := `too many periods: the series of sku "A" would span 1000005 index periods, from period "0" at h.csv:2 to the file's last period 1000004, more than the limit of 131072; check the periods`
	if a := h.SKUs[0]; a.Demand != nil || errText(a.Err) != want || !errors.Is(a.Err, ErrSpan) {
		t.Errorf("A: %d periods, error\n%v\nwant\n%s", len(a.Demand), a.Err, want)
	}
	if len(h.SKUs[1].Demand) != 5 {
		t.Errorf("B: %v", h.SKUs[1].Demand)
	}
	// One SKU spanning more than MaxSpan with no clear bulk.
	h = mustRead(t, "sku,period,quantity\nA,1,1\nA,2,1\nA,400000,1\nA,400001,1\n", Week)
	if err := errText(h.SKUs[0].Err); !strings.HasPrefix(err, "no clear bulk of rows") {
		t.Errorf("A: %s", err)
	}

	// 1400 SKUs at 1900-01-01 and 1400 at 2200-12-31, read in days: no
	// bulk of the file, and the series of the early ones would hold
	// 1400 × 109,938 periods.
	b.Reset()
	b.WriteString("sku,date,quantity\n")
	for i := 0; i < 1400; i++ {
		fmt.Fprintf(&b, "E%d,1900-01-01,1\nL%d,2200-12-31,1\n", i, i)
	}
	_, err := Read(strings.NewReader(b.String()), "h.csv", Day)
	want = `h.csv:2: too many periods: the series of the file's SKUs would hold 153914600 periods in all, from 1900-01-01 (the date on this line, sku "E0") to 2200-12-31, more than the limit of 134217728; check the dates, or use a longer period`
	if errText(err) != want || !errors.Is(err, ErrSpan) {
		t.Errorf("error\n%v\nwant\n%s", err, want)
	}
}

// Hostile cells: line breaks in a SKU, huge quantities, totals beyond
// 2^53, each an error of its row with the file and line.
func TestHostileRows(t *testing.T) {
	data := "sku,date,quantity\n" +
		"\"A\nB\",2026-01-05,1\n" + // lines 2-3
		"\"C\rD\",2026-01-05,1\n" + // line 4
		"D,2026-01-05,1e300\n" + // line 5
		"D,2026-01-05,9007199254740991\n" + // line 6
		"D,2026-01-06,1\n" + // line 7
		"D,2026-01-07,0x10\n" + // line 8
		"D,2026-01-08,1_000\n" + // line 9
		"D,2026-01-09,inf\n" + // line 10
		"D,2026-01-10,-3\n" // line 11
	h := mustRead(t, data, Week)
	var got []string
	for _, e := range h.Errors {
		got = append(got, e.Error())
	}
	for _, e := range h.SKUs[0].Errors {
		got = append(got, e.Error())
	}
	want := []string{
		`h.csv:2: sku "A\nB": want a SKU without line breaks (CR or LF)`,
		`h.csv:4: sku "C\rD": want a SKU without line breaks (CR or LF)`,
		`h.csv:5: quantity "1e300": want a whole number >= 0 below 9007199254740992 (2^53)`,
		`h.csv:7: quantity "1": want a quantity that keeps the SKU's total below 9007199254740992 (2^53); it is 9007199254740991 before this row`,
		`h.csv:8: quantity "0x10": want a whole number >= 0`,
		`h.csv:9: quantity "1_000": want a whole number >= 0`,
		`h.csv:10: quantity "inf": want a whole number >= 0`,
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("errors:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
	if d := h.SKUs[0]; d.SKU != "D" || d.Records != 1 || d.Demand[0] != 9007199254740991 || d.Returns != 1 || d.ReturnUnits != 3 {
		t.Errorf("D: %d records, %v", d.Records, d.Demand)
	}
}

// A quantity of 1e12 in one period: the fit refuses the pmf candidate over
// its limit, saying where the rows are, and never allocates the support.
func TestFitHugeQuantity(t *testing.T) {
	h := mustRead(t, "sku,period,quantity\nA,1,3\nA,2,1e12\nA,3,0\nB,1,2000000\nB,2,3\nB,3,0\nB,4,1\n", Week)
	_, err := h.SKUs[0].Fit()
	if want := "no candidate model could be fitted to 4 periods (the largest demand of a period is 1000000000000 (its rows start at h.csv:3))"; !strings.HasPrefix(errText(err), want) {
		t.Errorf("A: %v\nwant prefix %s", err, want)
	}
	s, err := h.SKUs[1].Fit()
	want := "no pmf candidate: the largest demand of a period, 2000000 (its rows start at h.csv:5), is beyond the pmf limit of 1048576"
	if err != nil || !strings.Contains(strings.Join(s.Warnings, "|"), want) {
		t.Errorf("B: %v, warnings %q", err, s.Warnings)
	}
}

func errText(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}
