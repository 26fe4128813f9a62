package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

// demoReceipts is the demo's receipts file (written by data/gen).
const demoReceipts = "../../data/receipts.csv"

// fewReceipts: six orders of one part in ISO weeks (four of one week, two
// of two weeks, one delivered in two parts) and two of another from the
// same invented supplier, which pool with them.
const fewReceipts = `SKU;Supplier;Order Date;Receipt Date;Quantity
DOOR-ROLLER-T3;Kelbrook Castings;03.03.2025;12.03.2025;20
DOOR-ROLLER-T3;Kelbrook Castings;17.03.2025;26.03.2025;20
DOOR-ROLLER-T3;Kelbrook Castings;31.03.2025;16.04.2025;20
DOOR-ROLLER-T3;Kelbrook Castings;14.04.2025;23.04.2025;20
DOOR-ROLLER-T3;Kelbrook Castings;28.04.2025;07.05.2025;12
DOOR-ROLLER-T3;Kelbrook Castings;28.04.2025;14.05.2025;8
DOOR-ROLLER-T3;Kelbrook Castings;12.05.2025;21.05.2025;20
HORN-ASSY-T3;Kelbrook Castings;03.03.2025;19.03.2025;2
HORN-ASSY-T3;Kelbrook Castings;07.04.2025;16.04.2025;1
`

func TestFitReceiptsJSON(t *testing.T) {
	code, out, errs := fitRun(fewReceipts, "--receipts", "-", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res []receiptsJSON
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if len(res) != 2 {
		t.Fatalf("%d SKUs, want 2", len(res))
	}
	cases := []struct {
		sku, source, law string
		orders, basis    int
		counts           []receiptsCountJSON
	}{
		{"DOOR-ROLLER-T3", "own", "pmf:1=0.6666666666666666,2=0.3333333333333333", 6, 6, []receiptsCountJSON{{1, 4}, {2, 2}}},
		{"HORN-ASSY-T3", "supplier", "pmf:1=0.625,2=0.375", 2, 8, []receiptsCountJSON{{1, 5}, {2, 3}}},
	}
	for i, c := range cases {
		r := res[i]
		if r.SKU != c.sku || r.Source != c.source || r.LeadTime != c.law || r.Orders != c.orders || r.Basis != c.basis || !r.Usable || !r.Realisable {
			t.Errorf("%d: %+v, want %+v", i, r, c)
		}
		if len(r.Counts) != len(c.counts) {
			t.Errorf("%s: counts %v, want %v", c.sku, r.Counts, c.counts)
			continue
		}
		for j := range c.counts {
			if r.Counts[j] != c.counts[j] {
				t.Errorf("%s: counts %v, want %v", c.sku, r.Counts, c.counts)
			}
		}
		if _, _, err := inventory.ParseLeadTime(r.LeadTime); err != nil {
			t.Errorf("%s: law %q does not read back: %v", c.sku, r.LeadTime, err)
		}
	}
	if res[0].Partial != 1 || res[0].Receipts != 7 {
		t.Errorf("partials %d receipts %d, want 1 and 7", res[0].Partial, res[0].Receipts)
	}
	if !strings.Contains(errs, "fit: 2 SKUs from stdin (';'-delimited, UTF-8; dates DD.MM.YYYY; lead times in week periods)") {
		t.Errorf("summary: %s", errs)
	}
}

func TestFitReceiptsDemoTable(t *testing.T) {
	code, out, errs := fitRun("", "--receipts", demoReceipts)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if !strings.HasPrefix(lines[0], "sku ") || !strings.Contains(lines[0], "counts") || !strings.Contains(lines[0], "lead_time") || len(lines) != 21 {
		t.Fatalf("table:\n%s", out)
	}
	want := map[string]string{
		"HOSE-CLIP-32-50":   `the law pools supplier "Kelbrook Castings"`,
		"HEADLIGHT-UNIT-T3": "no supplier to pool with",
		"DEGREASER-5L":      "1 order left out as far from the others",
		"SAND-DRY-25KG":     "orders delivered in parts",
		"GLOVE-NITRILE-M":   "nearest law they admit",
	}
	for sku, words := range want {
		found := false
		for _, l := range lines {
			if strings.HasPrefix(l, sku+" ") {
				found = strings.Contains(l, words)
			}
		}
		if !found {
			t.Errorf("%s: no row holding %q in\n%s", sku, words, out)
		}
	}
}

func TestFitReceiptsRefusals(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "r.csv")
	writeFile(t, bad, "sku,order_date,receipt_date\nA,2025-03-10,2025-03-03\n")
	cases := []struct {
		name  string
		args  []string
		code  int
		words string
	}{
		{"with history", []string{"--receipts", demoReceipts, "--history", "x.csv"}, 2, "--history and --receipts"},
		{"empty flag", []string{"--receipts", ""}, 2, "--receipts: want the receipts file"},
		{"bad column map", []string{"--receipts", demoReceipts, "--receipts-columns", "sku"}, 2, "--receipts-columns"},
		{"unknown mapped column", []string{"--receipts", demoReceipts, "--receipts-columns", "vendor=Supplier"}, 2, `"vendor" is not a column`},
		{"bad date layout", []string{"--receipts", demoReceipts, "--receipts-date-format", "DD-MM"}, 2, "--receipts-date-format"},
		{"missing file", []string{"--receipts", filepath.Join(dir, "none.csv")}, 1, "--receipts: open"},
		{"no usable row", []string{"--receipts", bad}, 1, bad + `:2: column receipt_date: "2025-03-03" is before the order_date`},
		{"period", []string{"--receipts", demoReceipts, "--period", "year"}, 2, "--period"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := fitRun("", c.args...)
			msg := strings.TrimSpace(errs)
			if code != c.code || out != "" || strings.Contains(msg, "\n") || !strings.Contains(msg, c.words) {
				t.Errorf("exit %d, stdout %q, stderr %q; want exit %d and one line holding %q", code, out, msg, c.code, c.words)
			}
		})
	}
}

