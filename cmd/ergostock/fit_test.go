package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"ergostock/inventory/history"
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
		{"missing column", []string{"--history", noQty}, "", 1, `ergostock: ` + noQty + `:1: missing column quantity: the header (line 1) has "sku", "date", "depot"`},
		{"no such file", []string{"--history", filepath.Join(dir, "nope.csv")}, "", 1, "ergostock: --history: open " + filepath.Join(dir, "nope.csv") + ": no such file or directory"},
		{"header only", []string{"--history", "-"}, "sku,date,quantity\n", 1, "ergostock: stdin:2: no data rows"},
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

// fitDays returns n rows of sku, one every step days from 2025-01-06, with
// quantities 1..7 in turn.
func fitDays(sku string, n, step int) string {
	var b strings.Builder
	for i := 0; i < n; i++ {
		b.WriteString(sku + "," + dayLabel(20094+i*step) + "," + itoa(i%7+1) + "\n")
	}
	return b.String()
}

// History that lies (issue 10, item 6) and hostile cells, through the
// command: exit status, the one-line message with file and line, and what
// the series became.
func TestFitHostileHistory(t *testing.T) {
	const head = "sku,date,quantity\n"
	bulk := fitDays("BRAKE-PAD-T3", 200, 3) // 2025-01-06 .. 2026-08-26: 86 ISO weeks
	var cells strings.Builder
	cells.WriteString(head)
	for i := 0; i < 1400; i++ {
		cells.WriteString("E" + itoa(i) + ",1900-01-01,1\nL" + itoa(i) + ",2200-12-31,1\n")
	}
	for _, c := range []struct {
		name    string
		stdin   string
		args    []string
		code    int
		stderr  string // a substring of stderr
		periods int    // of the first SKU in --json (-1: not checked)
		warning string // a substring of its warnings or error
	}{
		{"typo year first", head + "BRAKE-PAD-T3,0001-01-01,3\n" + bulk, nil, 0, "1 fitted, 0 without a model; 1 bad rows skipped", 86,
			`bad row skipped: stdin:2: date "0001-01-01": want a date YYYY-MM-DD in the years 1900 to 2200`},
		{"1900 first", head + "BRAKE-PAD-T3,1900-01-01,3\n" + bulk, nil, 0, "1 fitted, 0 without a model; 1 rows left out, far from the bulk of their SKU's dates", 86,
			`stdin:2: date "1900-01-01" (quantity 3) left out: 45661 days before 2025-01-06 .. 2026-08-26, the span holding the bulk of this SKU's rows`},
		{"1900 last", head + bulk + "BRAKE-PAD-T3,1900-01-01,3\n", nil, 0, "(week periods, 2025-W02 .. 2026-W35)", 86,
			`stdin:202: date "1900-01-01" (quantity 3) left out`},
		{"future typo in another sku", head + bulk + "DOOR-SENSOR-T4,2062-08-20,1\n", nil, 3, "(week periods, 2025-W02 .. 2026-W35): 1 fitted, 1 without a model", 86, ""},
		{"no clear bulk", head + "BRAKE-PAD-T3,1900-01-01,3\nBRAKE-PAD-T3,2026-01-05,2\n" + fitDays("WIPE-CAB-100", 20, 7), nil, 3, "1 fitted, 1 without a model", 0,
			`no clear bulk of rows: its 2 rows fall in 2 spans separated by gaps of more than 3653 days and none holds 90% of them (1900-01-01: 1 row at stdin:2; 2026-01-05: 1 row at stdin:3); check the dates`},
		{"all rows bad", head + "BRAKE-PAD-T3,2026-01-05,x\n,2026-01-05,2\nBRAKE-PAD-T3,2026-02-30,1\n", nil, 1,
			`ergostock: stdin: no usable series in 3 data rows (3 bad rows); the first problem: stdin:2: quantity "x": want a whole number >= 0`, -1, ""},
		{"only sku without a bulk", head + "BRAKE-PAD-T3,1900-01-01,3\nBRAKE-PAD-T3,2026-01-05,2\n", nil, 1,
			`ergostock: stdin: no usable series in 2 data rows (0 bad rows); the first problem: sku "BRAKE-PAD-T3": no clear bulk of rows`, -1, ""},
		{"semicolons read as commas", "sku;date;quantity\nBRAKE-PAD-T3;2026-01-05;2\n", []string{"--delimiter", ","}, 1,
			`ergostock: stdin:1: missing column sku: the header (line 1) has "sku;date;quantity"; the header looks ';'-delimited, but the file was read as ','-delimited: give --delimiter ';'`, -1, ""},
		{"semicolons", "sku;date;quantity\n" + strings.ReplaceAll(bulk, ",", ";"), nil, 0, "1 fitted, 0 without a model; read as ';'-delimited", 86, ""},
		{"tabs", "sku\tdate\tquantity\n", nil, 1, `stdin:2: no data rows`, -1, ""},
		{"bars", "sku|date|quantity\n", nil, 1, `stdin:2: no data rows`, -1, ""},
		{"line break in a sku", head + "\"BRAKE\nPAD\",2026-01-05,1\n" + bulk, nil, 0,
			`ergostock: warning: bad row skipped: stdin:2: sku "BRAKE\nPAD": want a SKU without line breaks (CR or LF)`, 86, ""},
		{"quantity 1e12", "sku,period,quantity\nBRAKE-PAD-T3,1,3\nBRAKE-PAD-T3,2,1e12\nBRAKE-PAD-T3,3,0\n", nil, 3,
			`ergostock: 1 of 1 SKUs have no demand model`, 3, `no candidate model could be fitted to 3 periods (the largest demand of a period is 1000000000000 (its rows start at stdin:3))`},
		{"quantity 1e300", head + "BRAKE-PAD-T3,2026-01-05,1e300\n" + bulk, nil, 0,
			`1 bad rows skipped`, 86, `bad row skipped: stdin:2: quantity "1e300": want a whole number >= 0 below 9007199254740992 (2^53)`},
		{"series beyond MaxSpan", "sku,period,quantity\nA,0,1\nA,1,2\nA,2,1\nB,1000000,1\nB,1000001,2\nB,1000002,1\n", nil, 3,
			"1 fitted, 1 without a model", 0, `too many periods: the series of sku "A" would span 1000003 index periods, from period "0" at stdin:2 to the file's last period 1000002, more than the limit of 131072`},
		{"series beyond MaxCells", cells.String(), []string{"--period", "day"}, 1,
			`ergostock: stdin:2: too many periods: the series of the file's SKUs would hold 153914600 periods in all, from 1900-01-01 (the date on this line, sku "E0") to 2200-12-31, more than the limit of 134217728`, -1, ""},
	} {
		args := append([]string{"--history", "-", "--json"}, c.args...)
		code, out, errs := fitRun(c.stdin, args...)
		if code != c.code || !strings.Contains(errs, c.stderr) {
			t.Errorf("%s: exit %d, stderr %q; want exit %d and %q", c.name, code, errs, c.code, c.stderr)
			continue
		}
		if code == 1 {
			if strings.Count(strings.TrimSpace(errs), "\n") != 0 || out != "" {
				t.Errorf("%s: error is not one line, or stdout %q: %q", c.name, out, errs)
			}
			continue
		}
		var res []struct {
			Periods  int      `json:"periods"`
			Warnings []string `json:"warnings"`
			Error    string   `json:"error"`
		}
		if err := json.Unmarshal([]byte(out), &res); err != nil || len(res) == 0 {
			t.Errorf("%s: %v\n%s", c.name, err, out)
			continue
		}
		r := res[0]
		if c.periods >= 0 && r.Periods != c.periods {
			t.Errorf("%s: %d periods, want %d", c.name, r.Periods, c.periods)
		}
		if all := strings.Join(append(r.Warnings, r.Error), "|"); !strings.Contains(all, c.warning) {
			t.Errorf("%s: warnings and error %q lack %q", c.name, all, c.warning)
		}
	}
}

