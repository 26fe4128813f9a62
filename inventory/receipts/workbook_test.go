package receipts

import (
	"bytes"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"

	"ergostock/inventory/history"
)

// A workbook with date cells and a renamed column (mapped as a flag
// would) gives the same counts as the text file it was made from.
func TestWorkbookReceipts(t *testing.T) {
	f := excelize.NewFile()
	defer f.Close()
	sh := "Receipts"
	f.SetSheetName("Sheet1", sh)
	f.SetSheetRow(sh, "A1", &[]any{"Item No", "Order Date", "Booked", "Quantity"})
	day := func(m, d int) time.Time { return time.Date(2025, time.Month(m), d, 0, 0, 0, 0, time.UTC) }
	rows := [][]any{
		{"AX-1", day(3, 3), day(3, 12), 10},
		{"AX-1", day(3, 17), day(3, 31), 10},
		{"AX-1", day(1, 6), "2025-01-20", 4},
	}
	for i, r := range rows {
		cell, _ := excelize.CoordinatesToCellName(1, i+2)
		f.SetSheetRow(sh, cell, &r)
	}
	var buf bytes.Buffer
	if err := f.Write(&buf); err != nil {
		t.Fatal(err)
	}
	rf, err := Read(bytes.NewReader(buf.Bytes()), "r.xlsx", Options{Period: history.Week,
		Columns: map[string]string{"sku": "Item No", "receipt_date": "Booked"}, ColumnsFlag: "--receipts-columns"})
	if err != nil {
		t.Fatal(err)
	}
	if len(rf.SKUs) != 1 || len(rf.SKUs[0].Errors) > 0 {
		t.Fatalf("skus %+v", rf.SKUs)
	}
	if got := rf.Laws()[0].CountsText(); got != "1=1,2=2" {
		t.Errorf("counts %s, want 1=1,2=2", got)
	}
	if !rf.HasQuantity || rf.Dialect.Format != "xlsx" {
		t.Errorf("quantity %v dialect %v", rf.HasQuantity, rf.Dialect)
	}
}
