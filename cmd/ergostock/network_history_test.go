package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"ergostock/inventory/history"
)

// byLocationHistory is an invented history (the demo's scenario: parts of
// the Brackwater Valley stores, by depot), one row per week and location:
// weeks starting Monday 2025-01-06, the quantities cycling through the
// lists below. The centre has no rows: it has no demand of its own.
func byLocationHistory() string {
	series := []struct {
		sku, loc string
		q        []int
	}{
		{"SEAL-KIT-40", "harrow-lane", []int{3, 5, 2, 4, 3, 6, 1, 4}},
		{"SEAL-KIT-40", "millbeck", []int{1, 2, 0, 3, 1, 2, 2}},
		{"FUSE-10A", "harrow-lane", []int{6, 4, 7, 5, 8, 3}},
	}
	var b strings.Builder
	b.WriteString("sku,location,date,quantity\n")
	for w := 0; w < 24; w++ {
		day := 6 + 7*w // January day numbers past 31 roll over below
		y, m, d := 2025, 1, day
		for _, n := range []int{31, 28, 31, 30, 31, 30} {
			if d <= n {
				break
			}
			d -= n
			m++
		}
		for _, s := range series {
			if q := s.q[w%len(s.q)]; q > 0 {
				fmt.Fprintf(&b, "%s,%s,%04d-%02d-%02d,%d\n", s.sku, s.loc, y, m, d, q)
			}
		}
	}
	return b.String()
}

const networkItemsNoDemand = `sku,location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock,min_fill_rate
SEAL-KIT-40,central-stores,,4,,0.5,,,
SEAL-KIT-40,harrow-lane,central-stores,1,,0.8,20,,0.95
SEAL-KIT-40,millbeck,central-stores,2,,0.8,20,,0.95
FUSE-10A,central-stores,,3,,0.1,,,
FUSE-10A,harrow-lane,central-stores,1,,0.15,5,,
`