// fit keeps the strings of the fitted laws, not the laws: an empirical pmf
// over a support of a million (a part issued in lots of 1e6) holds 24 MB,
// and a catalogue of them would not fit in memory.
func TestFitKeepsNoDistributions(t *testing.T) {
	var b strings.Builder
	b.WriteString("sku,period,quantity\n")
	for k := 0; k < 3; k++ {
		for i := 0; i < 20; i++ {
			q := 0
			if (i+k)%3 == 0 {
				q = 1000000
			}
			b.WriteString("LOT-" + itoa(k) + "," + itoa(i) + "," + itoa(q) + "\n")
		}
	}
	code, out, errs := fitRun(b.String(), "--history", "-", "--json")
	if code != 0 || !strings.Contains(out, `"demand": "pmf:0=`) || !strings.Contains(out, `1000000=`) {
		t.Fatalf("exit %d: %s\n%s", code, errs, out)
	}
	h, err := history.Read(strings.NewReader(b.String()), "lots.csv", history.Week)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range fitAll(h, true) {
		if r.Summary.Demand != nil || r.Demand == "" || len(r.Specs) != len(r.Summary.Candidates) {
			t.Errorf("%s: kept %v, spec %q, %d specs", r.SKU, r.Summary.Demand, r.Demand, len(r.Specs))
		}
		for _, c := range r.Summary.Candidates {
			if c.Demand != nil {
				t.Errorf("%s: candidate %s kept its law", r.SKU, c.Model)
			}
		}
	}
}

