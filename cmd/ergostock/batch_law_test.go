package main

import (
	"bytes"
	"context"
	"encoding/json"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"ergostock/cmd/ergostock/whatif"
	"ergostock/inventory"
	"ergostock/policies/batch"
	"ergostock/policies/report"
)

// A batch row whose lead_time is a law (and whose review period comes
// from the row or from --review-period) gives the very figures of
// optimize --lead-time LAW on the same inputs: one reader of the law
// (inventory.ParseLeadTime) and one engine. The items file is written in
// two dialects, plain CSV with the law quoted and ;-delimited with decimal
// commas, and both must agree with optimize bit for bit.
func TestBatchLeadTimeLawMatchesOptimize(t *testing.T) {
	dir := t.TempDir()
	plain := "sku,lead_time,holding_cost,shortage_cost,order_cost,demand,policy,lead_time_model,review_period\n" +
		"SS,\"pmf:1=0.2,2=0.5,3=0.3\",0.5,9,20,poisson:mean=3,s-S,,\n" +
		"BS,poisson:mean=2,0.5,9,0,poisson:mean=3,base-stock,,\n" +
		"IND,\"pmf:1=0.5,3=0.5\",0.5,9,0,poisson:mean=3,base-stock,independent,\n" +
		"WEEK,\"pmf:1=0.2,2=0.5,3=0.3\",0.5,9,20,poisson:mean=3,s-S,,\n" +
		"NQ,\"pmf:1=0.2,2=0.5,3=0.3\",0.5,9,20,poisson:mean=3,s-nQ,,2\n"
	semi := "sku;lead_time;holding_cost;shortage_cost;order_cost;demand;policy;lead_time_model;review_period\n" +
		"SS;pmf:1=0.2,2=0.5,3=0.3;0,5;9;20;poisson:mean=3;s-S;;\n" +
		"BS;poisson:mean=2;0,5;9;0;poisson:mean=3;base-stock;;\n" +
		"IND;\"pmf:1=0.5,3=0.5\";0,5;9;0;poisson:mean=3;base-stock;independent;\n" +
		"WEEK;pmf:1=0.2,2=0.5,3=0.3;0,5;9;20;poisson:mean=3;s-S;;\n" +
		"NQ;pmf:1=0.2,2=0.5,3=0.3;0,5;9;20;poisson:mean=3;s-nQ;;2\n"
	type want struct{ law, model, review, policy, orderCost string }
	cases := map[string]want{
		"SS":   {"pmf:1=0.2,2=0.5,3=0.3", "sequential", "1", "s-S", "20"},
		"BS":   {"poisson:mean=2", "sequential", "1", "base-stock", "0"},
		"IND":  {"pmf:1=0.5,3=0.5", "independent", "1", "base-stock", "0"},
		"WEEK": {"pmf:1=0.2,2=0.5,3=0.3", "sequential", "1", "s-S", "20"},
		"NQ":   {"pmf:1=0.2,2=0.5,3=0.3", "sequential", "2", "s-nQ", "20"},
	}
	figures := []string{"fill_rate", "stockout_probability", "mean_on_hand", "mean_backorders", "order_frequency", "mean_order_quantity", "holding_cost", "shortage_cost", "ordering_cost", "total_cost"}
	levels := map[string]string{"reorder_point": "reorder_point", "order_up_to": "order_up_to", "order_multiple": "order_multiple"}
	for _, run1 := range []struct {
		name, text string
		extra      []string
	}{
		{"plain", plain, nil},
		{"semicolon", semi, nil},
		{"weekly", plain, []string{"--review-period", "3"}},
	} {
		items := filepath.Join(dir, run1.name+".csv")
		if err := os.WriteFile(items, []byte(run1.text), 0o644); err != nil {
			t.Fatal(err)
		}
		out := filepath.Join(dir, run1.name+"-out.csv")
		if code, msg := runBatchCmd(t, append([]string{"--items", items, "--out", out}, run1.extra...)...); code != 0 {
			t.Fatalf("%s: batch exit %d: %s", run1.name, code, msg)
		}
		header, rows := readResults(t, out)
		if len(rows) != len(cases) {
			t.Fatalf("%s: %d rows, want %d", run1.name, len(rows), len(cases))
		}
		for _, row := range rows {
			sku := row[column(header, "sku")]
			w := cases[sku]
			if run1.name == "weekly" && sku != "NQ" {
				w.review = "3" // the default of rows without a review_period cell
			}
			if got := row[column(header, "lead_time")]; got != w.law {
				t.Errorf("%s %s: lead_time %q, want %q", run1.name, sku, got, w.law)
			}
			if got := row[column(header, "lead_time_model")] + "/" + row[column(header, "review_period")]; got != w.model+"/"+w.review {
				t.Errorf("%s %s: model/review %s, want %s/%s", run1.name, sku, got, w.model, w.review)
			}
			var o, e bytes.Buffer
			args := []string{"ergostock", "optimize", "--demand", "poisson:mean=3", "--holding-cost", "0.5", "--shortage-cost", "9",
				"--order-cost", w.orderCost, "--lead-time", w.law, "--lead-time-model", w.model, "--review-period", w.review, "--policy", w.policy, "--json"}
			if code := run(args, nil, &o, &e); code != 0 {
				t.Fatalf("%s %s: optimize exit %d: %s", run1.name, sku, code, e.String())
			}
			var js map[string]any
			if err := json.Unmarshal(o.Bytes(), &js); err != nil {
				t.Fatal(err)
			}
			for _, f := range figures {
				v, err := strconv.ParseFloat(row[column(header, f)], 64)
				if err != nil || v != js[f].(float64) {
					t.Errorf("%s %s: %s batch %q, optimize %v", run1.name, sku, f, row[column(header, f)], js[f])
				}
			}
			pol := js["policy"].(map[string]any)
			for col, key := range levels {
				cell := row[column(header, col)]
				jv, ok := pol[key]
				if (cell == "") != !ok || ok && cell != strconv.FormatFloat(jv.(float64), 'f', -1, 64) {
					t.Errorf("%s %s: %s batch %q, optimize %v", run1.name, sku, col, cell, jv)
				}
			}
		}
	}
}

