package main

import (
	"bytes"
	"encoding/csv"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/policies/batch"
)

// The fixtures in testdata/batch are plumbing: a small invented history of
// the demo's tram spare parts with one item for every way an item can fail.
// Figures are checked against an outside formula only where one applies
// (TestBatchNewsvendor); the engine's own tests check the rest.
const (
	batchItems   = "../../testdata/batch/items.csv"
	batchHistory = "../../testdata/batch/history.csv"
)

// runBatchCmd runs "ergostock batch" with the arguments and returns the exit
// status and stderr.
func runBatchCmd(t *testing.T, args ...string) (int, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(append([]string{"ergostock", "batch"}, args...), nil, &out, &errb)
	if out.Len() != 0 {
		t.Errorf("batch wrote to stdout: %q", out.String())
	}
	return code, errb.String()
}

// readResults reads a results file into its header and rows, keyed by sku
// and item position.
func readResults(t *testing.T, path string) ([]string, [][]string) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(b, []byte(batch.MetaPrefix)) {
		t.Fatalf("%s: no header record: starts %.40q", path, b)
	}
	b = b[bytes.IndexByte(b, '\n')+1:]
	recs, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if len(recs) == 0 {
		t.Fatalf("%s: empty", path)
	}
	return recs[0], recs[1:]
}

func column(header []string, name string) int {
	i := slices.Index(header, name)
	if i < 0 {
		panic("no column " + name)
	}
	return i
}

func TestBatchFixtures(t *testing.T) {
	out := filepath.Join(t.TempDir(), "results.csv")
	code, stderr := runBatchCmd(t, "--items", batchItems, "--history", batchHistory, "--out", out, "--period", "week", "--workers", "2")
	if code != 3 {
		t.Fatalf("exit status %d, want 3 (some items fail); stderr:\n%s", code, stderr)
	}
	if lines := strings.Count(stderr, "\n"); lines != 1 || !strings.Contains(stderr, "batch: 12 items: ") {
		t.Errorf("stderr is not the one summary line:\n%s", stderr)
	}
	header, rows := readResults(t, out)
	if len(rows) != 12 {
		t.Fatalf("%d rows, want 12", len(rows))
	}
	sku, errc, total, item := column(header, "sku"), column(header, "error"), column(header, "total_cost"), column(header, "item")
	wantErr := map[string]string{
		"ZERO-7":  "no demand",
		"CAB-2":   `bad history: ../../testdata/batch/history.csv:`,
		"GHOST-4": `no history for sku "GHOST-4" in ../../testdata/batch/history.csv`,
		"SIG-8":   `../../testdata/batch/items.csv:11: holding_cost "-3": want a finite cost >= 0`,
	}
	for i, r := range rows {
		if r[item] != strconv.Itoa(i) {
			t.Errorf("row %d: item %s", i, r[item])
		}
		want, fails := wantErr[r[sku]]
		if i == 10 {
			want, fails = `../../testdata/batch/items.csv:12: sku "BP-220": want a SKU given once (it is first given on line 2)`, true
		}
		switch {
		case fails && !strings.Contains(r[errc], want):
			t.Errorf("%s (row %d): error %q, want it to contain %q", r[sku], i, r[errc], want)
		case fails && r[total] != "":
			t.Errorf("%s: failed item has figures", r[sku])
		case !fails && r[errc] != "":
			t.Errorf("%s: unexpected error %q", r[sku], r[errc])
		}
	}
}

func TestBatchMissingColumn(t *testing.T) {
	out := filepath.Join(t.TempDir(), "results.csv")
	code, stderr := runBatchCmd(t, "--items", "../../testdata/batch/items-missing-column.csv", "--history", batchHistory, "--out", out)
	want := `ergostock: ../../testdata/batch/items-missing-column.csv:1: missing column shortage_cost: the header (line 1) has "sku", "lead_time", "holding_cost"; name the column that holds it with --items-columns "shortage_cost=HEADER"` + "\n"
	if code != 1 || stderr != want {
		t.Errorf("exit %d, stderr %q; want 1, %q", code, stderr, want)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("a failed run created %s", out)
	}
}

