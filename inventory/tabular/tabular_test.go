package tabular

import (
	"bytes"
	"errors"
	"io"
	"strings"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"
	"golang.org/x/text/encoding/charmap"
	"golang.org/x/text/encoding/unicode"
)

// readAll reads a whole table into header and records with their lines.
func readAll(t *testing.T, r *Reader) ([][]string, []int, error) {
	t.Helper()
	var recs [][]string
	var lines []int
	for {
		rec, line, err := r.Read()
		if err == io.EOF {
			return recs, lines, nil
		}
		if err != nil {
			return recs, lines, err
		}
		recs = append(recs, rec)
		lines = append(lines, line)
	}
}

func utf16le(s string) []byte {
	b, err := unicode.UTF16(unicode.LittleEndian, unicode.UseBOM).NewEncoder().Bytes([]byte(s))
	if err != nil {
		panic(err)
	}
	return b
}

func win1252(s string) []byte {
	b, err := charmap.Windows1252.NewEncoder().Bytes([]byte(s))
	if err != nil {
		panic(err)
	}
	return b
}

func TestDialects(t *testing.T) {
	want := [][]string{{"A-1", "2025-03-04", "3"}, {"Bé", "2025-03-05", "4"}}
	for _, c := range []struct {
		name    string
		data    []byte
		dialect string
		lines   []int
	}{
		{"comma", []byte("sku,date,qty\nA-1,2025-03-04,3\nBé,2025-03-05,4\n"), "','-delimited, UTF-8", []int{2, 3}},
		{"semicolon BOM CRLF", []byte("\ufeffsku;date;qty\r\nA-1;2025-03-04;3\r\nBé;2025-03-05;4\r\n"), "';'-delimited, UTF-8 with BOM", []int{2, 3}},
		{"tab", []byte("sku\tdate\tqty\nA-1\t2025-03-04\t3\nBé\t2025-03-05\t4\n"), "tab-delimited, UTF-8", []int{2, 3}},
		{"pipe", []byte("sku|date|qty\nA-1|2025-03-04|3\nBé|2025-03-05|4"), "'|'-delimited, UTF-8", []int{2, 3}},
		{"blank lines and trailing empty columns", []byte("sku,date,qty,,\n\nA-1,2025-03-04,3,,\n\n  \nBé,2025-03-05,4\n"), "','-delimited, UTF-8", []int{3, 6}},
		{"sep line", []byte("sep=;\nsku;date;qty\nA-1;2025-03-04;3\nBé;2025-03-05;4\n"), "';'-delimited, UTF-8, sep= line", []int{3, 4}},
		{"title line", []byte("Stores issues, Harrow Lane\nsku;date;qty\nA-1;2025-03-04;3\nBé;2025-03-05;4\n"), "';'-delimited, UTF-8", []int{3, 4}},
		{"UTF-16LE", utf16le("sku;date;qty\r\nA-1;2025-03-04;3\r\nBé;2025-03-05;4\r\n"), "';'-delimited, UTF-16LE with BOM", []int{2, 3}},
		{"windows-1252", win1252("sku;date;qty\nA-1;2025-03-04;3\nBé;2025-03-05;4\n"), "';'-delimited, windows-1252", []int{2, 3}},
		{"quoted delimiter", []byte("sku,date,qty\n\"A-1\",2025-03-04,3\n\"Bé\",\"2025-03-05\",\"4\"\n"), "','-delimited, UTF-8", []int{2, 3}},
	} {
		r, err := NewReader(bytes.NewReader(c.data), "h.csv", Options{})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		got := r.Dialect.String()
		if c.name == "title line" {
			got = strings.Replace(got, ", 1 title line(s) skipped", "", 1)
		}
		if got != c.dialect {
			t.Errorf("%s: dialect %q, want %q", c.name, got, c.dialect)
		}
		if strings.Join(r.Header, "|") != "sku|date|qty" {
			t.Errorf("%s: header %q", c.name, r.Header)
		}
		recs, lines, err := readAll(t, r)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if len(recs) != 2 || strings.Join(recs[0], "|") != strings.Join(want[0], "|") || strings.Join(recs[1], "|") != strings.Join(want[1], "|") {
			t.Errorf("%s: records %q", c.name, recs)
		}
		if len(lines) != 2 || lines[0] != c.lines[0] || lines[1] != c.lines[1] {
			t.Errorf("%s: lines %v, want %v", c.name, lines, c.lines)
		}
	}
}

