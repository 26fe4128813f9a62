package batch

import (
	"bytes"
	"fmt"
	"slices"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

// mergeCatalogue returns n planned rows, item positions 0..n-1.
func mergeCatalogue(n int) []*Row {
	rows := make([]*Row, n)
	for i := range rows {
		rows[i] = &Row{Item: i, SKU: fmt.Sprintf("TRAM-%03d", i), Demand: "poisson:mean=1.5", DemandMean: 1.5, DemandVariance: 1.5,
			Policy:  &policies.Policy{Kind: policies.BaseStock, OrderUpTo: 3 + i},
			Figures: &inventory.Figures{FillRate: 0.9 + float64(i)/1000, TotalCost: 1.25 * float64(i)}, States: 10}
	}
	return rows
}

// writeShard writes the rows of shard sh of the catalogue as batch would.
func writeShard(t testing.TB, rows []*Row, sh Shard, f Format, run string) string {
	t.Helper()
	var b bytes.Buffer
	w, err := NewFormatWriter(&b, f)
	if err != nil {
		t.Fatal(err)
	}
	m := Meta{Format: MetaFormat, Period: "week", Items: "0123456789abcdef", History: "fedcba9876543210", MaxStates: 100, Shard: sh, Version: "t", ItemCount: len(rows)}
	m.Run = m.RunDigest()
	if run != "" {
		m.Run = run
	}
	w.WriteMeta(m)
	w.WriteHeader()
	for _, r := range rows {
		if sh.Contains(r.Item) {
			w.Write(r)
		}
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

func mergeStrings(parts map[string]string, order ...string) (string, error) {
	var ps []Part
	for _, name := range order {
		ps = append(ps, Part{Name: name, R: strings.NewReader(parts[name])})
	}
	var b bytes.Buffer
	_, err := Merge(&b, ps)
	return b.String(), err
}

// The merge of all shards is the unsharded file byte for byte, in every
// dialect, whatever order the parts come in.
func TestMergeEqualsUnsharded(t *testing.T) {
	rows := mergeCatalogue(11)
	for _, f := range []Format{{}, {Delimiter: ';', Decimal: ','}, {Delimiter: '\t', Digits: 4}} {
		whole := writeShard(t, rows, Shard{0, 1}, f, "")
		for _, n := range []int{1, 3, 4, 11, 13} {
			parts := map[string]string{}
			var names []string
			for k := n - 1; k >= 0; k-- {
				name := fmt.Sprintf("part-%d.csv", k)
				parts[name] = writeShard(t, rows, Shard{k, n}, f, "")
				names = append(names, name)
			}
			got, err := mergeStrings(parts, names...)
			if err != nil {
				t.Fatalf("%+v, %d parts: %v", f, n, err)
			}
			if got != whole {
				t.Errorf("%+v, %d parts: merged\n%s\nwant\n%s", f, n, got, whole)
			}
		}
	}
}

func TestMergeRefusals(t *testing.T) {
	rows := mergeCatalogue(6)
	a := writeShard(t, rows, Shard{0, 2}, Format{}, "")
	b := writeShard(t, rows, Shard{1, 2}, Format{}, "")
	// cut drops the data line holding the given item (cells ...,item,<5 current cells>).
	cut := func(s string, item int) string {
		var keep []string
		for _, l := range strings.SplitAfter(s, "\n") {
			if !strings.HasSuffix(l, fmt.Sprintf(",%d,,,,,\n", item)) {
				keep = append(keep, l)
			}
		}
		return strings.Join(keep, "")
	}
	dup := func(s string, line int) string { // repeats a line
		ls := strings.SplitAfter(s, "\n")
		return strings.Join(append(ls[:line+1], ls[line:]...), "")
	}
	for _, tt := range []struct {
		name  string
		parts map[string]string
		order []string
		want  string
	}{
		{"digest mismatch", map[string]string{"a.csv": a, "b.csv": writeShard(t, rows, Shard{1, 2}, Format{}, "0000000000000000")}, []string{"a.csv", "b.csv"},
			"b.csv:1: run digest 0000000000000000, but a.csv has "},
		{"dialect mismatch", map[string]string{"a.csv": a, "b.csv": writeShard(t, rows, Shard{1, 2}, Format{Delimiter: ';'}, "")}, []string{"a.csv", "b.csv"},
			"b.csv:1: delimiter ';', but a.csv has ','"},
		{"digits mismatch", map[string]string{"a.csv": a, "b.csv": writeShard(t, rows, Shard{1, 2}, Format{Digits: 3}, "")}, []string{"a.csv", "b.csv"},
			"b.csv:1: digits 3, but a.csv has 0"},
		{"header mismatch", map[string]string{"a.csv": a, "b.csv": strings.Replace(b, ",saving,", ",savings,", 1)}, []string{"a.csv", "b.csv"},
			fmt.Sprintf(`b.csv:2: column header differs from a.csv's at column %d ("savings", there "saving")`, 1+slices.Index(Header(), "saving"))},
		{"missing shard", map[string]string{"a.csv": a}, []string{"a.csv"}, "shard 1/2 is missing: the 1 parts given are 0/2 (a.csv); want all 2"},
		{"shard twice", map[string]string{"a.csv": a, "c.csv": a}, []string{"a.csv", "c.csv"}, "c.csv:1: shard 0/2 is also a.csv"},
		{"gap", map[string]string{"a.csv": a, "b.csv": cut(b, 3)}, []string{"a.csv", "b.csv"},
			"b.csv: no row for item 3 (a position of its shard 1/2): the parts hold 5 rows and want positions 0..5 exactly once"},
		{"gap at the end", map[string]string{"a.csv": a, "b.csv": cut(b, 5)}, []string{"a.csv", "b.csv"},
			"b.csv: no row for item 5 (a position of its shard 1/2)"},
		{"beyond the item count", map[string]string{"a.csv": a, "b.csv": strings.Replace(b, ",5,,,,,\n", ",7,,,,,\n", 1)}, []string{"a.csv", "b.csv"},
			"b.csv:5: item 7, but the items file has 6 items"},
		{"item count mismatch", map[string]string{"a.csv": a, "b.csv": strings.Replace(b, "item_count=6", "item_count=7", 1)}, []string{"a.csv", "b.csv"},
			"b.csv:1: item_count 7, but a.csv has 6"},
		{"duplicate", map[string]string{"a.csv": dup(a, 3), "b.csv": b}, []string{"a.csv", "b.csv"},
			"a.csv:5: item 2 is also on a.csv:4: each item position must come once"},
		{"item of another shard", map[string]string{"a.csv": strings.Replace(a, ",2,,,,,\n", ",3,,,,,\n", 1), "b.csv": b}, []string{"a.csv", "b.csv"},
			"a.csv:4: item 3 is not a position of the part's shard 0/2 (header record)"},
		{"item not a number", map[string]string{"a.csv": strings.Replace(a, ",2,,,,,\n", ",two,,,,,\n", 1), "b.csv": b}, []string{"a.csv", "b.csv"},
			`a.csv:4: item "two": want the item's position`},
		{"no header record", map[string]string{"a.csv": a[strings.IndexByte(a, '\n')+1:], "b.csv": b}, []string{"a.csv", "b.csv"},
			"a.csv:1: no header record"},
		{"empty", map[string]string{"a.csv": ""}, []string{"a.csv"}, "a.csv: empty file"},
		{"ragged row", map[string]string{"a.csv": a + "X,1\n", "b.csv": b}, []string{"a.csv", "b.csv"}, "a.csv:6: 2 fields, but the header (line 2) has"},
		{"workbook", map[string]string{"a.xlsx": "PK\x03\x04junk"}, []string{"a.xlsx"}, "a.xlsx: a workbook: merge joins CSV parts"},
		{"none", nil, nil, "no parts to merge"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			got, err := mergeStrings(tt.parts, tt.order...)
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Fatalf("err = %v, want %q", err, tt.want)
			}
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("message on more than one line: %q", err)
			}
			if got != "" {
				t.Errorf("wrote %d bytes on refusal", len(got))
			}
		})
	}
}
