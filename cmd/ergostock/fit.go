package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/gocarina/gocsv"
	"github.com/urfave/cli/v2"

	"ergostock/inventory/history"
	"ergostock/policies/batch"
)

// fitCommand fits a demand model to each SKU of a history file.
func fitCommand() *cli.Command {
	return &cli.Command{
		Name:      "fit",
		Usage:     "fit a demand distribution to each SKU of a demand history, or a lead-time law to each SKU of a receipts file",
		UsageText: "ergostock fit (--history FILE | --receipts FILE) [--period day|week|month] [--json | --out FILE]",
		Description: "Reads a CSV with columns sku, date (YYYY-MM-DD) or an integer period, and quantity\n" +
			"(other columns ignored), sums it into periods, and for every SKU reports the mean,\n" +
			"variance, demand pattern (Syntetos-Boylan-Croston) and the candidate models\n" +
			"(poisson, negbin, normal, gamma, pmf) fitted by maximum likelihood, choosing the\n" +
			"one of least AICc (Akaike's criterion with the small-sample correction). Bad rows\n" +
			"are skipped with a warning; rows far from the bulk of a SKU's dates (a typo year)\n" +
			"are left out with a warning, and a SKU without a clear bulk gets no model.\n" +
			"FILE - reads standard input. Exit status 3 when some SKU gets no model (no\n" +
			"demand, no usable rows, no clear bulk), 1 when no SKU has a usable series.\n\n" +
			"With --receipts instead of --history, fit prints each SKU's lead-time law from its\n" +
			"receipts, with the orders counted per lead time (exit status 3 when some SKU has\n" +
			"no usable receipt).\n\n" + receiptsHelp,
		Flags: append(append([]cli.Flag{
			&cli.StringFlag{Name: "history", Usage: "demand history `FILE`, CSV in any common dialect or .xlsx (- for standard input)"},
			&cli.StringFlag{Name: "period", Usage: "review period for dated rows: day, week (ISO 8601, Monday first) or month; an integer period column is taken as it is", Value: "week"},
			&cli.BoolFlag{Name: "json", Usage: "print a JSON array, one object per SKU"},
			&cli.StringFlag{Name: "out", Usage: "write the results as CSV to `FILE` (atomically) instead of a table"},
			&cli.BoolFlag{Name: "by-location", Usage: "fit each (sku, location) of a history with a location column on its own (default: each SKU on the sum over its locations, as batch does for an items file without locations)"},
		}, receiptsFlags()...), append(tableFlags(), historyReadFlags()...)...),
		Action: fitAction,
	}
}

// fitResult is one SKU's fit as printed. The distributions themselves are
// not kept: an empirical pmf holds three numbers per support point (up to
// inventory.MaxSupport), so a catalogue of lot-sized items would need
// gigabytes; their strings are formatted as each SKU is fitted.
type fitResult struct {
	SKU      string
	Location string // with --by-location, else ""
	First    string
	Summary  history.Summary // Demand and Candidates[i].Demand cleared
	Demand   string          // the chosen model's SPEC, "" when none
	Specs    []string        // per candidate (with --json), "" when it cannot be built
	Err      error
}