func TestReaderErrors(t *testing.T) {
	for _, c := range []struct {
		name, data string
		opt        Options
		want       string
	}{
		{"empty", "", Options{}, "h.csv: no header line"},
		{"more fields", "sku,date,qty\nA,2025-03-04,2,5\n", Options{}, "h.csv:2: 4 fields, but the header (line 1) has 3 (a decimal comma"},
		{"fewer fields", "sku;date;qty\nA;2025-03-04\n", Options{}, "h.csv:2: 2 fields, but the header (line 1) has 3"},
		{"bare quote", "sku,date,qty\nA\"x,2025-03-04,2\n", Options{}, "h.csv:2:"},
		{"not utf-8 later", "sku,date,qty\n" + strings.Repeat("A,2025-03-04,1\n", 6000) + "B\xe9,2025-03-04,1\n", Options{}, "h.csv:6002: bytes that are not UTF-8"},
	} {
		r, err := NewReader(strings.NewReader(c.data), "h.csv", c.opt)
		if err == nil {
			_, _, err = readAll(t, r)
		}
		var te *Error
		if err == nil || !strings.HasPrefix(err.Error(), c.want) || !errors.As(err, &te) {
			t.Errorf("%s: err %v, want prefix %q", c.name, err, c.want)
		}
	}
}

func TestColumns(t *testing.T) {
	cols := Columns{Known: []string{"sku", "date", "quantity", "location", "order_cost"}, Required: []string{"sku", "date", "quantity"}, MapFlag: "--history-columns"}
	for _, c := range []struct {
		name, header, mapping string
		want                  string // positions sku,date,quantity or the error
	}{
		{"exact", "sku,date,quantity", "", "0 1 2"},
		{"case and separators", " SKU ,Date,Quantity,Order-Cost", "", "0 1 2"},
		{"order cost with a space", "sku,date,quantity,Order Cost", "", "0 1 2"},
		{"mapped", "Item No,Posting Date,Qty,Site", "sku=Item No,date=Posting Date,quantity=Qty,location=Site", "0 1 2"},
		{"mapped missing", "Item,Posting Date,Qty", "sku=Item No,date=Posting Date,quantity=Qty", "h.csv:1: --history-columns maps sku to \"Item No\", but the header has no such column"},
		{"misspelt", "sku,date,quantity,ordercost", "", "h.csv:1: column ordercost: not a column ergostock reads, but close to order_cost"},
		{"misspelt required", "sku,date,quantitty", "", "h.csv:1: column quantitty: not a column ergostock reads, but close to quantity"},
		{"missing", "sku,date,qty", "", "h.csv:1: missing column quantity: the header (line 1) has \"sku\", \"date\", \"qty\"; name the column"},
		{"twice", "sku,date,quantity,SKU", "", "h.csv:1: column \"sku\" appears 2 times"},
		{"other delimiter", "sku;date;quantity", "", "the header looks ';'-delimited, but the file was read as ','-delimited"},
	} {
		r, err := NewReader(strings.NewReader(c.header+"\n"), "h.csv", Options{Delimiter: ','})
		if err != nil {
			t.Fatal(err)
		}
		cc := cols
		cc.Map, err = ParseColumnMap("--history-columns", c.mapping, cols.Known)
		if err != nil {
			t.Fatal(err)
		}
		idx, err := cc.Index(r)
		got := ""
		if err != nil {
			got = err.Error()
		} else {
			got = strings.Join([]string{itoa(idx["sku"]), itoa(idx["date"]), itoa(idx["quantity"])}, " ")
		}
		if !strings.Contains(got, c.want) {
			t.Errorf("%s: got %q, want %q", c.name, got, c.want)
		}
	}
	if _, err := ParseColumnMap("--history-columns", "colour=Red", cols.Known); err == nil || !strings.Contains(err.Error(), `"colour" is not a column`) {
		t.Errorf("unknown mapped name: %v", err)
	}
}

