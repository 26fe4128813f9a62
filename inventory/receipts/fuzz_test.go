package receipts

import (
	"errors"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/inventory/tabular"
)

// FuzzReadReceipts reads arbitrary bytes as a receipts file and builds
// the laws. It checks that every error is one line naming the file (row
// errors also a line), that the orders account for the usable rows, and
// that every usable law is one a System accepts under both models.
func FuzzReadReceipts(f *testing.F) {
	f.Add([]byte(handFile), uint8(1))
	f.Add([]byte("sku;Order Date;Receipt Date;Supplier\nA;03.03.2025;12.03.2025;S\nB;03.03.2025;01.03.2025;S\n"), uint8(0))
	f.Add([]byte("sku,order_ref,order_date,receipt_date,quantity\nA,1,2025-03-03,2025-03-04,\"2,5\"\nA,1,2025-03-03,2026-03-04,1e3\n"), uint8(2))
	f.Add([]byte("sku,order_date,receipt_date\nA,45719,45728\nA,1,2\n,,\n"), uint8(0))
	f.Add([]byte("sku,order_date,reciept_date\n"), uint8(1))
	demand, _ := inventory.NewPoisson(2)
	f.Fuzz(func(t *testing.T, data []byte, p uint8) {
		if len(data) > 1<<14 {
			return
		}
		period := []history.Period{history.Day, history.Week, history.Month}[int(p)%3]
		rf, err := Read(strings.NewReader(string(data)), "r.csv", Options{Period: period})
		if err != nil {
			var te *tabular.Error
			if !errors.As(err, &te) || !strings.HasPrefix(err.Error(), "r.csv") || strings.ContainsAny(err.Error(), "\r\n") {
				t.Fatalf("file error %q (%T): want one line starting r.csv", err, err)
			}
			return
		}
		rows := len(rf.Errors)
		for _, e := range rf.Errors {
			checkRowError(t, e)
		}
		for _, k := range rf.SKUs {
			rows += len(k.Errors) + k.Receipts
			for _, e := range k.Errors {
				checkRowError(t, e)
			}
		}
		if rows != rf.Rows {
			t.Fatalf("%d rows read, %d accounted for", rf.Rows, rows)
		}
		for _, l := range rf.Laws() {
			for _, w := range l.Warnings {
				if strings.ContainsAny(w, "\r\n") {
					t.Fatalf("warning with a line break: %q", w)
				}
			}
			for _, m := range []inventory.LeadTimeModel{inventory.Sequential, inventory.Independent} {
				fixed, law, ok := l.LeadTime(m)
				if !ok {
					continue
				}
				s := inventory.System{Demand: demand, LeadTime: fixed, LeadTimeLaw: law, LeadTimeModel: m, Holding: 1, Shortage: 9, Mode: inventory.Backorder}
				if err := s.Validate(); err != nil {
					t.Fatalf("%s: law %v (%s) refused under %s: %v", l.SKU, law, l.CountsText(), m, err)
				}
			}
		}
	})
}

func checkRowError(t *testing.T, e *tabular.Error) {
	t.Helper()
	if e.File != "r.csv" || e.Line < 1 || e.Column == "" || strings.ContainsAny(e.Error(), "\r\n") {
		t.Fatalf("row error %q: want one line naming r.csv, a line and a column", e)
	}
}