// --receipts still overrides a lead_time given as a law, with its warning
// naming the law the items file gave; an item without receipts keeps its
// law.
func TestBatchReceiptsOverrideLaw(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	writeFile(t, items, "sku,lead_time,holding_cost,shortage_cost,order_cost,demand\n"+
		"DOOR-ROLLER-T3,\"pmf:2=0.5,3=0.5\",0.2,9,25,poisson:mean=4\n"+
		"SEAT-COVER-T4,\"pmf:1=0.2,2=0.5,3=0.3\",0.3,12,0,poisson:mean=1\n")
	rec := filepath.Join(dir, "receipts.csv")
	writeFile(t, rec, fewReceipts)
	out := filepath.Join(dir, "out.csv")
	if code, errs := runBatchCmd(t, "--items", items, "--receipts", rec, "--out", out); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	h, rows := readResults(t, out)
	lead, warn := column(h, "lead_time"), column(h, "warnings")
	if got := rows[0][lead]; got != "pmf:1=0.6666666666666666,2=0.3333333333333333" {
		t.Errorf("row 0 lead_time %q, want the receipts' law", got)
	}
	if w := rows[0][warn]; !strings.HasPrefix(w, "lead_time from receipts: ") || !strings.Contains(w, "the items file said pmf:2=0.5,3=0.5") {
		t.Errorf("row 0 warnings %q", w)
	}
	if got := rows[1][lead]; got != "pmf:1=0.2,2=0.5,3=0.3" {
		t.Errorf("row 1 lead_time %q, want the items file's law", got)
	}
}

// Items planned under laws from the items file, the lead_time_model column
// and the --review-period default: the report's batch page and serve take
// them as the batch planned them (serve's inputs reproduce the results'
// figures), and the item that fails (s-S under crossing orders) shows its
// reason.
func TestBatchLawReportServe(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	head := strings.SplitN(serveItems, "\n", 2)[0] + ",lead_time_model\n"
	writeFile(t, items, head+
		"WIPE-CAB-100,\"pmf:1=0.2,2=0.5,3=0.3\",0.0218,6.87,62.43,4.54,,,,,38,88,,\n"+
		"GLOVE-NITRILE-S,\"pmf:1=0.5,3=0.5\",0.0343,6.82,0,7.13,,base-stock,,,,40,,independent\n"+
		"BRAKE-PAD-X,\"pmf:1=0.5,3=0.5\",0.5,9,20,3,backorder,s-S,0.95,poisson:mean=3,4,20,,independent\n")
	hist := filepath.Join("..", "..", "data", "history.csv")
	results := filepath.Join(dir, "results.csv")
	var stderr bytes.Buffer
	code := run([]string{"ergostock", "batch", "--items", items, "--history", hist, "--out", results, "--workers", "1", "--review-period", "2"}, nil, &bytes.Buffer{}, &stderr)
	if code != 3 {
		t.Fatalf("batch exit %d, want 3 (one item fails): %s", code, stderr.String())
	}
	h, rows := readResults(t, results)
	if e := rows[2][column(h, "error")]; !strings.Contains(e, "independent lead times") || !strings.Contains(e, "lead_time_model sequential") {
		t.Errorf("BRAKE-PAD-X error %q", e)
	}
	for i := range 2 {
		if rows[i][column(h, "error")] != "" || rows[i][column(h, "review_period")] != "2" {
			t.Errorf("row %d: error %q review_period %q", i, rows[i][column(h, "error")], rows[i][column(h, "review_period")])
		}
	}

	page := filepath.Join(dir, "batch.html")
	rc, _, msg := runReport("--results", results, "--items", items, "--history", hist, "--targets", "0.9,0.95", "--out", page)
	if rc != 0 {
		t.Fatalf("report: exit %d: %s", rc, msg)
	}
	html := checkReportPage(t, page)
	for _, s := range []string{"GLOVE-NITRILE-S", "BRAKE-PAD-X", "review_period", "Independent lead times for 2 items", "sequential deliveries (Kaplan 1970) for 1 item", "<th>lead time</th>", "pmf:1=0.5,3=0.5, independent, R=2"} {
		if !strings.Contains(html, s) {
			t.Errorf("batch page lacks %q", s)
		}
	}

	cfg, err := serveConfig(context.Background(), results, items, hist, "")
	if err != nil {
		t.Fatal(err)
	}
	srv, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	for sku, want := range map[string][3]string{
		"WIPE-CAB-100":    {"pmf:1=0.2,2=0.5,3=0.3", "sequential", "2"},
		"GLOVE-NITRILE-S": {"pmf:1=0.5,3=0.5", "independent", "2"},
	} {
		rec := httptest.NewRecorder()
		srv.ServeHTTP(rec, httptest.NewRequest("GET", "http://127.0.0.1/api/items/"+sku, nil))
		var d struct{ Inputs map[string]string }
		if err := json.Unmarshal(rec.Body.Bytes(), &d); err != nil {
			t.Fatal(err)
		}
		if got := [3]string{d.Inputs["lead_time"], d.Inputs["lead_time_model"], d.Inputs["review_period"]}; got != want {
			t.Errorf("%s: serve inputs %v, want %v", sku, got, want)
		}
	}
	checkInputs(t, srv)
}

