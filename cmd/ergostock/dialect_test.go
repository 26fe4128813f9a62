package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"
)

// dialectItems is how many items of the demo the dialect tests plan (the
// first ones of data/items.csv, with their history): enough to meet every
// kind of row, few enough to plan a dozen times in a few seconds.
const dialectItems = 24

// demoSubset reads the first n items of the demo and the history rows of
// their SKUs, as records (header first).
func demoSubset(t *testing.T, n int) (items, hist [][]string) {
	t.Helper()
	read := func(path string) [][]string {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		recs, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		return recs
	}
	all := read(filepath.Join("..", "..", "data", "items.csv"))
	items = all[:n+1]
	keep := map[string]bool{}
	for _, r := range items[1:] {
		keep[r[0]] = true
	}
	h := read(filepath.Join("..", "..", "data", "history.csv"))
	hist = [][]string{h[0]}
	col := index(h[0], "sku")
	for _, r := range h[1:] {
		if keep[r[col]] {
			hist = append(hist, r)
		}
	}
	return items, hist
}

func index(header []string, name string) int {
	for i, h := range header {
		if h == name {
			return i
		}
	}
	return -1
}

// writeDelimited writes records with delimiter d, CRLF line ends when crlf,
// a UTF-8 byte-order mark when bom.
func writeDelimited(t *testing.T, path string, recs [][]string, d rune, crlf, bom bool) {
	t.Helper()
	var b bytes.Buffer
	if bom {
		b.WriteString("\ufeff")
	}
	w := csv.NewWriter(&b)
	w.Comma, w.UseCRLF = d, crlf
	if err := w.WriteAll(recs); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// mapCells returns a copy of recs (header kept) with f applied to the
// cells of the named columns.
func mapCells(recs [][]string, cols []string, f func(string) string) [][]string {
	out := make([][]string, len(recs))
	out[0] = append([]string(nil), recs[0]...)
	var at []int
	for _, c := range cols {
		if i := index(recs[0], c); i >= 0 {
			at = append(at, i)
		}
	}
	for k, r := range recs[1:] {
		c := append([]string(nil), r...)
		for _, i := range at {
			if c[i] != "" {
				c[i] = f(c[i])
			}
		}
		out[k+1] = c
	}
	return out
}

var decimalCell = regexp.MustCompile(`^-?[0-9]*\.[0-9]+$`)

// commaDecimals writes the decimal numbers of the cost columns with a
// decimal comma.
func commaDecimals(s string) string {
	if decimalCell.MatchString(s) {
		return strings.Replace(s, ".", ",", 1)
	}
	return s
}

var itemNumberCols = []string{"lead_time", "holding_cost", "shortage_cost", "order_cost", "unit_cost", "min_fill_rate",
	"current_reorder_point", "current_order_up_to", "current_order_multiple"}

// dateIn rewrites an ISO date in one of the layouts.
func dateIn(layout string) func(string) string {
	return func(s string) string {
		d, err := time.Parse("2006-01-02", s)
		if err != nil {
			return s
		}
		switch layout {
		case "DD.MM.YYYY":
			return d.Format("02.01.2006")
		case "DD/MM/YYYY":
			return d.Format("02/01/2006")
		case "MM/DD/YYYY":
			return d.Format("01/02/2006")
		case "YYYYMMDD":
			return d.Format("20060102")
		case "serial":
			return strconv.Itoa(int(d.Sub(time.Date(1899, 12, 30, 0, 0, 0, 0, time.UTC)).Hours() / 24))
		case "timestamp":
			return d.Format("2006-01-02") + "T08:30:00Z"
		}
		return s
	}
}

// batchResults runs batch on the inputs with the extra flags and returns
// the results without the header record (which holds the inputs' digests)
// and the summary line.
func batchResults(t *testing.T, items, hist string, extra ...string) (string, string) {
	t.Helper()
	out := filepath.Join(t.TempDir(), "results.csv")
	args := append([]string{"--items", items, "--history", hist, "--out", out, "--workers", "2"}, extra...)
	code, stderr := runBatchCmd(t, args...)
	if code != 0 {
		t.Fatalf("batch %v: exit %d, %s", extra, code, stderr)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	_, rest, _ := strings.Cut(string(b), "\n")
	return rest, stderr
}

// The demo history and items re-exported in each dialect a planner's
// programs write give byte-identical results to the plain run, and the
// summary line says what was read (issue 11, items 1-3 and 7).
func TestDialectsGiveTheSameResults(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the demo subset a dozen times")
	}
	items, hist := demoSubset(t, dialectItems)
	dir := t.TempDir()
	plainItems, plainHist := filepath.Join(dir, "items.csv"), filepath.Join(dir, "history.csv")
	writeDelimited(t, plainItems, items, ',', false, false)
	writeDelimited(t, plainHist, hist, ',', false, false)
	want, _ := batchResults(t, plainItems, plainHist)

	type variant struct {
		name         string
		items, hist  string
		extra        []string
		summaryParts []string
	}
	var vs []variant
	add := func(name string, ir, hr [][]string, d rune, crlf, bom bool, extra []string, parts ...string) {
		sub := filepath.Join(dir, strings.ReplaceAll(name, " ", "-"))
		if err := os.Mkdir(sub, 0o755); err != nil {
			t.Fatal(err)
		}
		ip, hp := filepath.Join(sub, "items.csv"), filepath.Join(sub, "history.csv")
		writeDelimited(t, ip, ir, d, crlf, bom)
		writeDelimited(t, hp, hr, d, crlf, bom)
		vs = append(vs, variant{name, ip, hp, extra, parts})
	}
	commaItems := mapCells(items, itemNumberCols, commaDecimals)
	dotted := mapCells(hist, []string{"date"}, dateIn("DD.MM.YYYY"))
	add("semicolon decimal comma BOM CRLF", commaItems, dotted, ';', true, true, nil,
		"items ';'-delimited, UTF-8 with BOM, decimal comma", "dates DD.MM.YYYY (found)")
	add("tab", items, hist, '\t', false, false, nil, "tab-delimited")
	add("pipe", items, hist, '|', false, false, nil, "'|'-delimited")
	for _, l := range []string{"DD/MM/YYYY", "MM/DD/YYYY", "YYYYMMDD", "serial", "timestamp"} {
		found := l
		if l == "timestamp" {
			found = "YYYY-MM-DD"
		}
		add("dates "+strings.ReplaceAll(l, "/", ""), items, mapCells(hist, []string{"date"}, dateIn(l)), ',', false, false, nil, "dates "+found+" (found)")
	}
	add("dates given", items, mapCells(hist, []string{"date"}, dateIn("DD/MM/YYYY")), ',', false, false, []string{"--date-format", "DD/MM/YYYY"}, "dates DD/MM/YYYY (given)")
	// Renamed headers: loose matching ("Holding Cost") and column maps.
	renItems := mapCells(items, nil, nil)
	for i, h := range renItems[0] {
		switch h {
		case "sku":
			renItems[0][i] = "Item No"
		case "lead_time":
			renItems[0][i] = "Lead Time"
		default:
			renItems[0][i] = strings.ToUpper(strings.ReplaceAll(h, "_", " "))
		}
	}
	renHist := mapCells(hist, nil, nil)
	renHist[0][index(hist[0], "sku")] = "Item No"
	renHist[0][index(hist[0], "date")] = "Posting Date"
	renHist[0][index(hist[0], "quantity")] = "Qty"
	add("renamed headers", renItems, renHist, ';', false, false,
		[]string{"--items-columns", "sku=Item No", "--history-columns", "sku=Item No,date=Posting Date,quantity=Qty"}, "';'-delimited")

	// A workbook of each, written by excelize: dates as real date cells,
	// numbers as numbers.
	sub := filepath.Join(dir, "xlsx")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	xi, xh := filepath.Join(sub, "items.xlsx"), filepath.Join(sub, "history.xlsx")
	writeWorkbook(t, xi, "Items", items, false)
	writeWorkbook(t, xh, "Demand", hist, true)
	vs = append(vs, variant{"xlsx", xi, xh, []string{"--history-sheet", "Demand"}, []string{`workbook, sheet "Items"`, `workbook, sheet "Demand"`}})

	for _, v := range vs {
		got, summary := batchResults(t, v.items, v.hist, v.extra...)
		if got != want {
			gl, wl := strings.Split(got, "\n"), strings.Split(want, "\n")
			for i := range min(len(gl), len(wl)) {
				if gl[i] != wl[i] {
					t.Errorf("%s: results differ from the plain run at row %d:\n got %s\nwant %s", v.name, i+1, gl[i], wl[i])
					break
				}
			}
			continue
		}
		for _, p := range v.summaryParts {
			if !strings.Contains(summary, p) {
				t.Errorf("%s: summary %q does not say %q", v.name, summary, p)
			}
		}
	}
}

// writeWorkbook writes records to one sheet of a new workbook: cells that
// read as numbers become numbers, ISO dates (with dates) real date cells.
func writeWorkbook(t *testing.T, path, sheet string, recs [][]string, dates bool) {
	t.Helper()
	f := excelize.NewFile()
	defer f.Close()
	if err := f.SetSheetName("Sheet1", sheet); err != nil {
		t.Fatal(err)
	}
	style, err := f.NewStyle(&excelize.Style{NumFmt: 14})
	if err != nil {
		t.Fatal(err)
	}
	sw, err := f.NewStreamWriter(sheet)
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range recs {
		row := make([]any, len(r))
		for j, c := range r {
			row[j] = c
			if i == 0 || c == "" {
				continue
			}
			if d, err := time.Parse("2006-01-02", c); err == nil && dates {
				row[j] = excelize.Cell{StyleID: style, Value: d}
			} else if v, err := strconv.ParseFloat(c, 64); err == nil && !strings.ContainsAny(c, "eE") {
				row[j] = v
			}
		}
		cell, _ := excelize.CoordinatesToCellName(1, i+1)
		if err := sw.SetRow(cell, row); err != nil {
			t.Fatal(err)
		}
	}
	if err := sw.Flush(); err != nil {
		t.Fatal(err)
	}
	if err := f.SaveAs(path); err != nil {
		t.Fatal(err)
	}
}

// Dates that no one layout reads, or that several read, are refused with
// the rows named and a request for --date-format (issue 11, item 3).
func TestDatesRefused(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	writeFile(t, items, "sku,lead_time,holding_cost,shortage_cost\nA,1,1,9\n")
	for _, c := range []struct{ name, hist, want string }{
		{"mixed", "sku,date,quantity\nA,2026-03-04,1\nA,04.03.2026,2\nA,2026-03-05,1\n",
			`history.csv:1: column date: no one date layout reads every date: line 2 ("2026-03-04") reads as YYYY-MM-DD, line 3 ("04.03.2026") as DD.MM.YYYY; give --date-format`},
		{"ambiguous", "sku,date,quantity\nA,04/03/2026,1\nA,05/03/2026,2\nA,12/11/2026,1\n",
			`history.csv:1: column date: the dates read in several layouts (DD/MM/YYYY, MM/DD/YYYY; no day above 12, so day and month cannot be told apart): give --date-format`},
	} {
		h := filepath.Join(dir, c.name+"-history.csv")
		writeFile(t, h, c.hist)
		code, stderr := runBatchCmd(t, "--items", items, "--history", h, "--out", filepath.Join(dir, "r.csv"))
		if code != 1 || !strings.Contains(stderr, c.want) || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%s: exit %d, stderr %q; want exit 1 and %q", c.name, code, stderr, c.want)
		}
	}
}