func TestBatchAtomicOutput(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "results.csv")
	old := []byte("sku,total_cost\nBP-220,12.5\n")
	if err := os.WriteFile(out, old, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{
		{"--items", "../../testdata/batch/items-missing-column.csv", "--history", batchHistory},
		{"--items", batchItems, "--history", filepath.Join(dir, "no-such-history.csv")},
		{"--items", batchItems, "--history", "../../testdata/batch/items.csv"}, // no quantity column
	} {
		code, stderr := runBatchCmd(t, append(args, "--out", out)...)
		if code != 1 || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%v: exit %d, stderr %q; want 1 and one line", args, code, stderr)
		}
		if b, _ := os.ReadFile(out); !bytes.Equal(b, old) {
			t.Errorf("%v: the failed run changed the existing output to %q", args, b)
		}
	}
	// A results file that cannot be written: its directory does not exist.
	nodir := filepath.Join(dir, "nodir")
	code, stderr := runBatchCmd(t, "--items", batchItems, "--history", batchHistory, "--out", filepath.Join(nodir, "r.csv"))
	if want := "ergostock: --out " + filepath.Join(nodir, "r.csv") + ": cannot create a file in " + nodir + ": no such file or directory\n"; code != 1 || stderr != want {
		t.Errorf("unwritable output: exit %d, stderr %q; want 1, %q", code, stderr, want)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		names := []string{}
		for _, e := range ents {
			names = append(names, e.Name())
		}
		t.Errorf("directory holds %v, want only results.csv", names)
	}
}

func TestBatchUsage(t *testing.T) {
	out := filepath.Join(t.TempDir(), "r.csv")
	for _, tt := range []struct {
		args []string
		want string
	}{
		{[]string{"--workers", "0"}, "ergostock: --workers 0: want a number of workers >= 1\n"},
		{[]string{"--shard", "3/3"}, `ergostock: --shard "3/3": want K/N with whole numbers 0 <= K < N` + "\n"},
		{[]string{"--period", "fortnight"}, `ergostock: --period "fortnight": want day, week or month` + "\n"},
	} {
		code, stderr := runBatchCmd(t, append([]string{"--items", batchItems, "--history", batchHistory, "--out", out}, tt.args...)...)
		if code != 2 || stderr != tt.want {
			t.Errorf("%v: exit %d, stderr %q; want 2, %q", tt.args, code, stderr, tt.want)
		}
	}
	for _, tt := range []struct {
		args []string
		want string
	}{
		{[]string{"--items", batchItems, "--history", batchHistory, "--out", batchItems}, "ergostock: --out " + batchItems + ": it is the --items file; choose another results file\n"},
		{[]string{"--items", batchItems}, "ergostock: batch: --out is required (see --help)\n"},
		{[]string{"--out", out}, "ergostock: batch: --items is required (see --help)\n"},
		{[]string{"--items", batchItems, "--out", out, "stray"}, `ergostock: batch: unexpected argument "stray" (every input is given by a flag)` + "\n"},
	} {
		code, stderr := runBatchCmd(t, tt.args...)
		if code != 2 || stderr != tt.want {
			t.Errorf("%v: exit %d, stderr %q; want 2, %q", tt.args, code, stderr, tt.want)
		}
	}
}

