package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime"
	"strings"
	"sync/atomic"
	"syscall"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/urfave/cli/v2"
	"golang.org/x/term"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/inventory/tabular"
	"ergostock/policies"
	"ergostock/policies/batch"
	"ergostock/policies/uncertainty"
)

const batchDescription = `Plans every item of the items file: fits a demand model to the item's
history (or takes the item's demand column), finds the cheapest policy of the
item's type under its fill-rate floor, evaluates the policy in use when the
current_* columns give one, and writes one row per item, in the order of the
items file, to the results file. An item that cannot be planned gets an error
in its row; the others are unaffected.

An items file with both a location and a parent column describes networks:
the rows of a SKU are its centre (empty parent) and stores, planned together
as ergostock network batch plans them, one row per SKU and location in the
network results file (see ergostock network batch --help).

Items file columns (header required, any order): sku, lead_time,
holding_cost, shortage_cost; optionally order_cost, unit_cost, unmet
(backorder|lost), policy (base-stock|s-S|s-nQ), min_fill_rate, demand,
current_reorder_point, current_order_up_to, current_order_multiple
(current_order_up_to alone: base-stock; with current_reorder_point: s-S;
current_reorder_point with current_order_multiple: s-nQ), review_period,
lead_time_model (sequential|independent). lead_time is a whole number of
periods or a lead-time law in the demand grammar, as --lead-time takes it
(e.g. "pmf:2=0.2,3=0.5,4=0.3", quoted where it holds commas; under
sequential deliveries the law must be one the model can realise, and the
error names the nearest one that is). --review-period R and
--lead-time-model set the items whose cell is empty or absent; when they
differ from 1 and sequential the header record says so (review_period=,
lead_time_model=). With independent lead times only base-stock in backorder
mode is exact: an item of another policy type fails with that reason.

Each item has a budget, --item-timeout (default 1m0s; 0 means none): an item
that runs past it fails with that reason and the run goes on. A panic, a
refused size or a figure that overflows (NaN, infinite or negative) fails
only its item, too.

The results file starts with a header record, a comment line such as
  # ergostock results v2; period=week; run=...; items=...; history=...; ...
with the planning period and digests of the items file, the history and the
options, which ergostock report checks. Text cells starting with = + - @
get a leading ' so that a spreadsheet does not run them as formulas.
The file is written to .NAME.ergostock-tmp-PID beside it and renamed into
place at the end, under a lock (.NAME.ergostock-lock), so a failed run
leaves an existing file as it was and two runs cannot write one file at
once; a later run removes what a killed run left. SIGINT or SIGTERM stops
the run, removes the temporary file and exits 130 or 143. --out - writes
the results to stdout instead (no temporary file).
--shard K/N plans only the items at positions K, K+N, K+2N, ... (0-based),
so that N runs, for instance the tasks of a cluster array job, split the
catalogue; their parts share one run digest in the header record, and
ergostock merge --out results.csv part-*.csv joins them into the file the
unsharded run writes.

For spreadsheets: --out-delimiter ';' --out-decimal , writes a file that a
spreadsheet in a decimal-comma locale opens cleanly (tab works too; a file
in such a dialect starts with a UTF-8 byte-order mark, and its header record
says decimal=comma); --digits N rounds every figure to N significant digits
(levels and counts are whole numbers and never rounded). --out FILE.xlsx
writes a workbook instead: a results sheet (header row frozen, numbers as
numbers, fill rate and stockout probability as percentages; figures keep
the 15 significant digits a spreadsheet cell holds), a warnings sheet (sku,
item, warning) and a run sheet with the header record. ergostock report
reads every one of these.

Exit status: 0 when every item was planned; 3 when the results file was
written but some items failed; 1 when the run failed as a whole (an
unreadable file, a missing column, a write error, --out busy or not
writable) and nothing was written; 2 for a usage error; 130 (SIGINT) or 143
(SIGTERM) when the run was interrupted and nothing was written.`