func fitAction(c *cli.Context) error {
	if c.NArg() > 0 {
		return usageErr("fit: unexpected argument %q (see --help)", c.Args().First())
	}
	if c.IsSet("receipts") {
		return fitReceiptsAction(c)
	}
	path := c.String("history")
	if path == "" {
		return usageErr("--history: want the demand history CSV file (- for standard input)")
	}
	if c.Bool("json") && c.IsSet("out") {
		return usageErr("--json and --out: give one of them, not both")
	}
	if c.IsSet("out") && c.String("out") == "" {
		return usageErr("--out: want a file name")
	}
	period, err := history.ParsePeriod(c.String("period"))
	if err != nil {
		return usageErr("--%v", err)
	}
	opt, err := historyOptions(c)
	if err != nil {
		return err
	}
	opt.ByLocation = c.Bool("by-location")
	h, err := fitRead(c, path, period, opt)
	if err != nil {
		return err
	}
	if opt.ByLocation && !h.Location {
		return fmt.Errorf("%s:1: --by-location: want a location column in the history's header (map another name with --history-columns location=NAME)", h.File)
	}
	if len(h.SKUs) == 0 && len(h.Errors) == 0 {
		return fmt.Errorf("%s:2: no data rows, want at least one row of sku, date and quantity", h.File)
	}
	if err := fitNoSeries(h); err != nil {
		return err
	}
	stderr := c.App.ErrWriter
	for _, e := range h.Errors {
		fmt.Fprintf(stderr, "ergostock: warning: bad row skipped: %v\n", e)
	}
	res := fitAll(h, c.Bool("json"))
	failed := 0
	for _, r := range res {
		if r.Err != nil || r.Demand == "" {
			failed++
		}
	}

	switch {
	case c.Bool("json"):
		err = fitWriteJSON(c.App.Writer, res)
	case c.IsSet("out"):
		err = fitWriteAtomic(c.String("out"), func(w io.Writer) error { return fitWriteCSV(w, res) })
	default:
		err = fitWriteTable(c.App.Writer, res)
	}
	if err != nil {
		return err
	}
	span := ""
	bad, left := len(h.Errors), 0
	for _, k := range h.SKUs {
		if len(k.Demand) > 0 {
			span = fmt.Sprintf(", %s .. %s", h.Label(fitFirst(h)), h.Label(h.Last))
		}
		bad += len(k.Errors)
		for _, o := range k.LeftOut {
			left += o.Rows
		}
	}
	notes := ""
	if bad > 0 {
		notes += fmt.Sprintf("; %d bad rows skipped", bad)
	}
	if left > 0 {
		notes += fmt.Sprintf("; %d rows left out, far from the bulk of their SKU's dates", left)
	}
	noun := "SKUs"
	if h.Location {
		noun = "(sku, location) pairs"
	}
	fmt.Fprintf(stderr, "fit: %d %s from %s (%s periods%s): %d fitted, %d without a model%s; read as %s\n",
		len(res), noun, h.File, h.Period, span, len(res)-failed, failed, notes, historyNotes(h, opt))
	if failed > 0 {
		return &exitError{code: 3, err: fmt.Errorf("%d of %d %s have no demand model", failed, len(res), noun)}
	}
	return nil
}

// fitReceiptsAction checks the flags of fit --receipts and runs it.
func fitReceiptsAction(c *cli.Context) error {
	if c.IsSet("history") {
		return usageErr("--history and --receipts: fit reads one of them at a time (demand laws or lead-time laws)")
	}
	if c.String("receipts") == "" {
		return usageErr("--receipts: want the receipts file (- for standard input)")
	}
	if c.Bool("json") && c.IsSet("out") {
		return usageErr("--json and --out: give one of them, not both")
	}
	if c.IsSet("out") && c.String("out") == "" {
		return usageErr("--out: want a file name")
	}
	period, err := history.ParsePeriod(c.String("period"))
	if err != nil {
		return usageErr("--%v", err)
	}
	return fitReceipts(c, period)
}

// fitAll fits every SKU, spread over all cores; the results are in the
// order of h.SKUs whatever the number of workers. With specs, every
// candidate's SPEC is formatted too (for --json).
func fitAll(h *history.History, specs bool) []fitResult {
	res := make([]fitResult, len(h.SKUs))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), max(1, len(res))) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1) - 1)
				if i >= len(res) {
					return
				}
				k := h.SKUs[i]
				if err := k.FieldCountError(); err != nil {
					// As in batch: the SKU fails (history.SKU.FieldCountError).
					res[i] = fitResult{SKU: k.SKU, Location: k.Location, Err: err}
					continue
				}
				s, err := k.Fit()
				res[i] = fitResult{SKU: k.SKU, Location: k.Location, Summary: s, Err: err}
				if s.Demand != nil {
					res[i].Demand = s.Demand.String()
				}
				if specs {
					res[i].Specs = make([]string, len(s.Candidates))
					for j := range s.Candidates {
						if d, err := s.Candidates[j].Build(); err == nil {
							res[i].Specs[j] = d.String()
						}
					}
				}
				res[i].Summary.Demand = nil
				for j := range s.Candidates {
					s.Candidates[j].Demand = nil
				}
				if len(k.Demand) > 0 {
					res[i].First = h.Label(k.Start)
				}
			}
		}()
	}
	wg.Wait()
	return res
}

// fitNoSeries refuses a history in which no SKU has a series: every row
// is bad, or every SKU failed the bulk rule. The error names the first
// reason, with its file and line.
func fitNoSeries(h *history.History) error {
	var first error
	rows := 0
	for _, k := range h.SKUs {
		if len(k.Demand) > 0 {
			return nil
		}
		rows += len(k.Errors)
		switch {
		case first != nil:
		case k.Err != nil:
			first = fmt.Errorf("sku %q: %w", k.SKU, k.Err)
		case len(k.Errors) > 0:
			first = k.Errors[0]
		}
	}
	if len(h.Errors) > 0 && (first == nil || h.Errors[0].Line < lineOf(first)) {
		first = h.Errors[0]
	}
	return fmt.Errorf("%s: no usable series in %d data rows (%d bad rows); the first problem: %w", h.File, h.Rows, rows+len(h.Errors), first)
}

