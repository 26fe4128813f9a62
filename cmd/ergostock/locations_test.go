package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"ergostock/cmd/ergostock/whatif"
	"ergostock/inventory/history"
	"ergostock/inventory/tabular"
	"ergostock/policies/batch"
)

// locationDemo writes, in a temporary directory, a small by-location
// variant of the demo: the first few items of data/items.csv, each given
// once per depot of data/history.csv (the demo's invented scenario), with
// the history cut to those SKUs. It returns the items and history paths
// and the reader flags that name the depot column as the location.
func locationDemo(t *testing.T, skus int) (dir, items, hist string, cols []string) {
	t.Helper()
	dir = t.TempDir()
	raw, err := os.ReadFile("../../data/items.csv")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(raw)), "\n")
	var ib strings.Builder
	ib.WriteString("sku,location," + strings.SplitN(lines[0], ",", 2)[1] + "\n")
	want := map[string]bool{}
	for _, l := range lines[1 : 1+skus] {
		sku, rest, _ := strings.Cut(l, ",")
		want[sku] = true
		for _, depot := range []string{"harrow-lane", "millbeck"} {
			ib.WriteString(sku + "," + depot + "," + rest + "\n")
		}
	}
	items = filepath.Join(dir, "items-loc.csv")
	writeFile(t, items, ib.String())
	f, err := os.Open("../../data/history.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var hb strings.Builder
	sc := bufio.NewScanner(f)
	for first := true; sc.Scan(); first = false {
		l := sc.Text()
		if f := strings.Split(l, ","); first || len(f) == 4 && want[f[2]] {
			hb.WriteString(l + "\n")
		}
	}
	hist = filepath.Join(dir, "history-loc.csv")
	writeFile(t, hist, hb.String())
	return dir, items, hist, []string{"--history-columns", "location=depot"}
}

// The batch page of a run by (sku, location): every item is matched to
// its own row (the exchange curve leaves none out), the items table has a
// location column, and the history is read by location.
func TestReportByLocation(t *testing.T) {
	dir, items, hist, cols := locationDemo(t, 3)
	out := filepath.Join(dir, "r.csv")
	if code, stderr := runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", out}, cols...)...); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, stderr)
	}
	header, rows := readResults(t, out)
	if header[1] != "location" || len(rows) != 6 {
		t.Fatalf("header %v, %d rows", header, len(rows))
	}
	page := filepath.Join(dir, "r.html")
	var o, e bytes.Buffer
	if code := run(append([]string{"ergostock", "report", "--results", out, "--items", items, "--history", hist, "--out", page, "--targets", "0.9,0.99"}, cols...), nil, &o, &e); code != 0 {
		t.Fatalf("report: exit %d: %s", code, e.String())
	}
	if strings.Contains(e.String(), "warning: the reader flags") {
		t.Errorf("report with the batch's reader flags warned: %s", e.String())
	}
	html, err := os.ReadFile(page)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{"<th>location</th>", "<td>harrow-lane</td>", "<td>millbeck</td>", "all 6 items"} {
		if !bytes.Contains(html, []byte(s)) {
			t.Errorf("page lacks %q", s)
		}
	}
	if bytes.Contains(html, []byte("Left out of the exchange curve")) {
		i := bytes.Index(html, []byte("Left out of the exchange curve"))
		t.Errorf("items left out: %.400s", html[i:])
	}
	// Items and results must agree on the planning key.
	plain := filepath.Join(dir, "items.csv")
	writeFile(t, plain, "sku,lead_time,holding_cost,shortage_cost\n"+rows[0][0]+",1,1,9\n")
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"items without location", []string{"--results", out, "--items", plain}, "items.csv:1: the items file has no location column but"},
		{"history without location", []string{"--results", out, "--history", hist}, "history-loc.csv:1:"},
	} {
		o.Reset()
		e.Reset()
		code := run(append([]string{"ergostock", "report", "--out", filepath.Join(dir, "x.html")}, c.args...), nil, &o, &e)
		// Without the batch's reader flags, a warning line comes first.
		lines := strings.Split(strings.TrimSpace(e.String()), "\n")
		if code != 1 || len(lines) != 2 || !strings.Contains(lines[0], "warning: the reader flags given are not those") || !strings.Contains(lines[1], c.want) {
			t.Errorf("%s: exit %d, %q; want exit 1, the reader-flags warning and one line with %q", c.name, code, e.String(), c.want)
		}
	}
}