// batchUncertaintyHelp says what --uncertainty adds to the results.
const batchUncertaintyHelp = `In a batch, --uncertainty appends columns after the usual ones (a plain run's
file is unchanged): resampling, resamples_used; reorder_point_p05/_p50/_p95,
order_up_to_p05/..., order_multiple_p05/... (the levels' bands);
expected_fill_rate, fill_rate_p05, fill_rate_p95, expected_stockout_probability,
expected_total_cost, total_cost_p95 (the recommendation under the resampled
models); regret_mean, regret_p95; share_meeting_min_fill_rate; and with
--robust robust_policy, robust_reorder_point, robust_order_up_to,
robust_order_multiple, robust_mean_total_cost,
robust_share_meeting_min_fill_rate, plug_in_mean_total_cost, robust_extra_cost.
Items planned from a demand column get empty cells and a warning.`

func batchCommand() *cli.Command {
	return &cli.Command{
		Name:        "batch",
		Usage:       "plan a whole catalogue: fitted demand, cheapest policy, its figures and the saving, one row per item",
		UsageText:   "ergostock batch --items FILE --history FILE --out FILE[.xlsx] [--period day|week|month] [--workers N] [--shard K/N] [--item-timeout D] [--receipts FILE] [--review-period R] [--lead-time-model sequential|independent] [--out-delimiter ';' --out-decimal ,] [--digits N] [--carry COL,...] [--uncertainty [--resamples B] [--seed N] [--resampling iid|block|auto|parametric] [--robust [--floor-confidence F]]] [--delimiter D] [--decimal M] [--date-format F] [--history-columns MAP] [--items-columns MAP] [--returns ignore|net|error] [--quantity-scale X]",
		Description: batchDescription + "\n\n" + receiptsHelp + "\n\nWith --receipts, an item's lead time is its SKU's law from the receipts: the\nresults' lead_time column shows the law, and a warning in the row gives the\ncounts behind it and the lead_time it replaced." + "\n\n" + uncertaintyHelp + "\n\n" + batchUncertaintyHelp,
		Flags: append([]cli.Flag{
			&cli.StringFlag{Name: "items", Usage: "items file (CSV in any common dialect, or .xlsx): costs, lead time and policy in use per SKU (and location)", Required: true},
			&cli.StringFlag{Name: "history", Usage: "demand history (CSV in any common dialect, or .xlsx, with sku, date or period, quantity); may be omitted when every item has a demand column"},
			&cli.StringFlag{Name: "out", Usage: "results file (CSV) to write; - writes the results to stdout", Required: true},
			&cli.StringFlag{Name: "period", Usage: "review period the history is summed into: day, week (ISO, Monday first) or month", Value: "week"},
			&cli.IntFlag{Name: "workers", Usage: "items planned at once", Value: runtime.GOMAXPROCS(0), DefaultText: "all cores"},
			&cli.StringFlag{Name: "shard", Usage: "plan only the items at positions K, K+N, K+2N, ... (0-based), given as K/N"},
			&cli.DurationFlag{Name: "item-timeout", Usage: "budget of one item, e.g. 90s or 5m; an item past it fails with that reason and the others go on (0: no limit)", Value: time.Minute},
			&cli.IntFlag{Name: "max-states", Usage: "largest lost-sales chain to build per evaluation", Value: policies.DefaultMaxStates},
			&cli.StringFlag{Name: "out-delimiter", Usage: "field separator of the results CSV: , ; or tab", Value: ","},
			&cli.StringFlag{Name: "out-decimal", Usage: "decimal mark of the results CSV: . or , (a decimal comma needs --out-delimiter ';' or tab)", Value: "."},
			&cli.StringFlag{Name: "carry", Usage: "item columns to copy to the results, comma-separated (e.g. supplier,category); appended after the results columns"},
			&cli.IntFlag{Name: "digits", Usage: "significant digits of the figures in the results (1 to 17; 0: full precision, the shortest decimal that reads back exactly)"},
			&cli.StringFlag{Name: "decisions", Usage: "decisions file of ergostock serve: each SKU's latest decision becomes its policy in use"},
			intFlag("review-period", "review period R in periods of the items without a review_period cell: reviewed, and ordered, only every R periods (figures and costs stay per period)", 1),
			&cli.StringFlag{Name: "lead-time-model", Usage: "lead-time model of the items without a lead_time_model cell: sequential (orders arrive in the order placed; Kaplan 1970) or independent (orders may cross)", Value: "sequential"},
		}, append(append(receiptsFlags(), uncertaintyFlags()...), readFlags()...)...),
		Action: func(c *cli.Context) error {
			return runBatch(c, c.App.ErrWriter)
		},
	}
}