// plannedTiming gives the report's items the timing of their results rows
// (receipts' laws, the batch's --review-period), and leaves items whose
// rows predate the timing columns as the items file has them.
func TestPlannedTiming(t *testing.T) {
	cat, err := batch.ReadCatalogue(strings.NewReader("sku,lead_time,holding_cost,shortage_cost\nA,2,1,9\nB,2,1,9\nC,2,1,9\n"), "items.csv", nil, batch.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rows := []report.ResultRow{
		{SKU: "A", LeadTime: "pmf:1=0.5,3=0.5", LeadTimeModel: "independent", ReviewPeriod: 7},
		{SKU: "B", LeadTime: "3", LeadTimeModel: "sequential", ReviewPeriod: 1},
		{SKU: "C"},
	}
	plannedTiming(cat.Items, rows)
	a, b, c := cat.Items[0].System, cat.Items[1].System, cat.Items[2].System
	if a.LeadTimeLaw == nil || a.LeadTimeLaw.String() != "pmf:1=0.5,3=0.5" || a.Model() != inventory.Independent || a.Review() != 7 {
		t.Errorf("A: %v %s %d", a.LeadTimeLaw, a.Model(), a.Review())
	}
	if b.LeadTimeLaw != nil || b.LeadTime != 3 || b.Review() != 1 {
		t.Errorf("B: %d %v %d", b.LeadTime, b.LeadTimeLaw, b.Review())
	}
	if c.LeadTime != 2 || c.LeadTimeLaw != nil {
		t.Errorf("C: %d %v", c.LeadTime, c.LeadTimeLaw)
	}
}

// Shards planned with different --review-period defaults have different
// run digests, so merge refuses to join them; shards of one setting merge
// into the unsharded file.
func TestMergeRefusesOtherReviewPeriod(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	writeFile(t, items, "sku,lead_time,holding_cost,shortage_cost,demand\n"+
		"A,\"pmf:1=0.2,2=0.5,3=0.3\",1,9,poisson:mean=3\nB,2,1,9,poisson:mean=2\n")
	part := func(name string, args ...string) string {
		p := filepath.Join(dir, name)
		if code, msg := runBatchCmd(t, append([]string{"--items", items, "--out", p}, args...)...); code != 0 {
			t.Fatalf("%s: exit %d: %s", name, code, msg)
		}
		return p
	}
	whole := part("whole.csv", "--review-period", "7")
	p0 := part("p0.csv", "--shard", "0/2", "--review-period", "7")
	p1 := part("p1.csv", "--shard", "1/2", "--review-period", "7")
	q1 := part("q1.csv", "--shard", "1/2")
	merged := filepath.Join(dir, "merged.csv")
	if code, _, msg := runMergeCmd("--out", merged, p0, p1); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, msg)
	}
	if !bytes.Equal(readFile(t, merged), readFile(t, whole)) {
		t.Error("merged shards differ from the unsharded run")
	}
	if !strings.Contains(string(readFile(t, whole)), "; review_period=7;") {
		t.Error("header record lacks review_period=7")
	}
	code, _, msg := runMergeCmd("--out", filepath.Join(dir, "bad.csv"), p0, q1)
	if code != 1 || !strings.Contains(msg, "run digest") || strings.Count(msg, "\n") != 1 {
		t.Errorf("merge of different review periods: exit %d: %q", code, msg)
	}
}