// Returns in each mode: ignored (counted in the warnings), netted within
// the period (floored at 0), or bad rows; fit and batch read them alike.
func TestReturnsModes(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	writeFile(t, items, "sku,lead_time,holding_cost,shortage_cost\nA,1,1,9\n")
	var b strings.Builder
	b.WriteString("sku,date,quantity,type\n")
	day := time.Date(2026, 1, 5, 0, 0, 0, 0, time.UTC)
	for i := 0; i < 40; i++ {
		fmt.Fprintf(&b, "A,%s,%d,SALE\n", day.AddDate(0, 0, 7*i).Format("2006-01-02"), 3+i%4)
	}
	b.WriteString("A,2026-01-06,-2,RETURN\nA,2026-01-13,5,RETURN\n")
	hist := filepath.Join(dir, "history.csv")
	writeFile(t, hist, b.String())
	for _, c := range []struct {
		name string
		args []string
		code int
		want string
	}{
		{"ignore", nil, 0, "returns ignored: 1 rows with negative quantities (2 units)"},
		{"net", []string{"--returns", "net"}, 0, "returns netted: 1 rows (2 units)"},
		{"column", []string{"--returns", "net", "--returns-column", "type=return"}, 0, "returns netted: 2 rows (7 units)"},
		{"error", []string{"--returns", "error"}, 3, `quantity ""-2"": want a whole number >= 0 (a return`},
	} {
		out := filepath.Join(dir, c.name+".csv")
		code, stderr := runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", out}, c.args...)...)
		res, _ := os.ReadFile(out)
		if code != c.code || !strings.Contains(string(res), c.want) {
			t.Errorf("%s: exit %d (%s), results %s; want exit %d and %q", c.name, code, stderr, res, c.code, c.want)
		}
		// fit reads the same rows by the same code: the same model, or
		// the same row refused (fit skips a bad row with a warning).
		fcode, fout, ferr := fitRun("", append([]string{"--history", hist, "--json"}, c.args...)...)
		if c.code != 0 {
			if fcode != 0 || !strings.Contains(ferr, "1 bad rows skipped") || !strings.Contains(fout, `a return: give --returns ignore or net`) {
				t.Errorf("%s: fit exit %d (%s)", c.name, fcode, ferr)
			}
			continue
		}
		header, rows := readResults(t, out)
		if d := rows[0][index(header, "demand")]; fcode != 0 || !strings.Contains(fout, `"demand": "`+d+`"`) {
			t.Errorf("%s: fit exit %d, output %.300s; batch's demand %s", c.name, fcode, fout, d)
		}
	}
}

