package receipts

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"time"

	"ergostock/inventory/history"
	"ergostock/inventory/tabular"
)

// The columns of a receipts file, in normal form (tabular.Normalize).
const (
	ColSKU      = "sku"
	ColOrder    = "order_date"
	ColReceipt  = "receipt_date"
	ColSupplier = "supplier"
	ColQuantity = "quantity"
	ColRef      = "order_ref"
)

// Columns lists every column the reader knows, required ones first.
var Columns = []string{ColSKU, ColOrder, ColReceipt, ColSupplier, ColQuantity, ColRef}

// MinOrders is the number of orders below which a SKU's law rests on few
// receipts and is pooled by supplier (a common rule of thumb).
const MinOrders = 5

// MaxLeadDays is the longest lead time a receipt may show, in days (ten
// years, the cap the history reader puts on a gap between dates): a
// longer one is refused as a typo in a year.
const MaxLeadDays = 3653

// MaxRows bounds the data rows read from one file (every row's cells are
// kept between the two passes of Read: a few hundred bytes a row).
const MaxRows = 5_000_000

// Options say how to read a receipts file.
type Options struct {
	// Period is the planning period lead times are counted in: history.Day,
	// Week or Month.
	Period history.Period
	// Dates is the layout of both date columns; "" or tabular.DateAuto
	// finds it from the dates.
	Dates tabular.DateLayout
	// DateFlag names the option that sets Dates, for messages
	// ("--receipts-date-format"); "" means "--date-format".
	DateFlag string
	// Columns maps known column names to the file's own (from
	// tabular.ParseColumnMap), and ColumnsFlag names the option that gave it.
	Columns     map[string]string
	ColumnsFlag string
	// Decimal is the decimal mark of quantities: '.', ',' or 0 to find it.
	Decimal byte
	// Table fixes the delimiter or encoding (zero: found from the file).
	Table tabular.Options
}

// Order is one order of a SKU with the receipts that delivered it.
type Order struct {
	SKU      string
	Supplier string
	Ref      string // the order_ref cell, "" without one
	Line     int    // line of the order's first receipt
	LastLine int    // line of the receipt that completed it (its last)
	Ordered  time.Time
	Received time.Time // the last receipt's date
	Receipts int       // receipt rows of the order (> 1: delivered in parts)
	Quantity float64   // units received, 0 when the file has no quantity
	Days     int       // Received - Ordered in days
	Lead     int       // lead time in planning periods (see the package doc)
}

// Outlier is an order left out of a law by the far-out fences.
type Outlier struct {
	Order *Order
	Low   bool    // below the lower fence (else above the upper one)
	Fence float64 // the fence it crossed, in days
}

// SKU is what the file says about one SKU.
type SKU struct {
	SKU      string
	Orders   []*Order         // in order of first receipt in the file
	Receipts int              // usable receipt rows
	Errors   []*tabular.Error // its refused rows, in file order
}

// File is a receipts file read into orders per SKU.
type File struct {
	Name    string
	Dialect tabular.Dialect
	Period  history.Period
	// Dates are the layouts of the order and receipt dates.
	OrderDates, ReceiptDates tabular.DateLayout
	Rows                     int              // data rows read
	SKUs                     []*SKU           // in order of first appearance
	Errors                   []*tabular.Error // refused rows without a usable sku
	HasSupplier, HasQuantity bool
	HasRef                   bool
}

// record is one data row kept between the passes.
type record struct {
	line  int
	cells [6]string // by Columns
	has   [6]bool
}

