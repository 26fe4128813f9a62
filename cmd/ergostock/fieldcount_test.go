package main

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
)

// A row whose number of fields differs from the header's fails its SKU in
// fit and in batch alike, with the same one-line message naming the file
// and line (issue 11, item 9; history.SKU.FieldCountError); the other
// SKUs of the file are fitted and planned as usual.
func TestFieldCountFitAndBatchAgree(t *testing.T) {
	var good strings.Builder
	for i := 0; i < 20; i++ {
		good.WriteString("B,2026-01-" + pad2(5+i) + "," + string(rune('1'+i%4)) + "\n")
	}
	for _, c := range []struct {
		name, rows, want string
	}{
		{"long row", "A,2026-01-05,1,5\nA,2026-01-06,2\n", `h.csv:2: row "A,2026-01-05,1,5": want 3 fields as in the header (line 1), not 4`},
		{"short row", "A,2026-01-05,2\nA,2026-01-06\nA,2026-01-07,1,5\n", `h.csv:3: quantity "": want a whole number >= 0 (the row has 2 fields, the header 3) (and 1 more rows of this sku with another number of fields)`},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			hist := filepath.Join(dir, "h.csv")
			writeFile(t, hist, "sku,date,quantity\n"+c.rows+good.String())
			code, out, errs := fitRun("", "--history", hist, "--period", "day", "--json")
			var res []struct {
				SKU, Demand, Error string
			}
			if err := json.Unmarshal([]byte(out), &res); err != nil || code != 3 || len(res) != 2 {
				t.Fatalf("fit: exit %d, %v, %s %s", code, err, out, errs)
			}
			if res[0].SKU != "A" || !strings.HasPrefix(res[0].Error, strings.Replace(c.want, "h.csv", hist, 1)) || res[1].Demand == "" {
				t.Errorf("fit: %+v, want A failing with %q", res, c.want)
			}
			items := filepath.Join(dir, "items.csv")
			writeFile(t, items, "sku,lead_time,holding_cost,shortage_cost\nA,1,1,9\nB,1,1,9\n")
			bout := filepath.Join(dir, "r.csv")
			bcode, berr := runBatchCmd(t, "--items", items, "--history", hist, "--out", bout, "--period", "day")
			header, rows := readResults(t, bout)
			e := index(header, "error")
			if bcode != 3 || len(rows) != 2 || rows[0][e] != res[0].Error || rows[1][e] != "" {
				t.Errorf("batch: exit %d (%s), A's error %q, want fit's %q", bcode, berr, rows[0][e], res[0].Error)
			}
		})
	}
}

func pad2(n int) string {
	if n < 10 {
		return "0" + string(rune('0'+n))
	}
	return string(rune('0'+n/10)) + string(rune('0'+n%10))
}