// lineOf returns the line of a *history.RowError, or 0.
func lineOf(err error) int {
	if re, ok := err.(*history.RowError); ok {
		return re.Line
	}
	return 0
}

// fitFirst returns the earliest first period over the SKUs with records.
func fitFirst(h *history.History) int {
	first, ok := 0, false
	for _, k := range h.SKUs {
		if len(k.Demand) > 0 && (!ok || k.Start < first) {
			first, ok = k.Start, true
		}
	}
	return first
}

// fitRead reads the history from a file or, for "-", standard input.
func fitRead(c *cli.Context, path string, p history.Period, opt history.Options) (*history.History, error) {
	if path == "-" {
		return history.ReadWith(c.App.Reader, "stdin", p, opt)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("--history: %w", err)
	}
	defer f.Close()
	return history.ReadWith(f, path, p, opt)
}

// fitNum formats a figure for the table and the CSV; non-finite values
// (the ADI and CV² of a series without demand) are left empty.
func fitNum(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// fitShort formats a figure to 4 significant digits for the table.
func fitShort(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "-"
	}
	return strconv.FormatFloat(x, 'g', 4, 64)
}

func (r *fitResult) demand() string {
	return r.Demand
}

func (r *fitResult) errText() string {
	if r.Err == nil {
		return ""
	}
	return oneLine(r.Err.Error())
}

// fitBrief shortens a SPEC string for the table: parameters to 4
// significant digits, and a pmf as its support range and point count.
// --json and --out print the exact string.
func fitBrief(spec string) string {
	family, params, ok := strings.Cut(spec, ":")
	if !ok {
		return spec
	}
	kvs := strings.Split(params, ",")
	if family == "pmf" {
		first, _, _ := strings.Cut(kvs[0], "=")
		last, _, _ := strings.Cut(kvs[len(kvs)-1], "=")
		if len(kvs) == 1 {
			return spec
		}
		return fmt.Sprintf("pmf on %s..%s (%d points)", first, last, len(kvs))
	}
	for i, kv := range kvs {
		k, v, _ := strings.Cut(kv, "=")
		if x, err := strconv.ParseFloat(v, 64); err == nil {
			kvs[i] = k + "=" + strconv.FormatFloat(x, 'g', 4, 64)
		}
	}
	return family + ":" + strings.Join(kvs, ",")
}

func fitWriteTable(w io.Writer, res []fitResult) error {
	tw := newTable(w)
	byLoc := fitByLocation(res)
	if byLoc {
		fmt.Fprint(tw, "sku\tlocation\t")
	} else {
		fmt.Fprint(tw, "sku\t")
	}
	fmt.Fprintln(tw, "periods\tmean\tvariance\tpattern\tdemand\twarnings")
	for _, r := range res {
		s := r.Summary
		d := fitBrief(r.demand())
		if d == "" {
			d = "-"
		}
		notes := s.Warnings
		if r.Err != nil {
			notes = append([]string{r.errText()}, notes...)
		}
		pat := string(s.Pattern)
		if pat == "" {
			pat = "-"
		}
		if byLoc {
			fmt.Fprintf(tw, "%s\t", r.SKU)
			r.SKU = r.Location
		}
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\t%s\n", r.SKU, s.Periods, fitShort(s.Mean), fitShort(s.Variance),
			pat, d, strings.Join(notes, "; "))
	}
	return tw.Flush()
}

// fitFloat is a number in JSON, null when not finite.
type fitFloat float64

