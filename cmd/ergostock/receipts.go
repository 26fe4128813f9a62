package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/gocarina/gocsv"
	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/inventory/receipts"
	"ergostock/inventory/tabular"
	"ergostock/policies/batch"
)

// receiptsHelp states what --receipts does and assumes, for --help.
const receiptsHelp = `Lead times from receipts (--receipts FILE): a table with columns sku,
order_date, receipt_date and optionally supplier, quantity and order_ref (the
order a receipt belongs to). Each order's lead time is the number of planning
periods between the period of its order date and that of its receipt date (a
receipt in the period of its order is lead time 0; the model lets a receipt
serve all of its period's demand, so weekly or monthly periods read lead
times slightly short). An order received in parts counts once, at its last
receipt. A SKU with fewer than 5 orders (a rule of thumb) pools the orders of
its suppliers; without a supplier it keeps its lead_time. Orders far from
the others (Tukey's far-out fences on the days) are left out with a warning.
A law that sequential deliveries cannot realise is replaced by the nearest
one they admit, with both means in a warning. Receipts describe the past:
check the laws against what the suppliers promise now, and follow local
practice and regulation for critical items.`

// receiptsFlags are the options of --receipts, shared by fit and batch.
func receiptsFlags() []cli.Flag {
	return []cli.Flag{
		&cli.StringFlag{Name: "receipts", Usage: "goods receipts `FILE` (sku, order_date, receipt_date; optionally supplier, quantity, order_ref): each SKU's lead-time law in planning periods"},
		&cli.StringFlag{Name: "receipts-columns", Usage: "the receipts file's own column names, e.g. \"sku=Item No,order_date=PO Date,receipt_date=GRN Date\""},
		&cli.StringFlag{Name: "receipts-date-format", Usage: "date layout of the receipts file: auto, YYYY-MM-DD, DD.MM.YYYY, DD/MM/YYYY, MM/DD/YYYY, YYYYMMDD or serial", Value: "auto"},
	}
}

// receiptsOptions reads the receipts flags; errors are usage errors.
func receiptsOptions(c *cli.Context, p history.Period) (receipts.Options, error) {
	opt := receipts.Options{Period: p, DateFlag: "--receipts-date-format", ColumnsFlag: "--receipts-columns"}
	m, err := tabular.ParseColumnMap("--receipts-columns", c.String("receipts-columns"), receipts.Columns)
	if err != nil {
		return opt, usageErr("%v", err)
	}
	opt.Columns = m
	l, err := tabular.ParseDateLayout(c.String("receipts-date-format"))
	if err != nil {
		return opt, usageErr("--receipts-date-format %q: %v", c.String("receipts-date-format"), err)
	}
	opt.Dates = l
	return opt, nil
}

// readReceiptsFile reads the receipts (a file, or standard input for "-")
// and returns them with the digest of the file's bytes.
func readReceiptsFile(ctx context.Context, stdin io.Reader, path string, opt receipts.Options) (f *receipts.File, digest string, err error) {
	if path == "-" {
		h := batch.NewDigest()
		f, err = receipts.Read(io.TeeReader(ctxReader{ctx, stdin}, h), "stdin", opt)
		if err == nil {
			_, err = io.Copy(h, ctxReader{ctx, stdin})
		}
		return f, batch.DigestSum(h), err
	}
	digest, err = readDigested(ctx, "receipts", path, func(r io.Reader) (err error) {
		f, err = receipts.Read(r, path, opt)
		return err
	})
	return f, digest, err
}

// receiptsNoLaw refuses a receipts file in which no row is usable, naming
// the first refused row.
func receiptsNoLaw(f *receipts.File) error {
	var first *tabular.Error
	bad := len(f.Errors)
	if bad > 0 {
		first = f.Errors[0]
	}
	for _, k := range f.SKUs {
		if len(k.Orders) > 0 {
			return nil
		}
		bad += len(k.Errors)
		if len(k.Errors) > 0 && (first == nil || k.Errors[0].Line < first.Line) {
			first = k.Errors[0]
		}
	}
	if first == nil {
		return fmt.Errorf("%s: no data rows, want rows of sku, order_date and receipt_date", f.Name)
	}
	return fmt.Errorf("%s: no usable receipt in %d data rows (%d refused); the first: %w", f.Name, f.Rows, bad, first)
}