// merge keeps the location column: the shards of a run by location merge
// into the whole run's results, byte for byte.
func TestMergeByLocation(t *testing.T) {
	dir, items, hist, cols := locationDemo(t, 2)
	whole := filepath.Join(dir, "whole.csv")
	if code, stderr := runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", whole}, cols...)...); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, stderr)
	}
	var parts []string
	for _, k := range []string{"0/2", "1/2"} {
		p := filepath.Join(dir, "part-"+k[:1]+".csv")
		if code, stderr := runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", p, "--shard", k}, cols...)...); code != 0 {
			t.Fatalf("batch --shard %s: exit %d: %s", k, code, stderr)
		}
		parts = append(parts, p)
	}
	merged := filepath.Join(dir, "merged.csv")
	var o, e bytes.Buffer
	if code := run(append([]string{"ergostock", "merge", "--out", merged}, parts...), nil, &o, &e); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, e.String())
	}
	a, _ := os.ReadFile(whole)
	b, _ := os.ReadFile(merged)
	if !bytes.Equal(a, b) {
		t.Errorf("merged results differ from the whole run:\n%s\n---\n%s", a, b)
	}
}

// locationReaders are the reader options of the by-location demo: the
// history's depot column is the location (as --history-columns
// location=depot gives batch).
func locationReaders(t *testing.T) readerOptions {
	t.Helper()
	cols, err := tabular.ParseColumnMap("--history-columns", "location=depot", history.HistoryColumns)
	if err != nil {
		t.Fatal(err)
	}
	return func(p history.Period) (batch.ReadOptions, history.Options, error) {
		return batch.ReadOptions{PeriodDays: periodDays(p), PeriodName: p.String()}, history.Options{Columns: cols, ColumnsFlag: "--history-columns"}, nil
	}
}

func get(t *testing.T, h http.Handler, path string) *httptest.ResponseRecorder {
	t.Helper()
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, httptest.NewRequest("GET", "http://127.0.0.1"+path, nil))
	return rec
}

