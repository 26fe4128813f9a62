package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"strconv"
	"strings"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/policies"
	"ergostock/policies/batch"
	"ergostock/policies/report"
	"ergostock/policies/sim"
	"ergostock/policies/uncertainty"
)

const reportDescription = `Writes one self-contained HTML page (--out): charts drawn inline as SVG,
inline CSS, nothing loaded from the network, readable without JavaScript and
printable on A4.

One SKU: give the system flags as for evaluate. With the policy flags the
page evaluates that policy (the current one) and also shows the cheapest
policy of its type (or of --policy); without them it shows the cheapest
policy of --policy (default s-S). --history FILE --sku ID adds the demand
history and the fitted distribution over its histogram; without --demand the
fitted model is used. --simulate adds the exact-versus-simulated table.
--uncertainty (with --history and --sku, without --demand) adds the stock
levels under the point model with their spread over resampled models and the
fill rate of the recommendation as a distribution (--resamples, --resampling,
--robust, --floor-confidence as for optimize; --seed is shared with
--simulate).

Random lead times and review periods (--lead-time LAW, --lead-time-model,
--review-period R) are shown in the item table, the law is drawn beside the
demand history, and the page's cautions state the model: under sequential
deliveries orders arrive in the order placed (Kaplan 1970), under
independent each order draws its own lead time and may overtake another;
with a review period orders are placed only every R periods while costs and
figures stay per period. The cost map is then evaluated cell by cell on the
exact chain, and left out for independent lead times (its s-S and s-nQ
cells have no exact figures).

A batch: --results FILE (written by ergostock batch) gives the table of
items, the saving by demand pattern, and the warnings and errors; with
--items FILE (the batch's items file) also the exchange curve, which
re-optimises every item under common fill-rate targets (--targets); with
--history also the map of demand patterns. Results of batch --uncertainty
add the items ranked by regret. The --items, --history and
--period given must be those in the header record of the results (the
line batch writes first); a mismatch is refused, naming both. Without
--period the record's period is used.

A network: --network FILE (the locations file of ergostock network) gives
the tree of the centre and its stores with the cheapest levels and their
fill rates, beside the same network planned one location at a time
(ergostock network report has the network command's other flags).

Exit status: 0 when the page was written; 1 when an input cannot be used
(nothing is written); 2 for a usage error.`

// reportCommand writes the HTML report for one SKU or for a batch.
func reportCommand() *cli.Command {
	flags := systemFlags()
	// The system flags are required only for a one-SKU page, and demand
	// may come from the history instead: checked in the action.
	for _, f := range flags {
		switch f := f.(type) {
		case *cli.StringFlag:
			f.Required = false
		case *cli.Float64Flag:
			f.Required = false
		}
	}
	flags = append(flags, policyFlags()...)
	flags = append(flags,
		&cli.StringFlag{Name: "policy", Usage: "policy type to recommend: base-stock, s-S or s-nQ (default: the type of the policy flags, else s-S)"},
		&cli.Float64Flag{Name: "min-fill-rate", Usage: "recommend the cheapest policy with fill rate at least F, for F in (0, 1)"},
		&cli.StringFlag{Name: "history", Usage: "demand history (CSV with sku, date or period, quantity)"},
		&cli.StringFlag{Name: "sku", Usage: "the SKU of --history to show (one-SKU page)"},
		&cli.StringFlag{Name: "location", Usage: "with --history --sku: the SKU's rows at this location only (the history's location column; default: summed over locations)"},
		&cli.StringFlag{Name: "period", Usage: "review period the history is summed into: day, week (ISO, Monday first) or month", Value: "week"},
		&cli.BoolFlag{Name: "simulate", Usage: "add the exact-versus-simulated table (one-SKU page)"},
		&cli.IntFlag{Name: "periods", Usage: "with --simulate: periods per replication, warm-up included", Value: 50_000},
		&cli.IntFlag{Name: "replications", Usage: "with --simulate: independent replications (>= 2)", Value: 10},
		&cli.IntFlag{Name: "seed", Usage: "with --simulate: seed of the random streams (>= 0)", Value: 1},
		&cli.StringFlag{Name: "results", Usage: "results file of ergostock batch (batch page)"},
		&cli.StringFlag{Name: "items", Usage: "items file of the batch, for the exchange curve (batch page)"},
		&cli.StringFlag{Name: "targets", Usage: "common fill-rate targets of the exchange curve, comma-separated", Value: "0.9,0.95,0.98,0.99,0.995,0.999"},
		&cli.IntFlag{Name: "workers", Usage: "searches run at once for the exchange curve (default: all cores)", Value: runtime.GOMAXPROCS(0), DefaultText: "all cores"},
		&cli.StringFlag{Name: "network", Usage: "network file (see ergostock network --help): the page of a centre and its stores, planned as a network against each location alone"},
		&cli.StringFlag{Name: "out", Usage: "HTML file to write", Required: true},
	)
	flags = append(flags, readFlags()...)
	// One-SKU page with --history --sku: the resampling charts; --seed is
	// shared with --simulate.
	flags = append(flags, uncertaintyFlags("seed")...)
	return &cli.Command{
		Name:  "report",
		Usage: "a self-contained HTML page with charts for one SKU or for a batch's results",
		UsageText: "ergostock report --out FILE --demand SPEC --holding-cost h --shortage-cost b [system flags] [policy flags | --policy TYPE] [--history FILE --sku ID] [--simulate]\n" +
			"ergostock report --out FILE --results FILE [--items FILE] [--history FILE]",
		Description: reportDescription,
		Flags:       flags,
		Action:      reportAction,
		OnUsageError: func(_ *cli.Context, err error, _ bool) error {
			return usageErr("report: %v (see ergostock report --help)", err)
		},
	}
}