// fit --by-location fits each (sku, location) on its own, with a location
// column in every output form, and each pair's fit equals the fit of a
// history holding that location's rows alone.
func TestFitByLocation(t *testing.T) {
	dir := t.TempDir()
	hist := "date,site,sku,quantity\n"
	alone := map[string]string{"north": "date,sku,quantity\n", "south": "date,sku,quantity\n"}
	for w := 0; w < 30; w++ {
		day := time.Date(2025, 1, 6, 0, 0, 0, 0, time.UTC).AddDate(0, 0, 7*w).Format("2006-01-02")
		for _, c := range []struct {
			site string
			q    int
		}{{"north", 3 + w%4}, {"south", 10 + (w*7)%5}} {
			hist += fmt.Sprintf("%s,%s,A,%d\n", day, c.site, c.q)
			alone[c.site] += fmt.Sprintf("%s,A,%d\n", day, c.q)
		}
	}
	write := func(name, body string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	hp := write("h.csv", hist)
	demand := func(args ...string) []map[string]any {
		var out, errb bytes.Buffer
		if code := run(append([]string{"ergostock", "fit", "--json"}, args...), nil, &out, &errb); code != 0 {
			t.Fatalf("fit %v: exit %d: %s", args, code, errb.String())
		}
		var v []map[string]any
		if err := json.Unmarshal(out.Bytes(), &v); err != nil {
			t.Fatal(err)
		}
		return v
	}
	got := demand("--history", hp, "--by-location", "--history-columns", "location=site")
	if len(got) != 2 {
		t.Fatalf("want 2 pairs, got %d", len(got))
	}
	for _, g := range got {
		loc, _ := g["location"].(string)
		want := demand("--history", write(loc+".csv", alone[loc]))
		if g["demand"] != want[0]["demand"] {
			t.Errorf("%s: demand %v, want the location alone's %v", loc, g["demand"], want[0]["demand"])
		}
	}
	var out, errb bytes.Buffer
	if code := run([]string{"ergostock", "fit", "--history", hp, "--by-location", "--history-columns", "location=site", "--out", filepath.Join(dir, "f.csv")}, nil, &out, &errb); code != 0 {
		t.Fatal(errb.String())
	}
	b, _ := os.ReadFile(filepath.Join(dir, "f.csv"))
	if !strings.HasPrefix(string(b), "sku,location,first_period,") || !strings.Contains(string(b), "\nA,north,") {
		t.Errorf("fit --out by location:\n%.200s", b)
	}
	// Without a location column: refused naming the flag and the file.
	errb.Reset()
	if code := run([]string{"ergostock", "fit", "--history", write("plain.csv", alone["north"]), "--by-location"}, nil, &out, &errb); code != 1 ||
		!strings.Contains(errb.String(), "plain.csv:1: --by-location") {
		t.Errorf("exit %d: %s", code, errb.String())
	}
}