// Locations: an items file with a location column plans each (sku,
// location) on its own rows, with a location column in the results; an
// items file without one plans each SKU on the sum over locations.
func TestLocations(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("Item No;Posting Date;Qty;Site\n")
	day := time.Date(2026, 1, 5, 0, 0, 0, 0, time.UTC)
	for i := 0; i < 30; i++ {
		d := day.AddDate(0, 0, 7*i).Format("02.01.2006")
		fmt.Fprintf(&b, "A;%s;%d;north\nA;%s;%d;south\n", d, 1+i%3, d, 10+i%5)
	}
	hist := filepath.Join(dir, "history.csv")
	writeFile(t, hist, b.String())
	cols := []string{"--history-columns", "sku=Item No,date=Posting Date,quantity=Qty,location=Site"}
	byLoc := filepath.Join(dir, "items-loc.csv")
	writeFile(t, byLoc, "sku;location;lead_time;holding_cost;shortage_cost\nA;north;1;1;9\nA;south;1;1;9\nA;east;1;1;9\n")
	out := filepath.Join(dir, "r.csv")
	code, stderr := runBatchCmd(t, append([]string{"--items", byLoc, "--history", hist, "--out", out}, cols...)...)
	header, rows := readResults(t, out)
	if code != 3 || len(rows) != 3 || header[1] != "location" {
		t.Fatalf("by location: exit %d (%s), header %v, %d rows", code, stderr, header, len(rows))
	}
	if rows[0][1] != "north" || rows[1][1] != "south" || !strings.Contains(strings.Join(rows[2], ","), `no history for sku "A" at location "east"`) {
		t.Errorf("rows %v", rows)
	}
	mean := index(header, "demand_mean")
	n, _ := strconv.ParseFloat(rows[0][mean], 64)
	s, _ := strconv.ParseFloat(rows[1][mean], 64)
	if !(n > 1.5 && n < 2.5) || !(s > 11 && s < 13) {
		t.Errorf("means north %v, south %v; want about 2 and 12", n, s)
	}
	// The batch page matches the rows to the items by (sku, location)
	// and reads the history by location (see TestReportByLocation).
	var o, e bytes.Buffer
	rep := run(append([]string{"ergostock", "report", "--results", out, "--items", byLoc, "--history", hist, "--out", filepath.Join(dir, "r.html")}, cols...), nil, &o, &e)
	if rep != 0 {
		t.Errorf("report by location: exit %d, %s", rep, e.String())
	}
	plain := filepath.Join(dir, "items.csv")
	writeFile(t, plain, "sku;lead_time;holding_cost;shortage_cost\nA;1;1;9\n")
	code, stderr = runBatchCmd(t, append([]string{"--items", plain, "--history", hist, "--out", out}, cols...)...)
	header, rows = readResults(t, out)
	if code != 0 || header[1] == "location" || len(rows) != 1 {
		t.Fatalf("summed: exit %d (%s), header %v", code, stderr, header)
	}
	if m, _ := strconv.ParseFloat(rows[0][index(header, "demand_mean")], 64); !(m > 13 && m < 15) {
		t.Errorf("summed mean %v, want about 14", m)
	}
}

