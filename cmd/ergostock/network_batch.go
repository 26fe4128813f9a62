package main

import (
	"context"
	"encoding/csv"
	"fmt"
	"math"
	"os"
	"runtime"
	"strconv"
	"strings"

	"github.com/urfave/cli/v2"

	"ergostock/inventory/tabular"
	"ergostock/policies/batch"
	"ergostock/policies/network"
)

// networkBatchHeader is the column header of `network batch` results: one
// row per SKU and location.
var networkBatchHeader = []string{"sku", "location", "parent", "lead_time", "base_stock", "echelon_base_stock",
	"fill_rate", "stockout_probability", "mean_on_hand", "mean_backorders", "holding_cost", "shortage_cost",
	"total_cost", "network_total_cost", "alone_total_cost", "exact", "fill_rate_error", "warnings", "error"}

func networkBatchCommand() *cli.Command {
	return &cli.Command{
		Name:  "batch",
		Usage: "plan one network per SKU from an items file (columns sku + those of the network file); one results row per SKU and location",
		Description: "Reads --items (the network file's columns plus sku: the rows of a SKU are its locations),\n" +
			"finds the cheapest levels of every SKU's network (see network optimize), plans each location\n" +
			"alone for comparison, and writes --out atomically. A SKU whose rows cannot be used fails alone:\n" +
			"its row carries the reason in the error column (exit status 3). For SKUs with several stores\n" +
			"the figures are an approximation; fill_rate_error is the largest fill-rate difference from a\n" +
			"short seeded simulation of the same network (--check-periods 0 skips it).\n\n" +
			"With --history (a demand history with a location column), every location whose demand cell is\n" +
			"empty (or every location, when the items file has no demand column) gets the demand fitted to\n" +
			"the history rows of its SKU and location, as fit and batch fit it; a centre without rows has no\n" +
			"demand of its own, a store without rows fails its SKU. The warnings column says what was fitted.",
		Flags: append([]cli.Flag{
			&cli.StringFlag{Name: "items", Usage: "the items file (CSV or .xlsx)"},
			&cli.StringFlag{Name: "out", Usage: "results file to write"},
			&cli.StringFlag{Name: "levels", Usage: "what the centre's base_stock means: echelon or installation", Value: "echelon"},
			&cli.StringFlag{Name: "min-fill-rate", Usage: "fill-rate floor for every store whose min_fill_rate cell is empty"},
			&cli.StringFlag{Name: "split", Usage: "several stores: binomial or two-moment split of the centre's backorders (see network evaluate --help)", Value: "binomial"},
			&cli.StringFlag{Name: "workers", Usage: "SKUs planned at once (0: all cores); never changes the output", Value: "0"},
			&cli.StringFlag{Name: "check-periods", Usage: "periods per replication of the check simulation (several stores); 0 skips it", Value: "5000"},
			&cli.StringFlag{Name: "check-replications", Usage: "replications of the check simulation", Value: "4"},
			&cli.StringFlag{Name: "seed", Usage: "seed of the check simulation", Value: "1"},
		}, append(networkHistoryFlags(false), itemsReadFlags()...)...),
		Action: networkBatch,
	}
}

func networkBatch(c *cli.Context) error {
	path, out := c.String("items"), c.String("out")
	if path == "" || out == "" {
		return usageErr("network batch: --items and --out are required (see --help)")
	}
	levels, err := network.ParseLevels(c.String("levels"))
	if err != nil {
		return usageErr("--levels %s: want echelon or installation", showValue(c.String("levels")))
	}
	split, err := network.ParseSplit(c.String("split"))
	if err != nil {
		return usageErr("--split %s: want binomial or two-moment", showValue(c.String("split")))
	}
	floor := 0.0
	if c.IsSet("min-fill-rate") {
		var nums tabular.Numbers
		v, _, err := nums.Fraction(c.String("min-fill-rate"), 0)
		if err != nil || v < 0 || v > network.MaxFillRate {
			return usageErr("--min-fill-rate %s: want a fraction from 0 to 1 - 1e-9 (such as 0.95 or 95%%)", showValue(c.String("min-fill-rate")))
		}
		floor = v
	}
	workers, err := wholeFlag(c, "workers", 0)
	if err != nil {
		return err
	}
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	periods, err := wholeFlag(c, "check-periods", 0)
	if err != nil {
		return err
	}
	reps, err := wholeFlag(c, "check-replications", 2)
	if err != nil {
		return err
	}
	seed, err := wholeFlag(c, "seed", 0)
	if err != nil {
		return err
	}
	return runNetworkBatch(c, networkBatchConfig{items: path, out: out, levels: levels, split: split, floor: floor,
		workers: workers, periods: periods, reps: reps, seed: seed, command: "network batch"})
}

