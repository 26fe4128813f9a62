package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const serialNetworkCSV = `location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock
central-stores,,5,,0.20,,28
harrow-lane,central-stores,1,poisson:mean=3.2,0.32,18,9
`

const twoStoreNetworkCSV = `location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock,min_fill_rate
central-stores,,5,,0.20,,40,
harrow-lane,central-stores,1,poisson:mean=3.2,0.32,18,9,0.97
millbeck,central-stores,2,poisson:mean=2.1,0.32,18,9,0.97
`

func writeTemp(t *testing.T, name, body string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func runNetwork(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(append([]string{"ergostock", "network"}, args...), strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

// The JSON of evaluate and optimize holds the keys of the contract.
func TestNetworkJSON(t *testing.T) {
	serialFile := writeTemp(t, "serial.csv", serialNetworkCSV)
	twoFile := writeTemp(t, "two.csv", twoStoreNetworkCSV)
	for _, c := range []struct {
		args  []string
		exact bool
		n     int
	}{
		{[]string{"evaluate", "--network", serialFile, "--json"}, true, 2},
		{[]string{"optimize", "--network", serialFile, "--json"}, true, 2},
		{[]string{"evaluate", "--network", twoFile, "--json", "--check-periods", "2000", "--check-replications", "3"}, false, 3},
		{[]string{"optimize", "--network", twoFile, "--json", "--check-periods", "2000", "--check-replications", "3"}, false, 3},
	} {
		code, out, errs := runNetwork(t, c.args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", c.args, code, errs)
		}
		var v map[string]any
		if err := json.Unmarshal([]byte(out), &v); err != nil {
			t.Fatalf("%v: %v\n%s", c.args, err, out)
		}
		for _, k := range []string{"locations", "total_cost", "method", "exact"} {
			if _, ok := v[k]; !ok {
				t.Errorf("%v: no %q in %s", c.args, k, out)
			}
		}
		if v["exact"] != c.exact {
			t.Errorf("%v: exact %v, want %v", c.args, v["exact"], c.exact)
		}
		if _, ok := v["approximation_error"]; ok == c.exact {
			t.Errorf("%v: approximation_error present %v, want %v", c.args, ok, !c.exact)
		}
		locs, _ := v["locations"].([]any)
		if len(locs) != c.n {
			t.Fatalf("%v: %d locations, want %d", c.args, len(locs), c.n)
		}
		for _, l := range locs {
			m := l.(map[string]any)
			for _, k := range []string{"location", "fill_rate", "stockout_probability", "mean_on_hand", "mean_backorders", "holding_cost", "shortage_cost", "total_cost"} {
				if _, ok := m[k]; !ok {
					t.Errorf("%v: location without %q", c.args, k)
				}
			}
		}
	}
}

func TestNetworkSimulateJSON(t *testing.T) {
	file := writeTemp(t, "serial.csv", serialNetworkCSV)
	args := []string{"simulate", "--network", file, "--json", "--periods", "3000", "--replications", "4", "--seed", "5"}
	code, out, errs := runNetwork(t, append(args, "--workers", "1")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var v struct {
		Locations []map[string]struct {
			Mean float64 `json:"mean"`
			CI95 float64 `json:"ci95"`
		} `json:"-"`
		TotalCost struct{ Mean, CI95 float64 } `json:"total_cost"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil || v.TotalCost.Mean <= 0 {
		t.Fatalf("%v: %s", err, out)
	}
	_, out3, _ := runNetwork(t, append(args, "--workers", "3")...)
	if out3 != out {
		t.Errorf("--workers changed the output")
	}
}

func TestNetworkTable(t *testing.T) {
	file := writeTemp(t, "two.csv", twoStoreNetworkCSV)
	code, out, errs := runNetwork(t, "evaluate", "--network", file, "--check-periods", "2000", "--check-replications", "3")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"harrow-lane", "millbeck", "total cost:", "figures approximation", "approximation error, measured by simulation"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
}

// networkHostileCases are the network command's rows of the hostile-input
// suite.
func networkHostileCases() []hostileCase {
	good := map[string]string{"n.csv": twoStoreNetworkCSV}
	file := func(body string) map[string]string { return map[string]string{"n.csv": body} }
	head := "location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock\n"
	var cs []hostileCase
	add := func(c hostileCase) { cs = append(cs, c) }
	add(hostileCase{name: "network-no-sub", args: []string{"network"}, code: 2, names: []string{"evaluate, optimize, simulate, report or batch"}})
	add(hostileCase{name: "network-bad-sub", args: []string{"network", "plan"}, code: 2, names: []string{"plan"}})
	add(hostileCase{name: "network-no-file-flag", args: []string{"network", "evaluate"}, code: 2, names: []string{"--network"}})
	add(hostileCase{name: "network-missing-file", args: []string{"network", "evaluate", "--network", "{dir}/none.csv"}, code: 1, names: []string{"none.csv"}})
	add(hostileCase{name: "network-levels-bad", args: []string{"network", "evaluate", "--network", "{dir}/n.csv", "--levels", "both"}, files: good, code: 2, names: []string{"--levels"}})
	add(hostileCase{name: "network-stray-arg", args: []string{"network", "evaluate", "--network", "{dir}/n.csv", "extra"}, files: good, code: 2, names: []string{"extra"}})
	add(hostileCase{name: "network-unknown-flag", args: []string{"network", "evaluate", "--network", "{dir}/n.csv", "--order-up-to", "3"}, files: good, code: 2, names: []string{"--order-up-to"}})
	for _, v := range []string{"-1", "abc", "1.5", "1e99", ""} {
		add(hostileCase{name: "network-sim-periods-" + v, args: []string{"network", "simulate", "--network", "{dir}/n.csv", "--periods", v}, files: good, code: 2, names: []string{"--periods"}})
		add(hostileCase{name: "network-check-periods-" + v, args: []string{"network", "evaluate", "--network", "{dir}/n.csv", "--check-periods", v}, files: good, code: 2, names: []string{"--check-periods"}})
	}
	add(hostileCase{name: "network-sim-replications-1", args: []string{"network", "simulate", "--network", "{dir}/n.csv", "--replications", "1"}, files: good, code: 2, names: []string{"--replications"}})
	add(hostileCase{name: "network-sim-warmup-over", args: []string{"network", "simulate", "--network", "{dir}/n.csv", "--periods", "100", "--warmup", "100"}, files: good, code: 2, names: []string{"--warmup"}})
	add(hostileCase{name: "network-sim-huge", args: []string{"network", "simulate", "--network", "{dir}/n.csv", "--periods", "2000000000", "--replications", "1000"}, files: good, code: 1, names: []string{"--periods"}})
	add(hostileCase{name: "network-report-no-out", args: []string{"network", "report", "--network", "{dir}/n.csv"}, files: good, code: 2, names: []string{"--out"}})
	add(hostileCase{name: "network-report-bad-dir", args: []string{"network", "report", "--network", "{dir}/n.csv", "--out", "{dir}/no/such/dir/p.html", "--check-periods", "0"}, files: good, code: 1, names: []string{"p.html"}})
	add(hostileCase{name: "network-batch-no-items", args: []string{"network", "batch", "--out", "{dir}/r.csv"}, code: 2, names: []string{"--items"}})
	add(hostileCase{name: "network-batch-bad-header", args: []string{"network", "batch", "--items", "{dir}/n.csv", "--out", "{dir}/r.csv"}, files: good, code: 1, names: []string{"n.csv:1", "sku"}})
	// Demand from history (--history).
	hf := func(hist string) map[string]string {
		return map[string]string{"i.csv": "sku,location,parent,lead_time,holding_cost,shortage_cost\nP,hub,,2,0.1,\nP,east,hub,1,0.2,5\n", "h.csv": hist}
	}
	okHist := "sku,location,date,quantity\nP,east,2025-01-06,3\nP,east,2025-01-13,2\nP,east,2025-01-20,4\n"
	add(hostileCase{name: "network-history-missing", args: []string{"network", "batch", "--items", "{dir}/i.csv", "--history", "{dir}/none.csv", "--out", "{dir}/r.csv"}, files: hf(okHist), code: 1, names: []string{"none.csv"}})
	add(hostileCase{name: "network-history-no-location", args: []string{"network", "batch", "--items", "{dir}/i.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv"}, files: hf("sku,date,quantity\nP,2025-01-06,3\n"), code: 1, names: []string{"h.csv:1", "location"}})
	add(hostileCase{name: "network-history-empty", args: []string{"network", "batch", "--items", "{dir}/i.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv"}, files: hf("sku,location,date,quantity\n"), code: 1, names: []string{"h.csv"}})
	add(hostileCase{name: "network-history-binary", args: []string{"network", "batch", "--items", "{dir}/i.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv"}, files: hf("\x00\x01\x02PK\x03\x04garbage"), code: 1, names: []string{"h.csv"}})
	add(hostileCase{name: "network-history-period-bad", args: []string{"network", "batch", "--items", "{dir}/i.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv", "--period", "year"}, files: hf(okHist), code: 2, names: []string{"year"}})
	add(hostileCase{name: "network-history-out-is-history", args: []string{"network", "batch", "--items", "{dir}/i.csv", "--history", "{dir}/h.csv", "--out", "{dir}/h.csv"}, files: hf(okHist), code: 2, names: []string{"--out", "--history"}})
	add(hostileCase{name: "network-history-store-missing", args: []string{"network", "batch", "--items", "{dir}/i.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv"}, files: hf("sku,location,date,quantity\nP,East ,2025-01-06,3\n"), code: 3, names: []string{"1 failed"}})
	add(hostileCase{name: "network-history-columns-bad", args: []string{"network", "batch", "--items", "{dir}/i.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv", "--items-columns", "colour=Hue"}, files: hf(okHist), code: 2, names: []string{"--items-columns", "colour"}})
	add(hostileCase{name: "network-optimize-sku-alone", args: []string{"network", "optimize", "--network", "{dir}/n.csv", "--sku", "P"}, files: good, code: 2, names: []string{"--sku", "--history"}})
	add(hostileCase{name: "network-optimize-history-no-sku", args: []string{"network", "optimize", "--network", "{dir}/n.csv", "--history", "{dir}/h.csv"}, files: map[string]string{"n.csv": twoStoreNetworkCSV, "h.csv": okHist}, code: 2, names: []string{"--sku"}})
	add(hostileCase{name: "batch-networks-shard", args: []string{"batch", "--items", "{dir}/i.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv", "--shard", "0/2"}, files: hf(okHist), code: 2, names: []string{"--shard"}})
	add(hostileCase{name: "network-split-bad", args: []string{"network", "evaluate", "--network", "{dir}/n.csv", "--split", "poisson"}, files: good, code: 2, names: []string{"--split"}})
	add(hostileCase{name: "report-network-missing", args: []string{"report", "--network", "{dir}/none.csv", "--out", "{dir}/p.html"}, code: 1, names: []string{"none.csv"}})
	add(hostileCase{name: "report-network-bad-row", args: []string{"report", "--network", "{dir}/n.csv", "--out", "{dir}/p.html"}, files: file(head + "hub,,1,,1,,30\nshop,hub,x,poisson:mean=2,1,9,10\n"), code: 1, names: []string{"n.csv:3", "lead_time"}})
	add(hostileCase{name: "network-fill-floor-1", args: []string{"network", "optimize", "--network", "{dir}/n.csv", "--min-fill-rate", "1"}, files: good, code: 2, names: []string{"--min-fill-rate"}})
	for _, c := range []struct{ name, body, column string }{
		{"empty", "", "n.csv"},
		{"header-only", head, "n.csv"},
		{"lead-time-law", head + "hub,,pmf:1=0.5,2=0.5,,1,,30\nshop,hub,1,poisson:mean=2,1,9,10\n", "n.csv:2"},
		{"lead-time-huge", head + "hub,,1e9,,1,,30\nshop,hub,1,poisson:mean=2,1,9,10\n", "lead_time"},
		{"level-huge", head + "hub,,1,,1,,1e15\nshop,hub,1,poisson:mean=2,1,9,10\n", "base_stock"},
		{"level-big", head + "hub,,1,,1,,30\nshop,hub,1,poisson:mean=2,1,9,100000000\n", "base_stock"},
		{"demand-huge", head + "hub,,1,,1,,30\nshop,hub,1,poisson:mean=1e12,1,9,10\n", "demand"},
		{"demand-bad", head + "hub,,1,,1,,30\nshop,hub,1,poisson:mean=x,1,9,10\n", "demand"},
		{"cost-nan", head + "hub,,1,,NaN,,30\nshop,hub,1,poisson:mean=2,1,9,10\n", "holding_cost"},
		{"cost-inf", head + "hub,,1,,1,,30\nshop,hub,1,poisson:mean=2,1,1e999,10\n", "shortage_cost"},
		{"deep-tree", head + "hub,,1,,1,,30\nshop,hub,1,poisson:mean=2,1,9,10\nkiosk,shop,1,poisson:mean=1,1,9,5\n", "parent"},
		{"cycle", head + "a,b,1,poisson:mean=2,1,9,10\nb,a,1,poisson:mean=2,1,9,10\n", "parent"},
		{"centre-level-very-negative", head + "hub,,1,,1,,-1000000000000\nshop,hub,1,poisson:mean=2,1,9,10\n", "base_stock"},
		{"store-level-very-negative", head + "hub,,1,,1,,30\nshop,hub,1,poisson:mean=2,1,9,-1000000000000\n", "base_stock"},
		{"no-level", head + "hub,,1,,1,,\nshop,hub,1,poisson:mean=2,1,9,10\n", "base_stock"},
		{"binary", "\x00\x01\x02garbage\xff\xfe", "n.csv"},
	} {
		add(hostileCase{name: "network-file-" + c.name, args: []string{"network", "evaluate", "--network", "{dir}/n.csv"}, files: file(c.body), code: 1, names: []string{c.column}})
	}
	return cs
}

func TestNetworkReport(t *testing.T) {
	file := writeTemp(t, "two.csv", twoStoreNetworkCSV)
	out := filepath.Join(t.TempDir(), "page.html")
	code, stdout, errs := runNetwork(t, "report", "--network", file, "--out", out, "--check-periods", "2000", "--check-replications", "3")
	if code != 0 || stdout != "" {
		t.Fatalf("exit %d, stdout %q: %s", code, stdout, errs)
	}
	page, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<svg", "Each location planned alone", "millbeck", "approximation"} {
		if !strings.Contains(string(page), want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if code, _, _ := runNetwork(t, "report", "--network", file); code != 2 {
		t.Errorf("no --out: exit %d, want 2", code)
	}
}

func TestNetworkBatch(t *testing.T) {
	items := `sku,location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock,min_fill_rate
PAD,hub,,3,,0.2,,,
PAD,east,hub,1,poisson:mean=3,0.3,18,,0.95
BAD,hub,,3,,0.2,,,
BAD,east,hub,1.5,poisson:mean=3,0.3,18,,
PAD,west,hub,2,poisson:mean=2,0.3,18,,0.95
ONE,hub,,2,,0.1,,,
ONE,east,hub,0,poisson:mean=1,0.3,9,,
`
	in := writeTemp(t, "items.csv", items)
	dir := t.TempDir()
	var outs []string
	for _, w := range []string{"1", "3"} {
		out := filepath.Join(dir, "res"+w+".csv")
		code, _, errs := runNetwork(t, "batch", "--items", in, "--out", out, "--workers", w, "--check-periods", "2000", "--check-replications", "2")
		if code != 3 || !strings.Contains(errs, "3 SKUs: 2 planned, 1 failed") {
			t.Fatalf("exit %d: %s", code, errs)
		}
		b, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		outs = append(outs, string(b))
	}
	if outs[0] != outs[1] {
		t.Errorf("--workers changed the results")
	}
	lines := strings.Split(strings.TrimSpace(outs[0]), "\n")
	// Record, header, PAD x 3 (in file order of first rows), BAD, ONE x 2.
	if len(lines) != 2+3+1+2 {
		t.Fatalf("%d lines:\n%s", len(lines), outs[0])
	}
	if !strings.HasPrefix(lines[5], "BAD,") || !strings.Contains(lines[5], "items.csv:5: column lead_time:") {
		t.Errorf("failed SKU row %q", lines[5])
	}
	if !strings.HasPrefix(lines[4], "PAD,west,hub,2,") || !strings.Contains(lines[7], ",true,0,") {
		t.Errorf("rows:\n%s", outs[0])
	}
}

// report --network writes the same page as network report.
func TestReportNetworkFlag(t *testing.T) {
	file := writeTemp(t, "serial.csv", serialNetworkCSV)
	out := filepath.Join(t.TempDir(), "page.html")
	var o, e bytes.Buffer
	if code := run([]string{"ergostock", "report", "--network", file, "--out", out}, strings.NewReader(""), &o, &e); code != 0 {
		t.Fatalf("exit %d: %s", code, e.String())
	}
	page, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "Each location planned alone") || !strings.Contains(string(page), "harrow-lane") {
		t.Errorf("page lacks the network content")
	}
}