func reportAction(c *cli.Context) error {
	if c.NArg() > 0 {
		return usageErr("report: unexpected argument %q (every input is a flag)", c.Args().First())
	}
	var page interface{ WriteHTML(io.Writer) error }
	var err error
	if c.IsSet("network") {
		page, err = reportNetworkPage(c)
	} else if c.IsSet("results") {
		page, err = reportBatch(c)
	} else {
		page, err = reportSKU(c)
	}
	if err != nil {
		return err
	}
	// Render in memory first, so that nothing is written on error.
	var buf bytes.Buffer
	if err := page.WriteHTML(&buf); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	out := c.String("out")
	for _, in := range []string{"results", "items", "history"} {
		if p := c.String(in); p != "" && sameFile(p, out) {
			return usageErr("--out %s: it is the --%s file; choose another file for the page", out, in)
		}
	}
	if err := batch.WriteFileAtomic(out, func(w io.Writer) error {
		_, err := w.Write(buf.Bytes())
		return err
	}); err != nil {
		return fmt.Errorf("--out %s: %w", out, err)
	}
	fmt.Fprintf(c.App.ErrWriter, "ergostock: report written to %s\n", out)
	return nil
}

// reportSKU gathers the one-SKU page.
func reportSKU(c *cli.Context) (*report.SKUPage, error) {
	for _, f := range []string{"items", "targets"} {
		if c.IsSet(f) {
			return nil, usageErr("--%s belongs to a batch page: give --results too, or leave it out", f)
		}
	}
	in := report.SKUInput{Version: version, DemandSource: "--demand"}
	if c.IsSet("location") && !c.IsSet("sku") {
		return nil, usageErr("--location goes with --history --sku: it picks the SKU's rows at one location")
	}
	if c.IsSet("history") != c.IsSet("sku") {
		return nil, usageErr("--history and --sku go together: give both to show a SKU's demand history")
	}
	if c.IsSet("history") {
		h, err := reportHistory(c)
		if err != nil {
			return nil, err
		}
		in.History, in.SKU = h, h.SKU
		if loc := c.String("location"); loc != "" {
			in.SKU = h.SKU + " @ " + loc
		}
		if !c.IsSet("demand") {
			if h.Fitted == nil {
				return nil, fmt.Errorf("%s: SKU %q: no demand model could be fitted; give --demand", h.File, h.SKU)
			}
			if err := c.Set("demand", h.Fitted.String()); err != nil {
				return nil, err
			}
			in.DemandSource = "fitted to " + h.File
		}
	}
	for _, f := range []string{"demand", "holding-cost", "shortage-cost"} {
		if !c.IsSet(f) {
			return nil, usageErr("--%s is required for a one-SKU page (or give --results for a batch page)", f)
		}
	}
	sys, err := systemFromFlags(c)
	if err != nil {
		return nil, err
	}
	in.System, in.Options = sys, evalOptions(c)
	if c.IsSet("reorder-point") || c.IsSet("order-up-to") || c.IsSet("order-multiple") {
		p, err := policyFromFlags(c, sys.Mode)
		if err != nil {
			return nil, err
		}
		in.Current = &p
	}
	if c.IsSet("policy") {
		kind := policies.Kind(c.String("policy"))
		switch kind {
		case policies.BaseStock, policies.SS, policies.SNQ:
		default:
			return nil, usageErr("--policy %s: want base-stock, s-S or s-nQ", c.String("policy"))
		}
		in.Kind = kind
	}
	if c.IsSet("min-fill-rate") {
		v := c.Float64("min-fill-rate")
		if !(v > 0 && v < 1) {
			return nil, usageErr("--min-fill-rate %v: want a fraction strictly between 0 and 1", v)
		}
		in.MinFillRate = v
	}
	if c.Bool("simulate") {
		seed := c.Int("seed")
		if seed < 0 {
			return nil, usageErr("--seed %d: want an integer >= 0", seed)
		}
		opt := sim.Options{Periods: c.Int("periods"), Replications: c.Int("replications"), Seed: uint64(seed)}
		opt.Warmup = sim.DefaultWarmup(opt.Periods)
		if opt.Periods < 2 {
			return nil, usageErr("--periods %d: want at least 2 periods per replication", opt.Periods)
		}
		if opt.Replications < 2 {
			return nil, usageErr("--replications %d: want at least 2 replications (an interval needs two)", opt.Replications)
		}
		in.Simulate = func(p policies.Policy) (*report.Simulated, error) {
			r, err := sim.Run(sys, p, opt)
			if err != nil {
				return nil, err
			}
			return &report.Simulated{Mean: r.Mean, HalfWidth: r.HalfWidth, Level: r.Level,
				Periods: r.Periods, Warmup: r.Warmup, Replications: r.Replications, Seed: r.Seed}, nil
		}
	}
	uopt, withUnc, err := uncertaintyOptions(c, "seed")
	if err != nil {
		return nil, err
	}
	if withUnc {
		if in.History == nil || in.DemandSource == "--demand" {
			return nil, usageErr("--uncertainty: needs --history FILE --sku ID without --demand (the resamples are refitted from the history)")
		}
		uopt.Kind = in.Kind
		if uopt.Kind == "" {
			uopt.Kind = policies.SS
			if in.Current != nil {
				uopt.Kind = in.Current.Kind
			}
		}
		uopt.Search = policies.SearchOptions{MinFillRate: in.MinFillRate, Eval: in.Options}
		uopt.KeepModels = true // the level band chart evaluates each model
		res, err := uncertainty.Analyze(in.SKU, in.History.Demand, sys, uopt)
		if err != nil {
			return nil, engineErr(c, fmt.Errorf("--uncertainty: %w", err))
		}
		in.Uncertainty = res
	}
	pg, err := report.BuildSKU(in)
	if err != nil {
		return nil, engineErr(c, err)
	}
	return pg, nil
}