// networkBatchConfig is what `network batch` (and `batch` with an items
// file of networks) was asked for.
type networkBatchConfig struct {
	items, out       string
	levels           network.Levels
	split            network.Split
	floor            float64
	workers, periods int
	reps, seed       int
	command          string // for the summary line
}

// runNetworkBatch plans the networks of cfg.items; the reader flags
// (dialect, --items-columns, --items-sheet, --history and its flags) are
// read from c, which both commands give.
func runNetworkBatch(c *cli.Context, cfg networkBatchConfig) error {
	path, out, levels, split, floor := cfg.items, cfg.out, cfg.levels, cfg.split, cfg.floor
	workers, periods, reps, seed := cfg.workers, cfg.periods, cfg.reps, cfg.seed
	opt, err := networkReadOptions(c, "items-columns")
	if err != nil {
		return err
	}
	h, hdigest, err := readNetworkHistoryDigest(c)
	if err != nil {
		return err
	}
	notes := map[string]string{}
	if h != nil {
		if sameFile(h.File, out) {
			return usageErr("--out %s: it is the --history file", out)
		}
		opt.Demand = historyDemand(h, path, notes)
	}
	if sameFile(path, out) {
		return usageErr("--out %s: it is the --items file", out)
	}
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	items, err := network.ReadCatalogueWith(f, path, levels, opt)
	f.Close()
	if err != nil {
		return err
	}
	// Notes are complete before the plans run (they are read in parallel).
	for _, it := range items {
		if h == nil || it.Network == nil {
			continue
		}
		if note := unnamedLocations(h, it.SKU, it.Network); note != "" {
			key := batch.PlanKey(it.SKU, it.Network.Centre.Name)
			if notes[key] != "" {
				note = notes[key] + "; " + note
			}
			notes[key] = note
		}
	}
	plan := func(_ context.Context, i int) [][]string {
		it := items[i]
		if it.Err != nil {
			return failedRows(it.SKU, it.Err)
		}
		n := it.Network
		n.Split = split

		for j := range n.Stores {
			if n.Stores[j].MinFillRate == 0 {
				n.Stores[j].MinFillRate = floor
			}
		}
		p, err := network.Optimize(n)
		if err != nil {
			return failedRows(it.SKU, err)
		}
		alone, err := network.Alone(n)
		if err != nil {
			return failedRows(it.SKU, err)
		}
		fillErr := math.NaN()
		if p.Result.Exact {
			fillErr = 0
		} else if periods > 0 {
			sr, err := network.Simulate(p.Network, network.SimOptions{Periods: periods, Warmup: periods / 10, Replications: reps, Seed: uint64(seed), Workers: 1})
			if err != nil {
				return failedRows(it.SKU, err)
			}
			fillErr = 0
			for k, l := range p.Result.Locations {
				fillErr = math.Max(fillErr, math.Abs(l.FillRate-sr.Locations[k].FillRate.Mean))
			}
		}
		var rows [][]string
		for _, l := range p.Result.Locations {
			rows = append(rows, []string{batch.Guard(it.SKU), batch.Guard(l.Location), batch.Guard(l.Parent), strconv.Itoa(l.LeadTime),
				strconv.Itoa(l.InstallationLevel), strconv.Itoa(l.EchelonLevel), g(l.FillRate), g(l.StockoutProbability),
				g(l.MeanOnHand), g(l.MeanBackorders), g(l.HoldingCost), g(l.ShortageCost), g(l.TotalCost),
				g(p.Result.TotalCost), g(alone.Result.TotalCost), strconv.FormatBool(p.Result.Exact), gOrEmpty(fillErr),
				batch.Guard(notes[batch.PlanKey(it.SKU, l.Location)]), ""})
		}
		return rows
	}
	fail := func(i int, err error) [][]string { return failedRows(items[i].SKU, err) }
	failed, planned := 0, 0
	a, err := batch.CreateAtomic(out)
	if err != nil {
		return fmt.Errorf("--out %s: %w", out, err)
	}
	w := csv.NewWriter(a)
	record := fmt.Sprintf("# ergostock network results v1; levels=%s; items=%d", levels, len(items))
	if h != nil {
		record += fmt.Sprintf("; history=%s; period=%s", hdigest, h.Period)
	}
	fmt.Fprintln(a, record)
	if err := w.Write(networkBatchHeader); err != nil {
		a.Abort()
		return err
	}
	emit := func(_ int, rows [][]string) error {
		if rows[0][len(networkBatchHeader)-1] != "" {
			failed++
		} else {
			planned++
		}
		return w.WriteAll(rows)
	}
	if err := batch.Run(c.Context, len(items), batch.RunOptions{Workers: workers}, plan, fail, emit); err != nil {
		a.Abort()
		return err
	}
	w.Flush()
	if err := w.Error(); err != nil {
		a.Abort()
		return err
	}
	if err := a.Commit(); err != nil {
		return fmt.Errorf("--out %s: %w", out, err)
	}
	msg := fmt.Sprintf("%s: %d SKUs: %d planned, %d failed; results in %s", cfg.command, len(items), planned, failed, out)
	if h != nil {
		fitted, bare := 0, 0
		for _, n := range notes {
			if strings.HasPrefix(n, "centre ") {
				bare++
			} else {
				fitted++
			}
		}
		msg += fmt.Sprintf("; demand fitted from %s (by location, per %s) at %d locations, %d centres without demand of their own", h.File, h.Period, fitted, bare)
	}
	if failed > 0 {
		return &exitError{code: 3, err: fmt.Errorf("%s", msg)}
	}
	fmt.Fprintf(c.App.ErrWriter, "ergostock: %s\n", msg)
	return nil
}

