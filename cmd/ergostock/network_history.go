package main

import (
	"context"
	"fmt"
	"strings"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/inventory/tabular"
	"ergostock/policies/batch"
	"ergostock/policies/network"
)

// Demand from history for the network commands: each location's external
// demand is fitted, by the fit of `fit` and `batch`, to the history rows of
// its (sku, location), when its demand cell is empty.

// networkHistoryFlags are the flags of a network command that may read a
// history: the file, the period, and the shared reader flags.
func networkHistoryFlags(withSKU bool) []cli.Flag {
	fs := []cli.Flag{
		&cli.StringFlag{Name: "history", Usage: "demand history with a location column (CSV or .xlsx): fits the demand of every location whose demand cell is empty"},
		&cli.StringFlag{Name: "period", Usage: "period the history is summed into (the network's period): day, week or month", Value: "week"},
	}
	if withSKU {
		fs = append(fs, &cli.StringFlag{Name: "sku", Usage: "the SKU of the history the network plans (with --history)"})
	}
	fs = append(fs, tableFlags()...)
	fs = append(fs, historyReadFlags()...)
	return fs
}

// networkReadOptions reads the reader flags for the network or items file:
// the dialect, and the column map of flag (--items-columns, or "" for none).
func networkReadOptions(c *cli.Context, flag string) (network.CatalogueOptions, error) {
	t, dec, err := tableOptions(c)
	if err != nil {
		return network.CatalogueOptions{}, err
	}
	opt := network.CatalogueOptions{Table: t, Decimal: dec}
	if flag != "" {
		opt.Table.Sheet = c.String("items-sheet")
		opt.ColumnsFlag = "--" + flag
		if opt.Columns, err = tabular.ParseColumnMap(opt.ColumnsFlag, c.String(flag), network.CatalogueColumns()); err != nil {
			return opt, usageErr("%v", err)
		}
	}
	return opt, nil
}

// readNetworkHistory reads --history by location for the network commands;
// nil when the flag is not given.
func readNetworkHistory(c *cli.Context) (*history.History, error) {
	h, _, err := readNetworkHistoryDigest(c)
	return h, err
}

// readNetworkHistoryDigest is readNetworkHistory with the digest of the
// history file.
func readNetworkHistoryDigest(c *cli.Context) (*history.History, string, error) {
	path := c.String("history")
	if path == "" {
		if c.IsSet("history") {
			return nil, "", usageErr("--history: want the history file")
		}
		return nil, "", nil
	}
	period, err := history.ParsePeriod(c.String("period"))
	if err != nil {
		return nil, "", usageErr("--%v", err)
	}
	hopt, err := historyOptions(c)
	if err != nil {
		return nil, "", err
	}
	hopt.ByLocation = true
	h, digest, err := readHistoryFile(context.Background(), path, period, hopt)
	if err != nil {
		return nil, "", err
	}
	if !h.Location {
		return nil, "", fmt.Errorf("%s:1: no location column: the network's demand is fitted per location, so the history needs one (or map it with --history-columns location=HEADER)", h.File)
	}
	if h.Rows == 0 {
		return nil, "", fmt.Errorf("%s:2: no data rows, want at least one row of sku, date, quantity and location", h.File)
	}
	if err := fitNoSeries(h); err != nil {
		return nil, "", err
	}
	return h, digest, nil
}