// batchTiming reads --review-period and --lead-time-model, the defaults of
// the items without those cells, into the reader's options and, when they
// differ from review every period and sequential deliveries, the header
// record.
func batchTiming(c *cli.Context, opt *batch.ReadOptions, meta *batch.Meta) error {
	r := c.Int("review-period")
	if r < 1 || r > inventory.MaxReviewPeriod {
		return usageErr("--review-period %s: want a whole number of periods from 1 to %d", typed(c, "review-period"), inventory.MaxReviewPeriod)
	}
	m, err := inventory.ParseLeadTimeModel(c.String("lead-time-model"))
	if err != nil {
		return usageErr("--lead-time-model %q: want sequential or independent", c.String("lead-time-model"))
	}
	if r > 1 {
		opt.ReviewPeriod, meta.ReviewPeriod = r, r
	}
	if m != inventory.Sequential {
		opt.LeadTimeModel, meta.LeadTimeModel = m, string(m)
	}
	return nil
}

// batchSummary tallies the rows as they are written.
type batchSummary struct {
	items, failed, withCurrent int
	totalCost, saving          float64
	period                     string // the planning period: day, week or month
}

func (s *batchSummary) add(r *batch.Row) {
	s.items++
	if r.Err != nil {
		s.failed++
		return
	}
	s.totalCost += r.Figures.TotalCost
	if v, ok := r.Saving(); ok {
		s.withCurrent++
		s.saving += v
	}
}

func (s *batchSummary) String() string {
	p := s.period
	if p == "" {
		p = "period"
	}
	return fmt.Sprintf("batch: %d items: %d planned, %d failed; planning period %s, costs per %s: total cost %.2f per %s; saving %.2f per %s over %d items with a current policy",
		s.items, s.items-s.failed, s.failed, p, p, s.totalCost, p, s.saving, p, s.withCurrent)
}

