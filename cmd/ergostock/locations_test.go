package main

import (
	"bufio"
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
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
		if code != 1 || !strings.Contains(e.String(), c.want) || strings.Count(strings.TrimSpace(e.String()), "\n") != 0 {
			t.Errorf("%s: exit %d, %q; want exit 1 and one line with %q", c.name, code, e.String(), c.want)
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
