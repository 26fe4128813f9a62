package receipts

import (
	"fmt"
	"sort"
	"strconv"
	"strings"

	"ergostock/inventory"
	"ergostock/inventory/history"
)

// Source says what a SKU's law rests on.
type Source string

// The sources of a law.
const (
	// Own: the SKU's own orders, at least MinOrders of them.
	Own Source = "own"
	// Pooled: the orders of the SKU's suppliers over all their SKUs.
	Pooled Source = "supplier"
	// Few: fewer than MinOrders own orders and no supplier to pool with;
	// the law is shown but not used for planning (Usable is false).
	Few Source = "few"
	// None: no usable receipt.
	None Source = "none"
)

// Law is the lead-time law of one SKU in planning periods.
type Law struct {
	SKU string
	// The SKU's own orders, receipt rows and orders delivered in parts.
	Orders, Receipts, Partial int
	Source                    Source
	// Suppliers are the suppliers pooled (Source Pooled), sorted;
	// PoolSKUs the SKUs their orders cover.
	Suppliers []string
	PoolSKUs  int
	// Counts[l] is the number of orders behind the law with lead time l
	// periods; Basis is their sum (outliers left out).
	Counts []int
	Basis  int
	// Empirical is the observed law, Counts[l]/Basis; Admissible is the
	// nearest law Kaplan's sequential deliveries can realise
	// (inventory.NearestKaplan), the same as Empirical when it is one.
	// Both are nil for Source None.
	Empirical, Admissible inventory.Distribution
	// MeanDays is the mean lead time in days of the orders behind the law.
	MeanDays float64
	Outliers []Outlier
	Warnings []string
}

// Usable reports whether the law should replace an item's lead time.
func (l *Law) Usable() bool { return l.Source == Own || l.Source == Pooled }

// Realisable reports whether the observed law is one sequential deliveries
// can realise (then Admissible is Empirical).
func (l *Law) Realisable() bool {
	return l.Empirical != nil && l.Admissible.String() == l.Empirical.String()
}

// LeadTime returns the lead time to plan with under model: a fixed number
// of periods (law nil) when every order took the same number of periods,
// else the law (Admissible under Sequential, Empirical under
// Independent). ok is false when the law is not usable.
func (l *Law) LeadTime(model inventory.LeadTimeModel) (fixed int, law inventory.Distribution, ok bool) {
	if !l.Usable() {
		return 0, nil, false
	}
	d := l.Admissible
	if model == inventory.Independent {
		d = l.Empirical
	}
	fixed, law, err := inventory.ParseLeadTime(d.String())
	if err != nil {
		return 0, nil, false
	}
	return fixed, law, true
}

// CountsText writes the counts as "L=orders" pairs: "1=3,2=8,4=1".
func (l *Law) CountsText() string {
	var parts []string
	for k, n := range l.Counts {
		if n > 0 {
			parts = append(parts, strconv.Itoa(k)+"="+strconv.Itoa(n))
		}
	}
	return strings.Join(parts, ",")
}