// reportHistory reads the history and fits the SKU's demand.
func reportHistory(c *cli.Context) (*report.History, error) {
	period, err := history.ParsePeriod(c.String("period"))
	if err != nil {
		return nil, usageErr("--%v", err)
	}
	path, sku, loc := c.String("history"), c.String("sku"), c.String("location")
	hopt, err := historyOptions(c)
	if err != nil {
		return nil, err
	}
	hopt.ByLocation = loc != ""
	h, err := reportReadHistory(path, period, hopt)
	if err != nil {
		return nil, err
	}
	if loc != "" && !h.Location {
		return nil, fmt.Errorf("%s:1: --location %s: the history has no location column (map one with --history-columns location=HEADER)", path, loc)
	}
	var k *history.SKU
	for _, s := range h.SKUs {
		if s.SKU == sku && s.Location == loc {
			k = s
			break
		}
	}
	if k == nil && loc != "" {
		var at []string
		for _, s := range h.SKUs {
			if s.SKU == sku && len(at) < 5 {
				at = append(at, strconv.Quote(s.Location))
			}
		}
		if len(at) > 0 {
			return nil, fmt.Errorf("%s: no rows of SKU %q at location %q: want one of its locations (%s)", path, sku, loc, strings.Join(at, ", "))
		}
	}
	if k == nil {
		return nil, fmt.Errorf("%s: no SKU %q in the history (%d SKUs, e.g. %s): want a SKU of the file's sku column", path, sku, len(h.SKUs), reportExamples(h))
	}
	if len(k.Demand) == 0 {
		if k.Err != nil { // no clear bulk of dates, or a span over the limit
			return nil, fmt.Errorf("%s: SKU %q: %w", path, sku, k.Err)
		}
		if len(k.Errors) > 0 {
			return nil, fmt.Errorf("SKU %q: no usable rows, first %w", sku, k.Errors[0])
		}
		return nil, fmt.Errorf("%s: SKU %q has no usable rows", path, sku)
	}
	sum, fitErr := k.Fit()
	out := &report.History{
		File: path, SKU: sku, Period: h.Period.String(), Demand: k.Demand,
		Mean: sum.Mean, Variance: sum.Variance, ADI: sum.ADI, CV2: sum.CV2,
		Pattern: string(sum.Pattern), Warnings: sum.Warnings, Fitted: sum.Demand, Model: sum.Model(),
	}
	if fitErr != nil {
		out.Fitted = nil
		out.Warnings = append(out.Warnings, "no model fitted: "+fitErr.Error())
	}
	out.Labels = make([]string, len(k.Demand))
	for i := range k.Demand {
		out.Labels[i] = h.Label(k.Start + i)
	}
	return out, nil
}