// A round trip through a real spreadsheet program, where one is installed:
// the demo subset converted to .xlsx by it headless plans as the CSV does.
// Skipped, with a message, on machines without one.
func TestSpreadsheetRoundTrip(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the demo subset twice")
	}
	convert := spreadsheetConverter()
	if convert == nil {
		t.Skip("no spreadsheet program found (soffice, libreoffice or ssconvert on PATH): round trip not run")
	}
	items, hist := demoSubset(t, 8)
	dir := t.TempDir()
	ic, hc := filepath.Join(dir, "items.csv"), filepath.Join(dir, "history.csv")
	writeDelimited(t, ic, items, ',', false, false)
	writeDelimited(t, hc, hist, ',', false, false)
	want, _ := batchResults(t, ic, hc)
	var xs []string
	for _, in := range []string{ic, hc} {
		x, err := convert(in, filepath.Join(dir, "x"))
		if err != nil {
			t.Skipf("the spreadsheet program failed to convert %s: %v", in, err)
		}
		xs = append(xs, x)
	}
	if got, _ := batchResults(t, xs[0], xs[1]); got != want {
		t.Errorf("results through the spreadsheet program differ from the CSV run")
	}
}

// spreadsheetConverter returns a function converting a CSV file to .xlsx
// in outDir with an installed spreadsheet program, or nil.
func spreadsheetConverter() func(in, outDir string) (string, error) {
	for _, name := range []string{"soffice", "libreoffice"} {
		if p, err := exec.LookPath(name); err == nil {
			return func(in, outDir string) (string, error) {
				out, err := exec.Command(p, "--headless", "--convert-to", "xlsx", "--outdir", outDir, in).CombinedOutput()
				if err != nil {
					return "", fmt.Errorf("%v: %s", err, out)
				}
				return filepath.Join(outDir, strings.TrimSuffix(filepath.Base(in), ".csv")+".xlsx"), nil
			}
		}
	}
	if p, err := exec.LookPath("ssconvert"); err == nil {
		return func(in, outDir string) (string, error) {
			if err := os.MkdirAll(outDir, 0o755); err != nil {
				return "", err
			}
			x := filepath.Join(outDir, strings.TrimSuffix(filepath.Base(in), ".csv")+".xlsx")
			out, err := exec.Command(p, in, x).CombinedOutput()
			if err != nil {
				return "", fmt.Errorf("%v: %s", err, out)
			}
			return x, nil
		}
	}
	return nil
}

