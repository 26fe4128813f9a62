package history

import (
	"bufio"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// FuzzReadHistory reads arbitrary bytes as a history in each period, fits
// every SKU and checks that nothing panics, that every error and every
// note of a left-out row is one line naming the file and a line, and that
// the series are consistent with the rows. Run it with
//
//	go test -run '^$' -fuzz '^FuzzReadHistory$' -fuzztime 20s ./inventory/history/
func FuzzReadHistory(f *testing.F) {
	// The demo's first lines, as they are and cut short.
	if fh, err := os.Open(filepath.Join("..", "..", "data", "history.csv")); err == nil {
		var b strings.Builder
		sc := bufio.NewScanner(fh)
		for i := 0; i < 40 && sc.Scan(); i++ {
			b.WriteString(sc.Text() + "\n")
		}
		fh.Close()
		f.Add(b.String(), uint8(1))
		f.Add(b.String()[:len(b.String())/2], uint8(0))
	}
	for _, s := range []string{
		"sku,date,quantity\nA,2026-01-05,3\nA,2026-01-12,1\nB,2026-01-05,0\n",
		"\ufeffSKU , Date,Quantity\r\nA,2026-01-05,3\r\nA,2026-01-06,4\r\n",
		"sku,date,quantity\n\"A\nB\",2026-01-05,1\n\"C\r\nD\",2026-01-06,2\nA,2026-01-07,\"1\n\"\n",
		"sku,date,quantity\nA,2026-01-05,1e300\nA,2026-01-05,9007199254740991\nA,2026-01-06,1\nA,2026-01-07,1e12\n",
		"sku;date;quantity\nA;2026-01-05;3\n", "sku\tdate\tquantity\nA\t2026-01-05\t3\n", "sku|date|quantity\n",
		"sku,date,quantity\nA,0001-01-01,3\nA,2026-01-05,1\nA,2026-01-12,2\nA,2026-01-19,2\n",
		"sku,date,quantity\nA,1900-01-01,3\nA,2026-01-05,1\nA,2200-12-31,2\nB,2062-08-20,1\n",
		"sku,period,quantity\nA,-1099511627776,1\nA,1099511627776,2\nB,0,1\nB,131071,1\n",
		"sku,period,quantity\nA,1,0x10\nA,2,1_000\nA,3,inf\nA,4,NaN\nA,5,-0\nA,6,+7\nA,7,.5\n",
		"sku,date,quantity\nA,2026-02-29,1\nA,2024-02-29,1\nA,2026-13-01,1\n,2026-01-05,1\n",
		"sku,date,quantity\nA,2026-01-05\nA\n\nA,2026-01-05,1,extra\n",
		"sku,date,quantity\nA,2026-01-05,1\"2\nA,\"2026-01-06,1\n",
		"sku,date,quantity,sku\n", "", "\n", "sku,date,quantity\n",
		"\ufeffItem No;Posting Date;Qty;Site\r\nA;05.01.2026;1,5;north\r\nA;06.01.2026;-2;south\r\n",
		"sep=;\nsku;date;quantity\nA;04/03/2026;1.200,5\nA;13/03/2026;2\n", "sku,date,quantity\nA,45720,1\nA,2025-03-04T14:05:00Z,2\n",
		"sku,year,period,quantity\nA,2025,52,1\nA,2026,1,2\nA,2026,53,1\n", "sku,period,quantity\nA,51,1\nA,52,1\nA,1,1\n", "sku,period,quantity\nA,2025-W52,1\nA,2026-W01,2\nA,2026-13,1\nA,3,1\n",
		"sku,date,quantity\nA,2025-01-01,30\nA,2025-02-01,40\nA,2025-03-01,20\nA,2025-04-01,50\n",
		"\xff\xfes\x00k\x00u\x00,\x00d\x00a\x00t\x00e\x00,\x00q\x00u\x00a\x00n\x00t\x00i\x00t\x00y\x00\n\x00",
	} {
		f.Add(s, uint8(1))
	}
	lineRef := regexp.MustCompile(`^h\.csv:\d+:`)
	anyRef := regexp.MustCompile(`h\.csv:\d+`)
	f.Fuzz(func(t *testing.T, data string, period uint8) {
		p := Period(period % 3)
		h, err := Read(strings.NewReader(data), "h.csv", p)
		oneLine := func(kind, msg string, re *regexp.Regexp) {
			if strings.ContainsAny(msg, "\r\n") || !re.MatchString(msg) {
				t.Fatalf("%s is not one line naming h.csv and a line: %q", kind, msg)
			}
		}
		if err != nil {
			oneLine("read error", err.Error(), lineRef)
			return
		}
		for _, e := range h.Errors {
			oneLine("row error", e.Error(), lineRef)
		}
		rows, failed := len(h.Errors)+h.PartialRows, false
		for _, k := range h.SKUs {
			if k.SKU == "" || strings.ContainsAny(k.SKU, "\r\n") {
				t.Fatalf("SKU %q accepted", k.SKU)
			}
			rows += len(k.Errors) + k.Records + k.Returns // returns are ignored
			for _, e := range k.Errors {
				oneLine("row error", e.Error(), lineRef)
			}
			for _, o := range k.LeftOut {
				oneLine("left-out note", o.String(), lineRef)
				rows += o.Rows
			}
			if k.Err != nil {
				failed = true // its usable rows are in no count
				oneLine("SKU error", k.Err.Error(), anyRef)
				if k.Demand != nil {
					t.Fatalf("%q: a series and an error %v", k.SKU, k.Err)
				}
			}
			if k.Demand != nil {
				if len(k.Demand) != h.Last-k.Start+1 || len(k.Demand) > MaxSpan || k.Records == 0 {
					t.Fatalf("%q: %d periods from %d to %d, %d records", k.SKU, len(k.Demand), k.Start, h.Last, k.Records)
				}
				total := 0
				for _, q := range k.Demand {
					if q < 0 {
						t.Fatalf("%q: negative demand %v", k.SKU, k.Demand)
					}
					total += q
				}
				if total >= maxExact {
					t.Fatalf("%q: total %d", k.SKU, total)
				}
			}
			s, err := k.Fit()
			if err != nil && strings.ContainsAny(err.Error(), "\r\n") {
				t.Fatalf("fit error of %q not one line: %q", k.SKU, err)
			}
			for _, w := range s.Warnings {
				if strings.ContainsAny(w, "\r\n") {
					t.Fatalf("warning of %q not one line: %q", k.SKU, w)
				}
			}
		}
		if rows > h.Rows || (!failed && rows != h.Rows) {
			t.Fatalf("%d rows read, %d accounted for", h.Rows, rows)
		}
	})
}