// TestBatchNoHistory plans items that all give their demand, without a
// history file; an item without one fails alone.
func TestBatchNoHistory(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	text := "sku,lead_time,holding_cost,shortage_cost,demand\n" +
		"HRN-6,1,0.5,10,poisson:mean=2.5\n" +
		"BP-220,0,1,9,\"negbin:mean=3,var=7\"\n" // the grammar's commas need quotes in CSV
	if err := os.WriteFile(items, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "results.csv")
	if code, stderr := runBatchCmd(t, "--items", items, "--out", out); code != 0 || !strings.HasPrefix(stderr, "ergostock: batch: 2 items: 2 planned, 0 failed;") {
		t.Errorf("exit %d, stderr %q; want 0 and the summary", code, stderr)
	}
	if err := os.WriteFile(items, []byte(text+"WFL-5,0,1,9,\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _ := runBatchCmd(t, "--items", items, "--out", out)
	header, rows := readResults(t, out)
	if code != 3 || len(rows) != 3 || rows[2][column(header, "error")] != "no demand column and no --history file" || rows[0][column(header, "error")] != "" {
		t.Errorf("exit %d, rows %v", code, rows)
	}
}

// TestBatchWorkersAndShards checks that the results do not depend on the
// number of workers, and that the shards of a run partition its rows.
func TestBatchWorkersAndShards(t *testing.T) {
	dir := t.TempDir()
	common := []string{"--items", batchItems, "--history", batchHistory, "--period", "week"}
	full := map[int][]byte{}
	for _, w := range []int{1, 4} {
		out := filepath.Join(dir, "w"+strconv.Itoa(w)+".csv")
		if code, stderr := runBatchCmd(t, append(common, "--workers", strconv.Itoa(w), "--out", out)...); code != 3 {
			t.Fatalf("workers %d: exit %d: %s", w, code, stderr)
		}
		full[w], _ = os.ReadFile(out)
	}
	if !bytes.Equal(full[1], full[4]) {
		t.Fatalf("output differs between 1 and 4 workers:\n%s\n---\n%s", full[1], full[4])
	}
	header, rows := readResults(t, filepath.Join(dir, "w1.csv"))
	item := column(header, "item")

	const n = 3
	var merged [][]string
	for k := range n {
		out := filepath.Join(dir, "part-"+strconv.Itoa(k)+".csv")
		code, stderr := runBatchCmd(t, append(common, "--shard", strconv.Itoa(k)+"/"+strconv.Itoa(n), "--out", out)...)
		if code != 0 && code != 3 {
			t.Fatalf("shard %d: exit %d: %s", k, code, stderr)
		}
		h, part := readResults(t, out)
		if !slices.Equal(h, header) {
			t.Errorf("shard %d: header differs", k)
		}
		for _, r := range part {
			if p, _ := strconv.Atoi(r[item]); p%n != k {
				t.Errorf("shard %d holds item %d", k, p)
			}
		}
		merged = append(merged, part...)
	}
	slices.SortFunc(merged, func(a, b []string) int {
		x, _ := strconv.Atoi(a[item])
		y, _ := strconv.Atoi(b[item])
		return x - y
	})
	if !slices.EqualFunc(merged, rows, slices.Equal[[]string]) {
		t.Errorf("the shards' rows, in item order, differ from the full run's")
	}
}

// TestBatchNewsvendor checks one item against a closed form. Under
// base-stock S with backorders, inventory position after review is always
// S, so net inventory at the end of a period is S minus the demand X over
// L+1 periods and the cost per period is h E[(S-X)^+] + b E[(X-S)^+],
// least at the smallest S with P(X <= S) >= b/(b+h): the newsvendor
// critical fractile (P. Zipkin, "Foundations of Inventory Management",
// 2000, section 9.4; cited from memory). Item HRN-6 has demand
// poisson:mean=2.5, L = 1, h = 0.5, b = 10, and no order cost, so X is
// Poisson(5); the CDF comes from gonum's distuv.
func TestBatchNewsvendor(t *testing.T) {
	out := filepath.Join(t.TempDir(), "results.csv")
	runBatchCmd(t, "--items", batchItems, "--history", batchHistory, "--out", out)
	header, rows := readResults(t, out)
	r := rows[11]
	if r[column(header, "sku")] != "HRN-6" {
		t.Fatalf("row 11 is %v", r)
	}
	if e := r[column(header, "error")]; e != "" {
		t.Fatalf("HRN-6 failed: %s", e)
	}
	x := distuv.Poisson{Lambda: 5}
	ratio := 10 / (10 + 0.5)
	want := 0
	for x.CDF(float64(want)) < ratio {
		want++
	}
	if got := r[column(header, "order_up_to")]; got != strconv.Itoa(want) || r[column(header, "policy")] != "base-stock" {
		t.Errorf("HRN-6: policy %s S=%s, want base-stock S=%d", r[column(header, "policy")], got, want)
	}
}

// TestBatchDemo runs the README's main command on the demo data: every row
// has either all its figures or an error, and a planned row's costs add up
// to its total (SPEC section 2: total = holding + shortage + ordering +
// purchase).
func TestBatchDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("the demo run takes several seconds")
	}
	const items, hist = "../../data/items.csv", "../../data/history.csv"
	for _, f := range []string{items, hist} {
		if _, err := os.Stat(f); err != nil {
			t.Skipf("demo data not present: %v", err)
		}
	}
	out := filepath.Join(t.TempDir(), "results.csv")
	code, stderr := runBatchCmd(t, "--items", items, "--history", hist, "--period", "week", "--out", out)
	if code != 0 && code != 3 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	header, rows := readResults(t, out)
	if len(rows) == 0 {
		t.Fatal("no rows")
	}
	first, last := column(header, "fill_rate"), column(header, "total_cost")
	errc, sku := column(header, "error"), column(header, "sku")
	failed := 0
	for _, r := range rows {
		if r[errc] != "" {
			failed++
			for j := first; j <= last; j++ {
				if r[j] != "" {
					t.Errorf("%s: failed (%s) but has %s = %s", r[sku], r[errc], header[j], r[j])
				}
			}
			continue
		}
		v := map[string]float64{}
		for j := first; j <= last; j++ {
			x, err := strconv.ParseFloat(r[j], 64)
			if err != nil {
				t.Fatalf("%s: %s = %q: %v", r[sku], header[j], r[j], err)
			}
			v[header[j]] = x
		}
		sum := v["holding_cost"] + v["shortage_cost"] + v["ordering_cost"] + v["purchase_cost"]
		if d := sum - v["total_cost"]; d > 1e-9*max(1, v["total_cost"]) || d < -1e-9*max(1, v["total_cost"]) {
			t.Errorf("%s: costs add to %g, total_cost %g", r[sku], sum, v["total_cost"])
		}
		if fr := v["fill_rate"]; !(fr >= 0 && fr <= 1) {
			t.Errorf("%s: fill rate %g", r[sku], fr)
		}
	}
	if (failed > 0) != (code == 3) {
		t.Errorf("exit %d with %d failed items", code, failed)
	}
	t.Logf("%d items, %d failed; %s", len(rows), failed, strings.TrimSpace(stderr))
}