// fitReceipts is fit --receipts: each SKU's lead-time law with its counts.
func fitReceipts(c *cli.Context, period history.Period) error {
	opt, err := receiptsOptions(c, period)
	if err != nil {
		return err
	}
	path := c.String("receipts")
	f, _, err := readReceiptsFile(c.Context, c.App.Reader, path, opt)
	if err != nil {
		return err
	}
	if err := receiptsNoLaw(f); err != nil {
		return err
	}
	stderr := c.App.ErrWriter
	for _, e := range f.Errors {
		fmt.Fprintf(stderr, "ergostock: warning: receipt row skipped: %v\n", e)
	}
	laws := f.Laws()
	switch {
	case c.Bool("json"):
		err = receiptsWriteJSON(c.App.Writer, f, laws)
	case c.IsSet("out"):
		err = fitWriteAtomic(c.String("out"), func(w io.Writer) error { return receiptsWriteCSV(w, laws) })
	default:
		err = receiptsWriteTable(c.App.Writer, laws)
	}
	if err != nil {
		return err
	}
	var own, pooled, few, none, orders, refused int
	refused = len(f.Errors)
	for i := range laws {
		switch laws[i].Source {
		case receipts.Own:
			own++
		case receipts.Pooled:
			pooled++
		case receipts.Few:
			few++
		default:
			none++
		}
		orders += laws[i].Orders
		refused += len(f.SKUs[i].Errors)
	}
	notes := ""
	if refused > 0 {
		notes = fmt.Sprintf("; rows refused: %d", refused)
	}
	dates := string(f.OrderDates)
	if f.ReceiptDates != f.OrderDates {
		dates += " and " + string(f.ReceiptDates)
	}
	fmt.Fprintf(stderr, "fit: %d SKUs from %s (%s; dates %s; lead times in %s periods): %d orders in %d rows; laws from own orders: %d, pooled by supplier: %d, on too few receipts (not used): %d, none: %d%s\n",
		len(laws), f.Name, f.Dialect, dates, f.Period, orders, f.Rows, own, pooled, few, none, notes)
	if none > 0 {
		return &exitError{code: 3, err: fmt.Errorf("%d of %d SKUs have no lead-time law", none, len(laws))}
	}
	return nil
}

// lawText is the law a SKU is planned with under the sequential model
// (the nearest admissible one), "" without one.
func lawText(l *receipts.Law) string {
	if l.Admissible == nil {
		return ""
	}
	return l.Admissible.String()
}

func receiptsWriteTable(w io.Writer, laws []receipts.Law) error {
	tw := newTable(w)
	fmt.Fprintln(tw, "sku\torders\tbasis\tcounts\tlead_time\tmean\twarnings")
	for i := range laws {
		l := &laws[i]
		basis := string(l.Source)
		switch l.Source {
		case receipts.Pooled:
			basis = "supplier " + strings.Join(l.Suppliers, "+")
		case receipts.Few:
			basis = "few, not used"
		}
		law, mean, counts := "-", "-", l.CountsText()
		if l.Admissible != nil {
			law, mean = leadBrief(lawText(l)), fitShort(l.Admissible.Mean())
		}
		if counts == "" {
			counts = "-"
		}
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\t%s\n", l.SKU, l.Orders, basis, counts, law, mean, strings.Join(l.Warnings, "; "))
	}
	return tw.Flush()
}

// leadBrief writes a lead-time law for the table: a one-point law as its
// number, a short pmf in full with 4 digits, a long one as its range.
func leadBrief(spec string) string {
	if fixed, law, err := inventory.ParseLeadTime(spec); err == nil && law == nil {
		return strconv.Itoa(fixed)
	}
	body, ok := strings.CutPrefix(spec, "pmf:")
	if !ok {
		return spec
	}
	kvs := strings.Split(body, ",")
	if len(kvs) > 6 {
		return fitBrief(spec)
	}
	for i, kv := range kvs {
		k, v, _ := strings.Cut(kv, "=")
		if x, err := strconv.ParseFloat(v, 64); err == nil {
			kvs[i] = k + "=" + strconv.FormatFloat(x, 'g', 4, 64)
		}
	}
	return "pmf:" + strings.Join(kvs, ",")
}

