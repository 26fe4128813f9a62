package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// fitRun runs `ergostock fit` and returns exit status, stdout and stderr.
func fitRun(stdin string, args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(append([]string{"ergostock", "fit"}, args...), strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

// A weekly history of three parts: a Poisson-like consumable, an
// over-dispersed one, and a spare with a bad row.
func fitHistory() string {
	var b strings.Builder
	b.WriteString("date,sku,quantity,depot\n")
	// 2026-01-05 is a Monday (2026-W02).
	steady := []int{4, 6, 5, 3, 5, 4, 6, 5, 4, 5, 6, 3, 5, 4, 5, 6}
	wild := []int{0, 14, 1, 0, 22, 2, 0, 0, 30, 1, 3, 0, 18, 0, 2, 25}
	for w := range steady {
		day := 20458 + 7*w // days since 1970-01-01 of each Monday from 2026-01-05
		d := dayLabel(day)
		b.WriteString(d + ",WIPE-CAB-100," + itoa(steady[w]) + ",harrow-lane\n")
		if wild[w] > 0 {
			b.WriteString(d + ",BRAKE-PAD-T3," + itoa(wild[w]) + ",millbeck\n")
		}
	}
	b.WriteString("2026-03-04,DOOR-SENSOR-T4,1,millbeck\n")
	b.WriteString("2026-03-11,DOOR-SENSOR-T4,one,millbeck\n")
	return b.String()
}

func itoa(n int) string { return strconv.Itoa(n) }

func dayLabel(d int) string {
	return time.Unix(int64(d)*86400, 0).UTC().Format("2006-01-02")
}

func TestFitJSON(t *testing.T) {
	code, out, errs := fitRun(fitHistory(), "--history", "-", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res []map[string]any
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if len(res) != 3 || res[0]["sku"] != "WIPE-CAB-100" || res[1]["sku"] != "BRAKE-PAD-T3" || res[2]["sku"] != "DOOR-SENSOR-T4" {
		t.Fatalf("SKUs not in order of first appearance: %v", res)
	}
	for _, k := range []string{"sku", "periods", "mean", "variance", "zero_fraction", "adi", "cv2", "pattern", "demand", "candidates", "warnings"} {
		if _, ok := res[0][k]; !ok {
			t.Errorf("no field %q", k)
		}
	}
	if res[0]["periods"] != 16.0 || res[0]["first_period"] != "2026-W02" || res[0]["pattern"] != "smooth" {
		t.Errorf("WIPE-CAB-100: %v", res[0])
	}
	if m := res[1]["model"]; m == "poisson" {
		t.Errorf("over-dispersed BRAKE-PAD-T3 fitted as %v", m)
	}
	cands := res[1]["candidates"].([]any)
	for _, c := range cands {
		c := c.(map[string]any)
		for _, k := range []string{"model", "log_likelihood", "aic"} {
			if _, ok := c[k]; !ok {
				t.Errorf("candidate without %q: %v", k, c)
			}
		}
	}
	// DOOR-SENSOR-T4: first record in 2026-W10, the file ends in 2026-W17.
	ds := res[2]
	if ds["periods"] != 8.0 || !strings.Contains(strings.Join(anyStrings(ds["warnings"]), "|"), `stdin:29: quantity "one": want a whole number >= 0`) {
		t.Errorf("DOOR-SENSOR-T4: %v", ds)
	}
}

func anyStrings(v any) []string {
	var s []string
	for _, x := range v.([]any) {
		s = append(s, x.(string))
	}
	return s
}

func TestFitTable(t *testing.T) {
	path := filepath.Join(t.TempDir(), "history.csv")
	if err := os.WriteFile(path, []byte(fitHistory()), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := fitRun("", "--history", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 4 || !strings.HasPrefix(lines[0], "sku ") || !strings.HasPrefix(lines[1], "WIPE-CAB-100 ") {
		t.Fatalf("table:\n%s", out)
	}
	// Aligned: every row starts its period count in the same column.
	col := strings.Index(lines[0], "periods")
	for _, l := range lines[1:] {
		if l[col-2:col] != "  " || l[col] < '0' || l[col] > '9' {
			t.Errorf("misaligned row %q", l)
		}
	}
	if !strings.Contains(errs, "fit: 3 SKUs from "+path+" (week periods, 2026-W02 .. 2026-W17): 3 fitted, 0 without a model") {
		t.Errorf("stderr: %s", errs)
	}
}

func TestFitOut(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "history.csv"), filepath.Join(dir, "fit.csv")
	if err := os.WriteFile(in, []byte(fitHistory()), 0o644); err != nil {
		t.Fatal(err)
	}
	code, stdout, errs := fitRun("", "--history", in, "--out", out, "--period", "month")
	if code != 0 || stdout != "" {
		t.Fatalf("exit %d, stdout %q: %s", code, stdout, errs)
	}
	f, err := os.Open(out)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 4 || strings.Join(recs[0], ",") != fitCSVColumns || recs[1][0] != "WIPE-CAB-100" || recs[1][1] != "2026-01" {
		t.Errorf("csv: %v", recs)
	}
	// Nothing else is left in the directory (no temporary file).
	ents, _ := os.ReadDir(dir)
	if len(ents) != 2 {
		t.Errorf("directory holds %d entries, want 2", len(ents))
	}
	// A failed run leaves the existing output untouched.
	before, _ := os.ReadFile(out)
	code, _, _ = fitRun("", "--history", filepath.Join(dir, "missing.csv"), "--out", out)
	after, _ := os.ReadFile(out)
	if code != 1 || !bytes.Equal(before, after) {
		t.Errorf("failed run: exit %d, output changed: %v", code, !bytes.Equal(before, after))
	}
}

// fitCSVColumns is the header fit --out must write.
const fitCSVColumns = "sku,first_period,periods,total,mean,variance,zero_fraction,adi,cv2,pattern,trend_slope,trend_p,model,demand,log_likelihood,aic,aicc,warnings,error"

func TestFitErrors(t *testing.T) {
	dir := t.TempDir()
	noQty := filepath.Join(dir, "h.csv")
	os.WriteFile(noQty, []byte("sku,date,depot\nWIPE-CAB-100,2026-01-05,millbeck\n"), 0o644)
	zero := filepath.Join(dir, "zero.csv")
	os.WriteFile(zero, []byte("sku,date,quantity\nDOOR-CONTROL-BOARD-T4,2026-01-05,0\nWIPE-CAB-100,2026-01-05,3\n"), 0o644)
	for _, c := range []struct {
		name  string
		args  []string
		stdin string
		code  int
		want  string
	}{
		{"no history flag", nil, "", 2, "ergostock: --history: want the demand history CSV file"},
		{"bad period", []string{"--history", noQty, "--period", "fortnight"}, "", 2, `ergostock: --period "fortnight": want day, week or month`},
		{"json and out", []string{"--history", noQty, "--json", "--out", "x.csv"}, "", 2, "ergostock: --json and --out: give one of them, not both"},
		{"missing column", []string{"--history", noQty}, "", 1, `ergostock: ` + noQty + `:1: missing column "quantity"`},
		{"no such file", []string{"--history", filepath.Join(dir, "nope.csv")}, "", 1, "ergostock: --history: open " + filepath.Join(dir, "nope.csv") + ": no such file or directory"},
		{"header only", []string{"--history", "-"}, "sku,date,quantity\n", 1, "ergostock: stdin: no data rows"},
		{"csv syntax", []string{"--history", "-"}, "sku,date,quantity\nA,2026-01-05,\"3\n", 1, "ergostock: stdin:2:"},
		{"no demand", []string{"--history", zero}, "", 3, "ergostock: 1 of 2 SKUs have no demand model"},
		{"empty sku", []string{"--history", "-"}, "sku,date,quantity\n,2026-01-05,3\nA,2026-01-05,1\n", 0, `ergostock: warning: bad row skipped: stdin:2: sku "": want a non-empty SKU`},
	} {
		code, _, errs := fitRun(c.stdin, c.args...)
		if code != c.code || !strings.Contains(errs, c.want) {
			t.Errorf("%s: exit %d, stderr %q; want exit %d and %q", c.name, code, errs, c.code, c.want)
		}
		if code != 0 && code != 3 && strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%s: error is not one line: %q", c.name, errs)
		}
	}
}

// The demo history: every SKU fitted, exit status 0. The messy example:
// DOOR-CONTROL-BOARD-T4 has no demand (exit status 3), CABLE-FLEX-2.5MM is
// warned of its bad row.
func TestFitDemo(t *testing.T) {
	path := filepath.Join("..", "..", "data", "history.csv")
	if _, err := os.Stat(path); err != nil {
		t.Skip(err)
	}
	code, _, errs := fitRun("", "--history", path, "--json")
	if code != 0 || !strings.Contains(errs, "196 fitted, 0 without a model") {
		t.Fatalf("demo: exit %d: %s", code, errs)
	}
	code, out, errs := fitRun("", "--history", filepath.Join("..", "..", "data", "messy", "history.csv"), "--json")
	if code != 3 || !strings.Contains(errs, "3 fitted, 1 without a model") {
		t.Fatalf("messy: exit %d: %s", code, errs)
	}
	var res []struct {
		SKU      string   `json:"sku"`
		Pattern  string   `json:"pattern"`
		Demand   string   `json:"demand"`
		Warnings []string `json:"warnings"`
		Error    string   `json:"error"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if len(res) != 4 {
		t.Fatalf("%d SKUs, want 4", len(res))
	}
	for _, r := range res {
		switch r.SKU {
		case "DOOR-CONTROL-BOARD-T4":
			if r.Error == "" || r.Demand != "" {
				t.Errorf("%s: %+v", r.SKU, r)
			}
		case "CABLE-FLEX-2.5MM":
			if len(r.Warnings) != 1 || !strings.Contains(r.Warnings[0], `history.csv:731: quantity "2.5"`) {
				t.Errorf("%s: %q", r.SKU, r.Warnings)
			}
		}
	}
}