func itoa(i int) string { return string(rune('0' + i)) }

func TestNumbers(t *testing.T) {
	for _, c := range []struct {
		name    string
		decimal byte
		in      []string // parsed in order
		want    []float64
		err     string // error of the last one, if any
	}{
		{"integers", 0, []string{"0", "12", "-3", "+4", " 5 "}, []float64{0, 12, -3, 4, 5}, ""},
		{"point", 0, []string{"2.5", "1.200"}, []float64{2.5, 1.2}, ""},
		{"comma", 0, []string{"2,5", "1,200", "1.200,5", "1 200,25"}, []float64{2.5, 1.2, 1200.5, 1200.25}, ""},
		{"grouping decides point", 0, []string{"1,200.5", "1,200", "7"}, []float64{1200.5, 1200, 7}, ""},
		{"grouping decides comma", 0, []string{"1.234.567", "2,5"}, []float64{1234567, 2.5}, ""},
		{"space grouping", '.', []string{"1 200", "1\u00a0200.5", "12 345 678"}, []float64{1200, 1200.5, 12345678}, ""},
		{"exponent", 0, []string{"1.5e3", "2E-2"}, []float64{1500, 0.02}, ""},
		{"leading zero is decimal", 0, []string{"0.125"}, []float64{0.125}, ""},
		{"ambiguous", 0, []string{"1,200"}, nil, "give the decimal mark"},
		{"ambiguous point", 0, []string{"3.500"}, nil, "give the decimal mark"},
		{"contradiction", 0, []string{"2,5", "3.75"}, []float64{2.5}, `line 1 ("2,5") showed the file uses a decimal comma`},
		{"given point refuses comma", '.', []string{"2,5"}, nil, "the decimal mark is a decimal point"},
		{"hex", 0, []string{"0x10"}, nil, "want a number"},
		{"underscore", 0, []string{"9_000"}, nil, "want a number"},
		{"inf", 0, []string{"Inf"}, nil, "want a number"},
		{"nan", 0, []string{"NaN"}, nil, "want a number"},
		{"huge", 0, []string{"1e999"}, nil, "below about 1.8e308"},
		{"empty", 0, []string{""}, nil, "want a number"},
	} {
		n := &Numbers{Decimal: c.decimal}
		var err error
		for i, s := range c.in {
			var v float64
			v, err = n.Parse(s, i+1)
			if err != nil {
				if i != len(c.in)-1 {
					t.Errorf("%s: %q: %v", c.name, s, err)
				}
				break
			}
			if i >= len(c.want) || v != c.want[i] {
				t.Errorf("%s: %q = %v, want %v", c.name, s, v, c.want)
			}
		}
		switch {
		case c.err == "" && err != nil:
			t.Errorf("%s: %v", c.name, err)
		case c.err != "" && (err == nil || !strings.Contains(err.Error(), c.err)):
			t.Errorf("%s: err %v, want %q", c.name, err, c.err)
		}
	}
}

