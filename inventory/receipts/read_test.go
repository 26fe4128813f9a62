package receipts

import (
	"math"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/inventory/tabular"
)

func read(t *testing.T, text string, opt Options) *File {
	t.Helper()
	f, err := Read(strings.NewReader(text), "r.csv", opt)
	if err != nil {
		t.Fatalf("Read: %v", err)
	}
	return f
}

// handFile is counted by hand against an ISO calendar for 2025: 3 March
// is the Monday of week 10, 10 March of week 11, and so on.
const handFile = `sku,order_date,receipt_date,quantity
AX-1,2025-03-03,2025-03-12,10
AX-1,2025-03-07,2025-03-10,10
AX-1,2025-03-04,2025-03-07,5
AX-1,2025-03-10,2025-03-24,10
AX-1,2025-03-17,2025-03-31,10
AX-1,2025-03-24,2025-03-26,4
AX-1,2025-03-24,2025-04-09,6
AX-1,2025-01-06,2025-06-30,10
`

// TestHandCount checks a law against a count made by hand, week by week:
// lead times of 1 (W10 -> W11), 1 (W10 -> W11), 0 (W10 -> W10),
// 2 (W11 -> W13), 2 (W12 -> W14) and 2 (W13 -> W15, the last part of
// the order delivered in two), and one order of 175 days (W02 -> W27)
// that the far-out fence (days 3, 3, 9, 14, 14, 16, 175: hinges 6 and
// 15, spread 9, upper fence 42 days) leaves out. The law is then 0=1/6, 1=2/6, 2=3/6.
// Its hazards 1/6, 2/5, 1 rise, so Kaplan's model admits it as it is.
func TestHandCount(t *testing.T) {
	f := read(t, handFile, Options{Period: history.Week})
	laws := f.Laws()
	if len(laws) != 1 {
		t.Fatalf("got %d laws, want 1", len(laws))
	}
	l := laws[0]
	if l.Orders != 7 || l.Receipts != 8 || l.Partial != 1 || l.Basis != 6 || l.Source != Own {
		t.Errorf("orders %d receipts %d partial %d basis %d source %s; want 7 8 1 6 own", l.Orders, l.Receipts, l.Partial, l.Basis, l.Source)
	}
	if got := l.CountsText(); got != "0=1,1=2,2=3" {
		t.Errorf("counts %s, want 0=1,1=2,2=3", got)
	}
	if len(l.Outliers) != 1 || l.Outliers[0].Order.Days != 175 || l.Outliers[0].Fence != 42 || l.Outliers[0].Order.LastLine != 9 {
		t.Errorf("outliers %+v, want the 175-day order of line 9 above 42", l.Outliers)
	}
	want := []float64{1.0 / 6, 2.0 / 6, 3.0 / 6}
	for k, p := range want {
		if math.Abs(l.Empirical.PMF(k)-p) > 1e-15 {
			t.Errorf("P(L=%d) = %v, want %v", k, l.Empirical.PMF(k), p)
		}
	}
	if !l.Realisable() {
		t.Errorf("law %s refused as not realisable", l.Empirical)
	}
	if l.MeanDays != (9+3+3+14+14+16)/6.0 {
		t.Errorf("mean days %v", l.MeanDays)
	}
	fixed, law, ok := l.LeadTime(inventory.Sequential)
	if !ok || fixed != 0 || law == nil || law.String() != l.Empirical.String() {
		t.Errorf("LeadTime: %d %v %v", fixed, law, ok)
	}
	// In days the same orders give their day counts, in months 0 or 1.
	fd := read(t, handFile, Options{Period: history.Day})
	if got := fd.Laws()[0].CountsText(); got != "3=2,9=1,14=2,16=1" {
		t.Errorf("daily counts %s", got)
	}
	fm := read(t, handFile, Options{Period: history.Month})
	if got := fm.Laws()[0].CountsText(); got != "0=5,1=1" {
		t.Errorf("monthly counts %s", got)
	}
}

