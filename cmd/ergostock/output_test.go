package main

import (
	"bytes"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"ergostock/policies/batch"
	"ergostock/policies/report"
)

// The demo catalogue, planned once per test that needs it.
const (
	demoItems   = "../../data/items.csv"
	demoHistory = "../../data/history.csv"
)

// batchTo runs the demo batch (or the given items and history) into out
// with extra flags and fails the test unless it exits with want.
func batchTo(t *testing.T, want int, out string, extra ...string) {
	t.Helper()
	args := append([]string{"--items", demoItems, "--history", demoHistory, "--out", out, "--workers", "2"}, extra...)
	code, stderr := runBatchCmd(t, args...)
	if code != want {
		t.Fatalf("batch %v: exit %d, want %d: %s", extra, code, want, stderr)
	}
}

func readFile(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// The plain run is byte-identical to one that gives the defaults of the
// output flags, so the new flags change nothing unless used.
func TestBatchOutDefaultsByteIdentical(t *testing.T) {
	dir := t.TempDir()
	plain, explicit := filepath.Join(dir, "plain.csv"), filepath.Join(dir, "explicit.csv")
	batchTo(t, 0, plain)
	batchTo(t, 0, explicit, "--out-delimiter", ",", "--out-decimal", ".", "--digits", "0")
	if a, b := readFile(t, plain), readFile(t, explicit); !bytes.Equal(a, b) {
		t.Fatalf("explicit defaults changed the results (%d vs %d bytes)", len(a), len(b))
	}
}

// Results written in each dialect read back (by the report's reader, which
// is inventory/tabular's) as the same rows, figure for figure, and give the
// same batch page.
func TestBatchOutDialectsRoundTrip(t *testing.T) {
	dir := t.TempDir()
	plain := filepath.Join(dir, "plain.csv")
	batchTo(t, 0, plain)
	want := readResultsFileT(t, plain)
	wantPage := reportPage(t, plain)
	for _, tt := range []struct {
		name  string
		flags []string
		start string // the file's first bytes
	}{
		{"semicolon, decimal comma", []string{"--out-delimiter", ";", "--out-decimal", ","}, "\ufeff# ergostock results v"},
		{"tab, decimal comma", []string{"--out-delimiter", "tab", "--out-decimal", "comma"}, "\ufeff# ergostock results v"},
		{"semicolon, decimal point", []string{"--out-delimiter", "semicolon"}, "\ufeff# ergostock results v"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			out := filepath.Join(dir, "dialect.csv")
			batchTo(t, 0, out, tt.flags...)
			if b := readFile(t, out); !bytes.HasPrefix(b, []byte(tt.start)) {
				t.Errorf("starts %.40q, want %q", b, tt.start)
			}
			got := readResultsFileT(t, out)
			if !reflect.DeepEqual(got.Rows, want.Rows) {
				for i := range got.Rows {
					if !reflect.DeepEqual(got.Rows[i], want.Rows[i]) {
						t.Fatalf("row %d differs:\n got %+v\nwant %+v", i, got.Rows[i], want.Rows[i])
					}
				}
				t.Fatalf("rows differ")
			}
			if g, w := got.Meta.Run, want.Meta.Run; g != w {
				t.Errorf("run digest %s, want %s", g, w)
			}
			if page := strings.ReplaceAll(reportPage(t, out), out, plain); page != wantPage {
				t.Errorf("the batch page differs from the plain run's")
			}
		})
	}
}

// --digits N rounds every figure to N significant digits, once, and the
// report reads the rounded file.
func TestBatchOutDigits(t *testing.T) {
	dir := t.TempDir()
	plain, rounded := filepath.Join(dir, "plain.csv"), filepath.Join(dir, "rounded.csv")
	batchTo(t, 0, plain)
	batchTo(t, 0, rounded, "--digits", "3", "--out-delimiter", ";", "--out-decimal", ",")
	full, short := readResultsFileT(t, plain), readResultsFileT(t, rounded)
	if short.Meta.Cells.Digits != 3 || short.Meta.Cells.Decimal != ',' {
		t.Errorf("header record %+v: want digits=3 and decimal=comma", short.Meta.Cells)
	}
	for i, r := range short.Rows {
		f, g := full.Rows[i].Figures, r.Figures
		if f == nil || g == nil {
			t.Fatalf("row %d has no figures", i)
		}
		for j, fd := range f.Fields() {
			got := g.Fields()[j].Value
			if got != roundTo(fd.Value, 3) {
				t.Errorf("%s %s = %v, want %v rounded to 3 digits (%v)", r.SKU, fd.Name, got, fd.Value, roundTo(fd.Value, 3))
			}
		}
		if *r.Policy != *full.Rows[i].Policy {
			t.Errorf("%s: policy %v, want %v (levels are never rounded)", r.SKU, *r.Policy, *full.Rows[i].Policy)
		}
	}
}

