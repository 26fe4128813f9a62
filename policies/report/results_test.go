package report

import (
	"encoding/csv"
	"errors"
	"slices"
	"strconv"
	"strings"
	"testing"

	"ergostock/policies/batch"
)

// A results file as batch writes it (format v2), read back: the header
// record, guarded text cells, an item without a SKU, and line numbers that
// count the header record.
func TestReadResultsFileV2(t *testing.T) {
	m := batch.Meta{Format: batch.MetaFormat, Period: "day", Items: "0123456789abcdef", History: "none", MaxStates: 10,
		Shard: batch.Shard{K: 0, N: 1}, Version: "t"}
	m.Run = m.RunDigest()
	header := strings.Join(batch.Header(), ",")
	// row writes one CSV record with the given cells set by column name.
	row := func(set map[string]string) string {
		h := batch.Header()
		cells := make([]string, len(h))
		for i, n := range h {
			cells[i] = set[n]
		}
		var b strings.Builder
		w := csv.NewWriter(&b)
		w.Write(cells)
		w.Flush()
		return strings.TrimSuffix(b.String(), "\n")
	}
	failed := func(sku, msg string) string { return row(map[string]string{"sku": sku, "error": msg, "item": "0"}) }
	for _, tt := range []struct {
		name, data string
		meta       bool
		skus, errs []string
		want       string // error
	}{
		{name: "v2", data: m.String() + "\n" + header + "\n" + failed("'=A1", "'-bad") + "\n" + failed("", "items.csv:3: sku \"\": want a non-empty SKU") + "\n",
			meta: true, skus: []string{"=A1", ""}, errs: []string{"-bad", `items.csv:3: sku "": want a non-empty SKU`}},
		{name: "BOM and CRLF", data: "\ufeff" + m.String() + "\r\n" + header + "\r\n" + failed("''Q", "x") + "\r\n",
			meta: true, skus: []string{"'Q"}, errs: []string{"x"}},
		{name: "v1, no header record", data: header + "\n" + failed("A", "x") + "\n", skus: []string{"A"}, errs: []string{"x"}},
		{name: "no SKU and no error", data: m.String() + "\n" + header + "\n" + failed("", "") + "\n",
			want: `r.csv:3: sku "": want a SKU (only a failed item may lack one)`},
		{name: "bad number, line counted", data: m.String() + "\n" + header + "\n" + row(map[string]string{"sku": "A", "demand_mean": "zz"}) + "\n",
			want: `r.csv:3: demand_mean "zz": want a finite number or an empty cell`},
		{name: "CSV error, line counted", data: m.String() + "\n" + header + "\nA,\"open\n",
			want: "r.csv:3: extraneous"},
		{name: "newer format", data: "# ergostock results v9; period=day; items=x\n" + header + "\n",
			want: "r.csv:1: results format v9: this ergostock reads up to v2; use a newer version"},
		{name: "missing column, line counted", data: m.String() + "\nsku,demand\n",
			want: "r.csv:2: missing columns"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			res, err := ReadResultsFile(strings.NewReader(tt.data), "r.csv")
			if tt.want != "" {
				if err == nil || !strings.Contains(err.Error(), tt.want) {
					t.Fatalf("err = %v, want %q", err, tt.want)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if (res.Meta != nil) != tt.meta || (tt.meta && *res.Meta != m) {
				t.Errorf("meta %+v, want %v", res.Meta, tt.meta)
			}
			if len(res.Rows) != len(tt.skus) {
				t.Fatalf("%d rows, want %d", len(res.Rows), len(tt.skus))
			}
			for i, r := range res.Rows {
				if r.SKU != tt.skus[i] || r.Err != tt.errs[i] {
					t.Errorf("row %d: sku %q error %q, want %q %q", i, r.SKU, r.Err, tt.skus[i], tt.errs[i])
				}
				if want := i + 2; tt.meta && r.Line != want+1 || !tt.meta && r.Line != want {
					t.Errorf("row %d: line %d", i, r.Line)
				}
			}
		})
	}
}

// The timing columns (batch.TimingColumns) round-trip through the writer
// and the reader, a law with commas included; a file written before they
// existed is still read (empty timing), and a bad cell names its line and
// column.
func TestReadResultsTiming(t *testing.T) {
	var b strings.Builder
	w := batch.NewWriter(&b)
	if err := w.WriteHeader(); err != nil {
		t.Fatal(err)
	}
	for _, r := range []batch.Row{
		{SKU: "A", LeadTime: "pmf:1=0.2,2=0.5,3=0.3", LeadTimeModel: "independent", ReviewPeriod: 7, Err: errFailed},
		{SKU: "B", LeadTime: "3", LeadTimeModel: "sequential", ReviewPeriod: 1, Err: errFailed},
		{SKU: "C", Err: errFailed},
	} {
		if err := w.Write(&r); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	rows, err := ReadResults(strings.NewReader(b.String()), "r.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := [][3]string{{"pmf:1=0.2,2=0.5,3=0.3", "independent", "7"}, {"3", "sequential", "1"}, {"", "", "0"}}
	for i, r := range rows {
		if got := [3]string{r.LeadTime, r.LeadTimeModel, strconv.Itoa(r.ReviewPeriod)}; got != want[i] {
			t.Errorf("row %d: timing %q, want %q", i, got, want[i])
		}
	}
	// An older file: the header without the timing columns.
	var old []string
	for _, h := range batch.Header() {
		if !slices.Contains(batch.TimingColumns, h) {
			old = append(old, h)
		}
	}
	cells := make([]string, len(old))
	cells[0], cells[slices.Index(old, "error")] = "Z", "x"
	rows, err = ReadResults(strings.NewReader(strings.Join(old, ",")+"\n"+strings.Join(cells, ",")+"\n"), "old.csv")
	if err != nil || len(rows) != 1 || rows[0].LeadTime != "" || rows[0].ReviewPeriod != 0 {
		t.Fatalf("older file: %+v, %v", rows, err)
	}
	// Bad cells.
	h := batch.Header()
	for _, c := range []struct{ col, val, want string }{
		{"lead_time", "soon", `r.csv:2: lead_time "soon": want a whole number of periods or a lead-time law`},
		{"lead_time_model", "crossing", `r.csv:2: lead_time_model "crossing": want sequential or independent`},
		{"review_period", "1.5", `r.csv:2: review_period "1.5": want a whole number or an empty cell`},
		{"review_period", "-2", `r.csv:2: review_period "-2": want a whole number of periods >= 1 or an empty cell`},
	} {
		cells := make([]string, len(h))
		cells[0], cells[slices.Index(h, "error")], cells[slices.Index(h, c.col)] = "A", "x", c.val
		_, err := ReadResults(strings.NewReader(strings.Join(h, ",")+"\n"+strings.Join(cells, ",")+"\n"), "r.csv")
		if err == nil || err.Error() != c.want {
			t.Errorf("%s %q: err %v, want %s", c.col, c.val, err, c.want)
		}
	}
}

var errFailed = errors.New("failed")

// The batch page states the timing assumptions only when some row has a
// lead-time law or a review period above 1.
func TestBatchTimingCautions(t *testing.T) {
	for _, c := range []struct {
		name string
		rows []ResultRow
		want []string // substrings, one per line; nil: no lines
	}{
		{"older file", []ResultRow{{SKU: "A"}}, nil},
		{"fixed, every period", []ResultRow{{SKU: "A", LeadTime: "3", LeadTimeModel: "sequential", ReviewPeriod: 1}}, nil},
		{"laws and weekly review", []ResultRow{
			{SKU: "A", LeadTime: "pmf:1=0.2,2=0.8", LeadTimeModel: "sequential", ReviewPeriod: 7},
			{SKU: "B", LeadTime: "pmf:0=0.5,3=0.5", LeadTimeModel: "independent", ReviewPeriod: 1},
			{SKU: "C", LeadTime: "2", LeadTimeModel: "sequential", ReviewPeriod: 7},
		}, []string{"lead_time column", "sequential deliveries (Kaplan 1970) for 1 item:", "Independent lead times for 1 item:", "for 2 items: orders are placed only at reviews"}},
	} {
		got := batchTimingCautions(c.rows)
		if len(got) != len(c.want) {
			t.Errorf("%s: %q, want %d lines", c.name, got, len(c.want))
			continue
		}
		for i, w := range c.want {
			if !strings.Contains(got[i], w) {
				t.Errorf("%s: line %d %q, want %q", c.name, i, got[i], w)
			}
		}
	}
}

// The items table's lead-time cell: the law (cut when long, with the whole
// text kept for the title), the model when orders may cross, the review
// period above 1.
func TestLeadText(t *testing.T) {
	long := "pmf:1=0.1111111111,2=0.2222222222,3=0.3333333333,4=0.3333333334"
	for _, c := range []struct {
		r          ResultRow
		text, full string
	}{
		{ResultRow{LeadTime: "2", LeadTimeModel: "sequential", ReviewPeriod: 1}, "2", ""},
		{ResultRow{LeadTime: "2", LeadTimeModel: "independent", ReviewPeriod: 7}, "2, R=7", ""},
		{ResultRow{LeadTime: "pmf:1=0.5,3=0.5", LeadTimeModel: "independent", ReviewPeriod: 2}, "pmf:1=0.5,3=0.5, independent, R=2", ""},
		{ResultRow{LeadTime: long, LeadTimeModel: "sequential"}, "pmf:1=0.1111111111,2=0.2222222222,…", long},
		{ResultRow{LeadTime: "", ReviewPeriod: 3}, "R=3", ""},
	} {
		if text, full := leadText(c.r); text != c.text || full != c.full {
			t.Errorf("%+v: %q %q, want %q %q", c.r, text, full, c.text, c.full)
		}
	}
}
