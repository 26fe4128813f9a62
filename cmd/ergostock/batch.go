package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/urfave/cli/v2"
	"golang.org/x/term"

	"ergostock/inventory/history"
	"ergostock/policies"
	"ergostock/policies/batch"
)

const batchDescription = `Plans every item of the items file: fits a demand model to the item's
history (or takes the item's demand column), finds the cheapest policy of the
item's type under its fill-rate floor, evaluates the policy in use when the
current_* columns give one, and writes one row per item, in the order of the
items file, to the results file. An item that cannot be planned gets an error
in its row; the others are unaffected.

Items file columns (header required, any order): sku, lead_time,
holding_cost, shortage_cost; optionally order_cost, unit_cost, unmet
(backorder|lost), policy (base-stock|s-S|s-nQ), min_fill_rate, demand,
current_reorder_point, current_order_up_to, current_order_multiple
(current_order_up_to alone: base-stock; with current_reorder_point: s-S;
current_reorder_point with current_order_multiple: s-nQ).

The results file is written to a temporary file beside it and renamed into
place at the end, so a failed run leaves an existing file as it was.
--shard K/N plans only the items at positions K, K+N, K+2N, ... (0-based),
so that N runs, for instance the tasks of a cluster array job, split the
catalogue; their parts concatenate (header once) into the full result, and
the item column restores input order.

Exit status: 0 when every item was planned; 3 when the results file was
written but some items failed; 1 when the run failed as a whole (an
unreadable file, a missing column, a write error) and nothing was written;
2 for a usage error.`

func batchCommand() *cli.Command {
	return &cli.Command{
		Name:        "batch",
		Usage:       "plan a whole catalogue: fitted demand, cheapest policy, its figures and the saving, one row per item",
		UsageText:   "ergostock batch --items FILE --history FILE --out FILE [--period day|week|month] [--workers N] [--shard K/N]",
		Description: batchDescription,
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "items", Usage: "items file (CSV): costs, lead time and policy in use per SKU", Required: true},
			&cli.StringFlag{Name: "history", Usage: "demand history (CSV with sku, date or period, quantity); may be omitted when every item has a demand column"},
			&cli.StringFlag{Name: "out", Usage: "results file (CSV) to write", Required: true},
			&cli.StringFlag{Name: "period", Usage: "review period the history is summed into: day, week (ISO, Monday first) or month", Value: "week"},
			&cli.IntFlag{Name: "workers", Usage: "items planned at once", Value: runtime.GOMAXPROCS(0), DefaultText: "all cores"},
			&cli.StringFlag{Name: "shard", Usage: "plan only the items at positions K, K+N, K+2N, ... (0-based), given as K/N"},
			&cli.IntFlag{Name: "max-states", Usage: "largest lost-sales chain to build per evaluation", Value: policies.DefaultMaxStates},
		},
		Action: func(c *cli.Context) error {
			return runBatch(c, c.App.ErrWriter)
		},
	}
}

// batchSummary tallies the rows as they are written.
type batchSummary struct {
	items, failed, withCurrent int
	totalCost, saving          float64
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
	return fmt.Sprintf("batch: %d items: %d planned, %d failed; total cost %.2f per period; saving %.2f per period over %d items with a current policy",
		s.items, s.items-s.failed, s.failed, s.totalCost, s.saving, s.withCurrent)
}

func runBatch(c *cli.Context, stderr io.Writer) error {
	workers := c.Int("workers")
	if workers < 1 {
		return usageErr("--workers %d: want a number of workers >= 1", workers)
	}
	if c.Int("max-states") < 1 {
		return usageErr("--max-states %d: want a state count >= 1", c.Int("max-states"))
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
	itemsPath, histPath, outPath := c.String("items"), c.String("history"), c.String("out")
	for _, in := range []struct{ flag, path string }{{"items", itemsPath}, {"history", histPath}} {
		if in.path != "" && sameFile(in.path, outPath) {
			return usageErr("--out %s: it is the --%s file; choose another results file", outPath, in.flag)
		}
	}

	items, err := readItemsFile(itemsPath, shard)
	if err != nil {
		return err
	}
	planner := &batch.Planner{Options: policies.Options{MaxStates: c.Int("max-states")}}
	if histPath != "" {
		h, err := readHistoryFile(histPath, period)
		if err != nil {
			return err
		}
		if n := len(h.Errors); n > 0 {
			fmt.Fprintf(stderr, "ergostock: %s: %d rows without a sku skipped, first %v\n", histPath, n, h.Errors[0])
		}
		need := make(map[string]bool, len(items))
		for _, it := range items {
			need[it.SKU] = true
		}
		planner.Fit, planner.Pattern = batch.HistoryFit(h, func(sku string) bool { return need[sku] })
	} else {
		planner.Fit = func(sku string) (*batch.Fitted, error) {
			return nil, errors.New("no demand column and no --history file")
		}
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
	var sum batchSummary
	err = batch.WriteFileAtomic(outPath, func(w io.Writer) error {
		bw := batch.NewWriter(w)
		if err := bw.WriteHeader(); err != nil {
			return err
		}
		err := batch.Run(len(items), workers,
			func(i int) batch.Row { return planner.Plan(items[i]) },
			func(i int, r batch.Row) error {
				sum.add(&r)
				if bar != nil {
					bar.Add(1)
				}
				return bw.Write(&r)
			})
		if err != nil {
			return err
		}
		return bw.Flush()
	})
	if bar != nil {
		bar.Finish()
	}
	if err != nil {
		return fmt.Errorf("--out %s: %w", outPath, err)
	}
	msg := sum.String() + "; results in " + outPath
	if sum.failed > 0 {
		return &exitError{code: 3, err: errors.New(msg)}
	}
	fmt.Fprintf(stderr, "ergostock: %s\n", msg)
	return nil
}

func readItemsFile(path string, shard batch.Shard) ([]batch.Item, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("--items: %w", err)
	}
	defer f.Close()
	return batch.ReadItems(f, path, shard.Contains)
}

func readHistoryFile(path string, p history.Period) (*history.History, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("--history: %w", err)
	}
	defer f.Close()
	return history.Read(f, path, p)
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