func readResultsFileT(t *testing.T, path string) *report.Results {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	res, err := report.ReadResultsFile(f, path)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// reportPage writes the batch page of a results file (no items, so no
// exchange curve) and returns it.
func reportPage(t *testing.T, results string) string {
	t.Helper()
	out := results + ".html"
	code, _, stderr := runReport("--results", results, "--out", out)
	if code != 0 {
		t.Fatalf("report %s: exit %d: %s", results, code, stderr)
	}
	return string(readFile(t, out))
}

// roundTo rounds as --digits does.
func roundTo(v float64, n int) float64 {
	if v == 0 {
		return 0
	}
	return batch.RoundDigits(v, n)
}

// The results name the planning period and the unit of costs (header
// record and summary line), and carry the current policy's levels, as the
// items file gives them, and its fill rate beside the recommended ones.
func TestBatchUnitsAndCurrentPolicy(t *testing.T) {
	out := filepath.Join(t.TempDir(), "results.csv")
	code, stderr := runBatchCmd(t, "--items", demoItems, "--history", demoHistory, "--out", out, "--period", "month", "--workers", "2")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "planning period month, costs per month: total cost ") || !strings.Contains(stderr, " per month over ") {
		t.Errorf("summary line does not name the period: %s", stderr)
	}
	first := strings.SplitN(string(readFile(t, out)), "\n", 2)[0]
	if !strings.Contains(first, "; period=month;") || !strings.HasSuffix(first, "; costs=per month") {
		t.Errorf("header record %q: want period=month and costs=per month", first)
	}
	header, rows := readResults(t, out)
	items := readCSV(t, demoItems)
	ih := items[0]
	with := 0
	for _, r := range rows {
		get := func(c string) string { return r[column(header, c)] }
		item := items[1+atoiT(t, get("item"))]
		iget := func(c string) string {
			if i := slices.Index(ih, c); i >= 0 {
				return strings.TrimSpace(item[i])
			}
			return ""
		}
		if get("current_policy") == "" {
			if get("current_total_cost") != "" || get("current_fill_rate") != "" {
				t.Errorf("%s: current figures without a current policy", get("sku"))
			}
			continue
		}
		with++
		for _, c := range []string{"current_reorder_point", "current_order_up_to", "current_order_multiple"} {
			if get(c) != iget(c) {
				t.Errorf("%s: %s %q, the items file has %q", get("sku"), c, get(c), iget(c))
			}
		}
		fr := parseFloatT(t, get("current_fill_rate"))
		if !(fr >= 0 && fr <= 1) {
			t.Errorf("%s: current_fill_rate %v", get("sku"), fr)
		}
		cur, tot, sav := parseFloatT(t, get("current_total_cost")), parseFloatT(t, get("total_cost")), parseFloatT(t, get("saving"))
		if cur-tot != sav {
			t.Errorf("%s: saving %v, want %v - %v", get("sku"), sav, cur, tot)
		}
	}
	if with == 0 {
		t.Error("no item with a current policy in the demo")
	}
	page := reportPage(t, out)
	for _, want := range []string{"Planned by the month; costs are per month.", `<th class="num">current fill rate</th>`,
		"aggregate fill rate of the current policies, where given (demand-weighted)"} {
		if !strings.Contains(page, want) {
			t.Errorf("batch page lacks %q", want)
		}
	}
}

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	recs, err := csv.NewReader(bytes.NewReader(readFile(t, path))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs
}

func atoiT(t *testing.T, s string) int {
	t.Helper()
	n, err := strconv.Atoi(s)
	if err != nil {
		t.Fatal(err)
	}
	return n
}

