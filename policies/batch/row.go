package batch

import (
	"encoding/csv"
	"io"
	"strconv"
	"strings"

	"ergostock/inventory"
	"ergostock/policies"
)

// Row is the plan of one item: one line of the results file.
type Row struct {
	Item int    // 0-based position in the items file
	SKU  string // as in the items file

	// The demand model, when known: set from the item's demand column or
	// from the fit of its history.
	Demand         string // the model in the text grammar; "" when unknown
	DemandMean     float64
	DemandVariance float64
	Pattern        string // of the history; "" without one

	// The timing the item was planned under (see SetTiming): the lead
	// time as a whole number of periods or a law in the demand grammar,
	// the lead-time model and the review period; "" and 0 when unknown
	// (an item that failed before its system was read).
	LeadTime      string
	LeadTimeModel string
	ReviewPeriod  int

	// The cheapest policy and what it delivers; nil when the item failed.
	Policy  *policies.Policy
	Figures *inventory.Figures
	// The cost of the policy in use; nil without one or when the item failed.
	CurrentTotalCost *float64
	// The policy in use and its fill rate; nil without one or when the
	// item failed (see currentColumns).
	Current         *policies.Policy
	CurrentFillRate *float64

	States    int     // states of the chosen policy's chain
	Residual  float64 // of its stationary solve, ||pi P - pi||_1
	Balance   float64 // of its stationary solve, max |flow out - flow in| over states
	Neglected float64 // mass left out by any truncation
	Evaluated int     // policies evaluated by the search

	Warnings []string
	Err      error // why the item failed; nil when it did not

	Carried []string // the item's carried columns (see Carry), last in the row
	// Uncertainty holds the resampling cells of a run with --uncertainty
	// (see UncertaintyHeader); nil otherwise or when the analysis failed.
	Uncertainty *UncertaintyCells
}

// SetTiming records the lead time, the lead-time model and the review
// period of sys in the row (columns lead_time, lead_time_model and
// review_period).
func (r *Row) SetTiming(sys inventory.System) {
	r.LeadTime = strconv.Itoa(sys.LeadTime)
	if sys.LeadTimeLaw != nil {
		r.LeadTime = sys.LeadTimeLaw.String()
	}
	r.LeadTimeModel = string(sys.Model())
	r.ReviewPeriod = sys.Review()
}

// Saving is the current policy's total cost minus the chosen one's, and
// whether both are known.
func (r *Row) Saving() (float64, bool) {
	if r.CurrentTotalCost == nil || r.Figures == nil {
		return 0, false
	}
	return *r.CurrentTotalCost - r.Figures.TotalCost, true
}

// TimingColumns are the columns of the timing an item was planned under,
// in this order right after the policy's levels: lead_time (a whole
// number of periods, or the law in the demand grammar, quoted as CSV
// quotes a cell with commas), lead_time_model (sequential or independent)
// and review_period (periods between reviews, 1 for every period).
var TimingColumns = []string{"lead_time", "lead_time_model", "review_period"}

// Header returns the column names of the results file.
func Header() []string {
	h := []string{"sku", "demand", "demand_mean", "demand_variance", "pattern",
		"policy", "reorder_point", "order_up_to", "order_multiple"}
	h = append(h, TimingColumns...)
	for _, f := range (inventory.Figures{}).Fields() {
		h = append(h, f.Name)
	}
	h = append(h, "current_total_cost", "saving", "warnings", "error",
		"states", "residual", "balance", "neglected", "policies_evaluated", "item")
	return append(h, currentColumns...)
}

// Writer writes the results file as CSV.
type Writer struct {
	out io.Writer
	w   *csv.Writer
	rec []string

	carry   []string   // carried item columns, after every results column
	format  Format     // how cells are written (see NewFormatWriter)
	kinds   []CellKind // of the header's columns, when format is not plain
	started bool       // the byte-order mark, if any, is written
	// Uncertainty, when not nil, appends the columns of
	// UncertaintyHeader(*Uncertainty) after the standard ones (true: with
	// the robust policy's); nil keeps the plain file.
	Uncertainty *bool
}

// NewWriter returns a Writer on w; call WriteMeta (optional) and
// WriteHeader first, and Flush last.
func NewWriter(w io.Writer) *Writer {
	return &Writer{out: w, w: csv.NewWriter(w)}
}

// WriteMeta writes the header record, the comment line that says what the
// results were computed from (see Meta). Call it before WriteHeader.
func (w *Writer) WriteMeta(m Meta) error {
	w.w.Flush()
	if err := w.w.Error(); err != nil {
		return err
	}
	if err := w.start(); err != nil {
		return err
	}
	m.Cells = w.format
	_, err := io.WriteString(w.out, m.String()+"\n")
	return err
}