func (x fitFloat) MarshalJSON() ([]byte, error) {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

type fitCandidateJSON struct {
	Model         string   `json:"model"`
	Parameters    int      `json:"parameters"`
	LogLikelihood fitFloat `json:"log_likelihood"`
	AIC           fitFloat `json:"aic"`
	AICc          fitFloat `json:"aicc"`
	Demand        string   `json:"demand"`
	Chosen        bool     `json:"chosen"`
}

type fitJSON struct {
	SKU          string             `json:"sku"`
	Location     string             `json:"location,omitempty"`
	FirstPeriod  string             `json:"first_period"`
	Periods      int                `json:"periods"`
	Total        int                `json:"total"`
	Mean         fitFloat           `json:"mean"`
	Variance     fitFloat           `json:"variance"`
	ZeroFraction fitFloat           `json:"zero_fraction"`
	ADI          fitFloat           `json:"adi"`
	CV2          fitFloat           `json:"cv2"`
	Pattern      string             `json:"pattern"`
	TrendSlope   fitFloat           `json:"trend_slope"`
	TrendP       fitFloat           `json:"trend_p"`
	Model        string             `json:"model"`
	Demand       string             `json:"demand"`
	Candidates   []fitCandidateJSON `json:"candidates"`
	Warnings     []string           `json:"warnings"`
	Error        string             `json:"error,omitempty"`
}

func fitWriteJSON(w io.Writer, res []fitResult) error {
	out := make([]fitJSON, len(res))
	for i, r := range res {
		s := r.Summary
		j := fitJSON{
			SKU: r.SKU, Location: r.Location, FirstPeriod: r.First, Periods: s.Periods, Total: s.Total,
			Mean: fitFloat(s.Mean), Variance: fitFloat(s.Variance), ZeroFraction: fitFloat(s.ZeroFraction),
			ADI: fitFloat(s.ADI), CV2: fitFloat(s.CV2), Pattern: string(s.Pattern),
			TrendSlope: fitFloat(s.Trend.Slope), TrendP: fitFloat(s.Trend.P),
			Model: s.Model(), Demand: r.demand(),
			Candidates: []fitCandidateJSON{}, Warnings: s.Warnings, Error: r.errText(),
		}
		if j.Warnings == nil {
			j.Warnings = []string{}
		}
		for i := range s.Candidates {
			c := &s.Candidates[i]
			spec := ""
			if i < len(r.Specs) {
				spec = r.Specs[i]
			}
			j.Candidates = append(j.Candidates, fitCandidateJSON{c.Model, c.Params, fitFloat(c.LogLikelihood),
				fitFloat(c.AIC), fitFloat(c.AICc), spec, i == s.Chosen})
		}
		out[i] = j
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(out)
}

// fitCSVRow is one row of fit --out; its tags name the columns.
type fitCSVRow struct {
	SKU           string `csv:"sku"`
	FirstPeriod   string `csv:"first_period"`
	Periods       int    `csv:"periods"`
	Total         int    `csv:"total"`
	Mean          string `csv:"mean"`
	Variance      string `csv:"variance"`
	ZeroFraction  string `csv:"zero_fraction"`
	ADI           string `csv:"adi"`
	CV2           string `csv:"cv2"`
	Pattern       string `csv:"pattern"`
	TrendSlope    string `csv:"trend_slope"`
	TrendP        string `csv:"trend_p"`
	Model         string `csv:"model"`
	Demand        string `csv:"demand"`
	LogLikelihood string `csv:"log_likelihood"`
	AIC           string `csv:"aic"`
	AICc          string `csv:"aicc"`
	Warnings      string `csv:"warnings"`
	Error         string `csv:"error"`
}

// fitWriteCSV writes one row per SKU with gocsv, which takes the header from
// the struct tags of fitCSVRow. Numbers are preformatted by fitNum so that
// they read back to the same float64.
func fitWriteCSV(w io.Writer, res []fitResult) error {
	rows := make([]fitCSVRow, 0, len(res))
	for _, r := range res {
		s := r.Summary
		row := fitCSVRow{SKU: r.SKU, FirstPeriod: r.First, Periods: s.Periods, Total: s.Total,
			Mean: fitNum(s.Mean), Variance: fitNum(s.Variance), ZeroFraction: fitNum(s.ZeroFraction),
			ADI: fitNum(s.ADI), CV2: fitNum(s.CV2), Pattern: string(s.Pattern),
			TrendSlope: fitNum(s.Trend.Slope), TrendP: fitNum(s.Trend.P), Model: s.Model(), Demand: r.demand(),
			Warnings: strings.Join(s.Warnings, "; "), Error: r.errText()}
		if s.Chosen >= 0 {
			c := s.Candidates[s.Chosen]
			row.LogLikelihood, row.AIC, row.AICc = fitNum(c.LogLikelihood), fitNum(c.AIC), fitNum(c.AICc)
		}
		rows = append(rows, row)
	}
	if !fitByLocation(res) {
		return gocsv.Marshal(rows, w)
	}
	// By location: the same columns with location after sku.
	var buf bytes.Buffer
	if err := gocsv.Marshal(rows, &buf); err != nil {
		return err
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	for i, rec := range recs {
		loc := "location"
		if i > 0 {
			loc = res[i-1].Location
		}
		if err := cw.Write(append([]string{rec[0], loc}, rec[1:]...)); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// fitByLocation reports whether the results are by (sku, location).
func fitByLocation(res []fitResult) bool {
	for _, r := range res {
		if r.Location != "" {
			return true
		}
	}
	return false
}

// fitWriteAtomic writes the --out file through the batch package's atomic
// writer, so a failure leaves any existing file untouched.
func fitWriteAtomic(path string, write func(io.Writer) error) error {
	if err := batch.WriteFileAtomic(path, write); err != nil {
		return fmt.Errorf("--out %s: %w", path, err)
	}
	return nil
}
