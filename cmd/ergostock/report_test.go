package main

import (
	"bytes"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

func runReport(args ...string) (code int, stdout, stderr string) {
	var out, errb bytes.Buffer
	code = run(append([]string{"ergostock", "report"}, args...), nil, &out, &errb)
	return code, out.String(), errb.String()
}

// reportNetworkRE finds anything in a page that would load from elsewhere.
var reportNetworkRE = regexp.MustCompile(`(?i)https?://|\bsrc\s*=|@import|url\(|<link\b`)

// checkReportPage reads the page and checks that the charts with the given
// ids are drawn as inline SVG and nothing refers to the network.
func checkReportPage(t *testing.T, path string, charts ...string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	if !strings.HasPrefix(page, "<!DOCTYPE html>") || !strings.HasSuffix(strings.TrimSpace(page), "</html>") {
		t.Errorf("%s: not a complete HTML page", path)
	}
	if m := reportNetworkRE.FindString(page); m != "" {
		t.Errorf("%s: refers to an external resource: %q", path, m)
	}
	for _, id := range charts {
		if !regexp.MustCompile(`<figure id="` + regexp.QuoteMeta(id) + `">\s*<svg\b`).MatchString(page) {
			t.Errorf("%s: chart %q missing or not drawn", path, id)
		}
	}
	return page
}

// The page for one SKU of the demo data (data/history.csv), its demand
// fitted from the history, with the current policy and the simulation.
func TestReportSKUDemo(t *testing.T) {
	out := filepath.Join(t.TempDir(), "sku.html")
	code, stdout, stderr := runReport("--history", "../../data/history.csv", "--sku", "DOOR-SENSOR-T4-IR",
		"--lead-time", "3", "--holding-cost", "1.0699", "--shortage-cost", "314.98", "--order-cost", "104.21",
		"--unit-cost", "222.53", "--reorder-point", "3", "--order-up-to", "4",
		"--simulate", "--periods", "20000", "--replications", "4", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if stdout != "" {
		t.Errorf("stdout %q, want nothing (the page goes to --out)", stdout)
	}
	page := checkReportPage(t, out, "levels", "cost-map", "fill-rate", "history", "history-fit")
	for _, s := range []string{"DOOR-SENSOR-T4-IR", "fitted to ../../data/history.csv", "Key figures",
		"Exact against simulated", "current s-S(s=3,S=4)", "Assumptions and cautions"} {
		if !strings.Contains(page, s) {
			t.Errorf("page lacks %q", s)
		}
	}
}

// A one-SKU page from the system flags alone: the cheapest s-nQ policy.
func TestReportSKUOptimize(t *testing.T) {
	out := filepath.Join(t.TempDir(), "snq.html")
	code, _, stderr := runReport("--demand", "poisson:mean=6", "--lead-time", "1", "--holding-cost", "1",
		"--shortage-cost", "19", "--order-cost", "50", "--policy", "s-nQ", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	page := checkReportPage(t, out, "levels", "cost-map", "fill-rate")
	if !strings.Contains(page, "Recommended: s-nQ(") {
		t.Errorf("page does not recommend an s-nQ policy")
	}
}

// The batch page for the fixture made by `ergostock batch --items
// testdata/report/items.csv --out testdata/report/results.csv`, with the
// demand patterns of the demo history (data/history.csv).
func TestReportBatchFixture(t *testing.T) {
	out := filepath.Join(t.TempDir(), "batch.html")
	code, _, stderr := runReport("--results", "../../testdata/report/results.csv",
		"--items", "../../testdata/report/items.csv", "--history", "../../data/history.csv",
		"--targets", "0.9,0.95,0.99", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	page := checkReportPage(t, out, "exchange", "saving-by-pattern", "pattern-map")
	for _, s := range []string{`class="items sortable"`, "BRAKE-PAD-07", "COUPLER-PIN-3", "holding_cost", "<script>"} {
		if !strings.Contains(page, s) {
			t.Errorf("page lacks %q", s)
		}
	}
}

// The batch page for the whole demo: the README's main job, then the page
// with the exchange curve (three targets to keep the test short). Skipped
// with -short.
func TestReportBatchDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the whole demo catalogue")
	}
	dir := t.TempDir()
	results := filepath.Join(dir, "results.csv")
	var out, errb bytes.Buffer
	code := run([]string{"ergostock", "batch", "--items", "../../data/items.csv", "--history", "../../data/history.csv",
		"--period", "week", "--out", results}, nil, &out, &errb)
	if code != 0 {
		t.Fatalf("batch: exit %d: %s", code, errb.String())
	}
	page := filepath.Join(dir, "batch.html")
	code, _, stderr := runReport("--results", results, "--items", "../../data/items.csv", "--history", "../../data/history.csv",
		"--targets", "0.9,0.98,0.995", "--out", page)
	if code != 0 {
		t.Fatalf("report: exit %d: %s", code, stderr)
	}
	html := checkReportPage(t, page, "exchange", "saving-by-pattern", "pattern-map")
	for _, s := range []string{"WIPE-CAB-100", "BRAKE-PAD-T4-FRONT", "T5-BRAKE-PAD-FRONT", `class="items sortable"`} {
		if !strings.Contains(html, s) {
			t.Errorf("demo batch page lacks %q", s)
		}
	}
}

// Bad input: a one-line error naming the file or flag and what was
// expected, exit 1 (2 for flag misuse), and no page written; an existing
// page is left as it was.
func TestReportBadInput(t *testing.T) {
	dir := t.TempDir()
	sys := []string{"--demand", "poisson:mean=4", "--holding-cost", "1", "--shortage-cost", "9"}
	for _, c := range []struct {
		name string
		args []string
		code int
		want string
	}{
		{"missing results", []string{"--results", filepath.Join(dir, "nope.csv")}, 1, "nope.csv"},
		{"foreign results", []string{"--results", "../../testdata/report/foreign.csv"}, 1, "foreign.csv:1: missing columns demand, demand_mean, demand_variance and 21 more"},
		{"history as results", []string{"--results", "../../testdata/report/items.csv"}, 1, "not a results file of ergostock batch"},
		{"sku not in history", append([]string{"--history", "../../data/history.csv", "--sku", "NO-SUCH-PART"}, sys...), 1, `no SKU "NO-SUCH-PART"`},
		{"missing history", append([]string{"--history", filepath.Join(dir, "h.csv"), "--sku", "A"}, sys...), 1, "h.csv"},
		{"missing items", []string{"--results", "../../testdata/report/results.csv", "--items", filepath.Join(dir, "i.csv")}, 1, "i.csv"},
		{"sku without history", append([]string{"--sku", "A"}, sys...), 2, "--history and --sku go together"},
		{"batch with system flags", []string{"--results", "../../testdata/report/results.csv", "--demand", "poisson:mean=3"}, 2, "--demand belongs to a one-SKU page"},
		{"no holding cost", []string{"--demand", "poisson:mean=4", "--shortage-cost", "9"}, 2, "--holding-cost is required"},
		{"bad targets", []string{"--results", "../../testdata/report/results.csv", "--targets", "0.9,1.5"}, 2, "--targets"},
		{"bad policy type", append([]string{"--policy", "min-max"}, sys...), 2, "--policy min-max"},
		{"bad demand", []string{"--demand", "poisson:mean=-1", "--holding-cost", "1", "--shortage-cost", "9"}, 2, "--demand"},
		{"bad floor", append([]string{"--min-fill-rate", "1.2"}, sys...), 2, "--min-fill-rate"},
	} {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(dir, "page.html")
			if err := os.WriteFile(out, []byte("old page"), 0o644); err != nil {
				t.Fatal(err)
			}
			code, _, stderr := runReport(append(c.args, "--out", out)...)
			if code != c.code {
				t.Errorf("exit %d, want %d (stderr %q)", code, c.code, stderr)
			}
			if !strings.Contains(stderr, c.want) {
				t.Errorf("stderr %q, want it to contain %q", stderr, c.want)
			}
			if n := strings.Count(strings.TrimRight(stderr, "\n"), "\n"); n > 0 {
				t.Errorf("stderr has %d lines, want one: %q", n+1, stderr)
			}
			if b, _ := os.ReadFile(out); string(b) != "old page" {
				t.Errorf("the existing page was changed")
			}
			if m, _ := filepath.Glob(filepath.Join(dir, ".page.html.tmp-*")); len(m) > 0 {
				t.Errorf("temporary files left behind: %v", m)
			}
		})
	}
}