// TestDateLayouts reads one file written in each date layout.
func TestDateLayouts(t *testing.T) {
	iso := [][2]string{{"2025-03-03", "2025-03-12"}, {"2025-03-17", "2025-03-31"}, {"2025-01-06", "2025-01-20"}}
	write := func(f func(s string) string) string {
		var b strings.Builder
		b.WriteString("SKU;Order Date;Receipt-Date\n")
		for _, r := range iso {
			b.WriteString("P1;" + f(r[0]) + ";" + f(r[1]) + "\n")
		}
		return b.String()
	}
	ymd := func(s string) (string, string, string) { return s[:4], s[5:7], s[8:] }
	serial := map[string]string{"2025-03-03": "45719", "2025-03-12": "45728", "2025-03-17": "45733", "2025-03-31": "45747", "2025-01-06": "45663", "2025-01-20": "45677"}
	cases := []struct {
		name   string
		f      func(string) string
		layout tabular.DateLayout
	}{
		{"iso", func(s string) string { return s }, ""},
		{"timestamp", func(s string) string { return s + " 14:05:00" }, ""},
		{"dot", func(s string) string { y, m, d := ymd(s); return d + "." + m + "." + y }, ""},
		{"dmy given", func(s string) string { y, m, d := ymd(s); return d + "/" + m + "/" + y }, tabular.DateDMY},
		{"mdy", func(s string) string { y, m, d := ymd(s); return m + "/" + d + "/" + y }, ""},
		{"compact", func(s string) string { y, m, d := ymd(s); return y + m + d }, ""},
		{"serial", func(s string) string { return serial[s] }, tabular.DateSerial},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := read(t, write(c.f), Options{Period: history.Week, Dates: c.layout})
			if len(f.Errors) > 0 || len(f.SKUs) != 1 || len(f.SKUs[0].Errors) > 0 {
				t.Fatalf("errors: %v %v", f.Errors, f.SKUs)
			}
			if got := f.Laws()[0].CountsText(); got != "1=1,2=2" {
				t.Errorf("counts %s, want 1=1,2=2 (layout %s)", got, f.OrderDates)
			}
		})
	}
}

// TestRefusals checks that each bad row is refused on its own, naming the
// file, the line and the column, and that file-level faults stop the read.
func TestRefusals(t *testing.T) {
	rows := []struct {
		row, want string
	}{
		{"A,2025-03-10,2025-03-03,1", `r.csv:2: column receipt_date: "2025-03-03" is before the order_date "2025-03-10"`},
		{"A,2025-03-10,2062-03-03,1", `r.csv:2: column receipt_date: "2062-03-03" is 13507 days after`},
		{"A,2025-03-10,2025-03-33,1", `r.csv:2: column receipt_date: "2025-03-33": no such day`},
		{"A,,2025-03-12,1", `r.csv:2: column order_date: empty`},
		{"A,1812-03-10,2025-03-12,1", `r.csv:2: column order_date: "1812-03-10": want a date in the years 1900 to 2200`},
		{"A,2025-03-10,2025-03-12,0", `r.csv:2: column quantity: "0": want a quantity received > 0`},
		{"A,2025-03-10,2025-03-12,-4", `r.csv:2: column quantity: "-4": want a quantity received > 0`},
		{"A,2025-03-10,2025-03-12,lots", `r.csv:2: column quantity: "lots"`},
		{",2025-03-10,2025-03-12,1", `r.csv:2: column sku: "": want a non-empty SKU`},
	}
	for _, c := range rows {
		t.Run(c.row, func(t *testing.T) {
			f := read(t, "sku,order_date,receipt_date,quantity\n"+c.row+"\nA,2025-03-10,2025-03-12,1\n", Options{Period: history.Week})
			var errs []*tabular.Error
			errs = append(errs, f.Errors...)
			for _, k := range f.SKUs {
				errs = append(errs, k.Errors...)
			}
			if len(errs) != 1 || !strings.HasPrefix(errs[0].Error(), c.want) || strings.Contains(errs[0].Error(), "\n") {
				t.Fatalf("errors %v, want one starting %q", errs, c.want)
			}
			if k := f.SKUs[len(f.SKUs)-1]; k.SKU != "A" || len(k.Orders) != 1 {
				t.Errorf("the good row was not kept: %+v", k)
			}
		})
	}
	files := []struct {
		name, text string
		opt        Options
		want       string
	}{
		{"missing column", "sku,order_date,quantity\nA,2025-03-10,1\n", Options{}, "r.csv:1: missing column receipt_date"},
		{"misspelt column", "sku,order_date,reciept_date\nA,2025-03-10,2025-03-12\n", Options{}, `r.csv:1: column reciept_date: not a column ergostock reads, but close to receipt_date`},
		{"ambiguous dates", "sku,order_date,receipt_date\nA,03/04/2025,05/04/2025\n", Options{DateFlag: "--receipts-date-format"}, "give --receipts-date-format"},
		{"mapped column absent", "sku,ordered,receipt_date\nA,2025-03-10,2025-03-12\n", Options{Columns: map[string]string{"order_date": "Placed"}, ColumnsFlag: "--receipts-columns"}, `--receipts-columns maps order_date to "Placed"`},
		{"empty", "", Options{}, "r.csv: no header line"},
		{"period", "sku,order_date,receipt_date\n", Options{Period: history.Index}, "r.csv: period index: want day, week or month"},
	}
	for _, c := range files {
		t.Run(c.name, func(t *testing.T) {
			_, err := Read(strings.NewReader(c.text), "r.csv", c.opt)
			if err == nil || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
				t.Fatalf("error %v, want one line holding %q", err, c.want)
			}
		})
	}
}

