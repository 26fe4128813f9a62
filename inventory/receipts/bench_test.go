package receipts

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"ergostock/inventory/history"
)

// benchFile writes n receipts of n/10 SKUs over seven suppliers, lead
// times of 0 to 59 days (seeded, so every run reads the same file).
func benchFile(n int) string {
	rng := rand.New(rand.NewPCG(1, 2))
	var b strings.Builder
	b.WriteString("sku,supplier,order_date,receipt_date,quantity\n")
	start := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC)
	for range n {
		s := rng.IntN(n / 10)
		o := start.AddDate(0, 0, rng.IntN(700))
		r := o.AddDate(0, 0, rng.IntN(60))
		sup := ""
		if s%3 != 0 {
			sup = fmt.Sprintf("S%d", s%7)
		}
		fmt.Fprintf(&b, "P%d,%s,%s,%s,%d\n", s, sup, o.Format(time.DateOnly), r.Format(time.DateOnly), 1+rng.IntN(50))
	}
	return b.String()
}

// BenchmarkReadLaws reads 100,000 receipts of 10,000 SKUs in days and
// builds every law.
func BenchmarkReadLaws(b *testing.B) {
	text := benchFile(100_000)
	b.ResetTimer()
	for range b.N {
		f, err := Read(strings.NewReader(text), "r.csv", Options{Period: history.Day})
		if err != nil {
			b.Fatal(err)
		}
		if len(f.Laws()) == 0 {
			b.Fatal("no laws")
		}
	}
}