// serve over a run by (sku, location): the list names each pair, one
// item's page shows its own depot's history, decisions are recorded per
// pair in a log with a location column, and batch --decisions applies
// them to that pair only.
func TestServeByLocation(t *testing.T) {
	dir, items, hist, cols := locationDemo(t, 3)
	results := filepath.Join(dir, "r.csv")
	if code, stderr := runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", results}, cols...)...); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, stderr)
	}
	header, rows := readResults(t, results)
	sku, mean := rows[1][0], rows[1][index(header, "demand_mean")]
	if rows[1][1] != "millbeck" {
		t.Fatalf("row 2 %v", rows[1])
	}
	// Without the column map the history has no location: refused.
	if _, err := serveConfig(context.Background(), results, items, hist, ""); err == nil || !strings.Contains(err.Error(), "history-loc.csv:1:") {
		t.Errorf("history without its location column: %v", err)
	}
	decisions := filepath.Join(dir, "d.csv")
	cfg, err := serveConfigWith(context.Background(), results, items, hist, decisions, locationReaders(t))
	if err != nil {
		t.Fatal(err)
	}
	srv, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	var list struct {
		ByLocation bool `json:"by_location"`
		Items      []struct{ SKU, Location string }
	}
	if rec := get(t, srv, "/api/items"); rec.Code != 200 || json.Unmarshal(rec.Body.Bytes(), &list) != nil || !list.ByLocation || len(list.Items) != 6 || list.Items[1].Location != "millbeck" {
		t.Fatalf("items: %d %.300s", rec.Code, rec.Body.String())
	}
	rec := get(t, srv, "/api/items/"+sku+"?location=millbeck")
	var d struct {
		Location string
		Fit      struct{ Mean float64 }
	}
	if rec.Code != 200 || json.Unmarshal(rec.Body.Bytes(), &d) != nil || d.Location != "millbeck" || strconv.FormatFloat(d.Fit.Mean, 'g', -1, 64) != mean {
		t.Errorf("item at millbeck: %d, mean %v (results %s): %.300s", rec.Code, d.Fit.Mean, mean, rec.Body.String())
	}
	if rec := get(t, srv, "/api/items/"+sku); rec.Code != 404 || !strings.Contains(rec.Body.String(), "give ?location=LOC") {
		t.Errorf("item without location: %d %s", rec.Code, rec.Body.String())
	}
	for _, c := range []struct {
		body   string
		status int
		want   string
	}{
		{`{"sku":"` + sku + `","location":"millbeck","decision":"override","version":0,"order_up_to":` + "500" + `}`, 200, `"location":"millbeck"`},
		{`{"sku":"` + sku + `","location":"millbeck","decision":"accept","version":0}`, 409, `at location \"millbeck\": decision based on version 0`},
		{`{"sku":"` + sku + `","decision":"accept","version":0}`, 400, "want a SKU and location of the results file"},
	} {
		if rec := post(t, srv, "/api/decisions", c.body); rec.Code != c.status || !strings.Contains(rec.Body.String(), c.want) {
			t.Errorf("%s: %d %s, want %d and %q", c.body, rec.Code, rec.Body.String(), c.status, c.want)
		}
	}
	raw, err := os.ReadFile(decisions)
	if err != nil || !strings.HasPrefix(string(raw), "sku,location,version,") {
		t.Fatalf("decisions file: %v %q", err, raw)
	}
	again := filepath.Join(dir, "again.csv")
	code, stderr := runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", again, "--decisions", decisions}, cols...)...)
	if code != 0 || !strings.Contains(stderr, "1 items take their latest decision") {
		t.Fatalf("batch --decisions: exit %d: %s", code, stderr)
	}
	h2, rows2 := readResults(t, again)
	cur := index(h2, "current_order_up_to")
	for i, r := range rows2 {
		if (r[cur] == "500") != (i == 1) {
			t.Errorf("row %d (%s @ %s): current_order_up_to %q", i+1, r[0], r[1], r[cur])
		}
	}
	// A log kept by SKU alone does not apply to a run by location.
	bySKU := filepath.Join(dir, "d-sku.csv")
	writeFile(t, bySKU, "sku,version,decision,policy,reorder_point,order_up_to,order_multiple,note,decided_at\n"+sku+",1,keep,base-stock,,3,,,\n")
	code, stderr = runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", again, "--decisions", bySKU}, cols...)...)
	if code != 1 || !strings.Contains(stderr, "d-sku.csv:2: sku") {
		t.Errorf("by-SKU log on a run by location: exit %d: %s", code, stderr)
	}
}

// The one-SKU page of one location: --location picks the SKU's rows at a
// depot; a location the SKU has no rows at is refused naming those it has.
func TestReportSKUAtLocation(t *testing.T) {
	dir, _, hist, cols := locationDemo(t, 1)
	raw, _ := os.ReadFile(hist)
	sku := strings.Split(strings.Split(string(raw), "\n")[1], ",")[2]
	base := append([]string{"ergostock", "report", "--history", hist, "--sku", sku, "--holding-cost", "1", "--shortage-cost", "9"}, cols...)
	page := filepath.Join(dir, "one.html")
	var o, e bytes.Buffer
	if code := run(append(base, "--location", "millbeck", "--out", page), nil, &o, &e); code != 0 {
		t.Fatalf("report --location: exit %d: %s", code, e.String())
	}
	if html, _ := os.ReadFile(page); !bytes.Contains(html, []byte(sku+" @ millbeck")) {
		t.Errorf("page does not name %s @ millbeck", sku)
	}
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"--location", "nowhere"}, 1, `no rows of SKU "` + sku + `" at location "nowhere": want one of its locations ("harrow-lane", "millbeck")`},
	} {
		e.Reset()
		code := run(append(append(base, "--out", filepath.Join(dir, "x.html")), c.args...), nil, &o, &e)
		if code != c.code || !strings.Contains(e.String(), c.want) || strings.Count(strings.TrimSpace(e.String()), "\n") != 0 {
			t.Errorf("%v: exit %d, %q; want %d and %q", c.args, code, e.String(), c.code, c.want)
		}
	}
	e.Reset()
	if code := run([]string{"ergostock", "report", "--history", hist, "--sku", sku, "--holding-cost", "1", "--shortage-cost", "9", "--location", "millbeck", "--out", filepath.Join(dir, "y.html")}, nil, &o, &e); code != 1 || !strings.Contains(e.String(), "the history has no location column") {
		t.Errorf("without the column map: exit %d, %q", code, e.String())
	}
}
