package batch

import (
	"bytes"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// writeWorkbook writes the sample rows as a workbook and opens it again.
func writeWorkbook(t *testing.T, f Format) (*excelize.File, []byte) {
	t.Helper()
	var b bytes.Buffer
	w, err := NewWorkbookWriter(&b, f)
	if err != nil {
		t.Fatal(err)
	}
	m := Meta{Format: MetaFormat, Period: "month", Items: "0123456789abcdef", History: "none", Shard: Shard{0, 1}, Version: "t"}
	m.Run = m.RunDigest()
	if err := w.WriteMeta(m); err != nil {
		t.Fatal(err)
	}
	if err := w.WriteHeader(); err != nil {
		t.Fatal(err)
	}
	for _, r := range sampleRows() {
		if err := w.Write(r); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	x, err := excelize.OpenReader(bytes.NewReader(b.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { x.Close() })
	return x, b.Bytes()
}

func TestWorkbookWriter(t *testing.T) {
	x, data := writeWorkbook(t, Format{})
	if got := strings.Join(x.GetSheetList(), ","); got != "results,warnings,run" {
		t.Fatalf("sheets %s", got)
	}
	for _, sheet := range []string{ResultsSheet, WarningsSheet} {
		p, err := x.GetPanes(sheet)
		if err != nil || !p.Freeze || p.YSplit != 1 {
			t.Errorf("%s: panes %+v (%v), want the header row frozen", sheet, p, err)
		}
	}
	rows, err := x.GetRows(ResultsSheet, excelize.Options{RawCellValue: true})
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(rows[0], ","); got != strings.Join(Header(), ",") {
		t.Errorf("header row %s", got)
	}
	col := func(name string) string {
		for i, h := range Header() {
			if h == name {
				c, _ := excelize.CoordinatesToCellName(i+1, 2)
				return c
			}
		}
		t.Fatalf("no column %s", name)
		return ""
	}
	for _, tt := range []struct {
		column, numFmt, value string
		typ                   excelize.CellType
	}{
		{"fill_rate", fmtPercent, "0.98123456789", excelize.CellTypeUnset},
		{"stockout_probability", fmtPercent, "0.0312", excelize.CellTypeUnset},
		{"total_cost", fmtCost, "47.123456", excelize.CellTypeUnset},
		{"mean_on_hand", fmtQuantity, "9.87654321", excelize.CellTypeUnset},
		{"residual", fmtDiagnostic, "0.00000000000000012", excelize.CellTypeUnset},
		{"order_up_to", fmtWhole, "19", excelize.CellTypeUnset},
		{"sku", "", "PANTO-STRIP-2", excelize.CellTypeInlineString},
	} {
		cell := col(tt.column)
		v, _ := x.GetCellValue(ResultsSheet, cell, excelize.Options{RawCellValue: true})
		typ, _ := x.GetCellType(ResultsSheet, cell)
		if v != tt.value || typ != tt.typ {
			t.Errorf("%s (%s): %q of type %v, want %q of type %v", tt.column, cell, v, typ, tt.value, tt.typ)
		}
		id, _ := x.GetCellStyle(ResultsSheet, cell)
		st, err := x.GetStyle(id)
		got := ""
		if err == nil && st.CustomNumFmt != nil {
			got = *st.CustomNumFmt
		}
		if got != tt.numFmt {
			t.Errorf("%s: number format %q, want %q", tt.column, got, tt.numFmt)
		}
	}
	// The failed row's SKU keeps its guard; its figures are blank.
	if v, _ := x.GetCellValue(ResultsSheet, "A3"); v != "'-LAMP" {
		t.Errorf("A3 = %q, want the guarded SKU '-LAMP", v)
	}
	warn, _ := x.GetRows(WarningsSheet)
	want := [][]string{{"sku", "item", "warning"}, {"PANTO-STRIP-2", "0", "a; b"}, {"PANTO-STRIP-2", "0", "'=c"}}
	if len(warn) != len(want) {
		t.Fatalf("warnings sheet %q", warn)
	}
	for i := range want {
		if strings.Join(warn[i], "|") != strings.Join(want[i], "|") {
			t.Errorf("warnings row %d: %q, want %q", i+1, warn[i], want[i])
		}
	}
	run, _ := x.GetRows(RunSheet)
	if len(run) == 0 || !strings.HasPrefix(run[0][0], MetaPrefix) || !strings.Contains(run[0][0], "; costs=per month") {
		t.Fatalf("run sheet %q", run)
	}
	if m, err := ParseMeta(run[0][0], "w.xlsx", 1); err != nil || m.Period != "month" {
		t.Errorf("run sheet record: %+v, %v", m, err)
	}
	props, err := x.GetDocProps()
	if err != nil || props.Description != run[0][0] {
		t.Errorf("document description %q, want the header record", props.Description)
	}
	// Repeatable byte for byte.
	if _, again := writeWorkbook(t, Format{}); !bytes.Equal(data, again) {
		t.Error("two writes of the same rows differ")
	}
}

func TestWorkbookWriterDigitsAndRefusals(t *testing.T) {
	x, _ := writeWorkbook(t, Format{Digits: 3})
	col := 0
	for i, h := range Header() {
		if h == "fill_rate" {
			col = i + 1
		}
	}
	cell, _ := excelize.CoordinatesToCellName(col, 2)
	v, _ := x.GetCellValue(ResultsSheet, cell, excelize.Options{RawCellValue: true})
	if v != "0.981" {
		t.Errorf("fill_rate with --digits 3: %q, want 0.981", v)
	}
	for _, f := range []Format{{Delimiter: ';'}, {Delimiter: ';', Decimal: ','}, {Digits: 40}} {
		if _, err := NewWorkbookWriter(&bytes.Buffer{}, f); err == nil {
			t.Errorf("%+v accepted for a workbook", f)
		}
	}
}