func reportExamples(h *history.History) string {
	var names []string
	for i, s := range h.SKUs {
		if i == 3 {
			names = append(names, "...")
			break
		}
		names = append(names, strconv.Quote(s.SKU))
	}
	if len(names) == 0 {
		return "none"
	}
	return strings.Join(names, ", ")
}

func reportReadHistory(path string, p history.Period, opt history.Options) (*history.History, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("--history: %w", err)
	}
	defer f.Close()
	return history.ReadWith(f, path, p, opt)
}

// reportBatch gathers the batch page.
func reportBatch(c *cli.Context) (*report.BatchPage, error) {
	for _, f := range []string{"demand", "lead-time", "holding-cost", "shortage-cost", "order-cost", "unit-cost", "unmet",
		"reorder-point", "order-up-to", "order-multiple", "policy", "min-fill-rate", "sku", "location", "simulate",
		"uncertainty", "resamples", "resampling", "robust", "floor-confidence"} {
		if c.IsSet(f) {
			return nil, usageErr("--%s belongs to a one-SKU page; a batch page (--results) takes --items, --history, --targets and --workers", f)
		}
	}
	if c.Int("workers") < 1 {
		return nil, usageErr("--workers %d: want a number of workers >= 1", c.Int("workers"))
	}
	var targets []float64
	for _, s := range strings.Split(c.String("targets"), ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil || !(v > 0 && v < 1) || math.IsNaN(v) {
			return nil, usageErr("--targets %s: want fill rates strictly between 0 and 1, comma-separated, e.g. 0.9,0.95,0.99", c.String("targets"))
		}
		targets = append(targets, v)
	}
	path := c.String("results")
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("--results: %w", err)
	}
	res, err := report.ReadResultsFile(f, path)
	f.Close()
	if err != nil {
		return nil, err
	}
	meta := res.Meta
	// The inputs must be those the results were planned from.
	mismatch := func(flag, file, digest, key, want string) error {
		return fmt.Errorf("--%s %s (digest %s) is not the %s file %s was planned from (%s=%s on its line 1): give that file, or run the batch again", flag, file, digest, flag, path, key, want)
	}
	period := c.String("period")
	if meta != nil {
		if c.IsSet("period") && period != meta.Period {
			return nil, fmt.Errorf("--period %s contradicts %s, planned by the %s (period=%s on its line 1): give --period %s or leave it out", period, path, meta.Period, meta.Period, meta.Period)
		}
		period = meta.Period
	}
	if c.IsSet("items") || c.IsSet("history") {
		warnReading(c, meta, path)
	}
	in := report.BatchInput{ResultsFile: path, Rows: res.Rows, Targets: targets, Workers: c.Int("workers"), Version: version}
	byLocation := res.ByLocation
	if meta != nil {
		in.Period = meta.Period
	}
	if p := c.String("items"); p != "" {
		per, err := history.ParsePeriod(period)
		if err != nil {
			return nil, usageErr("--%v", err)
		}
		iopt, err := itemsOptions(c, per)
		if err != nil {
			return nil, err
		}
		if meta != nil {
			// The batch's defaults for items without the cells
			// (batch --review-period, --lead-time-model).
			iopt.ReviewPeriod, iopt.LeadTimeModel = meta.ReviewPeriod, inventory.LeadTimeModel(meta.LeadTimeModel)
		}
		cat, digest, err := readItemsFile(c.Context, p, batch.Shard{}, iopt)
		if err != nil {
			return nil, err
		}
		if cat.ByLocation != res.ByLocation {
			// Results are matched to items by (sku, location) or by SKU
			// alone, as the batch planned them.
			return nil, locationMismatch(p, path, cat.ByLocation)
		}
		byLocation = cat.ByLocation
		items := cat.Items
		if meta != nil && digest != meta.Items {
			return nil, mismatch("items", p, digest, "items", meta.Items)
		}
		plannedTiming(items, res.Rows)
		in.Items, in.ItemsFile = items, p
		fmt.Fprintf(c.App.ErrWriter, "ergostock: re-optimising %d items at %d fill-rate targets for the exchange curve\n", len(items), len(targets))
	}
	if p := c.String("history"); p != "" {
		per, err := history.ParsePeriod(period)
		if err != nil {
			return nil, usageErr("--%v", err)
		}
		hopt, err := historyOptions(c)
		if err != nil {
			return nil, err
		}
		hopt.ByLocation = byLocation
		h, digest, err := readHistoryFile(c.Context, p, per, hopt)
		if err != nil {
			return nil, err
		}
		if byLocation && !h.Location {
			return nil, fmt.Errorf("%s:1: %s was planned by (sku, location), but the history has no location column: give the history the batch read (or map its column with --history-columns location=HEADER)", h.File, path)
		}
		// A batch planned from demand columns alone (history=none) has no
		// history to contradict; the page may still show its patterns.
		if meta != nil && meta.History != "none" && digest != meta.History {
			return nil, mismatch("history", p, digest, "history", meta.History)
		}
		in.History = h
	}
	if meta == nil && (c.IsSet("items") || c.IsSet("history") || c.IsSet("period")) {
		fmt.Fprintf(c.App.ErrWriter, "ergostock: %s has no header record (an older ergostock wrote it): the items, history and period given are not checked against it\n", path)
	}
	return report.BuildBatch(in)
}