// Read reads a receipts file from r; name is used in messages. The
// returned error is for the file as a whole (no header, a missing or
// misspelt column, a syntax error, dates in no single layout, more than
// MaxRows rows); refused rows are in SKU.Errors and File.Errors.
func Read(r io.Reader, name string, opt Options) (*File, error) {
	if opt.Period != history.Day && opt.Period != history.Week && opt.Period != history.Month {
		return nil, fmt.Errorf("%s: period %v: want day, week or month", name, opt.Period)
	}
	tr, err := tabular.Open(r, name, opt.Table)
	if err != nil {
		return nil, err
	}
	cols := tabular.Columns{Known: Columns, Required: Columns[:3], Map: opt.Columns, MapFlag: opt.ColumnsFlag}
	idx, err := cols.Index(tr)
	if err != nil {
		return nil, err
	}
	f := &File{Name: name, Dialect: tr.Dialect, Period: opt.Period}
	_, f.HasSupplier = idx[ColSupplier]
	_, f.HasQuantity = idx[ColQuantity]
	_, f.HasRef = idx[ColRef]

	// Pass 1: the cells.
	var recs []record
	for {
		rec, line, err := tr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if len(recs) >= MaxRows {
			return nil, &tabular.Error{File: name, Line: line, Err: fmt.Errorf("more than %d data rows: split the file", MaxRows)}
		}
		var x record
		x.line = line
		for i, c := range Columns {
			if j, ok := idx[c]; ok && j < len(rec) {
				x.cells[i] = strings.TrimSpace(rec[j])
				x.has[i] = true
			}
		}
		recs = append(recs, x)
	}
	f.Rows = len(recs)

	// The date layouts.
	f.OrderDates, f.ReceiptDates, err = layouts(name, recs, opt)
	if err != nil {
		return nil, err
	}

	// Pass 2: rows into orders.
	nums := &tabular.Numbers{Decimal: opt.Decimal, File: name}
	skus := map[string]*SKU{}
	type key struct{ sku, ref, supplier, date string }
	orders := map[key]*Order{}
	for i := range recs {
		x := &recs[i]
		bad := func(col, format string, a ...any) *tabular.Error {
			return &tabular.Error{File: name, Line: x.line, Column: col, Err: fmt.Errorf(format, a...)}
		}
		sku := x.cells[0]
		if sku == "" || strings.ContainsAny(sku, "\r\n") {
			want := "want a non-empty SKU"
			if sku != "" {
				want = "want a SKU without line breaks"
			}
			f.Errors = append(f.Errors, bad(ColSKU, "%q: %s", sku, want))
			continue
		}
		k := skus[sku]
		if k == nil {
			k = &SKU{SKU: sku}
			skus[sku] = k
			f.SKUs = append(f.SKUs, k)
		}
		refuse := func(e *tabular.Error) { k.Errors = append(k.Errors, e) }
		ordered, e := readDate(x.cells[1], f.OrderDates, bad, ColOrder)
		if e != nil {
			refuse(e)
			continue
		}
		received, e := readDate(x.cells[2], f.ReceiptDates, bad, ColReceipt)
		if e != nil {
			refuse(e)
			continue
		}
		days := int(received.Sub(ordered).Hours() / 24)
		if days < 0 {
			refuse(bad(ColReceipt, "%q is before the order_date %q: want a receipt on or after the day of its order", x.cells[2], x.cells[1]))
			continue
		}
		if days > MaxLeadDays {
			refuse(bad(ColReceipt, "%q is %d days after the order_date %q: want a lead time of at most %d days (ten years); a typo in a year?", x.cells[2], days, x.cells[1], MaxLeadDays))
			continue
		}
		q := 0.0
		if x.has[4] && x.cells[4] != "" {
			v, err := nums.Parse(x.cells[4], x.line)
			if err != nil {
				refuse(bad(ColQuantity, "%q: %v", x.cells[4], err))
				continue
			}
			if !(v > 0) || math.IsInf(v, 0) || v >= 1<<53 {
				refuse(bad(ColQuantity, "%q: want a quantity received > 0 below 2^53 (a return or a cancelled line is not a receipt)", x.cells[4]))
				continue
			}
			q = v
		}
		supplier, ref := x.cells[3], x.cells[5]
		kk := key{sku: sku, ref: ref}
		if ref == "" {
			kk.supplier, kk.date = supplier, ordered.Format(time.DateOnly)
		}
		o := orders[kk]
		if o != nil {
			switch {
			case !o.Ordered.Equal(ordered):
				refuse(bad(ColOrder, "%q: order_ref %q was ordered on %s (line %d): want one order_date per order", x.cells[1], ref, o.Ordered.Format(time.DateOnly), o.Line))
				continue
			case o.Supplier != supplier:
				refuse(bad(ColSupplier, "%q: order_ref %q is from supplier %q (line %d): want one supplier per order", supplier, ref, o.Supplier, o.Line))
				continue
			}
		} else {
			o = &Order{SKU: k.SKU, Supplier: supplier, Ref: ref, Line: x.line, Ordered: ordered}
			orders[kk] = o
			k.Orders = append(k.Orders, o)
		}
		k.Receipts++
		o.Receipts++
		o.Quantity += q
		if o.Receipts == 1 || !received.Before(o.Received) {
			o.Received, o.LastLine = received, x.line
		}
	}
	for _, k := range f.SKUs {
		for _, o := range k.Orders {
			o.Days = int(o.Received.Sub(o.Ordered).Hours() / 24)
			o.Lead = f.Period.Of(o.Received) - f.Period.Of(o.Ordered)
		}
	}
	return f, nil
}