func TestMoneyAndFraction(t *testing.T) {
	n := &Numbers{}
	for _, c := range []struct {
		in   string
		v    float64
		curr string
	}{
		{"€12.50", 12.5, "EUR"}, {"12.50 EUR", 12.5, "EUR"}, {"$3", 3, "$"}, {" 7 ", 7, ""}, {"-€2", -2, "EUR"},
	} {
		v, cur, err := n.Money(c.in, 1)
		if err != nil || v != c.v || cur != c.curr {
			t.Errorf("Money(%q) = %v %q %v, want %v %q", c.in, v, cur, err, c.v, c.curr)
		}
	}
	m := &Numbers{Decimal: ','}
	for _, c := range []struct {
		in  string
		v   float64
		pct bool
	}{{"98%", 0.98, true}, {"98,5 %", 0.985, true}, {"0,95", 0.95, false}} {
		v, pct, err := m.Fraction(c.in, 1)
		if err != nil || v != c.v || pct != c.pct {
			t.Errorf("Fraction(%q) = %v %v %v, want %v %v", c.in, v, pct, err, c.v, c.pct)
		}
	}
}

func TestDates(t *testing.T) {
	day := func(y, m, d int) time.Time { return time.Date(y, time.Month(m), d, 0, 0, 0, 0, time.UTC) }
	for _, c := range []struct {
		layout DateLayout
		in     string
		want   time.Time
		err    bool
	}{
		{DateISO, "2025-03-04", day(2025, 3, 4), false},
		{DateISO, "2025-03-04 14:05:00", day(2025, 3, 4), false},
		{DateISO, "2025-03-04T14:05:00Z", day(2025, 3, 4), false},
		{DateISO, "2025-03-04T14:05:00+01:00", day(2025, 3, 4), false},
		{DateISO, "2025-02-29", time.Time{}, true},
		{DateISO, "2025-03-04 lunch", time.Time{}, true},
		{DateDotDMY, "04.03.2025", day(2025, 3, 4), false},
		{DateDotDMY, "4.3.2025 14:05", day(2025, 3, 4), false},
		{DateDMY, "04/03/2025", day(2025, 3, 4), false},
		{DateMDY, "03/04/2025", day(2025, 3, 4), false},
		{DateMDY, "13/04/2025", time.Time{}, true},
		{DateCompact, "20250304", day(2025, 3, 4), false},
		// The 1900 date system: 1 is 1900-01-01, 59 1900-02-28, 60 the
		// fictitious 1900-02-29, 61 1900-03-01; 45720 is 2025-03-04 (from
		// memory of the common spreadsheet convention, checked here by the
		// day count from 1899-12-30).
		{DateSerial, "1", day(1900, 1, 1), false},
		{DateSerial, "59", day(1900, 2, 28), false},
		{DateSerial, "60", time.Time{}, true},
		{DateSerial, "61", day(1900, 3, 1), false},
		{DateSerial, "45720", day(2025, 3, 4), false},
		{DateSerial, "45720.5", day(2025, 3, 4), false},
		{DateSerial, "0", time.Time{}, true},
	} {
		got, err := c.layout.Parse(c.in)
		if (err != nil) != c.err || (!c.err && !got.Equal(c.want)) {
			t.Errorf("%s.Parse(%q) = %v, %v; want %v (error %v)", c.layout, c.in, got, err, c.want, c.err)
		}
	}
}

func TestDetectDates(t *testing.T) {
	s := func(texts ...string) []DateSample {
		out := make([]DateSample, len(texts))
		for i, x := range texts {
			out[i] = DateSample{x, i + 2}
		}
		return out
	}
	for _, c := range []struct {
		name    string
		samples []DateSample
		want    DateLayout
		err     string
	}{
		{"iso", s("2025-03-04", "2025-12-31 08:00:00"), DateISO, ""},
		{"dots", s("04.03.2025", "31.12.2025"), DateDotDMY, ""},
		{"day first", s("04/03/2025", "31/12/2025"), DateDMY, ""},
		{"month first", s("03/04/2025", "12/31/2025"), DateMDY, ""},
		{"compact", s("20250304"), DateCompact, ""},
		{"serial", s("45720", "45721"), DateSerial, ""},
		{"ambiguous", s("04/03/2025", "05/03/2025"), "", "several layouts (DD/MM/YYYY, MM/DD/YYYY; no day above 12"},
		{"disagree", s("31/03/2025", "03/31/2025"), "", `line 2 ("31/03/2025") reads as DD/MM/YYYY, line 3 ("03/31/2025") as MM/DD/YYYY`},
		{"mixed layouts", s("2025-03-04", "04.03.2025"), "", "no one date layout reads every date"},
		{"nonsense", s("2025-03-04", "yesterday"), "", `date "yesterday" is in none of the layouts`},
	} {
		got, err := DetectDates("h.csv", "date", c.samples)
		switch {
		case c.err == "" && (err != nil || got != c.want):
			t.Errorf("%s: %v %v, want %v", c.name, got, err, c.want)
		case c.err != "" && (err == nil || !strings.Contains(err.Error(), c.err)):
			t.Errorf("%s: err %v, want %q", c.name, err, c.err)
		}
	}
}