// locationMismatch is the error of an items file whose location column
// does not agree with the results': one was planned by (sku, location),
// the other by SKU alone.
func locationMismatch(items, results string, itemsByLocation bool) error {
	if itemsByLocation {
		return fmt.Errorf("%s:1: the items file has a location column but %s has none (it was planned by SKU alone): give the items file the batch read", items, results)
	}
	return fmt.Errorf("%s:1: the items file has no location column but %s was planned by (sku, location) (its location column): give the items file the batch read", items, results)
}

// plannedTiming gives each item the lead time, lead-time model and review
// period its results row was planned under (a law from batch --receipts,
// the batch's --review-period), so that the exchange curve re-optimises
// the items as the batch planned them; rows without the timing columns
// (older files) leave the items file's.
func plannedTiming(items []batch.Item, rows []report.ResultRow) {
	byKey := make(map[string]*report.ResultRow, len(rows))
	for i := range rows {
		if _, dup := byKey[rows[i].Key()]; !dup {
			byKey[rows[i].Key()] = &rows[i]
		}
	}
	for i := range items {
		it := &items[i]
		r := byKey[it.Key()]
		if it.Err != nil || r == nil || r.LeadTime == "" {
			continue
		}
		fixed, law, err := inventory.ParseLeadTime(r.LeadTime)
		if err != nil {
			continue
		}
		sys := it.System
		sys.LeadTime, sys.LeadTimeLaw = fixed, law
		if m, err := inventory.ParseLeadTimeModel(r.LeadTimeModel); err == nil && r.LeadTimeModel != "" {
			sys.LeadTimeModel = m
		}
		if r.ReviewPeriod > 0 {
			sys.ReviewPeriod = r.ReviewPeriod
		}
		if sys.Demand == nil || sys.Validate() == nil {
			it.System = sys
		}
	}
}