// fittedDemand fits (sku, location) of the history as `fit` does, outside
// the network code: the reference the network commands must agree with.
func fittedDemand(t *testing.T, path, sku, loc string) string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	h, err := history.ReadWith(f, path, history.Week, history.Options{ByLocation: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range h.SKUs {
		if k.SKU == sku && k.Location == loc {
			s, err := k.Fit()
			if err != nil || s.Demand == nil {
				t.Fatalf("%s at %s: %v", sku, loc, err)
			}
			return s.Demand.String()
		}
	}
	t.Fatalf("%s at %s: not in the history", sku, loc)
	return ""
}

func readNetResults(t *testing.T, path string) [][]string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	_, body, _ := strings.Cut(string(b), "\n") // the header record
	recs, err := csv.NewReader(strings.NewReader(body)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs
}

// A network batch whose demand is fitted from a by-location history plans
// every SKU exactly as network optimize does with the fitted demands
// written into the file, and network optimize --history --sku agrees too.
func TestNetworkBatchHistoryEqualsOptimize(t *testing.T) {
	dir := t.TempDir()
	hist := filepath.Join(dir, "history.csv")
	items := filepath.Join(dir, "items.csv")
	out := filepath.Join(dir, "results.csv")
	if err := os.WriteFile(hist, []byte(byLocationHistory()), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(items, []byte(networkItemsNoDemand), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errs := runNetwork(t, "batch", "--items", items, "--history", hist, "--out", out, "--check-periods", "0")
	if code != 0 || !strings.Contains(errs, "at 3 locations, 2 centres without demand") {
		t.Fatalf("exit %d: %s", code, errs)
	}
	recs := readNetResults(t, out)
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	if len(recs) != 1+5 {
		t.Fatalf("%d records", len(recs))
	}
	for _, sku := range []string{"SEAL-KIT-40", "FUSE-10A"} {
		// The network file with the fitted demands written in.
		var b strings.Builder
		b.WriteString("location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock,min_fill_rate\n")
		var noDemand strings.Builder
		noDemand.WriteString("location,parent,lead_time,holding_cost,shortage_cost,min_fill_rate\n")
		for _, line := range strings.Split(strings.TrimSpace(networkItemsNoDemand), "\n")[1:] {
			f := strings.Split(line, ",")
			if f[0] != sku {
				continue
			}
			d := ""
			if f[2] != "" {
				d = fittedDemand(t, hist, sku, f[1])
			}
			fmt.Fprintf(&b, "%s,%s,%s,\"%s\",%s,%s,,%s\n", f[1], f[2], f[3], d, f[5], f[6], f[8])
			fmt.Fprintf(&noDemand, "%s,%s,%s,%s,%s,%s\n", f[1], f[2], f[3], f[5], f[6], f[8])
		}
		written := writeTemp(t, "net.csv", b.String())
		bare := writeTemp(t, "bare.csv", noDemand.String())
		var want networkObject
		for i, args := range [][]string{
			{"optimize", "--network", written, "--json", "--check-periods", "0"},
			{"optimize", "--network", bare, "--history", hist, "--sku", sku, "--json", "--check-periods", "0"},
		} {
			code, stdout, errs := runNetwork(t, args...)
			if code != 0 {
				t.Fatalf("%v: exit %d: %s", args, code, errs)
			}
			var got networkObject
			if err := json.Unmarshal([]byte(stdout), &got); err != nil {
				t.Fatal(err)
			}
			if i == 0 {
				want = got
				continue
			}
			if got.TotalCost != want.TotalCost || len(got.Locations) != len(want.Locations) {
				t.Errorf("%s: optimize --history: total %v, want %v", sku, got.TotalCost, want.TotalCost)
			}
			if !strings.Contains(errs, "fitted from") {
				t.Errorf("%s: stderr does not say what was fitted: %s", sku, errs)
			}
		}
		rows := 0
		for _, r := range recs[1:] {
			if r[col["sku"]] != sku {
				continue
			}
			l := want.Locations[rows]
			rows++
			total, _ := strconv.ParseFloat(r[col["network_total_cost"]], 64)
			fill, _ := strconv.ParseFloat(r[col["fill_rate"]], 64)
			if r[col["location"]] != l.Location || r[col["base_stock"]] != strconv.Itoa(l.InstallationLevel) ||
				total != want.TotalCost || fill != l.FillRate || r[col["error"]] != "" {
				t.Errorf("%s %s: batch row %v, want levels %d, fill rate %v, total %v", sku, l.Location, r, l.InstallationLevel, l.FillRate, want.TotalCost)
			}
			if math.IsNaN(fill) || (r[col["parent"]] != "" && !strings.Contains(r[col["warnings"]], "fitted from")) {
				t.Errorf("%s %s: warnings %q", sku, l.Location, r[col["warnings"]])
			}
		}
		if rows != len(want.Locations) {
			t.Errorf("%s: %d rows, want %d", sku, rows, len(want.Locations))
		}
	}
}

// What cannot be fitted fails its SKU alone, with a one-line reason
// naming the items file's line and the near-miss in the history.
func TestNetworkBatchHistoryRefusals(t *testing.T) {
	hist := writeTemp(t, "history.csv", byLocationHistory()+"CABLE-3M,central-stores,2025-01-07,4\nCABLE-3M,east,2025-01-07,4\n")
	items := writeTemp(t, "items.csv", `sku,location,parent,lead_time,demand,holding_cost,shortage_cost
SEAL-KIT-40,central-stores,,4,,0.5,
SEAL-KIT-40,Harrow-Lane,central-stores,1,,0.8,20
FUSE-10A,central-stores,,3,,0.1,
FUSE-10A,harrow-lane,central-stores,1,poisson:mean=2,0.15,5
FUSE-10A,millbeck,central-stores,1,,0.15,5
CABLE-3M,central-stores,,3,,0.1,
CABLE-3M,east,central-stores,1,,0.15,5
NOPE,central-stores,,3,,0.1,
NOPE,east,central-stores,1,,0.15,5
`)
	out := filepath.Join(t.TempDir(), "r.csv")
	code, _, errs := runNetwork(t, "batch", "--items", items, "--history", hist, "--out", out, "--check-periods", "0")
	if code != 3 || !strings.Contains(errs, "4 SKUs: 0 planned, 4 failed") {
		t.Fatalf("exit %d: %s", code, errs)
	}
	recs := readNetResults(t, out)
	wants := map[string][]string{
		"SEAL-KIT-40": {"items.csv:3: column demand:", `did you mean location "harrow-lane"?`},
		"FUSE-10A":    {"items.csv:6: column demand:", `"millbeck"`, `(it has sku "FUSE-10A" at "harrow-lane")`},
		"CABLE-3M":    {"items.csv:7: column demand:", "external demand at the centre is not modelled"},
		"NOPE":        {"items.csv:10: column demand:", `no rows of sku "NOPE" at all`},
	}
	for _, r := range recs[1:] {
		e := r[len(r)-1]
		for _, w := range wants[r[0]] {
			if !strings.Contains(e, w) {
				t.Errorf("%s: error %q lacks %q", r[0], e, w)
			}
		}
		if strings.Contains(e, "\n") {
			t.Errorf("%s: error on several lines", r[0])
		}
		delete(wants, r[0])
	}
	if len(wants) > 0 {
		t.Errorf("no rows for %v", wants)
	}

	// Refusals of the whole run.
	noLoc := writeTemp(t, "h.csv", "sku,date,quantity\nFUSE-10A,2025-01-06,3\n")
	for _, c := range []struct {
		args  []string
		code  int
		names []string
	}{
		{[]string{"batch", "--items", items, "--history", noLoc, "--out", out}, 1, []string{"h.csv:1", "location column"}},
		{[]string{"batch", "--items", items, "--history", hist, "--out", out, "--period", "fortnight"}, 2, []string{"fortnight"}},
		{[]string{"batch", "--items", items, "--history", hist, "--out", hist}, 2, []string{"--out", "--history"}},
		{[]string{"batch", "--items", items, "--history", hist, "--out", out, "--items-columns", "sku=Part"}, 1, []string{"--items-columns", "Part"}},
		{[]string{"optimize", "--network", items, "--sku", "FUSE-10A"}, 2, []string{"--sku", "--history"}},
		{[]string{"optimize", "--network", items, "--history", hist}, 2, []string{"--sku"}},
		{[]string{"evaluate", "--network", items, "--history", noLoc, "--sku", "FUSE-10A"}, 1, []string{"location column"}},
	} {
		code, stdout, errs := runNetwork(t, c.args...)
		if code != c.code || stdout != "" || strings.Count(strings.TrimSpace(errs), "\n") > 0 {
			t.Errorf("%v: exit %d (want %d), stdout %q, stderr %q", c.args, code, c.code, stdout, errs)
		}
		for _, n := range c.names {
			if !strings.Contains(errs, n) {
				t.Errorf("%v: %q does not name %q", c.args, errs, n)
			}
		}
	}
}

// The items file may drop the demand column when a history is given, and
// may name its columns otherwise (--items-columns), in another dialect.
func TestNetworkBatchHistoryDialect(t *testing.T) {
	hist := writeTemp(t, "history.csv", byLocationHistory())
	items := writeTemp(t, "items.csv", "Part;Site;Supplied by;Lead time;holding_cost;shortage_cost\n"+
		"FUSE-10A;central-stores;;3;0,1;\nFUSE-10A;harrow-lane;central-stores;1;0,15;5\n")
	out := filepath.Join(t.TempDir(), "r.csv")
	code, _, errs := runNetwork(t, "batch", "--items", items, "--history", hist, "--out", out, "--check-periods", "0",
		"--items-columns", "sku=Part,location=Site,parent=Supplied by,lead_time=Lead time")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	recs := readNetResults(t, out)
	if len(recs) != 3 || recs[2][1] != "harrow-lane" || !strings.Contains(recs[2][len(recs[2])-2], fittedDemand(t, hist, "FUSE-10A", "harrow-lane")) {
		t.Errorf("records %v", recs)
	}
}

// batch with an items file of networks (location and parent columns)
// writes what network batch writes, also with demand from the history,
// and refuses the flags that do not apply.
func TestBatchOfNetworks(t *testing.T) {
	dir := t.TempDir()
	hist := filepath.Join(dir, "history.csv")
	items := filepath.Join(dir, "items.csv")
	if err := os.WriteFile(hist, []byte(byLocationHistory()), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(items, []byte(networkItemsNoDemand), 0o644); err != nil {
		t.Fatal(err)
	}
	a, b := filepath.Join(dir, "a.csv"), filepath.Join(dir, "b.csv")
	var o, e strings.Builder
	if code := run([]string{"ergostock", "batch", "--items", items, "--history", hist, "--out", a, "--workers", "2"}, strings.NewReader(""), &o, &e); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, e.String())
	}
	if code, _, errs := runNetwork(t, "batch", "--items", items, "--history", hist, "--out", b, "--check-periods", "5000", "--check-replications", "4", "--workers", "1"); code != 0 {
		t.Fatalf("network batch: exit %d: %s", code, errs)
	}
	ra, _ := os.ReadFile(a)
	rb, _ := os.ReadFile(b)
	if string(ra) != string(rb) || !strings.Contains(e.String(), "batch (networks): 2 SKUs: 2 planned") {
		t.Errorf("batch of networks differs from network batch:\n%s\n%s", ra, rb)
	}
	for _, extra := range [][]string{{"--shard", "0/2"}, {"--uncertainty"}, {"--out", "-"}, {"--out", filepath.Join(dir, "r.xlsx")}} {
		args := append([]string{"ergostock", "batch", "--items", items, "--history", hist, "--out", a}, extra...)
		var o, e strings.Builder
		if code := run(args, strings.NewReader(""), &o, &e); code != 2 || !strings.Contains(e.String(), extra[0]) || o.Len() > 0 {
			t.Errorf("%v: exit %d: %s", extra, code, e.String())
		}
	}
}

// A location of the history that the network does not name is reported on
// the centre's row, and the header record names the history and period.
func TestNetworkBatchHistoryUnnamed(t *testing.T) {
	hist := writeTemp(t, "history.csv", byLocationHistory())
	items := writeTemp(t, "items.csv", "sku,location,parent,lead_time,holding_cost,shortage_cost\n"+
		"SEAL-KIT-40,central-stores,,4,0.5,\nSEAL-KIT-40,harrow-lane,central-stores,1,0.8,20\n")
	out := filepath.Join(t.TempDir(), "r.csv")
	if code, _, errs := runNetwork(t, "batch", "--items", items, "--history", hist, "--out", out, "--check-periods", "0", "--workers", "2"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, _ := os.ReadFile(out)
	if !strings.Contains(strings.SplitN(string(b), "\n", 2)[0], "; history=") {
		t.Errorf("header record %q", strings.SplitN(string(b), "\n", 2)[0])
	}
	recs := readNetResults(t, out)
	if w := recs[1][len(recs[1])-2]; !strings.Contains(w, `"millbeck" (20 rows), not in the network`) {
		t.Errorf("centre warnings %q", w)
	}
}

// A workbook of networks and a workbook history are read like the CSVs.
func TestNetworkBatchHistoryWorkbooks(t *testing.T) {
	dir := t.TempDir()
	var hist, items [][]string
	for _, l := range strings.Split(strings.TrimSpace(byLocationHistory()), "\n") {
		hist = append(hist, strings.Split(l, ","))
	}
	for _, l := range strings.Split(strings.TrimSpace(networkItemsNoDemand), "\n") {
		items = append(items, strings.Split(l, ","))
	}
	hx, ix := filepath.Join(dir, "h.xlsx"), filepath.Join(dir, "i.xlsx")
	writeWorkbook(t, hx, "Sheet1", hist, false)
	writeWorkbook(t, ix, "Sheet1", items, false)
	hc := filepath.Join(dir, "h.csv")
	ic := filepath.Join(dir, "i.csv")
	os.WriteFile(hc, []byte(byLocationHistory()), 0o644)
	os.WriteFile(ic, []byte(networkItemsNoDemand), 0o644)
	a, b := filepath.Join(dir, "a.csv"), filepath.Join(dir, "b.csv")
	for _, r := range [][]string{{ix, hx, a}, {ic, hc, b}} {
		if code, _, errs := runNetwork(t, "batch", "--items", r[0], "--history", r[1], "--out", r[2], "--check-periods", "0"); code != 0 {
			t.Fatalf("%v: exit %d: %s", r, code, errs)
		}
	}
	ra, rb := readNetResults(t, a), readNetResults(t, b)
	if len(ra) != len(rb) || len(ra) != 6 {
		t.Fatalf("%d and %d records", len(ra), len(rb))
	}
	for i := range ra {
		// The warnings name the history file; everything else agrees.
		if strings.Join(ra[i][:17], ",") != strings.Join(rb[i][:17], ",") {
			t.Errorf("row %d: workbook %v, CSV %v", i, ra[i], rb[i])
		}
	}
}