// TestBatchReceipts plans two items from demand columns with and without
// receipts: with them, each row names the law that replaced lead_time, and
// its figures are those of the cheapest policy under that law.
func TestBatchReceipts(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	writeFile(t, items, "sku,lead_time,holding_cost,shortage_cost,order_cost,demand\n"+
		"DOOR-ROLLER-T3,1,0.2,9,25,poisson:mean=4\n"+
		"HORN-ASSY-T3,3,1.5,40,0,poisson:mean=0.5\n"+
		"SEAT-COVER-T4,2,0.3,12,0,poisson:mean=1\n")
	rec := filepath.Join(dir, "receipts.csv")
	writeFile(t, rec, fewReceipts)
	plain, withR := filepath.Join(dir, "plain.csv"), filepath.Join(dir, "with.csv")
	if code, errs := runBatchCmd(t, "--items", items, "--out", plain); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	code, errs := runBatchCmd(t, "--items", items, "--receipts", rec, "--out", withR)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, "lead-time laws set for 2 items; lead_time kept for 0 items on too few receipts and 1 items without receipts; 0 SKUs of the receipts match no item planned in this run") {
		t.Errorf("stderr: %s", errs)
	}
	h, rows := readResults(t, withR)
	_, plainRows := readResults(t, plain)
	warn, cost, lead := column(h, "warnings"), column(h, "total_cost"), column(h, "lead_time")
	laws := []string{"pmf:1=0.6666666666666666,2=0.3333333333333333", "pmf:1=0.625,2=0.375"}
	type sys struct {
		mean, hold, short, order float64
	}
	systems := []sys{{4, 0.2, 9, 25}, {0.5, 1.5, 40, 0}}
	for i, law := range laws {
		if rows[i][lead] != law {
			t.Errorf("row %d lead_time %q, want %s", i, rows[i][lead], law)
		}
		w := rows[i][warn]
		if !strings.HasPrefix(w, "lead_time from receipts: ") || !strings.Contains(w, "periods=orders") || !strings.Contains(w, "the items file said ") {
			t.Errorf("row %d warnings %q, want the receipts first", i, w)
		}
		d, _ := inventory.NewPoisson(systems[i].mean)
		_, l, err := inventory.ParseLeadTime(law)
		if err != nil {
			t.Fatal(err)
		}
		s := inventory.System{Demand: d, LeadTimeLaw: l, Holding: systems[i].hold, Shortage: systems[i].short, OrderCost: systems[i].order, Mode: inventory.Backorder}
		kind := policies.BaseStock
		if s.OrderCost > 0 {
			kind = policies.SS
		}
		best, err := policies.Optimize(s, kind, policies.SearchOptions{})
		if err != nil {
			t.Fatal(err)
		}
		got, _ := strconv.ParseFloat(rows[i][cost], 64)
		if math.Abs(got-best.Figures.TotalCost) > 1e-12*max(1, got) {
			t.Errorf("row %d total cost %v, want %v (the optimum under the law)", i, got, best.Figures.TotalCost)
		}
		if rows[i][cost] == plainRows[i][cost] {
			t.Errorf("row %d: the receipts did not change the cost %s", i, rows[i][cost])
		}
	}
	if rows[0][warn] != "lead_time from receipts: 6 orders in "+rec+", periods=orders 1=4,2=2; the items file said 1; receipts: 1 of 6 orders delivered in parts: each counted once, at its last receipt" {
		t.Errorf("row 0 warnings %q", rows[0][warn])
	}
	if rows[2][lead] != "2" || rows[2][warn] != plainRows[2][warn] || rows[2][cost] != plainRows[2][cost] {
		t.Errorf("the item without receipts changed: %q %s against %q %s", rows[2][warn], rows[2][cost], plainRows[2][warn], plainRows[2][cost])
	}
	// The receipts join the run digest.
	a, _ := os.ReadFile(plain)
	b, _ := os.ReadFile(withR)
	if bytes.Equal(a[:bytes.IndexByte(a, '\n')], b[:bytes.IndexByte(b, '\n')]) {
		t.Errorf("same header record with and without receipts")
	}
}

