package main

import (
	"bytes"
	"os"
	"path/filepath"
	"reflect"
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