// TestPartials checks the grouping of receipts into orders: by order_ref
// when the file has one, else by sku, supplier and order date.
func TestPartials(t *testing.T) {
	cases := []struct {
		name, text          string
		orders, partial     int
		counts              string
		errLine             int
		errColumn, errWords string
	}{
		{"by date and supplier", `sku,supplier,order_date,receipt_date
A,S1,2025-03-03,2025-03-04
A,S1,2025-03-03,2025-03-18
A,S2,2025-03-03,2025-03-05
`, 2, 1, "0=1,2=1", 0, "", ""},
		{"by order_ref", `sku,order_ref,order_date,receipt_date
A,PO-1,2025-03-03,2025-03-04
A,PO-2,2025-03-03,2025-03-05
A,PO-1,2025-03-03,2025-03-25
`, 2, 1, "0=1,3=1", 0, "", ""},
		{"ref with two order dates", `sku,order_ref,order_date,receipt_date
A,PO-1,2025-03-03,2025-03-04
A,PO-1,2025-03-04,2025-03-25
`, 1, 0, "0=1", 3, "order_date", "want one order_date per order"},
		{"ref with two suppliers", `sku,order_ref,supplier,order_date,receipt_date
A,PO-1,S1,2025-03-03,2025-03-04
A,PO-1,S2,2025-03-03,2025-03-25
`, 1, 0, "0=1", 3, "supplier", "want one supplier per order"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := read(t, c.text, Options{Period: history.Week})
			l := f.Laws()[0]
			if l.Orders != c.orders || l.Partial != c.partial || l.CountsText() != c.counts {
				t.Errorf("orders %d partial %d counts %s; want %d %d %s", l.Orders, l.Partial, l.CountsText(), c.orders, c.partial, c.counts)
			}
			errs := f.SKUs[0].Errors
			if c.errLine == 0 {
				if len(errs) > 0 {
					t.Errorf("errors %v", errs)
				}
				return
			}
			if len(errs) != 1 || errs[0].Line != c.errLine || errs[0].Column != c.errColumn || !strings.Contains(errs[0].Error(), c.errWords) {
				t.Errorf("errors %v, want line %d column %s: %s", errs, c.errLine, c.errColumn, c.errWords)
			}
		})
	}
	if w := strings.Join(read(t, cases[0].text, Options{}).Laws()[0].Warnings, "; "); !strings.Contains(w, "1 of 2 orders delivered in parts: each counted once, at its last receipt") {
		t.Errorf("warnings %q", w)
	}
}