// historyDemand is the demand source of a network read with a history: the
// fit of the history rows of (sku, location). A store with no rows fails
// its SKU (naming the near-misses among the history's SKUs and locations);
// a centre with no rows has no demand of its own (a note says so); a centre
// with rows fails, since external demand at the centre is not modelled.
// notes, when not nil, receives one line per location it has something to
// say about, keyed by batch.PlanKey(sku, location).
func historyDemand(h *history.History, file string, notes map[string]string) func(sku string, l network.Location) (inventory.Distribution, string, error) {
	fit, _ := batch.HistoryFit(h, nil)
	byKey := map[string]*history.SKU{}
	locs := map[string][]string{}
	var skus []string
	for _, k := range h.SKUs {
		byKey[batch.PlanKey(k.SKU, k.Location)] = k
		if _, ok := locs[k.SKU]; !ok {
			skus = append(skus, k.SKU)
		}
		locs[k.SKU] = append(locs[k.SKU], k.Location)
	}
	return func(sku string, l network.Location) (inventory.Distribution, string, error) {
		key := batch.PlanKey(sku, l.Name)
		bad := func(format string, a ...any) error {
			return &tabular.Error{File: file, Line: l.Line, Column: "demand", Err: fmt.Errorf(format, a...)}
		}
		k := byKey[key]
		if k == nil {
			hint := locationHint(sku, l.Name, skus, locs[sku])
			if l.Parent == "" {
				hint = "" // a centre usually has no rows: name only a near-miss
				if near := tabular.Near(l.Name, locs[sku]); len(near) > 0 {
					hint = fmt.Sprintf("; did the history mean it by %q?", near[0])
				}
				note := fmt.Sprintf("centre %q has no demand cell and no rows in %s: planned without demand of its own%s", l.Name, h.File, hint)
				if notes != nil {
					notes[key] = note
				}
				return nil, note, nil
			}
			return nil, "", bad("empty, and %s has no rows of sku %q at location %q: want a demand law, or history rows for every store%s", h.File, sku, l.Name, hint)
		}
		if l.Parent == "" {
			return nil, "", bad("empty, and %s has %d rows of sku %q at the centre %q: external demand at the centre is not modelled: give it to a store of the centre with lead time 0", h.File, k.Records, sku, l.Name)
		}
		f, err := fit(key)
		if err != nil {
			return nil, "", bad("empty, and its fit from the history failed: %v", err)
		}
		note := fmt.Sprintf("%s: demand %s fitted from %s (%d periods)", l.Name, f.Demand.String(), h.File, len(f.Series))
		if len(f.Warnings) > 0 {
			note += " (" + strings.Join(f.Warnings, "; ") + ")"
		}
		if notes != nil {
			notes[key] = note
		}
		return f.Demand, note, nil
	}
}

// locationHint names what the history may have meant by (sku, loc): a near
// SKU, a near location of the SKU, or the SKU's locations.
func locationHint(sku, loc string, skus, locs []string) string {
	quote := func(ss []string, sep string) string {
		q := make([]string, len(ss))
		for i, s := range ss {
			q[i] = fmt.Sprintf("%q", s)
		}
		if len(q) > 5 {
			q = append(q[:5], "...")
		}
		return strings.Join(q, sep)
	}
	if len(locs) == 0 {
		if near := tabular.Near(sku, skus); len(near) > 0 {
			return "; did you mean sku " + quote(near, " or ") + "?"
		}
		return fmt.Sprintf(" (no rows of sku %q at all)", sku)
	}
	if near := tabular.Near(loc, locs); len(near) > 0 {
		return "; did you mean location " + quote(near, " or ") + "?"
	}
	return fmt.Sprintf(" (it has sku %q at %s)", sku, quote(locs, ", "))
}

// unnamedLocations says which locations of sku the history has rows at
// that the network does not name ("" when none): their demand is left out
// of the plan.
func unnamedLocations(h *history.History, sku string, n *network.Network) string {
	named := map[string]bool{n.Centre.Name: true}
	for _, l := range n.Stores {
		named[l.Name] = true
	}
	var left []string
	for _, k := range h.SKUs {
		if k.SKU == sku && !named[k.Location] {
			left = append(left, fmt.Sprintf("%q (%d rows)", k.Location, k.Records))
		}
	}
	if len(left) == 0 {
		return ""
	}
	if len(left) > 5 {
		left = append(left[:5], "...")
	}
	return fmt.Sprintf("%s also has sku %q at %s, not in the network: left out of the plan", h.File, sku, strings.Join(left, ", "))
}