func runBatch(c *cli.Context, stderr io.Writer) error {
	workers := c.Int("workers")
	if workers < 1 {
		return usageErr("--workers %d: want a number of workers >= 1", workers)
	}
	if c.Int("max-states") < 1 {
		return usageErr("--max-states %d: want a state count >= 1", c.Int("max-states"))
	}
	if itemsAreNetworks(c) {
		return batchNetworks(c) // location and parent columns: one network per SKU
	}
	timeout := c.Duration("item-timeout")
	if timeout < 0 {
		return usageErr("--item-timeout %v: want a duration >= 0 (0 for no limit), e.g. 90s or 5m", timeout)
	}
	var shard batch.Shard
	if c.IsSet("shard") {
		s, err := batch.ParseShard(c.String("shard"))
		if err != nil {
			return usageErr("--%v", err)
		}
		shard = s
	}
	period, err := history.ParsePeriod(c.String("period"))
	if err != nil {
		return usageErr("--%v", err)
	}
	cells, err := outFormat(c)
	if err != nil {
		return err
	}
	var carry []string
	if c.IsSet("carry") {
		if carry, err = batch.ParseCarry(c.String("carry")); err != nil {
			return usageErr("%v", err)
		}
	}
	uopt, withUnc, err := uncertaintyOptions(c)
	if err != nil {
		return err
	}
	itemsPath, histPath, outPath := c.String("items"), c.String("history"), c.String("out")
	receiptsPath := c.String("receipts")
	if c.IsSet("receipts") && receiptsPath == "" {
		return usageErr("--receipts: want the receipts file")
	}
	if receiptsPath == "-" {
		return usageErr("--receipts -: batch reads the receipts from a file, not standard input")
	}
	ropt, err := receiptsOptions(c, period)
	if err != nil {
		return err
	}
	toStdout := outPath == "-"
	for _, in := range []struct{ flag, path string }{{"items", itemsPath}, {"history", histPath}, {"receipts", receiptsPath}} {
		if in.path != "" && !toStdout && sameFile(in.path, outPath) {
			return usageErr("--out %s: it is the --%s file; choose another results file", outPath, in.flag)
		}
	}

	// An interrupt cancels the run: the items in progress get a done
	// context, the temporary file is removed, and the exit status says
	// which signal came (128 + its number, as a shell reports it). A
	// second signal of the same kind kills the process at once.
	ctx, cancel := context.WithCancel(c.Context)
	defer cancel()
	sigs := make(chan os.Signal, 1)
	signal.Notify(sigs, os.Interrupt, syscall.SIGTERM)
	defer signal.Stop(sigs)
	var got atomic.Value // the signal that interrupted the run
	go func() {
		select {
		case s := <-sigs:
			got.Store(s)
			signal.Stop(sigs)
			cancel()
		case <-ctx.Done():
		}
	}()
	interrupted := func() error {
		s, _ := got.Load().(os.Signal)
		if s == nil {
			return nil
		}
		code, name := 130, "SIGINT"
		if s == syscall.SIGTERM {
			code, name = 143, "SIGTERM"
		}
		what := "--out " + outPath + " left as it was"
		if toStdout {
			what = "the results on stdout are incomplete"
		}
		return &exitError{code: code, err: fmt.Errorf("batch interrupted by %s: %s", name, what)}
	}

	// The results file is checked and locked before any work.
	var out io.Writer = c.App.Writer
	var af *batch.AtomicFile
	if !toStdout {
		af, err = batch.CreateAtomic(outPath)
		if err != nil {
			return fmt.Errorf("--out %s: %w", outPath, err)
		}
		defer af.Abort()
		out = af
	}

	meta := batch.Meta{Format: batch.MetaFormat, Period: period.String(), History: "none",
		MaxStates: c.Int("max-states"), Shard: shard, Version: version}
	if shard.N == 0 {
		meta.Shard = batch.Shard{K: 0, N: 1}
	}
	hopt, err := historyOptions(c)
	if err != nil {
		return err
	}
	iopt, err := itemsOptions(c, period)
	if err != nil {
		return err
	}
	if err := batchTiming(c, &iopt, &meta); err != nil {
		return err
	}
	cat, count, digest, err := readItemsCounted(ctx, itemsPath, shard, iopt)
	if e := interrupted(); e != nil {
		return e
	}
	if err != nil {
		return err
	}
	items := cat.Items
	meta.Items, meta.ItemCount = digest, count
	read := "; read: items " + cat.Dialect
	hopt.ByLocation = cat.ByLocation
	if meta.Decisions, err = applyDecisionsFile(c.String("decisions"), items, cat.ByLocation, stderr); err != nil {
		return err
	}
	var carried []string
	if len(carry) > 0 {
		if carried, err = batch.Carry(items, itemsPath, carry); err != nil {
			return usageErr("%v", err)
		}
	}
	planner := &batch.Planner{Options: policies.Options{MaxStates: c.Int("max-states")}}
	if histPath != "" {
		h, digest, err := readHistoryFile(ctx, histPath, period, hopt)
		if e := interrupted(); e != nil {
			return e
		}
		if err != nil {
			return err
		}
		if cat.ByLocation && !h.Location {
			return fmt.Errorf("%s:1: the items file %s has a location column, so each (sku, location) is planned, but the history has none: add one to the history (or map it with --history-columns location=HEADER), or drop the items file's location column to plan each SKU on its whole history", h.File, itemsPath)
		}
		if h.Rows == 0 {
			return fmt.Errorf("%s:2: no data rows, want at least one row of sku, date and quantity", h.File)
		}
		if err := fitNoSeries(h); err != nil {
			return err
		}
		meta.History = digest
		read += "; history " + historyNotes(h, hopt)
		if n := len(h.Errors); n > 0 {
			fmt.Fprintf(stderr, "ergostock: %s: %d rows without a sku skipped, first %v\n", histPath, n, h.Errors[0])
		}
		need := make(map[string]bool, len(items))
		for _, it := range items {
			need[it.Key()] = true
		}
		planner.Fit, planner.Pattern = batch.HistoryFit(h, func(sku string) bool { return need[sku] })
	} else {
		planner.Fit = func(sku string) (*batch.Fitted, error) {
			return nil, errors.New("no demand column and no --history file")
		}
	}
	if withUnc {
		planner.Uncertainty = batch.UncertaintyStep(uopt, planner.Options)
		meta.Uncertainty = fmt.Sprintf("%s,resamples=%d,seed=%d,robust=%v", uopt.Scheme, uopt.Resamples, uopt.Seed, uopt.Robust)
		if uopt.Robust {
			conf := uopt.FloorConfidence
			if conf == 0 {
				conf = uncertainty.DefaultFloorConfidence
			}
			meta.Uncertainty += fmt.Sprintf(",floor_confidence=%g", conf)
		}
	}
	meta.Reading, meta.Unit = readingDigest(c), unitOf(hopt.Scale)
	meta.Run = meta.RunDigest()
	var leadNotes map[int][]string
	if receiptsPath != "" {
		rf, digest, err := readReceiptsFile(ctx, nil, receiptsPath, ropt)
		if e := interrupted(); e != nil {
			return e
		}
		if err != nil {
			return err
		}
		if err := receiptsNoLaw(rf); err != nil {
			return err
		}
		if n := len(rf.Errors); n > 0 {
			fmt.Fprintf(stderr, "ergostock: %s: %d receipt rows without a sku skipped, first %v\n", receiptsPath, n, rf.Errors[0])
		}
		var tally receiptsTally
		leadNotes, tally = applyReceipts(items, rf)
		fmt.Fprintf(stderr, "ergostock: %s (%s; lead times in %s periods): lead-time laws set for %d items; lead_time kept for %d items on too few receipts and %d items without receipts; %d SKUs of the receipts match no item planned in this run\n",
			receiptsPath, rf.Dialect, rf.Period, tally.set, tally.kept, tally.without, tally.unmatched)
		// The receipts shape the figures: they join the run digest, so
		// shards planned with other receipts do not join this run.
		h := batch.NewDigest()
		fmt.Fprintf(h, "run=%s\nreceipts=%s\n", meta.Run, digest)
		meta.Run = batch.DigestSum(h)
	}

	var bar *progressbar.ProgressBar
	if isTerminal(stderr) && len(items) > 0 {
		bar = progressbar.NewOptions(len(items),
			progressbar.OptionSetWriter(stderr),
			progressbar.OptionSetDescription("planning"),
			progressbar.OptionShowCount(),
			progressbar.OptionSetItsString("items"),
			progressbar.OptionShowIts(),
			progressbar.OptionSetPredictTime(true),
			progressbar.OptionThrottle(100*time.Millisecond),
			progressbar.OptionClearOnFinish(),
		)
	}
	sum := batchSummary{period: period.String()}
	var bw resultsWriter
	if isWorkbookName(outPath) {
		bw, err = batch.NewWorkbookWriter(out, cells)
	} else {
		bw, err = batch.NewFormatWriter(out, cells)
	}
	if err != nil {
		return usageErr("--out %s: %v", outPath, err)
	}
	bw.Carry(carried)
	bw.SetLocation(cat.ByLocation)
	if withUnc {
		bw.SetUncertainty(uopt.Robust)
	}
	err = bw.WriteMeta(meta)
	if err == nil {
		err = bw.WriteHeader()
	}
	if err == nil {
		err = planner.PlanAll(ctx, items, batch.RunOptions{Workers: workers, ItemTimeout: timeout},
			func(r *batch.Row) error {
				if n := leadNotes[r.Item]; len(n) > 0 {
					r.Warnings = append(append([]string(nil), n...), r.Warnings...)
				}
				sum.add(r)
				if bar != nil {
					bar.Add(1)
				}
				return bw.Write(r)
			})
	}
	if err == nil {
		err = bw.Flush()
	}
	if bar != nil {
		bar.Finish()
	}
	if e := interrupted(); e != nil {
		return e
	}
	if err == nil && af != nil {
		err = af.Commit()
	}
	if err != nil {
		return fmt.Errorf("--out %s: %w", outPath, err)
	}
	where := "results in " + outPath
	if toStdout {
		where = "results on stdout"
	}
	msg := sum.String() + read + "; " + where
	if sum.failed > 0 {
		return &exitError{code: 3, err: errors.New(msg)}
	}
	fmt.Fprintf(stderr, "ergostock: %s\n", msg)
	return nil
}

