package report

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"ergostock/inventory"
	"ergostock/inventory/tabular"
	"ergostock/policies"
	"ergostock/policies/batch"
)

// ResultRow is one line of the results file of `ergostock batch`.
type ResultRow struct {
	Line int // in the file, for errors
	SKU  string
	// Location is the item's location in a run planned by (sku, location)
	// (the results' location column); "" otherwise.
	Location       string
	Demand         string // the demand model in the text grammar; "" if unknown
	DemandMean     float64
	DemandVariance float64
	Pattern        string
	Policy         *policies.Policy   // nil when the item failed
	Figures        *inventory.Figures // nil when the item failed
	CurrentCost    *float64           // total cost of the policy in use, if given
	Saving         *float64           // current minus recommended total cost
	// The policy in use and its fill rate, if given (files written before
	// these columns existed have neither).
	Current         *policies.Policy
	CurrentFillRate *float64
	Warnings        []string
	Err             string
	// Uncertainty holds the resampling columns of a run with
	// --uncertainty; nil without them or for an item without figures.
	Uncertainty *ResultUncertainty
	// The timing the item was planned under (columns lead_time,
	// lead_time_model and review_period, see batch.TimingColumns); empty
	// and 0 in files written before they were added.
	LeadTime      string
	LeadTimeModel string
	ReviewPeriod  int
}

// resultColumns are the columns the report needs from a results file.
var resultColumns = append([]string{"sku", "demand", "demand_mean", "demand_variance", "pattern",
	"policy", "reorder_point", "order_up_to", "order_multiple"}, figureNames()...)

var resultTail = []string{"current_total_cost", "saving", "warnings", "error"}

func figureNames() []string {
	var n []string
	for _, f := range (inventory.Figures{}).Fields() {
		n = append(n, f.Name)
	}
	return n
}

// ErrNotResults is wrapped by the error of ReadResults for a file that is
// not a results file of `ergostock batch`.
var ErrNotResults = errors.New("not a results file of ergostock batch")

// Results is a results file of `ergostock batch`.
type Results struct {
	// Meta is the header record (planning period, digests of the inputs);
	// nil for a file written before there was one (format v1).
	Meta *batch.Meta
	Rows []ResultRow
	// ByLocation is true when the file has a location column: the run
	// planned by (sku, location) and ResultRow.Key is the planning key.
	ByLocation bool
}

// Key is the row's planning key, batch.PlanKey(SKU, Location): the key
// of the item it was planned for.
func (r ResultRow) Key() string { return batch.PlanKey(r.SKU, r.Location) }

// Name is the row's SKU, with its location after " @ " in a run by
// location, for lists and messages.
func (r ResultRow) Name() string {
	if r.Location == "" {
		return r.SKU
	}
	return r.SKU + " @ " + r.Location
}

// ReadResults reads the rows of a results file; see ReadResultsFile.
func ReadResults(r io.Reader, name string) ([]ResultRow, error) {
	res, err := ReadResultsFile(r, name)
	if err != nil {
		return nil, err
	}
	return res.Rows, nil
}

