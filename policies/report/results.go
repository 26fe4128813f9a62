package report

import (
	"bufio"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/batch"
)

// ResultRow is one line of the results file of `ergostock batch`.
type ResultRow struct {
	Line           int // in the file, for errors
	SKU            string
	Demand         string // the demand model in the text grammar; "" if unknown
	DemandMean     float64
	DemandVariance float64
	Pattern        string
	Policy         *policies.Policy   // nil when the item failed
	Figures        *inventory.Figures // nil when the item failed
	CurrentCost    *float64           // total cost of the policy in use, if given
	Saving         *float64           // current minus recommended total cost
	Warnings       []string
	Err            string
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
// header record (batch.Meta). Columns are found by their header names
// (extra columns are ignored). Text cells are read back through
// batch.Unguard. A missing column, an unreadable number or policy, or an
// empty file is an error naming the file, the line and the column, in the
// style of encoding/csv's ParseError. Every file batch writes is read,
// including rows of items without a SKU (they failed).
func ReadResultsFile(r io.Reader, name string) (*Results, error) {
	br := bufio.NewReader(r)
	if b, err := br.Peek(3); err == nil && string(b) == "\ufeff" {
		br.Discard(3)
	}
	res := &Results{}
	offset := 0 // lines before the CSV header
	if b, err := br.Peek(1); err == nil && b[0] == '#' {
		line, err := br.ReadString('\n')
		if err != nil && err != io.EOF {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		m, err := batch.ParseMeta(line, name, 1)
		if err != nil {
			return nil, err
		}
		res.Meta, offset = m, 1
	}
	cr := csv.NewReader(br)
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fmt.Errorf("%s: empty file: %w (want a header with columns %s, ...)", name, ErrNotResults, strings.Join(resultColumns[:6], ", "))
	}
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	col := map[string]int{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
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
		return nil, fmt.Errorf("%s:%d: missing %s %s: %w (want its header: sku, demand, ..., error)", name, 1+offset, noun, list, ErrNotResults)
	}
	var rows []ResultRow
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				pe.StartLine += offset
				pe.Line += offset
			}
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		line, _ := cr.FieldPos(0)
		line += offset
		cell := func(c string) string {
			if i := col[c]; i < len(rec) {
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
			v, err := strconv.ParseFloat(s, 64)
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