// resultsWriter writes the results file: CSV (batch.Writer) or a
// workbook (batch.WorkbookWriter).
type resultsWriter interface {
	Carry(names []string)
	SetUncertainty(robust bool)
	SetLocation(on bool)
	WriteMeta(batch.Meta) error
	WriteHeader() error
	Write(*batch.Row) error
	Flush() error
}

// isWorkbookName reports whether --out names an .xlsx workbook.
func isWorkbookName(path string) bool { return strings.HasSuffix(strings.ToLower(path), ".xlsx") }

// outFormat reads --out-delimiter, --out-decimal and --digits.
func outFormat(c *cli.Context) (batch.Format, error) {
	var f batch.Format
	if out := c.String("out"); isWorkbookName(out) {
		for _, flag := range []string{"out-delimiter", "out-decimal"} {
			if c.IsSet(flag) {
				return f, usageErr("--%s with --out %s: a workbook stores numbers as numbers and shows them in the spreadsheet's own locale; leave --%s out (it applies to CSV results)", flag, out, flag)
			}
		}
	}
	d, err := tabular.ParseDelimiter(c.String("out-delimiter"))
	if err != nil || d == 0 {
		return f, usageErr("--out-delimiter %q: want , ; or tab", c.String("out-delimiter"))
	}
	f.Delimiter = d
	m, err := tabular.ParseDecimal(c.String("out-decimal"))
	if err != nil || m == 0 {
		return f, usageErr("--out-decimal %q: want . or ,", c.String("out-decimal"))
	}
	f.Decimal = m
	f.Digits = c.Int("digits")
	if err := f.Validate(); err != nil {
		return f, usageErr("%v", err)
	}
	return f, nil
}