// Laws returns the lead-time law of every SKU of f, in file order (see the
// package documentation for pooling, outliers and admissibility).
func (f *File) Laws() []Law {
	pdays := map[history.Period]int{history.Day: 1, history.Week: 7, history.Month: 30}[f.Period]
	// The orders of each supplier, over all SKUs.
	bySupplier := map[string][]*Order{}
	for _, k := range f.SKUs {
		for _, o := range k.Orders {
			if o.Supplier != "" {
				bySupplier[o.Supplier] = append(bySupplier[o.Supplier], o)
			}
		}
	}
	// The pooled law of each set of suppliers, built once.
	pools := map[string]*core{}
	out := make([]Law, len(f.SKUs))
	for i, k := range f.SKUs {
		l := &out[i]
		l.SKU, l.Orders, l.Receipts = k.SKU, len(k.Orders), k.Receipts
		for _, o := range k.Orders {
			if o.Receipts > 1 {
				l.Partial++
			}
		}
		if n := len(k.Errors); n > 0 {
			more := ""
			if n > 1 {
				more = fmt.Sprintf(" (and %d more)", n-1)
			}
			l.Warnings = append(l.Warnings, fmt.Sprintf("%s refused, first %v%s", plural(n, "receipt row"), k.Errors[0], more))
		}
		if l.Orders == 0 {
			l.Source = None
			l.Warnings = append(l.Warnings, "no usable receipt: no lead-time law")
			continue
		}
		if l.Partial > 0 {
			l.Warnings = append(l.Warnings, fmt.Sprintf("%d of %d orders delivered in parts: each counted once, at its last receipt", l.Partial, l.Orders))
		}
		l.Source = Own
		var c *core
		if len(k.Orders) >= MinOrders {
			c = build(k.Orders, pdays)
		} else {
			seen := map[string]bool{}
			for _, o := range k.Orders {
				if o.Supplier != "" && !seen[o.Supplier] {
					seen[o.Supplier] = true
					l.Suppliers = append(l.Suppliers, o.Supplier)
				}
			}
			sort.Strings(l.Suppliers)
			key := strings.Join(l.Suppliers, "\x00")
			pc, done := pools[key]
			if !done && len(l.Suppliers) > 0 {
				var pool []*Order
				skus := map[string]bool{}
				for _, s := range l.Suppliers {
					for _, o := range bySupplier[s] {
						pool = append(pool, o)
						skus[o.SKU] = true
					}
				}
				pc = build(pool, pdays)
				pc.poolSKUs = len(skus)
				pools[key] = pc
			}
			switch {
			case pc != nil && pc.orders > len(k.Orders):
				c, l.Source, l.PoolSKUs = pc, Pooled, pc.poolSKUs
				l.Warnings = append(l.Warnings, fmt.Sprintf("only %d orders of its own (fewer than %d): the law pools supplier %s, %d orders over %d SKUs",
					l.Orders, MinOrders, quoteList(l.Suppliers), pc.orders, pc.poolSKUs))
			case len(l.Suppliers) > 0:
				c, l.Source = build(k.Orders, pdays), Few
				l.Warnings = append(l.Warnings, fmt.Sprintf("only %d orders (fewer than %d) and supplier %s has no others to pool: the law is not used for planning",
					l.Orders, MinOrders, quoteList(l.Suppliers)))
			default:
				c, l.Source = build(k.Orders, pdays), Few
				l.Warnings = append(l.Warnings, fmt.Sprintf("only %d orders (fewer than %d) and no supplier to pool with: the law is not used for planning, the item keeps its lead_time",
					l.Orders, MinOrders))
			}
		}
		l.Outliers = c.outliers
		if len(c.outliers) > 0 {
			l.Warnings = append(l.Warnings, outlierNote(f.Name, c.outliers, l.Source == Pooled))
		}
		if c.basis < MinOrders && l.Source == Pooled {
			l.Warnings = append(l.Warnings, fmt.Sprintf("the pool holds only %d orders (fewer than %d): a law from few receipts", c.basis, MinOrders))
		}
		l.Counts, l.Basis, l.MeanDays = c.counts, c.basis, c.meanDays
		if c.err != nil { // cannot happen: lead times are at most MaxLeadDays
			l.Source = None
			l.Warnings = append(l.Warnings, "no lead-time law: "+c.err.Error())
			continue
		}
		l.Empirical, l.Admissible = c.emp, c.adm
		if !l.Realisable() {
			l.Warnings = append(l.Warnings, fmt.Sprintf("the observed law (mean %.4g periods) is not one sequential deliveries (Kaplan 1970) can realise: planning uses the nearest law they admit, mean %.4g periods (the independent lead-time model keeps the observed law)",
				l.Empirical.Mean(), l.Admissible.Mean()))
		}
	}
	return out
}

// core is a law built from a group of orders.
type core struct {
	orders   int // in the group, outliers included
	poolSKUs int // SKUs of a pool
	counts   []int
	basis    int
	meanDays float64
	emp, adm inventory.Distribution
	outliers []Outlier
	err      error
}