// readDate reads one date cell in layout l, within the years
// history.MinYear..MaxYear.
func readDate(s string, l tabular.DateLayout, bad func(string, string, ...any) *tabular.Error, col string) (time.Time, *tabular.Error) {
	if s == "" {
		return time.Time{}, bad(col, "empty: want a date in the layout %s", l)
	}
	t, err := l.Parse(s)
	if err != nil {
		return time.Time{}, bad(col, "%v", err)
	}
	if y := t.Year(); y < history.MinYear || y > history.MaxYear {
		return time.Time{}, bad(col, "%q: want a date in the years %d to %d", s, history.MinYear, history.MaxYear)
	}
	return t, nil
}

// layouts finds the date layouts of the order and receipt columns: the
// given one for both, else the one layout that reads every date of both
// columns, else one per column. Cells that read in no layout are left to
// the row checks.
func layouts(name string, recs []record, opt Options) (tabular.DateLayout, tabular.DateLayout, error) {
	if opt.Dates != "" && opt.Dates != tabular.DateAuto {
		return opt.Dates, opt.Dates, nil
	}
	var ord, rec []tabular.DateSample
	for i := range recs {
		x := &recs[i]
		if readsSome(x.cells[1]) {
			ord = append(ord, tabular.DateSample{Text: x.cells[1], Line: x.line})
		}
		if readsSome(x.cells[2]) {
			rec = append(rec, tabular.DateSample{Text: x.cells[2], Line: x.line})
		}
	}
	both := append(append([]tabular.DateSample{}, ord...), rec...)
	l, jointErr := tabular.DetectDates(name, ColOrder+"/"+ColReceipt, both)
	if jointErr == nil {
		return l, l, nil
	}
	lo, err1 := tabular.DetectDates(name, ColOrder, ord)
	lr, err2 := tabular.DetectDates(name, ColReceipt, rec)
	if err1 == nil && err2 == nil && len(ord) > 0 && len(rec) > 0 {
		return lo, lr, nil
	}
	return "", "", renameFlag(jointErr, opt.DateFlag)
}

// readsSome reports whether s reads as a date in some layout.
func readsSome(s string) bool {
	if s == "" {
		return false
	}
	for _, l := range tabular.DateLayouts {
		if t, err := l.Parse(s); err == nil && (l != tabular.DateSerial || t.Year() < 2200) {
			return true
		}
	}
	return false
}

// renameFlag makes a date-detection message name the option that sets the
// receipts' layout.
func renameFlag(err error, flag string) error {
	var te *tabular.Error
	if flag == "" || flag == "--date-format" || !errors.As(err, &te) {
		return err
	}
	return &tabular.Error{File: te.File, Line: te.Line, Column: te.Column,
		Err: errors.New(strings.ReplaceAll(te.Err.Error(), "--date-format", flag))}
}