// ctxReader fails its reads once ctx is done, so that an interrupt stops
// the reading of a large input.
type ctxReader struct {
	ctx context.Context
	r   io.Reader
}

func (r ctxReader) Read(p []byte) (int, error) {
	if err := r.ctx.Err(); err != nil {
		return 0, err
	}
	return r.r.Read(p)
}

// readDigested opens path, hands read a reader of its bytes, and returns
// the digest of the whole file (for the results' header record).
func readDigested(ctx context.Context, flag, path string, read func(io.Reader) error) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", fmt.Errorf("--%s: %w", flag, err)
	}
	defer f.Close()
	h := batch.NewDigest()
	if err := read(io.TeeReader(ctxReader{ctx, f}, h)); err != nil {
		return "", err
	}
	if _, err := io.Copy(h, ctxReader{ctx, f}); err != nil {
		return "", fmt.Errorf("--%s %s: %w", flag, path, err)
	}
	return batch.DigestSum(h), nil
}

func readItemsFile(ctx context.Context, path string, shard batch.Shard, opt batch.ReadOptions) (cat *batch.Catalogue, digest string, err error) {
	cat, _, digest, err = readItemsCounted(ctx, path, shard, opt)
	return cat, digest, err
}

// readItemsCounted is readItemsFile that also counts the items of the
// whole file (every shard's), for the header record's item_count.
func readItemsCounted(ctx context.Context, path string, shard batch.Shard, opt batch.ReadOptions) (cat *batch.Catalogue, count int, digest string, err error) {
	keep := func(i int) bool {
		count = max(count, i+1)
		return shard.Contains(i)
	}
	digest, err = readDigested(ctx, "items", path, func(r io.Reader) (err error) {
		cat, err = batch.ReadCatalogue(r, path, keep, opt)
		return err
	})
	return cat, count, digest, err
}

func readHistoryFile(ctx context.Context, path string, p history.Period, opt history.Options) (h *history.History, digest string, err error) {
	digest, err = readDigested(ctx, "history", path, func(r io.Reader) (err error) {
		h, err = history.ReadWith(r, path, p, opt)
		return err
	})
	return h, digest, err
}

// sameFile reports whether the paths name one existing file.
func sameFile(a, b string) bool {
	fa, errA := os.Stat(a)
	fb, errB := os.Stat(b)
	return errA == nil && errB == nil && os.SameFile(fa, fb)
}

// isTerminal reports whether w is a terminal, where a progress bar may be
// drawn.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}