func failedRows(sku string, err error) [][]string {
	row := make([]string, len(networkBatchHeader))
	row[0] = batch.Guard(sku)
	row[len(row)-1] = batch.Guard(oneLine(err.Error()))
	return [][]string{row}
}

func g(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func gOrEmpty(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return g(v)
}

// itemsAreNetworks reports whether the batch items file plans networks: a
// header with both a location and a parent column (by name, or mapped by
// --items-columns). Anything it cannot read is left to the plain reader,
// which reports it.
func itemsAreNetworks(c *cli.Context) bool {
	path := c.String("items")
	if path == "" || path == "-" {
		return false
	}
	t, _, err := tableOptions(c)
	if err != nil {
		return false
	}
	t.Sheet = c.String("items-sheet")
	m, err := tabular.ParseColumnMap("--items-columns", c.String("items-columns"), network.CatalogueColumns())
	if err != nil {
		m = nil
	}
	r, closer, err := tabular.OpenFile(path, t)
	if err != nil {
		return false
	}
	defer closer()
	has := map[string]bool{}
	for _, h := range r.Header {
		has[tabular.Normalize(h)] = true
	}
	for k, v := range m {
		if has[tabular.Normalize(v)] {
			has[k] = true
		}
	}
	return has["location"] && has["parent"]
}

// networkBatchOff are the batch flags that do not apply to networks.
var networkBatchOff = []string{"shard", "receipts", "receipts-columns", "receipts-date-format", "uncertainty",
	"resamples", "resampling", "robust", "floor-confidence", "seed", "carry", "decisions", "out-delimiter",
	"out-decimal", "digits", "item-timeout", "max-states"}

// batchNetworks runs `batch` on an items file of networks: each SKU's rows
// are its locations, planned together as `network batch` plans them (the
// echelon reading of the centre's base_stock, the binomial split, a check
// simulation of 4 x 5000 periods, seed 1, for SKUs with several stores).
func batchNetworks(c *cli.Context) error {
	for _, f := range networkBatchOff {
		if c.IsSet(f) {
			return usageErr("--%s: not for an items file with location and parent columns (each SKU's network is planned as by network batch); drop it, or use ergostock network batch", f)
		}
	}
	out := c.String("out")
	if out == "-" || strings.HasSuffix(strings.ToLower(out), ".xlsx") {
		return usageErr("--out %s: an items file with location and parent columns writes network results to a CSV file; give a .csv name", out)
	}
	return runNetworkBatch(c, networkBatchConfig{items: c.String("items"), out: out, levels: network.Echelon, split: network.Binomial,
		workers: c.Int("workers"), periods: 5000, reps: 4, seed: 1, command: "batch (networks)"})
}
