package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// uncHistory is an invented 20-week history of one part.
const uncHistory = "sku,period,quantity\n" +
	"PANTO-CARBON,1,3\nPANTO-CARBON,2,0\nPANTO-CARBON,3,5\nPANTO-CARBON,4,2\nPANTO-CARBON,5,4\n" +
	"PANTO-CARBON,6,1\nPANTO-CARBON,7,6\nPANTO-CARBON,8,2\nPANTO-CARBON,9,3\nPANTO-CARBON,10,3\n" +
	"PANTO-CARBON,11,0\nPANTO-CARBON,12,4\nPANTO-CARBON,13,2\nPANTO-CARBON,14,5\nPANTO-CARBON,15,1\n" +
	"PANTO-CARBON,16,3\nPANTO-CARBON,17,7\nPANTO-CARBON,18,2\nPANTO-CARBON,19,4\nPANTO-CARBON,20,3\n"

func writeUncHistory(t *testing.T) string {
	p := filepath.Join(t.TempDir(), "h.csv")
	if err := os.WriteFile(p, []byte(uncHistory), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestOptimizeUncertaintyJSON(t *testing.T) {
	h := writeUncHistory(t)
	args := []string{"--history", h, "--sku", "PANTO-CARBON", "--lead-time", "2", "--holding-cost", "0.4",
		"--shortage-cost", "9", "--order-cost", "25", "--min-fill-rate", "0.95", "--uncertainty", "--resamples", "40", "--seed", "7", "--robust", "--json"}
	code, out, errs := optRun(args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var v struct {
		Policy      map[string]any `json:"policy"`
		FillRate    float64        `json:"fill_rate"`
		Uncertainty struct {
			Resamples    int                `json:"resamples"`
			Used         int                `json:"resamples_used"`
			ReorderPoint map[string]float64 `json:"reorder_point"`
			FillRate     map[string]float64 `json:"fill_rate"`
			Regret       map[string]float64 `json:"regret"`
			Robust       *struct {
				Policy     map[string]any `json:"policy"`
				FloorShare float64        `json:"share_meeting_floor"`
			} `json:"robust"`
		} `json:"uncertainty"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	u := v.Uncertainty
	if u.Resamples != 40 || u.Used != 40 || u.Robust == nil {
		t.Fatalf("uncertainty object %+v", u)
	}
	if !(u.ReorderPoint["p05"] <= u.ReorderPoint["p50"] && u.ReorderPoint["p50"] <= u.ReorderPoint["p95"]) {
		t.Errorf("band not ordered: %v", u.ReorderPoint)
	}
	if u.Regret["mean"] < 0 || u.Robust.FloorShare < 0.9 {
		t.Errorf("regret %v, robust share %g", u.Regret, u.Robust.FloorShare)
	}
	// Same seed, same answer; the table prints the same bands.
	code2, out2, _ := optRun(args...)
	if code2 != 0 || out2 != out {
		t.Error("a second run with the same seed differs")
	}
	code, tab, errs := optRun(args[:len(args)-1]...)
	if code != 0 {
		t.Fatalf("table: exit %d: %s", code, errs)
	}
	for _, want := range []string{"resampled models", "optimal reorder point", "regret", "robust", "plug-in", "share meeting min fill rate 0.95"} {
		if !strings.Contains(tab, want) {
			t.Errorf("table lacks %q:\n%s", want, tab)
		}
	}
}

// TestOptimizeHistoryWithoutUncertainty: --history --sku alone fits the
// SKU and optimises, as --demand with the fitted law would.
func TestOptimizeHistoryWithoutUncertainty(t *testing.T) {
	h := writeUncHistory(t)
	code, out, errs := optRun("--history", h, "--sku", "PANTO-CARBON", "--holding-cost", "1", "--shortage-cost", "9", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var v map[string]any
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if _, ok := v["uncertainty"]; ok {
		t.Error("an uncertainty object without --uncertainty")
	}
	d, _ := v["demand"].(string)
	if d != "poisson:mean=3" { // the sample mean, 60/20; Poisson wins by AICc here
		t.Fatalf("demand %q, want poisson:mean=3", d)
	}
	code, out2, errs := optRun("--demand", d, "--holding-cost", "1", "--shortage-cost", "9", "--json")
	if code != 0 || out2 != out {
		t.Errorf("--demand %s (exit %d, %s) differs from --history", d, code, errs)
	}
}

// TestBatchUncertainty: --uncertainty appends its columns after the plain
// ones and leaves the plain columns as they are; failed items stay failed
// with empty cells.
func TestBatchUncertainty(t *testing.T) {
	dir := t.TempDir()
	plain, unc := filepath.Join(dir, "plain.csv"), filepath.Join(dir, "unc.csv")
	if code, stderr := runBatchCmd(t, "--items", batchItems, "--history", batchHistory, "--out", plain); code != 3 {
		t.Fatalf("plain: exit %d: %s", code, stderr)
	}
	if code, stderr := runBatchCmd(t, "--items", batchItems, "--history", batchHistory, "--out", unc,
		"--uncertainty", "--resamples", "20", "--robust"); code != 3 {
		t.Fatalf("uncertainty: exit %d: %s", code, stderr)
	}
	ph, prows := readResults(t, plain)
	uh, urows := readResults(t, unc)
	if len(uh) <= len(ph) || !slices.Equal(uh[:len(ph)], ph) {
		t.Fatalf("header %v does not extend %v", uh, ph)
	}
	warn, errc, regret := column(ph, "warnings"), column(ph, "error"), column(uh, "regret_p95")
	for i := range prows {
		for j := range ph {
			if j != warn && urows[i][j] != prows[i][j] {
				t.Errorf("row %d column %s: %q with --uncertainty, %q without", i, ph[j], urows[i][j], prows[i][j])
			}
		}
		if (prows[i][errc] != "") != (urows[i][regret] == "") && !strings.Contains(urows[i][warn], "uncertainty") {
			t.Errorf("row %d: error %q, regret_p95 %q", i, prows[i][errc], urows[i][regret])
		}
	}
	for _, args := range [][]string{{"--resamples", "50"}, {"--uncertainty", "--resamples", "1"}, {"--uncertainty", "--resampling", "x"}} {
		code, stderr := runBatchCmd(t, append([]string{"--items", batchItems, "--history", batchHistory, "--out", filepath.Join(dir, "x.csv")}, args...)...)
		if code != 2 || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%v: exit %d, stderr %q; want 2 and one line", args, code, stderr)
		}
	}
}

// TestReportUncertainty: the one-SKU page with --uncertainty carries the
// two resampling charts; --uncertainty with --demand or on a batch page is
// a usage error.
func TestReportUncertainty(t *testing.T) {
	h := writeUncHistory(t)
	dir := t.TempDir()
	page := filepath.Join(dir, "p.html")
	base := []string{"ergostock", "report", "--history", h, "--sku", "PANTO-CARBON", "--holding-cost", "0.4", "--shortage-cost", "9",
		"--order-cost", "25", "--out", page}
	var out, errb strings.Builder
	if code := run(append(append([]string{}, base...), "--uncertainty", "--resamples", "20"), nil, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	b, err := os.ReadFile(page)
	if err != nil {
		t.Fatal(err)
	}
	for _, id := range []string{`id="level-band"`, `id="fill-band"`} {
		if !strings.Contains(string(b), id) {
			t.Errorf("page lacks %s", id)
		}
	}
	for _, extra := range [][]string{{"--uncertainty", "--demand", "poisson:mean=3"}, {"--resamples", "20"}} {
		errb.Reset()
		if code := run(append(append([]string{}, base...), extra...), nil, &out, &errb); code != 2 {
			t.Errorf("%v: exit %d (%s), want 2", extra, code, errb.String())
		}
	}
}