// A run read with non-default reader flags records their digest and the
// unit of a scaled history in its header record, so that parts read
// differently never share a run digest; a plain run's record is as before.
func TestReadingInHeaderRecord(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	writeFile(t, items, "sku,lead_time,holding_cost,shortage_cost\nA,1,1,9\n")
	var b strings.Builder
	b.WriteString("sku,date,quantity\n")
	for i := 0; i < 30; i++ {
		fmt.Fprintf(&b, "A,%s,%d.5\n", time.Date(2026, 1, 5, 0, 0, 0, 0, time.UTC).AddDate(0, 0, 7*i).Format("2006-01-02"), i%4)
	}
	hist := filepath.Join(dir, "history.csv")
	writeFile(t, hist, b.String())
	record := func(args ...string) string {
		out := filepath.Join(dir, "r.csv")
		code, stderr := runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", out}, args...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d, %s", args, code, stderr)
		}
		data, _ := os.ReadFile(out)
		line, _, _ := strings.Cut(string(data), "\n")
		return line
	}
	ten, hundred := record("--quantity-scale", "10"), record("--quantity-scale", "100")
	if !strings.Contains(ten, "; unit=0.1") || !strings.Contains(hundred, "; unit=0.01") || !strings.Contains(ten, "; reading=") {
		t.Errorf("records %q, %q", ten, hundred)
	}
	run := func(rec string) string { _, r, _ := strings.Cut(rec, "run="); return r[:16] }
	if run(ten) == run(hundred) {
		t.Errorf("runs at two scales share the run digest %s", run(ten))
	}
}
