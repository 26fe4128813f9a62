package history

import (
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func mustRead(t *testing.T, data string, p Period) *History {
	t.Helper()
	h, err := Read(strings.NewReader(data), "h.csv", p)
	if err != nil {
		t.Fatal(err)
	}
	return h
}

func series(h *History) map[string][]int {
	m := map[string][]int{}
	for _, s := range h.SKUs {
		m[s.SKU] = s.Demand
	}
	return m
}

// Aggregation: the weeks are ISO 8601 weeks (2026-12-28 .. 2027-01-03 is
// 2026-W53); months are calendar months, with 2024-02-29 a leap day.
func TestAggregation(t *testing.T) {
	data := `quantity,date,sku,depot
1,2026-12-27,A,north
2,2026-12-28,A,north
3,2027-01-03,A,south
4,2027-01-03,A,north
5,2027-01-04,A,south
7,2027-01-10,B,north
`
	for _, c := range []struct {
		p     Period
		want  map[string][]int
		start string
		last  string
	}{
		{Week, map[string][]int{"A": {1, 9, 5}, "B": {7}}, "2026-W52", "2027-W01"},
		{Month, map[string][]int{"A": {3, 12}, "B": {7}}, "2026-12", "2027-01"},
	} {
		h := mustRead(t, data, c.p)
		if got := series(h); !reflect.DeepEqual(got, c.want) {
			t.Errorf("%v: series %v, want %v", c.p, got, c.want)
		}
		if got := h.Label(h.SKUs[0].Start); got != c.start {
			t.Errorf("%v: start %s, want %s", c.p, got, c.start)
		}
		if got := h.Label(h.Last); got != c.last {
			t.Errorf("%v: last %s, want %s", c.p, got, c.last)
		}
	}
	h := mustRead(t, data, Day)
	if got := len(h.SKUs[0].Demand); got != 15 { // 2026-12-27 .. 2027-01-10
		t.Errorf("daily window of A: %d days, want 15", got)
	}
	if got := h.SKUs[0].Demand[7]; got != 7 { // 2027-01-03, two rows summed
		t.Errorf("2027-01-03: %d, want 7", got)
	}

	leap := "sku,date,quantity\nX,2024-01-31,1\nX,2024-02-29,2\nX,2024-03-01,3\nX,2024-02-01,4\nX,2024-05-31,5\n"
	h = mustRead(t, leap, Month)
	if got, want := h.SKUs[0].Demand, []int{1, 6, 3, 0, 5}; !reflect.DeepEqual(got, want) {
		t.Errorf("months of 2024: %v, want %v", got, want)
	}
	h = mustRead(t, leap, Week)
	// 2024-02-29 (Thu) and 2024-03-01 (Fri) are both in 2024-W09.
	wk := map[string]int{}
	for i, q := range h.SKUs[0].Demand {
		if q > 0 {
			wk[h.Label(h.SKUs[0].Start+i)] = q
		}
	}
	if want := map[string]int{"2024-W05": 5, "2024-W09": 5, "2024-W22": 5}; !reflect.DeepEqual(wk, want) {
		t.Errorf("weeks of 2024: %v, want %v", wk, want)
	}
}

// Rows in reverse date order give the same series as rows in date order.
func TestReadOrder(t *testing.T) {
	var fwd, rev []string
	for d := 0; d < 400; d++ {
		fwd = append(fwd, "S,"+Day.Label(20000+d)+","+string(rune('0'+d%10)))
	}
	for i := len(fwd) - 1; i >= 0; i-- {
		rev = append(rev, fwd[i])
	}
	a := mustRead(t, "sku,date,quantity\n"+strings.Join(fwd, "\n"), Day)
	b := mustRead(t, "sku,date,quantity\n"+strings.Join(rev, "\n"), Day)
	if !reflect.DeepEqual(a.SKUs[0].Demand, b.SKUs[0].Demand) || len(a.SKUs[0].Demand) != 400 || a.SKUs[0].Start != b.SKUs[0].Start {
		t.Errorf("reverse order changed the series")
	}
}

// Each SKU's window runs from its own first record to the file's last
// period; SKUs keep their order of first appearance.
func TestWindowAndOrder(t *testing.T) {
	h := mustRead(t, "sku,period,quantity\nZ,5,1\nA,2,3\nZ,9,2\n", Week)
	if h.Period != Index {
		t.Errorf("period = %v, want index", h.Period)
	}
	got := [][]int{h.SKUs[0].Demand, h.SKUs[1].Demand}
	want := [][]int{{1, 0, 0, 0, 2}, {3, 0, 0, 0, 0, 0, 0, 0}}
	if h.SKUs[0].SKU != "Z" || !reflect.DeepEqual(got, want) {
		t.Errorf("got %s %v, want Z first and %v", h.SKUs[0].SKU, got, want)
	}
}

func TestPeriodColumnFixture(t *testing.T) {
	f, err := os.Open(filepath.Join("..", "..", "testdata", "history", "period-column.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	h, err := Read(f, "period-column.csv", Week)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := series(h), map[string][]int{"DOOR-SNS": {2, 0, 5, 0}, "FLANGE-LUB": {5, 0, 0}}; !reflect.DeepEqual(got, want) {
		t.Errorf("series %v, want %v", got, want)
	}
}

// Bad rows are recorded against their SKU with file and line, in the style
// of encoding/csv's ParseError; the good rows are kept.
func TestBadRows(t *testing.T) {
	f, err := os.Open(filepath.Join("..", "..", "testdata", "history", "bad-rows.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	h, err := Read(f, "bad-rows.csv", Day)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, s := range h.SKUs {
		for _, e := range s.Errors {
			got = append(got, s.SKU+" "+e.Error())
		}
	}
	for _, e := range h.Errors {
		got = append(got, "- "+e.Error())
	}
	want := []string{
		`PAD-T3 bad-rows.csv:3: quantity "abc": want a whole number >= 0`,
		`PAD-T3 bad-rows.csv:5: quantity "2.5": want a whole number >= 0 (or give --quantity-scale 10 to plan in units of 0.1)`,
		`LED-DSP bad-rows.csv:7: date "2026-02-30": want a date YYYY-MM-DD (2026-02 has 28 days)`,
		`- bad-rows.csv:6: sku "": want a non-empty SKU`,
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("errors:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
	pad := h.SKUs[0]
	if pad.Records != 2 || pad.Demand[0] != 4 || pad.Demand[len(pad.Demand)-1] != 3 {
		t.Errorf("PAD-T3: %d records, %v", pad.Records, pad.Demand)
	}
	if h.Rows != 8 {
		t.Errorf("rows = %d, want 8", h.Rows)
	}
}

func TestShortRow(t *testing.T) {
	h := mustRead(t, "sku,date,quantity\nA,2026-01-05\nA,2026-01-06,1\n", Day)
	if len(h.SKUs[0].Errors) != 1 || h.SKUs[0].Errors[0].Error() != `h.csv:2: quantity "": want a whole number >= 0 (the row has 2 fields, the header 3)` {
		t.Errorf("errors %v", h.SKUs[0].Errors)
	}
}

func TestReadFails(t *testing.T) {
	for _, c := range []struct {
		data, want string
		missing    bool
	}{
		{"sku,date,note\nA,2026-01-05,x\n", `h.csv:1: missing column quantity: the header (line 1) has "sku", "date", "note"; name the column that holds it with --history-columns "quantity=HEADER"`, true},
		{"\ufeffdate,quantity\n2026-01-05,1\n", `h.csv:1: missing column sku: the header (line 1) has "date", "quantity"`, true},
		{"sku,quantity\nA,1\n", `h.csv:1: missing column date or period: the header (line 1) has "sku", "quantity"; name the column that holds it with --history-columns "date=HEADER"`, true},
		{"", "h.csv:1: empty file, want a header line with columns sku, date", true},
		{"sku,date,quantity,sku\n", `h.csv:1: column "sku" appears 2 times in the header`, false},
		{"sku,date,quantity\nA,2026-01-05,\"1\n", `h.csv:2: extraneous or missing " in quoted-field (character 17): want a quoted field closed by " and each " inside it doubled`, false},
		{"sku,date,quantity\nA,2026-01-05,1\"2\n", `h.csv:2: bare " in non-quoted-field (character 15): want a field holding " enclosed in quotes, with the " doubled`, false},
		// A header in another dialect than the one given says so.
		{"sku;date;quantity\nA;2026-01-05;1\n", `h.csv:1: missing column sku: the header (line 1) has "sku;date;quantity"; the header looks ';'-delimited, but the file was read as ','-delimited: give --delimiter ';'`, true},
		// An unknown column close to a known one is refused, naming both.
		{"sku,date,quantitty\nA,2026-01-05,1\n", `h.csv:1: column quantitty: not a column ergostock reads, but close to quantity`, false},
		{"sku,date,qty,Locaton\nA,2026-01-05,1,N\n", `h.csv:1: column Locaton: not a column ergostock reads, but close to location`, false},
	} {
		opt := Options{}
		if strings.HasPrefix(c.data, "sku;") {
			opt.Table.Delimiter = ','
		}
		_, err := ReadWith(strings.NewReader(c.data), "h.csv", Week, opt)
		if err == nil || !strings.HasPrefix(err.Error(), c.want) || errors.Is(err, ErrMissingColumn) != c.missing {
			t.Errorf("Read(%q) error %v, want prefix %q (missing column: %v)", c.data, err, c.want, c.missing)
		}
	}
}

func TestMissingColumnFixture(t *testing.T) {
	f, err := os.Open(filepath.Join("..", "..", "testdata", "history", "missing-quantity.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	_, err = Read(f, "missing-quantity.csv", Week)
	if err == nil || !strings.HasPrefix(err.Error(), `missing-quantity.csv:1: missing column quantity: the header (line 1) has "sku", "date", "note"`) {
		t.Errorf("error %v", err)
	}
}

// Quantities and numbers follow one rule: a plain decimal (sign, digits,
// fraction, exponent), whole and >= 0, below 2^53 (common practice: the
// largest range of whole numbers a float64 holds exactly).
func TestQuantityOf(t *testing.T) {
	for _, c := range []struct {
		s  string
		n  int
		ok bool
	}{
		{"0", 0, true}, {"12", 12, true}, {"+3", 3, true}, {"12.0", 12, true}, {"12.", 12, true},
		{"1e3", 1000, true}, {"1.2E1", 12, true}, {"-0", 0, true}, {"9007199254740991", 1<<53 - 1, true},
		{"1.5", 0, false}, {"-1", 0, false}, {".5", 0, false}, {"", 0, false},
		{"+", 0, false}, {"abc", 0, false}, {"99999999999999999999", 0, false}, {"9007199254740992", 0, false},
		{"1_000", 0, false}, {"0x10", 0, false}, {"inf", 0, false}, {"NaN", 0, false}, {"1e400", 0, false},
		{"1e", 0, false}, {"e3", 0, false}, {" 1", 0, false}, {"1,5", 0, false}, {"١٢", 0, false},
	} {
		n, want := quantityOf(c.s)
		if n != c.n || (want == "") != c.ok {
			t.Errorf("quantityOf(%q) = %d, %q, want %d, ok %v", c.s, n, want, c.n, c.ok)
		}
	}
	for _, c := range []struct {
		s  string
		ok bool
	}{{".5", true}, {"5.", true}, {"-2.5e-3", true}, {".", false}, {"-.e1", false}, {"1e+", false}, {"Infinity", false}, {"0x1p-2", false}, {"1e308", true}, {"2e308", false}} {
		if _, err := parseNumber(c.s); (err == nil) != c.ok {
			t.Errorf("parseNumber(%q): error %v, want ok %v", c.s, err, c.ok)
		}
	}
}

// A mistyped year is refused at the row level: dates outside MinYear ..
// MaxYear never reach a series.
func TestDateRange(t *testing.T) {
	h := mustRead(t, "sku,date,quantity\nA,2026-01-05,1\nA,0206-01-05,1\nA,1899-12-31,1\nA,2201-01-01,1\nA,1900-01-01,0\nA,2200-12-31,0\nB,2026-01-06,2\n", Day)
	var got []string
	for _, e := range h.SKUs[0].Errors {
		got = append(got, e.Error())
	}
	want := []string{
		`h.csv:3: date "0206-01-05": want a date YYYY-MM-DD in the years 1900 to 2200`,
		`h.csv:4: date "1899-12-31": want a date YYYY-MM-DD in the years 1900 to 2200`,
		`h.csv:5: date "2201-01-01": want a date YYYY-MM-DD in the years 1900 to 2200`,
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("errors %q, want %q", got, want)
	}
}

// Large quantities are summed exactly, and a pmf beyond the largest
// support point is simply not a candidate.
func TestLargeQuantities(t *testing.T) {
	h := mustRead(t, "sku,period,quantity\nA,1,4000000000\nA,1,4000000000\nA,2,3\nA,3,5000000\n", Week)
	if got := h.SKUs[0].Demand; got[0] != 8000000000 {
		t.Fatalf("sum %v", got)
	}
	h = mustRead(t, "sku,period,quantity\nA,1,2000000\nA,1,2000000\nA,2,3\nA,3,5000000\n", Week)
	s, err := h.SKUs[0].Fit()
	if err != nil || s.Demand == nil {
		t.Fatalf("fit: %v", err)
	}
	if _, ok := candidate(s, ModelPMF); ok {
		t.Error("pmf candidate beyond MaxSupport")
	}
}

// A byte-order mark, spaces and capitals in the header are tolerated.
func TestHeaderForms(t *testing.T) {
	h := mustRead(t, "\ufeff Quantity , SKU,Date\n3, A ,2026-01-05\n", Day)
	if len(h.SKUs) != 1 || h.SKUs[0].SKU != "A" || h.SKUs[0].Demand[0] != 3 {
		t.Errorf("%+v", h.SKUs)
	}
}