// A workbook written by excelize reads back with dates as real date cells
// and as text, numbers as numbers.
func TestWorkbook(t *testing.T) {
	f := excelize.NewFile()
	defer f.Close()
	sh := "Issues"
	f.SetSheetName("Sheet1", sh)
	f.SetSheetRow(sh, "A1", &[]any{"SKU", "Date", "Qty"})
	f.SetSheetRow(sh, "A2", &[]any{"A-1", time.Date(2025, 3, 4, 0, 0, 0, 0, time.UTC), 3})
	f.SetSheetRow(sh, "A3", &[]any{"B-2", "2025-03-05", 4.5})
	f.SetSheetRow(sh, "A5", &[]any{"C-3", time.Date(2025, 3, 6, 14, 5, 0, 0, time.UTC), 1200})
	var buf bytes.Buffer
	if err := f.Write(&buf); err != nil {
		t.Fatal(err)
	}
	r, err := Open(bytes.NewReader(buf.Bytes()), "h.xlsx", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Dialect.String() != `workbook, sheet "Issues"` || strings.Join(r.Header, "|") != "SKU|Date|Qty" {
		t.Fatalf("dialect %q header %q", r.Dialect, r.Header)
	}
	recs, lines, err := readAll(t, r)
	if err != nil {
		t.Fatal(err)
	}
	want := [][]string{{"A-1", "2025-03-04", "3"}, {"B-2", "2025-03-05", "4.5"}, {"C-3", "2025-03-06 14:05:00", "1200"}}
	if len(recs) != 3 {
		t.Fatalf("records %q", recs)
	}
	for i := range want {
		if strings.Join(recs[i], "|") != strings.Join(want[i], "|") {
			t.Errorf("row %d: %q, want %q", lines[i], recs[i], want[i])
		}
	}
	if lines[2] != 5 {
		t.Errorf("lines %v, want the sheet's row numbers", lines)
	}
	if _, err := Open(bytes.NewReader(buf.Bytes()), "h.xlsx", Options{Sheet: "Nope"}); err == nil || !strings.Contains(err.Error(), `no sheet "Nope": the workbook has "Issues"`) {
		t.Errorf("missing sheet: %v", err)
	}
	if _, err := Open(strings.NewReader("PK\x03\x04garbage"), "h.xlsx", Options{}); err == nil || !strings.Contains(err.Error(), "not a readable .xlsx workbook") {
		t.Errorf("broken workbook: %v", err)
	}
}

func TestParseDelimiter(t *testing.T) {
	for in, want := range map[string]rune{"": 0, "auto": 0, ";": ';', "tab": '\t', "|": '|', "comma": ','} {
		if got, err := ParseDelimiter(in); err != nil || got != want {
			t.Errorf("ParseDelimiter(%q) = %q, %v", in, got, err)
		}
	}
	for _, in := range []string{";;", "\"", "\n"} {
		if _, err := ParseDelimiter(in); err == nil {
			t.Errorf("ParseDelimiter(%q) accepted", in)
		}
	}
}
