package whatif

import (
	"bufio"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"net/http"
	"runtime"
	"strconv"
	"strings"
	"sync"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/policies"
	"ergostock/policies/batch"
	"ergostock/policies/report"
)

// Catalogue is what the page lists: the rows of a results file joined by
// planning key (the SKU, or the SKU and location of a run by location)
// with the items file (for the inputs and the policy in use) and the
// history (for the series and its fit).
type Catalogue struct {
	Period  string // of the history: day, week or month
	entries []*entry
	bySKU   map[string]*entry // by planning key (batch.PlanKey)
	hist    map[string]*history.SKU
	h       *history.History
	// Uncertainty says whether the results carry a regret column.
	Uncertainty bool
	// ByLocation says that the results were planned by (sku, location):
	// items are found by both and decisions carry a location.
	ByLocation bool
}

// entry is one item of the catalogue.
type entry struct {
	Summary
	inputs  map[string]string
	current *policies.Policy
	rec     *policies.Policy
	mode    inventory.Mode
}

// PolicyJSON is a policy as evaluate's JSON writes it: its type and the
// levels that apply to it.
type PolicyJSON struct {
	Type          policies.Kind `json:"type"`
	ReorderPoint  *int          `json:"reorder_point,omitempty"`
	OrderUpTo     *int          `json:"order_up_to,omitempty"`
	OrderMultiple *int          `json:"order_multiple,omitempty"`
}

func policyJSON(p *policies.Policy) *PolicyJSON {
	if p == nil {
		return nil
	}
	o := &PolicyJSON{Type: p.Kind}
	s, S, q := p.ReorderPoint, p.OrderUpTo, p.OrderMultiple
	switch p.Kind {
	case policies.BaseStock:
		o.OrderUpTo = &S
	case policies.SS:
		o.ReorderPoint, o.OrderUpTo = &s, &S
	case policies.SNQ:
		o.ReorderPoint, o.OrderMultiple = &s, &q
	}
	return o
}

// Summary is one line of the item list.
//
// FillRateGap is the recommended policy's fill rate minus the current
// one's (positive: the levels in use serve less than recommended); Saving
// is the current total cost minus the recommended one, per period, as in
// the results file; Regret is the results' regret column, when it has one.
type Summary struct {
	SKU                string             `json:"sku"`
	Location           string             `json:"location,omitempty"`
	Pattern            string             `json:"pattern"`
	Demand             string             `json:"demand"`
	DemandMean         float64            `json:"demand_mean"`
	Unmet              inventory.Mode     `json:"unmet"`
	Recommended        *PolicyJSON        `json:"recommended"`
	RecommendedFigures *inventory.Figures `json:"recommended_figures"`
	Current            *PolicyJSON        `json:"current"`
	CurrentFigures     *inventory.Figures `json:"current_figures"`
	CurrentError       string             `json:"current_error,omitempty"`
	Saving             *float64           `json:"saving"`
	FillRateGap        *float64           `json:"fill_rate_gap"`
	Regret             *float64           `json:"regret"`
	Error              string             `json:"error,omitempty"`
	Warnings           []string           `json:"warnings"`
	Decision           *DecisionJSON      `json:"decision"`
	Version            int                `json:"version"`
}