// ReadResultsFile reads the results file of `ergostock batch` from r; name
// is the file name used in errors. A first line starting with "#" is the
// header record (batch.Meta). The table is read by inventory/tabular, so
// every dialect batch writes is read: ',' ';' or tab delimited, decimal
// point or comma (the header record's decimal= key; without a header
// record a comma-delimited file has decimal points and the mark of
// another is found from its numbers), a UTF-8 byte-order mark, CRLF, and
// workbooks (.xlsx, see ReadResultsWorkbook). Columns are found by their
// header names (extra columns, such as carried item columns, are ignored).
// Text cells are read back through batch.Unguard. A missing column, an
// unreadable number or policy, or an empty file is an error naming the
// file, the line and the column, in the style of encoding/csv's
// ParseError. Every file batch writes is read, including rows of items
// without a SKU (they failed).
func ReadResultsFile(r io.Reader, name string) (*Results, error) {
	br := bufio.NewReader(r)
	if head, _ := br.Peek(4); tabular.IsWorkbook(name, head) {
		return ReadResultsWorkbook(br, name)
	}
	if b, err := br.Peek(3); err == nil && string(b) == "\ufeff" {
		br.Discard(3)
	}
	res := &Results{}
	var body io.Reader = br
	if b, err := br.Peek(1); err == nil && b[0] == '#' {
		line, err := br.ReadString('\n')
		if err != nil && err != io.EOF {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		m, err := batch.ParseMeta(line, name, 1)
		if err != nil {
			return nil, err
		}
		res.Meta = m
		// A blank line stands in for the header record, which the table
		// reader skips, so that its line numbers are the file's.
		body = io.MultiReader(strings.NewReader("\n"), br)
	}
	tr, err := tabular.NewReader(body, name, tabular.Options{})
	if err != nil {
		if strings.Contains(err.Error(), "no header line") {
			return nil, fmt.Errorf("%s: empty file: %w (want a header with columns %s, ...)", name, ErrNotResults, strings.Join(resultColumns[:6], ", "))
		}
		return nil, err
	}
	return readResultsTable(tr, res)
}

// decimalOf returns the decimal mark of a results table: the header
// record's (a file batch wrote says decimal=comma when it has commas),
// else '.' in a comma-delimited file, else found from the numbers.
func decimalOf(tr *tabular.Reader, m *batch.Meta) byte {
	switch {
	case m != nil && m.Cells.Decimal == ',':
		return ','
	case m != nil, tr.Dialect.Format == "xlsx", tr.Dialect.Delimiter == ',':
		return '.'
	}
	return 0
}

// readResultsTable reads the rows of a results table whose header record,
// if any, is in res.Meta.
func readResultsTable(tr *tabular.Reader, res *Results) (*Results, error) {
	name := tr.Name
	nums := tabular.Numbers{Decimal: decimalOf(tr, res.Meta), File: name}
	col := map[string]int{}
	for i, h := range tr.Header {
		h = tabular.Normalize(h)
		if _, dup := col[h]; !dup {
			col[h] = i
		}
	}
	var missing []string
	for _, c := range append(append([]string(nil), resultColumns...), resultTail...) {
		if _, ok := col[c]; !ok {
			missing = append(missing, c)
		}
	}
	if len(missing) > 0 {
		list := strings.Join(missing, ", ")
		if len(missing) > 3 {
			list = strings.Join(missing[:3], ", ") + fmt.Sprintf(" and %d more", len(missing)-3)
		}
		noun := "column"
		if len(missing) > 1 {
			noun = "columns"
		}
		return nil, fmt.Errorf("%s:%d: missing %s %s: %w (want its header: sku, demand, ..., error)", name, tr.HeaderLine, noun, list, ErrNotResults)
	}
	_, res.ByLocation = col["location"]
	var rows []ResultRow
	for {
		rec, line, err := tr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		cell := func(c string) string {
			if i, ok := col[c]; ok && i < len(rec) {
				return strings.TrimSpace(rec[i])
			}
			return ""
		}
		text := func(c string) string { return batch.Unguard(cell(c)) }
		bad := func(c, want string) error {
			return fmt.Errorf("%s:%d: %s %q: want %s", name, line, c, cell(c), want)
		}
		number := func(c string) (float64, bool, error) {
			s := cell(c)
			if s == "" {
				return 0, false, nil
			}
			v, err := nums.Parse(s, line)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, false, bad(c, "a finite number or an empty cell")
			}
			return v, true, nil
		}
		integer := func(c string) (int, error) {
			s := cell(c)
			if s == "" {
				return 0, nil
			}
			v, err := strconv.Atoi(s)
			if err != nil {
				return 0, bad(c, "a whole number or an empty cell")
			}
			return v, nil
		}
		row := ResultRow{Line: line, SKU: text("sku"), Demand: text("demand"), Pattern: text("pattern"), Err: text("error")}
		if row.SKU == "" && row.Err == "" {
			return nil, bad("sku", "a SKU (only a failed item may lack one)")
		}
		if row.DemandMean, _, err = number("demand_mean"); err != nil {
			return nil, err
		}
		if row.DemandVariance, _, err = number("demand_variance"); err != nil {
			return nil, err
		}
		if w := text("warnings"); w != "" {
			for _, s := range strings.Split(w, "; ") {
				if s = strings.TrimSpace(s); s != "" {
					row.Warnings = append(row.Warnings, s)
				}
			}
		}
		if kind := text("policy"); kind != "" {
			p := policies.Policy{Kind: policies.Kind(kind)}
			if p.ReorderPoint, err = integer("reorder_point"); err != nil {
				return nil, err
			}
			if p.OrderUpTo, err = integer("order_up_to"); err != nil {
				return nil, err
			}
			if p.OrderMultiple, err = integer("order_multiple"); err != nil {
				return nil, err
			}
			switch p.Kind {
			case policies.BaseStock, policies.SS, policies.SNQ:
			default:
				return nil, bad("policy", "base-stock, s-S or s-nQ")
			}
			row.Policy = &p
			vals := make([]float64, 0, len(figureNames()))
			for _, c := range figureNames() {
				v, ok, err := number(c)
				if err != nil {
					return nil, err
				}
				if !ok {
					return nil, bad(c, "a number for an item with a policy")
				}
				vals = append(vals, v)
			}
			f := inventory.FromFields(vals)
			row.Figures = &f
		}
		// Optional: files written before these columns lack them.
		opt := func(c string) string {
			if _, has := col[c]; has {
				return text(c)
			}
			return ""
		}
		row.Location = opt("location")
		row.LeadTime, row.LeadTimeModel = opt("lead_time"), opt("lead_time_model")
		if row.LeadTime != "" {
			if _, _, err := inventory.ParseLeadTime(row.LeadTime); err != nil {
				return nil, bad("lead_time", "a whole number of periods or a lead-time law")
			}
		}
		if row.LeadTimeModel != "" {
			if _, err := inventory.ParseLeadTimeModel(row.LeadTimeModel); err != nil {
				return nil, bad("lead_time_model", "sequential or independent")
			}
		}
		if _, has := col["review_period"]; has {
			if row.ReviewPeriod, err = integer("review_period"); err != nil {
				return nil, err
			}
		}
		if row.ReviewPeriod < 0 {
			return nil, bad("review_period", "a whole number of periods >= 1 or an empty cell")
		}
		if v, ok, err := number("current_total_cost"); err != nil {
			return nil, err
		} else if ok {
			row.CurrentCost = &v
		}
		if v, ok, err := number("saving"); err != nil {
			return nil, err
		} else if ok {
			row.Saving = &v
		}
		// The current policy's columns, in files since they were added.
		if kind := text("current_policy"); kind != "" {
			p := policies.Policy{Kind: policies.Kind(kind)}
			if p.ReorderPoint, err = integer("current_reorder_point"); err != nil {
				return nil, err
			}
			if p.OrderUpTo, err = integer("current_order_up_to"); err != nil {
				return nil, err
			}
			if p.OrderMultiple, err = integer("current_order_multiple"); err != nil {
				return nil, err
			}
			switch p.Kind {
			case policies.BaseStock, policies.SS, policies.SNQ:
			default:
				return nil, bad("current_policy", "base-stock, s-S or s-nQ")
			}
			row.Current = &p
		}
		if v, ok, err := number("current_fill_rate"); err != nil {
			return nil, err
		} else if ok {
			row.CurrentFillRate = &v
		}
		if u, err := readUncertainty(col, number); err != nil {
			return nil, err
		} else {
			row.Uncertainty = u
		}
		rows = append(rows, row)
	}
	if len(rows) == 0 {
		return nil, fmt.Errorf("%s: no items after the header: want at least one row of results", name)
	}
	res.Rows = rows
	return res, nil
}