func TestFitReceiptsOut(t *testing.T) {
	out := filepath.Join(t.TempDir(), "laws.csv")
	code, stdout, errs := fitRun(fewReceipts, "--receipts", "-", "--out", out)
	if code != 0 || stdout != "" {
		t.Fatalf("exit %d, stdout %q: %s", code, stdout, errs)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if len(lines) != 3 || !strings.HasPrefix(lines[0], "sku,orders,receipts,orders_in_parts,source,suppliers,basis_orders,counts,lead_time,") {
		t.Fatalf("file:\n%s", b)
	}
	if !strings.HasPrefix(lines[2], `HORN-ASSY-T3,2,2,0,supplier,Kelbrook Castings,8,"1=5,2=3","pmf:1=0.625,2=0.375",1.375,`) {
		t.Errorf("row %q", lines[2])
	}
}

// An item whose SKU the receipts spell otherwise (case, leading zeros)
// keeps its lead time, with a warning naming the near miss.
func TestBatchReceiptsNearMiss(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	writeFile(t, items, "sku,lead_time,holding_cost,shortage_cost,demand\n00417,1,0.2,9,poisson:mean=4\n")
	rec := filepath.Join(dir, "receipts.csv")
	writeFile(t, rec, strings.ReplaceAll(strings.ReplaceAll(fewReceipts, "DOOR-ROLLER-T3", "417"), "HORN-ASSY-T3", "door-roller-t3"))
	out := filepath.Join(dir, "out.csv")
	code, errs := runBatchCmd(t, "--items", items, "--receipts", rec, "--out", out)
	if code != 0 || !strings.Contains(errs, "lead-time laws set for 0 items; lead_time kept for 0 items on too few receipts and 1 items without receipts; 2 SKUs of the receipts match no item") {
		t.Fatalf("exit %d: %s", code, errs)
	}
	h, rows := readResults(t, out)
	if w := rows[0][column(h, "warnings")]; !strings.HasPrefix(w, `no receipts for this sku in `+rec+`, but it has receipts for "417": the same part spelt differently? lead_time 1 kept`) {
		t.Errorf("warnings %q", w)
	}
}