// TestPooling checks the pooling of SKUs with few receipts by supplier.
func TestPooling(t *testing.T) {
	var b strings.Builder
	b.WriteString("sku,supplier,order_date,receipt_date\n")
	// Y: six orders from S of 1 or 2 weeks; X: two from S of 3 weeks; Z:
	// two without a supplier; W: two from T, who has no others.
	for _, r := range []string{"03-03,03-10", "03-10,03-17", "03-17,03-31", "03-24,04-07", "03-31,04-07", "04-07,04-14"} {
		o, rc, _ := strings.Cut(r, ",")
		b.WriteString("Y,S,2025-" + o + ",2025-" + rc + "\n")
	}
	b.WriteString("X,S,2025-03-03,2025-03-24\nX,S,2025-04-07,2025-04-28\n")
	b.WriteString("Z,,2025-03-03,2025-03-24\nZ,,2025-04-07,2025-04-28\n")
	b.WriteString("W,T,2025-03-03,2025-03-24\nW,T,2025-04-07,2025-04-28\n")
	laws := read(t, b.String(), Options{Period: history.Week}).Laws()
	by := map[string]Law{}
	for _, l := range laws {
		by[l.SKU] = l
	}
	cases := []struct {
		sku    string
		source Source
		counts string
		usable bool
		words  string
	}{
		{"Y", Own, "1=4,2=2", true, ""},
		{"X", Pooled, "1=4,2=2,3=2", true, `the law pools supplier "S", 8 orders over 2 SKUs`},
		{"Z", Few, "3=2", false, "no supplier to pool with: the law is not used for planning, the item keeps its lead_time"},
		{"W", Few, "3=2", false, `supplier "T" has no others to pool`},
	}
	for _, c := range cases {
		l := by[c.sku]
		if l.Source != c.source || l.CountsText() != c.counts || l.Usable() != c.usable || !strings.Contains(strings.Join(l.Warnings, "; "), c.words) {
			t.Errorf("%s: source %s counts %s usable %v warnings %q; want %s %s %v %q", c.sku, l.Source, l.CountsText(), l.Usable(), l.Warnings, c.source, c.counts, c.usable, c.words)
		}
		if _, _, ok := l.LeadTime(inventory.Sequential); ok != c.usable {
			t.Errorf("%s: LeadTime ok %v", c.sku, ok)
		}
	}
}

// TestKaplanNearest checks that a law whose hazard falls is replaced, for
// the sequential model, by inventory.NearestKaplan of it, with both means
// in the warning, and kept for the independent model.
func TestKaplanNearest(t *testing.T) {
	var b strings.Builder
	b.WriteString("sku,order_date,receipt_date\n")
	// 5 orders of 1 week, 1 of 2, 4 of 3: hazards 0.5, 0.2, 1.
	add := func(n int, rc string) {
		for range n {
			b.WriteString("A,2025-03-03," + rc + "\n")
		}
	}
	add(5, "2025-03-10")
	add(1, "2025-03-17")
	add(4, "2025-03-24")
	// The orders share a day, so without a ref they would be one order
	// delivered in parts: give each row an order_ref of its own.
	text := strings.Replace(b.String(), "sku,order_date", "sku,order_ref,order_date", 1)
	lines := strings.Split(strings.TrimSpace(text), "\n")
	for i := 1; i < len(lines); i++ {
		lines[i] = strings.Replace(lines[i], "A,", "A,PO-"+strings.Repeat("x", i)+",", 1)
	}
	l := read(t, strings.Join(lines, "\n")+"\n", Options{Period: history.Week}).Laws()[0]
	if l.CountsText() != "1=5,2=1,3=4" {
		t.Fatalf("counts %s", l.CountsText())
	}
	if l.Realisable() {
		t.Fatalf("law %s taken as realisable", l.Empirical)
	}
	near := inventory.NearestKaplan(l.Empirical)
	if l.Admissible.String() != near.String() {
		t.Errorf("admissible %s, want %s", l.Admissible, near)
	}
	w := strings.Join(l.Warnings, "; ")
	if !strings.Contains(w, "mean 1.9 periods") || !strings.Contains(w, "nearest law they admit") {
		t.Errorf("warnings %q", w)
	}
	_, seq, _ := l.LeadTime(inventory.Sequential)
	_, ind, _ := l.LeadTime(inventory.Independent)
	if seq.String() != near.String() || ind.String() != l.Empirical.String() {
		t.Errorf("sequential %v independent %v", seq, ind)
	}
	demand, _ := inventory.NewPoisson(2)
	if err := (inventory.System{Demand: demand, LeadTimeLaw: seq, Holding: 1, Shortage: 9, Mode: inventory.Backorder}).Validate(); err != nil {
		t.Errorf("the admissible law is refused: %v", err)
	}
}