// WriteHeader writes the header line.
func (w *Writer) WriteHeader() error {
	if err := w.start(); err != nil {
		return err
	}
	return w.w.Write(w.header())
}

// Write writes one row.
func (w *Writer) Write(r *Row) error {
	w.rec = r.appendRecord(w.rec[:0])
	if w.Uncertainty != nil {
		w.rec = r.Uncertainty.appendCells(w.rec, *w.Uncertainty)
	}
	w.rec = appendCarried(w.rec, r.Carried, len(w.carry))
	if !w.format.Plain() {
		if w.kinds == nil {
			w.header()
		}
		w.format.reformat(w.rec, w.kinds)
	}
	return w.w.Write(w.rec)
}

// Flush writes any buffered data and returns the first error met.
func (w *Writer) Flush() error {
	w.w.Flush()
	return w.w.Error()
}

// formatFloat prints the shortest decimal that reads back to v.
func formatFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// appendRecord appends the row's cells, in the order of Header.
func (r *Row) appendRecord(rec []string) []string {
	rec = append(rec, Guard(r.SKU), Guard(r.Demand))
	if r.Demand != "" {
		rec = append(rec, formatFloat(r.DemandMean), formatFloat(r.DemandVariance))
	} else {
		rec = append(rec, "", "")
	}
	rec = append(rec, Guard(r.Pattern))
	ok := r.Err == nil && r.Policy != nil && r.Figures != nil
	review := ""
	if r.ReviewPeriod > 0 {
		review = strconv.Itoa(r.ReviewPeriod)
	}
	if ok {
		p := r.Policy
		s, S, Q := "", "", ""
		switch p.Kind {
		case policies.BaseStock:
			S = strconv.Itoa(p.OrderUpTo)
		case policies.SS:
			s, S = strconv.Itoa(p.ReorderPoint), strconv.Itoa(p.OrderUpTo)
		case policies.SNQ:
			s, Q = strconv.Itoa(p.ReorderPoint), strconv.Itoa(p.OrderMultiple)
		}
		rec = append(rec, string(p.Kind), s, S, Q, Guard(r.LeadTime), Guard(r.LeadTimeModel), review)
		for _, f := range r.Figures.Fields() {
			rec = append(rec, formatFloat(f.Value))
		}
	} else {
		rec = append(rec, "", "", "", "", Guard(r.LeadTime), Guard(r.LeadTimeModel), review)
		for range (inventory.Figures{}).Fields() {
			rec = append(rec, "")
		}
	}
	cur, saving := "", ""
	if ok && r.CurrentTotalCost != nil {
		cur = formatFloat(*r.CurrentTotalCost)
		if v, has := r.Saving(); has {
			saving = formatFloat(v)
		}
	}
	errText := ""
	if r.Err != nil {
		errText = r.Err.Error()
	}
	rec = append(rec, cur, saving, Guard(strings.Join(r.Warnings, "; ")), Guard(errText))
	if ok {
		rec = append(rec, strconv.Itoa(r.States), formatFloat(r.Residual), formatFloat(r.Balance),
			formatFloat(r.Neglected), strconv.Itoa(r.Evaluated))
	} else {
		rec = append(rec, "", "", "", "", "")
	}
	rec = append(rec, strconv.Itoa(r.Item))
	return r.appendCurrent(rec)
}

// oneLine folds a message onto one line, so that every row of the results
// file is one line of text and line tools can split and merge it.
func oneLine(s string) string {
	if !strings.ContainsAny(s, "\r\n") {
		return s
	}
	return strings.NewReplacer("\r\n", " ", "\n", " ", "\r", " ").Replace(s)
}

// Guard makes a text cell safe for the results file: line breaks are
// folded into spaces (every row is one line of text), and a cell that a
// spreadsheet would run as a formula, one starting with =, +, - or @ (or a
// tab), gets a leading single quote, the usual guard against CSV
// injection (common practice, as recommended by OWASP). A cell that starts
// with a single quote gets one more, so that Unguard restores every cell
// exactly. Numeric cells are never guarded: -3 stays a number.
func Guard(s string) string {
	s = oneLine(s)
	if s == "" {
		return s
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\'':
		return "'" + s
	}
	return s
}

// Unguard undoes Guard on a text cell read from a results file: it drops
// one leading single quote.
func Unguard(s string) string { return strings.TrimPrefix(s, "'") }
