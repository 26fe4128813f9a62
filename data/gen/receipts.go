package main

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"time"
)

// The seed of the receipts, apart from the seed of the history and items
// so that adding receipts changed no other file.
const receiptSeed1, receiptSeed2 = 20261202, 20250303

// Suppliers (invented firms).
const (
	fenwright = "Fenwright Stores Supply"
	kelbrook  = "Kelbrook Castings"
	ashgill   = "Ashgill Traction Electrics"
	tarnside  = "Tarnside Coachworks"
)

// receiptSKUs are the parts with receipts on file, with their supplier and
// what is special about them: most have two years of ordinary orders; some
// show what the reader warns about.
var receiptSKUs = []struct {
	sku, supplier, note string
}{
	{"GLOVE-NITRILE-M", fenwright, ""},
	{"FLANGE-LUB-5L", fenwright, ""},
	{"SAND-DRY-25KG", fenwright, "partial"},
	{"HVAC-FILTER-T3", fenwright, ""},
	{"DEGREASER-5L", fenwright, "outlier"},
	{"BRAKE-PAD-T3-FRONT", kelbrook, ""},
	{"BRAKE-PAD-T4-REAR", kelbrook, "partial"},
	{"BOLT-M12-40", kelbrook, ""},
	{"DOOR-SEAL-T4", kelbrook, ""},
	{"HOSE-CLIP-32-50", kelbrook, "few"}, // pooled with its supplier's other parts
	{"DOOR-SENSOR-T3-IR", ashgill, ""},
	{"PANTO-CARBON-T4", ashgill, ""},
	{"WIPER-MOTOR-T3", ashgill, "slow"},
	{"COUPLER-HEAD-T3", ashgill, ""},
	{"WHEEL-TYRE-T3", ashgill, ""},
	{"BATTERY-24V-T4", ashgill, "few"},
	{"DAMPER-PRIMARY-T4", tarnside, ""},
	{"RELAY-24V-2P", tarnside, ""},
	{"GLAZING-SIDE-T4", tarnside, ""},
	{"HEADLIGHT-UNIT-T3", "", "few"}, // few orders, no supplier: keeps its lead_time
}

// writeReceipts writes the goods receipts of the parts in receiptSKUs that
// keep accepts and whose item is planned with backorders: order date,
// receipt date, supplier, quantity and an order reference, one row per
// receipt, in date order. A part's lead times scatter around its item's
// lead_time (in weeks): a few days either way, now and then a week or two
// late.
func writeReceipts(path string, items []itemRow, keep func(*part) bool) error {
	rng := rand.New(rand.NewPCG(receiptSeed1, receiptSeed2))
	byName := map[string]itemRow{}
	for _, r := range items {
		byName[r.p.sku] = r
	}
	type row struct {
		order, receipt time.Time
		sku, supplier  string
		qty            int
		ref            string
	}
	var rows []row
	ref := 41000
	for _, x := range receiptSKUs {
		it, ok := byName[x.sku]
		if !ok || !keep(it.p) || it.lost || it.p.issue == nil {
			continue
		}
		m, _ := weekly(it.p)
		lot := max(1, int(math.Round(m*4)))
		supplier := x.supplier
		n := 9 + rng.IntN(6)
		if x.note == "few" {
			n = 2 + rng.IntN(2)
		}
		// Orders spread over the two years, on working days.
		step := days / (n + 1)
		for i := range n {
			t := step*(i+1) - step/3 + rng.IntN(max(1, step*2/3))
			d := firstDay.AddDate(0, 0, t)
			for d.Weekday() == time.Saturday || d.Weekday() == time.Sunday {
				d = d.AddDate(0, 0, 1)
			}
			lead := 7*it.lead - 3 + rng.IntN(7)
			if rng.IntN(8) == 0 {
				lead += 7 + rng.IntN(8) // held up at the supplier
			}
			if x.note == "slow" {
				lead += 7 * rng.IntN(3)
			}
			lead = max(0, lead)
			ref++
			id := fmt.Sprintf("BV-%d", ref)
			rc := d.AddDate(0, 0, lead)
			switch {
			case x.note == "partial" && i%3 == 1:
				// Delivered in two parts, the rest a week or so later.
				first := max(1, lot/2)
				early := d.AddDate(0, 0, max(0, lead-7-rng.IntN(4)))
				rows = append(rows, row{d, early, x.sku, supplier, first, id})
				rows = append(rows, row{d, rc, x.sku, supplier, max(1, lot-first), id})
				continue
			case x.note == "outlier" && i == n/2:
				rc = rc.AddDate(1, 0, 0) // the receipt keyed a year late
			}
			rows = append(rows, row{d, rc, x.sku, supplier, lot, id})
		}
	}
	sort.SliceStable(rows, func(a, b int) bool { return rows[a].receipt.Before(rows[b].receipt) })
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	fmt.Fprintln(w, "receipt_date,order_date,order_ref,sku,supplier,quantity")
	for _, r := range rows {
		fmt.Fprintf(w, "%s,%s,%s,%s,%s,%d\n", r.receipt.Format(time.DateOnly), r.order.Format(time.DateOnly), r.ref, r.sku, r.supplier, r.qty)
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