// NewCatalogue joins the results rows with the items (by planning key,
// batch.PlanKey of the SKU and, in a run by location, the location; the
// first item of a key counts) and the history (nil when there is none). The
// inputs of an item are its costs and mode from the items file, the
// demand law of the results, and the lead time, lead-time model and
// review period of the results when they give them (else the items
// file's). regret,
// when not nil, holds the regret of each results row.
func NewCatalogue(rows []report.ResultRow, regret []*float64, items []batch.Item, h *history.History, period string) *Catalogue {
	c := &Catalogue{Period: period, bySKU: map[string]*entry{}, hist: map[string]*history.SKU{}, h: h, Uncertainty: regret != nil}
	byItem := map[string]*batch.Item{}
	for i := range items {
		if _, dup := byItem[items[i].Key()]; !dup {
			byItem[items[i].Key()] = &items[i]
		}
		c.ByLocation = c.ByLocation || items[i].Location != ""
	}
	if h != nil {
		for _, k := range h.SKUs {
			c.hist[batch.PlanKey(k.SKU, k.Location)] = k
		}
	}
	for i, r := range rows {
		if r.SKU == "" {
			continue
		}
		c.ByLocation = c.ByLocation || r.Location != ""
		if _, dup := c.bySKU[r.Key()]; dup {
			continue
		}
		e := &entry{Summary: Summary{SKU: r.SKU, Location: r.Location, Pattern: r.Pattern, Demand: r.Demand, DemandMean: r.DemandMean,
			RecommendedFigures: r.Figures, Saving: r.Saving, Error: r.Err, Warnings: r.Warnings}}
		if e.Warnings == nil {
			e.Warnings = []string{}
		}
		if r.Policy != nil {
			p := *r.Policy
			e.rec = &p
			e.Recommended = policyJSON(&p)
		}
		if regret != nil && i < len(regret) {
			e.Regret = regret[i]
		}
		e.inputs = map[string]string{}
		if r.Demand != "" {
			e.inputs["demand"] = r.Demand
		}
		if it := byItem[r.Key()]; it != nil {
			sys := it.System
			e.mode = sys.Mode
			e.Unmet = sys.Mode
			if sys.LeadTimeLaw != nil {
				e.inputs["lead_time"] = sys.LeadTimeLaw.String()
				e.inputs["lead_time_model"] = string(sys.Model())
			} else {
				e.inputs["lead_time"] = strconv.Itoa(sys.LeadTime)
			}
			if sys.ReviewPeriod > 1 {
				e.inputs["review_period"] = strconv.Itoa(sys.ReviewPeriod)
			}
			e.inputs["holding_cost"] = formatFloat(sys.Holding)
			e.inputs["shortage_cost"] = formatFloat(sys.Shortage)
			e.inputs["order_cost"] = formatFloat(sys.OrderCost)
			e.inputs["unit_cost"] = formatFloat(sys.UnitCost)
			e.inputs["unmet"] = string(sys.Mode)
			if it.MinFillRate > 0 {
				e.inputs["min_fill_rate"] = formatFloat(it.MinFillRate)
			}
			kind := it.Kind
			if e.rec != nil {
				kind = e.rec.Kind
			}
			if kind != "" {
				e.inputs["policy"] = string(kind)
			}
			if it.Current != nil {
				p := *it.Current
				e.current = &p
				e.Current = policyJSON(&p)
			}
		}
		// The timing the batch planned under (a law from receipts, say)
		// comes before the items file's.
		if r.LeadTime != "" {
			e.inputs["lead_time"] = r.LeadTime
			delete(e.inputs, "lead_time_model")
			if r.LeadTimeModel != "" && strings.Contains(r.LeadTime, ":") {
				e.inputs["lead_time_model"] = r.LeadTimeModel
			}
		}
		if r.ReviewPeriod > 1 {
			e.inputs["review_period"] = strconv.Itoa(r.ReviewPeriod)
		}
		c.entries = append(c.entries, e)
		c.bySKU[r.Key()] = e
	}
	return c
}

// key is the entry's planning key.
func (e *entry) key() string { return batch.PlanKey(e.SKU, e.Location) }

// itemName names an item in messages: sku "A", or sku "A" at location "north".
func itemName(sku, location string) string {
	if location == "" {
		return fmt.Sprintf("sku %q", sku)
	}
	return fmt.Sprintf("sku %q at location %q", sku, location)
}

// Len returns the number of items.
func (c *Catalogue) Len() int { return len(c.entries) }