// maxResultsWorkbook bounds a results workbook read into memory.
const maxResultsWorkbook = 512 << 20

// ReadResultsWorkbook reads a results workbook written by `ergostock batch
// --out FILE.xlsx`: the rows from its sheet "results" (numbers stored as
// numbers, read back exactly), the header record from its sheet "run"
// (its first cell). Both sheets go through inventory/tabular's workbook
// reader; errors name the file, the sheet and the row.
func ReadResultsWorkbook(r io.Reader, name string) (*Results, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxResultsWorkbook+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if len(data) > maxResultsWorkbook {
		return nil, fmt.Errorf("%s: a workbook larger than %d MiB: write the results as CSV instead", name, maxResultsWorkbook>>20)
	}
	res := &Results{}
	if run, err := tabular.NewWorkbookReader(bytes.NewReader(data), name, tabular.Options{Sheet: batch.RunSheet}); err == nil {
		if len(run.Header) > 0 && strings.HasPrefix(run.Header[0], batch.MetaPrefix) {
			m, err := batch.ParseMeta(run.Header[0], run.Name, run.HeaderLine)
			if err != nil {
				return nil, err
			}
			res.Meta = m
		}
	}
	tr, err := tabular.NewWorkbookReader(bytes.NewReader(data), name, tabular.Options{Sheet: batch.ResultsSheet})
	if err != nil {
		return nil, fmt.Errorf("%w (%w)", err, ErrNotResults)
	}
	return readResultsTable(tr, res)
}