// build makes the law of a group of orders: the far-out ones left out,
// the others counted per lead time, the observed law and its nearest
// admissible one.
func build(group []*Order, pdays int) *core {
	c := &core{orders: len(group)}
	kept, outl := fences(group, pdays)
	c.outliers = outl
	maxL, sumDays := 0, 0
	for _, o := range kept {
		maxL = max(maxL, o.Lead)
		sumDays += o.Days
	}
	c.counts = make([]int, maxL+1)
	for _, o := range kept {
		c.counts[o.Lead]++
	}
	c.basis = len(kept)
	c.meanDays = float64(sumDays) / float64(len(kept))
	p := make([]float64, len(c.counts))
	for j, n := range c.counts {
		p[j] = float64(n) / float64(c.basis)
	}
	emp, err := inventory.NewPMF(p)
	if err != nil {
		c.err = err
		return c
	}
	// The printed law, read back, is the one planned with.
	d, err := inventory.Parse(emp.String())
	if err != nil {
		d = emp
	}
	c.emp, c.adm = d, inventory.NearestKaplan(d)
	return c
}

// fences splits orders into those kept and the far-out ones: beyond
// Q1 - 3s or Q3 + 3s in days, with s = max(Q3 - Q1, pdays), Q1 and Q3 the
// hinges; groups of fewer than MinOrders orders are kept whole.
func fences(group []*Order, pdays int) (kept []*Order, out []Outlier) {
	if len(group) < MinOrders {
		return group, nil
	}
	d := make([]int, len(group))
	for i, o := range group {
		d[i] = o.Days
	}
	sort.Ints(d)
	q1, q3 := hinges(d)
	s := max(q3-q1, float64(pdays))
	lo, hi := q1-3*s, q3+3*s
	for _, o := range group {
		switch x := float64(o.Days); {
		case x < lo:
			out = append(out, Outlier{Order: o, Low: true, Fence: lo})
		case x > hi:
			out = append(out, Outlier{Order: o, Fence: hi})
		default:
			kept = append(kept, o)
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].Order.LastLine < out[b].Order.LastLine })
	return kept, out
}

// hinges returns Tukey's lower and upper hinges of sorted d: the medians of
// its lower and upper halves (the middle value, when the count is odd,
// belongs to both).
func hinges(d []int) (float64, float64) {
	n := len(d)
	h := (n + 1) / 2
	return median(d[:h]), median(d[n-h:])
}

func median(d []int) float64 {
	n := len(d)
	if n%2 == 1 {
		return float64(d[n/2])
	}
	return float64(d[n/2-1]+d[n/2]) / 2
}

// outlierNote says which orders the fences left out, naming up to three
// receipts by file line.
func outlierNote(file string, out []Outlier, pooled bool) string {
	var parts []string
	for i, o := range out {
		if i == 3 {
			parts = append(parts, fmt.Sprintf("and %d more", len(out)-3))
			break
		}
		side := "above"
		if o.Low {
			side = "below"
		}
		what := fmt.Sprintf("%s:%d: %d days, %s the fence %.4g", file, o.Order.LastLine, o.Order.Days, side, o.Fence)
		if pooled {
			what = fmt.Sprintf("%s:%d (sku %s): %d days, %s the fence %.4g", file, o.Order.LastLine, o.Order.SKU, o.Order.Days, side, o.Fence)
		}
		parts = append(parts, what)
	}
	return fmt.Sprintf("%s left out as far from the others (Tukey's far-out fences; check the dates, a real delay this long belongs in the law): %s",
		plural(len(out), "order"), strings.Join(parts, "; "))
}

func quoteList(s []string) string {
	q := make([]string, len(s))
	for i, x := range s {
		q[i] = strconv.Quote(x)
	}
	return strings.Join(q, ", ")
}

// plural writes a count with its noun: "1 order", "3 orders".
func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return strconv.Itoa(n) + " " + noun + "s"
}