// formatFloat prints the shortest decimal that reads back to v.
func formatFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// levelArgs are the flags of p's levels.
func levelArgs(p *policies.Policy) []string {
	switch p.Kind {
	case policies.BaseStock:
		return []string{"--order-up-to=" + strconv.Itoa(p.OrderUpTo)}
	case policies.SS:
		return []string{"--reorder-point=" + strconv.Itoa(p.ReorderPoint), "--order-up-to=" + strconv.Itoa(p.OrderUpTo)}
	}
	return []string{"--reorder-point=" + strconv.Itoa(p.ReorderPoint), "--order-multiple=" + strconv.Itoa(p.OrderMultiple)}
}

// systemArgs are the system flags of an item's inputs.
func (e *entry) systemArgs() []string {
	var args []string
	for _, k := range systemKeys {
		if v, ok := e.inputs[k]; ok {
			args = append(args, "--"+flagOf(k)+"="+v)
		}
	}
	return args
}

// EvaluateCurrent evaluates the policy in use of every item that has one
// and a demand model, with workers at once (0: all cores), each under the
// server's time limit, filling the current figures and the fill-rate gap
// of the list. An item whose evaluation fails keeps the message in
// CurrentError. Call it before the server takes requests: it writes the
// catalogue without a lock.
func (s *Server) EvaluateCurrent(ctx context.Context, workers int) {
	c := s.cfg.Catalogue
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var wg sync.WaitGroup
	next := make(chan *entry)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for e := range next {
				a, err := s.runEngine(ctx, "evaluate", append(e.systemArgs(), levelArgs(e.current)...), false)
				if err != nil {
					e.CurrentError = oneLine(err.Error())
					continue
				}
				var fig inventory.Figures
				if err := json.Unmarshal(a.JSON, &fig); err != nil {
					e.CurrentError = "evaluate: " + err.Error()
					continue
				}
				e.CurrentFigures = &fig
				if e.RecommendedFigures != nil {
					g := e.RecommendedFigures.FillRate - fig.FillRate
					e.FillRateGap = &g
				}
			}
		}()
	}
	for _, e := range c.entries {
		if e.current != nil && e.inputs["demand"] != "" && e.Error == "" {
			next <- e
		}
	}
	close(next)
	wg.Wait()
}

// ReadRegret finds a column named regret (or starting with "regret") in a
// results file and returns its values by row (nil for an empty cell); nil
// and false when there is no such column. A cell that is not a finite
// number is an error naming the file, the line and the column.
func ReadRegret(r io.Reader, name string) ([]*float64, bool, error) {
	br := bufio.NewReader(r)
	if b, err := br.Peek(3); err == nil && string(b) == "\ufeff" {
		br.Discard(3)
	}
	offset := 0
	if b, err := br.Peek(1); err == nil && b[0] == '#' {
		if _, err := br.ReadString('\n'); err != nil && err != io.EOF {
			return nil, false, fmt.Errorf("%s: %w", name, err)
		}
		offset = 1
	}
	cr := csv.NewReader(br)
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err != nil {
		return nil, false, nil
	}
	col := -1
	for i, h := range header {
		if strings.HasPrefix(strings.ToLower(strings.TrimSpace(h)), "regret") {
			col = i
			break
		}
	}
	if col < 0 {
		return nil, false, nil
	}
	var out []*float64
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return out, true, nil
		}
		if err != nil {
			return nil, false, fmt.Errorf("%s: %w", name, err)
		}
		line, _ := cr.FieldPos(0)
		var v *float64
		if col < len(rec) {
			if s := strings.TrimSpace(rec[col]); s != "" {
				x, err := strconv.ParseFloat(s, 64)
				if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
					return nil, false, fmt.Errorf("%s:%d: %s %q: want a finite number or an empty cell", name, line+offset, header[col], s)
				}
				v = &x
			}
		}
		out = append(out, v)
	}
}

// summaries returns the list with each item's latest decision.
func (s *Server) summaries() []Summary {
	out := make([]Summary, 0, len(s.cfg.Catalogue.entries))
	latest := s.store.latestAll()
	for _, e := range s.cfg.Catalogue.entries {
		sm := e.Summary
		if d, ok := latest[e.key()]; ok {
			sm.Decision, sm.Version = decisionJSON(d), d.Version
		}
		out = append(out, sm)
	}
	return out
}