func parseFloatT(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// dataV matches the sort keys of the batch page's table cells.
var dataV = regexp.MustCompile(` data-v="[^"]*"`)

// Results written as a workbook read back by the report as the same rows:
// levels, text and warnings exactly, figures to the 15 significant digits
// a workbook cell keeps; the page shows the same figures.
func TestBatchOutWorkbookRoundTrip(t *testing.T) {
	dir := t.TempDir()
	plain, book := filepath.Join(dir, "plain.csv"), filepath.Join(dir, "results.xlsx")
	batchTo(t, 0, plain)
	batchTo(t, 0, book)
	if b := readFile(t, book); !bytes.HasPrefix(b, []byte("PK\x03\x04")) {
		t.Fatalf("%s is not a workbook: starts %.10q", book, b)
	}
	want, got := readResultsFileT(t, plain), readResultsFileT(t, book)
	if got.Meta == nil || got.Meta.Run != want.Meta.Run || got.Meta.Period != "week" {
		t.Fatalf("header record %+v, want %+v", got.Meta, want.Meta)
	}
	if len(got.Rows) != len(want.Rows) {
		t.Fatalf("%d rows, want %d", len(got.Rows), len(want.Rows))
	}
	close := func(a, b float64) bool { return math.Abs(a-b) <= 1e-14*math.Max(math.Abs(a), math.Abs(b)) }
	for i, g := range got.Rows {
		w := want.Rows[i]
		if g.SKU != w.SKU || g.Demand != w.Demand || *g.Policy != *w.Policy || strings.Join(g.Warnings, "|") != strings.Join(w.Warnings, "|") ||
			(g.Current == nil) != (w.Current == nil) || g.Current != nil && *g.Current != *w.Current {
			t.Fatalf("row %d: %+v, want %+v", i, g, w)
		}
		for j, f := range w.Figures.Fields() {
			if v := g.Figures.Fields()[j].Value; !close(v, f.Value) {
				t.Errorf("%s %s: %v, want %v", w.SKU, f.Name, v, f.Value)
			}
		}
	}
	page := dataV.ReplaceAllString(strings.ReplaceAll(reportPage(t, book), book, plain), "")
	if page != dataV.ReplaceAllString(reportPage(t, plain), "") {
		t.Error("the batch page of the workbook shows other figures than the CSV's")
	}
}

// --carry copies item columns to the results, after every results column;
// report and merge read such files.
func TestBatchCarry(t *testing.T) {
	dir := t.TempDir()
	items := readCSV(t, demoItems)
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	for i, rec := range items {
		extra := []string{"Supplier", "store group"}
		if i > 0 {
			extra = []string{"Brackwater Works " + strconv.Itoa(i%3), strings.SplitN(rec[0], "-", 2)[0]}
		}
		w.Write(append(rec, extra...))
	}
	w.Flush()
	path := filepath.Join(dir, "items.csv")
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "results.csv")
	code, stderr := runBatchCmd(t, "--items", path, "--history", demoHistory, "--out", out, "--carry", "supplier,Store_Group")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	header, rows := readResults(t, out)
	if n := len(header); header[n-2] != "Supplier" || header[n-1] != "store group" {
		t.Fatalf("header ends %q", header[n-3:])
	}
	for i, r := range rows {
		if want := items[1+i]; r[len(r)-1] != strings.SplitN(want[0], "-", 2)[0] || r[len(r)-2] != "Brackwater Works "+strconv.Itoa((i+1)%3) {
			t.Fatalf("row %d carries %q", i, r[len(r)-2:])
		}
	}
	readResultsFileT(t, out) // the report reads it
	// Parts with the same --carry merge; the column header has the carried columns.
	var parts []string
	for k := 0; k < 2; k++ {
		p := filepath.Join(dir, "part-"+strconv.Itoa(k)+".csv")
		if code, stderr := runBatchCmd(t, "--items", path, "--history", demoHistory, "--out", p, "--carry", "supplier,Store_Group", "--shard", strconv.Itoa(k)+"/2"); code != 0 {
			t.Fatalf("shard %d: exit %d: %s", k, code, stderr)
		}
		parts = append(parts, p)
	}
	merged := filepath.Join(dir, "merged.csv")
	if code, _, stderr := runMergeCmd(append([]string{"--out", merged}, parts...)...); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, stderr)
	}
	if !bytes.Equal(readFile(t, merged), readFile(t, out)) {
		t.Error("merged parts with carried columns differ from the unsharded run")
	}
	// An unknown column is refused naming the header found, before any
	// work, and nothing is written.
	code, stderr = runBatchCmd(t, "--items", path, "--history", demoHistory, "--out", filepath.Join(dir, "no.csv"), "--carry", "vendor")
	if code != 2 || !strings.Contains(stderr, `--carry vendor: `+path+` has no such column: its header has "sku", "lead_time"`) || strings.Count(stderr, "\n") != 1 {
		t.Errorf("exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(dir, "no.csv")); err == nil {
		t.Error("a refused run wrote its results")
	}
}

// The --uncertainty columns read back the same from a decimal-comma file
// and from a workbook (to 15 digits) as from the plain file.
func TestBatchOutUncertaintyDialects(t *testing.T) {
	dir := t.TempDir()
	args := []string{"--shard", "0/60", "--uncertainty", "--resamples", "8", "--seed", "3"}
	plain, semi, book := filepath.Join(dir, "p.csv"), filepath.Join(dir, "s.csv"), filepath.Join(dir, "b.xlsx")
	batchTo(t, 0, plain, args...)
	batchTo(t, 0, semi, append(args, "--out-delimiter", ";", "--out-decimal", ",")...)
	batchTo(t, 0, book, args...)
	want, got := readResultsFileT(t, plain), readResultsFileT(t, semi)
	if !reflect.DeepEqual(got.Rows, want.Rows) {
		t.Fatal("the decimal-comma file reads back other rows than the plain one")
	}
	wb := readResultsFileT(t, book)
	for i, r := range wb.Rows {
		w := want.Rows[i]
		if (r.Uncertainty == nil) != (w.Uncertainty == nil) {
			t.Fatalf("%s: uncertainty %v, want %v", r.SKU, r.Uncertainty, w.Uncertainty)
		}
	}
	if want.Rows[0].Uncertainty == nil {
		t.Error("no uncertainty columns read")
	}
}