type receiptsCountJSON struct {
	LeadTime int `json:"lead_time"`
	Orders   int `json:"orders"`
}

type receiptsOutlierJSON struct {
	Line int    `json:"line"`
	SKU  string `json:"sku"`
	Days int    `json:"days"`
}

type receiptsJSON struct {
	SKU          string                `json:"sku"`
	Orders       int                   `json:"orders"`
	Receipts     int                   `json:"receipts"`
	Partial      int                   `json:"orders_in_parts"`
	Source       string                `json:"source"`
	Suppliers    []string              `json:"suppliers"`
	Basis        int                   `json:"basis_orders"`
	Counts       []receiptsCountJSON   `json:"counts"`
	LeadTime     string                `json:"lead_time"`
	Mean         fitFloat              `json:"lead_time_mean"`
	Observed     string                `json:"observed"`
	ObservedMean fitFloat              `json:"observed_mean"`
	Realisable   bool                  `json:"sequential_realisable"`
	Usable       bool                  `json:"used_for_planning"`
	MeanDays     fitFloat              `json:"mean_days"`
	Outliers     []receiptsOutlierJSON `json:"outliers"`
	Refused      []string              `json:"refused_rows"`
	Warnings     []string              `json:"warnings"`
}

func receiptsWriteJSON(w io.Writer, f *receipts.File, laws []receipts.Law) error {
	out := make([]receiptsJSON, len(laws))
	for i := range laws {
		l := &laws[i]
		j := receiptsJSON{SKU: l.SKU, Orders: l.Orders, Receipts: l.Receipts, Partial: l.Partial,
			Source: string(l.Source), Suppliers: l.Suppliers, Basis: l.Basis, Counts: []receiptsCountJSON{},
			LeadTime: lawText(l), Usable: l.Usable(), Outliers: []receiptsOutlierJSON{},
			Refused: []string{}, Warnings: l.Warnings}
		if j.Suppliers == nil {
			j.Suppliers = []string{}
		}
		if j.Warnings == nil {
			j.Warnings = []string{}
		}
		for k, n := range l.Counts {
			if n > 0 {
				j.Counts = append(j.Counts, receiptsCountJSON{k, n})
			}
		}
		if l.Empirical != nil {
			j.Mean, j.Observed, j.ObservedMean = fitFloat(l.Admissible.Mean()), l.Empirical.String(), fitFloat(l.Empirical.Mean())
			j.Realisable, j.MeanDays = l.Realisable(), fitFloat(l.MeanDays)
		}
		for _, o := range l.Outliers {
			j.Outliers = append(j.Outliers, receiptsOutlierJSON{o.Order.LastLine, o.Order.SKU, o.Order.Days})
		}
		for _, e := range f.SKUs[i].Errors {
			j.Refused = append(j.Refused, e.Error())
		}
		out[i] = j
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(out)
}

// receiptsCSVRow is one row of fit --receipts --out.
type receiptsCSVRow struct {
	SKU        string `csv:"sku"`
	Orders     int    `csv:"orders"`
	Receipts   int    `csv:"receipts"`
	Partial    int    `csv:"orders_in_parts"`
	Source     string `csv:"source"`
	Suppliers  string `csv:"suppliers"`
	Basis      int    `csv:"basis_orders"`
	Counts     string `csv:"counts"`
	LeadTime   string `csv:"lead_time"`
	Mean       string `csv:"lead_time_mean"`
	Observed   string `csv:"observed"`
	Realisable bool   `csv:"sequential_realisable"`
	Usable     bool   `csv:"used_for_planning"`
	MeanDays   string `csv:"mean_days"`
	Warnings   string `csv:"warnings"`
}

func receiptsWriteCSV(w io.Writer, laws []receipts.Law) error {
	rows := make([]receiptsCSVRow, len(laws))
	for i := range laws {
		l := &laws[i]
		r := receiptsCSVRow{SKU: batch.Guard(l.SKU), Orders: l.Orders, Receipts: l.Receipts, Partial: l.Partial,
			Source: string(l.Source), Suppliers: batch.Guard(strings.Join(l.Suppliers, "; ")), Basis: l.Basis,
			Counts: l.CountsText(), LeadTime: lawText(l), Usable: l.Usable(),
			Warnings: batch.Guard(strings.Join(l.Warnings, "; "))}
		if l.Empirical != nil {
			r.Mean, r.Observed = fitNum(l.Admissible.Mean()), l.Empirical.String()
			r.Realisable, r.MeanDays = l.Realisable(), fitNum(l.MeanDays)
		}
		rows[i] = r
	}
	return gocsv.Marshal(rows, w)
}

// receiptsTally counts what applyReceipts did, for the summary line.
type receiptsTally struct{ set, kept, without, unmatched int }

// applyReceipts sets each item's lead time from its SKU's receipts and
// returns the warnings to add to each item's row, by item position. The
// law replaces the item's lead time, so the results row's lead_time column
// shows it, and the warning gives the counts behind it and the value it
// replaced; an item whose SKU has no usable law keeps its lead_time, with
// a warning, and an item without receipts keeps it silently (counted in
// the tally) unless the receipts hold a near miss of its SKU.
func applyReceipts(items []batch.Item, f *receipts.File) (map[int][]string, receiptsTally) {
	var tally receiptsTally
	laws := f.Laws()
	bySKU := make(map[string]*receipts.Law, len(laws))
	for i := range laws {
		bySKU[laws[i].SKU] = &laws[i]
	}
	// SKUs that differ only in case, surrounding spaces or leading zeros
	// (as tabular.Near matches them), to name a near miss.
	bySpelling := map[string][]string{}
	for i := range laws {
		k := spelling(laws[i].SKU)
		if len(bySpelling[k]) < 3 {
			bySpelling[k] = append(bySpelling[k], laws[i].SKU)
		}
	}
	used := map[string]bool{}
	notes := map[int][]string{}
	for i := range items {
		it := &items[i]
		if it.Err != nil {
			continue
		}
		l := bySKU[it.SKU]
		if l == nil {
			tally.without++
			if near := bySpelling[spelling(it.SKU)]; len(near) > 0 {
				notes[it.Index] = []string{fmt.Sprintf("no receipts for this sku in %s, but it has %s: the same part spelt differently? lead_time %s kept",
					f.Name, quoteSKUs(near), itemLeadTime(it.System))}
			}
			continue
		}
		used[it.SKU] = true
		var w []string
		for _, x := range l.Warnings {
			w = append(w, "receipts: "+x)
		}
		fixed, law, ok := l.LeadTime(it.System.Model())
		if !ok {
			tally.kept++
			notes[it.Index] = append(w, "receipts give no usable lead-time law: lead_time "+itemLeadTime(it.System)+" kept")
			continue
		}
		tally.set++
		what := strconv.Itoa(fixed)
		if law != nil {
			what = law.String()
		}
		from := fmt.Sprintf("%d orders", l.Basis)
		if l.Source == receipts.Pooled {
			from = fmt.Sprintf("%d orders of supplier %s", l.Basis, strings.Join(l.Suppliers, "+"))
		}
		msg := fmt.Sprintf("lead_time from receipts: %s in %s, periods=orders %s", from, f.Name, l.CountsText())
		if cur := itemLeadTime(it.System); cur != what {
			msg += "; the items file said " + cur
		}
		it.System.LeadTime, it.System.LeadTimeLaw = fixed, law
		notes[it.Index] = append([]string{msg}, w...)
	}
	for i := range laws {
		if !used[laws[i].SKU] {
			tally.unmatched++
		}
	}
	return notes, tally
}

// spelling is the form in which two SKUs are a near miss of each other:
// lower case, surrounding spaces and leading zeros removed.
func spelling(sku string) string {
	s := strings.ToLower(strings.TrimSpace(sku))
	if t := strings.TrimLeft(s, "0"); t != "" {
		return t
	}
	return s
}

func quoteSKUs(s []string) string {
	q := make([]string, len(s))
	for i, x := range s {
		q[i] = strconv.Quote(x)
	}
	return "receipts for " + strings.Join(q, ", ")
}

// itemLeadTime writes an item's lead time as its column gives it: a
// number of periods or a law.
func itemLeadTime(s inventory.System) string {
	if s.LeadTimeLaw != nil {
		return s.LeadTimeLaw.String()
	}
	return strconv.Itoa(s.LeadTime)
}