// items is GET /api/items.
func (s *Server) items(w http.ResponseWriter, r *http.Request) {
	writeJSON(w, http.StatusOK, map[string]any{
		"period":      s.cfg.Catalogue.Period,
		"uncertainty": s.cfg.Catalogue.Uncertainty,
		"by_location": s.cfg.Catalogue.ByLocation,
		"items":       s.summaries(),
	})
}

// HistoryJSON is an item's demand series.
type HistoryJSON struct {
	Period  string   `json:"period"`
	Labels  []string `json:"labels"`
	Demand  []int    `json:"demand"`
	Records int      `json:"records"`
}

// FitJSON is the fit of an item's series: the figures of the series, the
// candidates by AICc and the chosen model.
type FitJSON struct {
	Periods    int             `json:"periods"`
	Mean       float64         `json:"mean"`
	Variance   float64         `json:"variance"`
	Pattern    string          `json:"pattern"`
	Chosen     string          `json:"chosen"`
	Demand     string          `json:"demand"`
	Candidates []CandidateJSON `json:"candidates"`
	Warnings   []string        `json:"warnings"`
	Error      string          `json:"error,omitempty"`
}

// CandidateJSON is one fitted model.
type CandidateJSON struct {
	Model         string   `json:"model"`
	LogLikelihood float64  `json:"log_likelihood"`
	AICc          *float64 `json:"aicc"`
}

// detail is GET /api/items/{sku} (with ?location=LOC in a run by
// location).
type detail struct {
	Summary
	Inputs  map[string]string `json:"inputs"`
	History *HistoryJSON      `json:"history"`
	Fit     *FitJSON          `json:"fit"`
}

func (s *Server) item(w http.ResponseWriter, r *http.Request) {
	sku, loc := r.PathValue("sku"), r.URL.Query().Get("location")
	c := s.cfg.Catalogue
	key := batch.PlanKey(sku, loc)
	e, ok := c.bySKU[key]
	if !ok {
		msg := itemName(sku, loc) + ": not in the results file"
		if c.ByLocation && loc == "" {
			msg += " (planned by sku and location: give ?location=LOC)"
		}
		s.fail(w, r, http.StatusNotFound, msg)
		return
	}
	d := detail{Summary: e.Summary, Inputs: e.inputs}
	if dec, ok := s.store.latest(key); ok {
		d.Decision, d.Version = decisionJSON(dec), dec.Version
	}
	if k := c.hist[key]; k != nil && len(k.Demand) > 0 {
		hj := &HistoryJSON{Period: c.Period, Demand: k.Demand, Records: k.Records}
		for i := range k.Demand {
			hj.Labels = append(hj.Labels, c.h.Label(k.Start+i))
		}
		d.History = hj
		fit, err := k.Fit()
		fj := &FitJSON{Periods: fit.Periods, Mean: fit.Mean, Variance: fit.Variance, Pattern: string(fit.Pattern),
			Chosen: fit.Model(), Warnings: fit.Warnings, Candidates: []CandidateJSON{}}
		if fj.Warnings == nil {
			fj.Warnings = []string{}
		}
		if fit.Demand != nil {
			fj.Demand = fit.Demand.String()
		}
		if err != nil {
			fj.Error = oneLine(err.Error())
		}
		for _, cd := range fit.Candidates {
			cj := CandidateJSON{Model: cd.Model, LogLikelihood: cd.LogLikelihood}
			if !math.IsInf(cd.AICc, 0) && !math.IsNaN(cd.AICc) {
				v := cd.AICc
				cj.AICc = &v
			}
			if math.IsInf(cj.LogLikelihood, 0) || math.IsNaN(cj.LogLikelihood) {
				cj.LogLikelihood = 0
			}
			fj.Candidates = append(fj.Candidates, cj)
		}
		d.Fit = fj
	}
	writeJSON(w, http.StatusOK, d)
}
