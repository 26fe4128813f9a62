package report

import (
	"encoding/csv"
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
