package main

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"os/signal"
	"strings"
	"syscall"
	"time"

	"github.com/urfave/cli/v2"

	"ergostock/inventory/history"
	"ergostock/policies"
	"ergostock/policies/batch"
	"ergostock/policies/report"

	"ergostock/cmd/ergostock/whatif"
)

const serveDescription = `Serves a page on this machine for reviewing the items of a batch run: the
items as a list to sort and filter (by saving, fill-rate gap, pattern and,
when the results have a regret column, regret); for one item its history,
fitted demand law, current and recommended levels; inputs for the levels,
lead time, costs and fill-rate floor, each change evaluated exactly on the
server; a button for the cheapest levels under the inputs on screen; and a
record of the decision (accept the recommendation, keep the levels in use,
or override them with a note).

Decisions go to a CSV log beside the results (--decisions, default the
results file name with "-decisions" before its extension), rewritten
atomically under a lock at each decision; an older decision is never lost,
and a decision based on a version that is no longer the latest (a second
tab) is refused. ergostock batch --decisions FILE takes the latest decision
of each SKU (of each (sku, location) in a run by location) as its policy
in use.

The items and history are read as batch reads them, with the same reader
flags (--delimiter, --decimal, --encoding, --date-format,
--history-columns, --items-columns, --returns, --returns-column,
--quantity-scale, the sheet flags): give the flags the batch run was given.
A run planned by (sku, location) (an items file with a location column;
the results then have one after sku) is served by (sku, location): the
list names each pair as "SKU @ location", an item's history is its
location's, and the decisions file has a location column after sku.

The server listens on a loopback address only (127.0.0.1:8080 by default),
with no accounts: anyone on this machine can use it. --allow-remote lets it
listen elsewhere; do that only on a network you trust. The figures are the
model's: they assume demand independent from period to period with the
fitted law and the costs given. For critical items (medicines, safety
spares) follow local practice and regulation.

The JSON API (for scripts too): POST /api/evaluate and /api/optimize take
an object with the flags of evaluate and optimize, "-" written as "_"
({"demand": "poisson:mean=4", "holding_cost": 1, "shortage_cost": 9,
"order_up_to": 7}), and answer what evaluate --json and optimize --json
print; a refused input gets status 400 or 422 and {"error": "..."} with the
command line's message. SIGINT or SIGTERM stops the server cleanly.`

func serveCommand() *cli.Command {
	return &cli.Command{
		Name:        "serve",
		Usage:       "a local what-if page over a batch run: try levels with exact figures, record decisions",
		UsageText:   "ergostock serve --results FILE --items FILE --history FILE [--addr 127.0.0.1:8080] [--decisions FILE] [--allow-remote] [--timeout D] [reader flags as batch: --delimiter, --decimal, --date-format, --history-columns, --items-columns, --returns, ...]",
		Description: serveDescription,
		Flags: append([]cli.Flag{
			&cli.StringFlag{Name: "results", Usage: "results file of ergostock batch", Required: true},
			&cli.StringFlag{Name: "items", Usage: "the items file the batch planned", Required: true},
			&cli.StringFlag{Name: "history", Usage: "the demand history the batch fitted (optional when every item has a demand column)"},
			&cli.StringFlag{Name: "addr", Usage: "address to listen on (host:port; port 0 picks a free one)", Value: "127.0.0.1:8080"},
			&cli.StringFlag{Name: "decisions", Usage: "decisions file (CSV log) to keep; default: the results name with -decisions"},
			&cli.BoolFlag{Name: "allow-remote", Usage: "allow an address other than loopback (no accounts: anyone who reaches it can use it)"},
			&cli.DurationFlag{Name: "timeout", Usage: "budget of one evaluation or search", Value: whatif.DefaultTimeout},
		}, readFlags()...),
		Action: runServe,
	}
}

// defaultDecisions is the results path with "-decisions" before its
// extension: out/results.csv -> out/results-decisions.csv.
func defaultDecisions(results string) string {
	ext := ""
	base := results
	if i := strings.LastIndexByte(results, '.'); i > strings.LastIndexAny(results, `/\`) && i > 0 {
		base, ext = results[:i], results[i:]
	}
	return base + "-decisions" + ext
}

// serveConfig reads the files of serve with the readers' defaults and
// builds the server's configuration (see serveConfigWith).
func serveConfig(ctx context.Context, resultsPath, itemsPath, histPath, decisionsPath string) (whatif.Config, error) {
	return serveConfigWith(ctx, resultsPath, itemsPath, histPath, decisionsPath, func(p history.Period) (batch.ReadOptions, history.Options, error) {
		return batch.ReadOptions{PeriodDays: periodDays(p), PeriodName: p.String()}, history.Options{}, nil
	})
}

// readerOptions gives the options of the items and history readers for
// the planning period of the results.
type readerOptions func(history.Period) (batch.ReadOptions, history.Options, error)

// serveConfigWith reads the files of serve, the items and history with
// the options of opts (the reader flags, as batch and report take them),
// and builds the server's configuration. A run planned by (sku,
// location) (the results' location column) needs an items file with a
// location column and a history read by location.
func serveConfigWith(ctx context.Context, resultsPath, itemsPath, histPath, decisionsPath string, opts readerOptions) (whatif.Config, error) {
	var cfg whatif.Config
	raw, err := os.ReadFile(resultsPath)
	if err != nil {
		return cfg, fmt.Errorf("--results: %w", err)
	}
	res, err := report.ReadResultsFile(bytes.NewReader(raw), resultsPath)
	if err != nil {
		return cfg, err
	}
	regret, _, err := whatif.ReadRegret(bytes.NewReader(raw), resultsPath)
	if err != nil {
		return cfg, err
	}
	period := "week"
	if res.Meta != nil && res.Meta.Period != "" {
		period = res.Meta.Period
	}
	per, err := history.ParsePeriod(period)
	if err != nil {
		return cfg, fmt.Errorf("--results %s: %w", resultsPath, err)
	}
	iopt, hopt, err := opts(per)
	if err != nil {
		return cfg, err
	}
	cat, _, err := readItemsFile(ctx, itemsPath, batch.Shard{}, iopt)
	if err != nil {
		return cfg, err
	}
	if cat.ByLocation != res.ByLocation {
		return cfg, locationMismatch(itemsPath, resultsPath, cat.ByLocation)
	}
	items := cat.Items
	hopt.ByLocation = cat.ByLocation
	var h *history.History
	if histPath != "" {
		p, err := history.ParsePeriod(period)
		if err != nil {
			return cfg, fmt.Errorf("--results %s: %w", resultsPath, err)
		}
		if h, _, err = readHistoryFile(ctx, histPath, p, hopt); err != nil {
			return cfg, err
		}
		if cat.ByLocation && !h.Location {
			return cfg, fmt.Errorf("%s:1: %s was planned by (sku, location), but the history has no location column: give the history the batch read (or map its column with --history-columns location=HEADER)", h.File, resultsPath)
		}
	}
	if decisionsPath == "" {
		decisionsPath = defaultDecisions(resultsPath)
	}
	for _, in := range []struct{ flag, path string }{{"results", resultsPath}, {"items", itemsPath}, {"history", histPath}} {
		if in.path != "" && sameFile(in.path, decisionsPath) {
			return cfg, usageErr("--decisions %s: it is the --%s file; choose another decisions file", decisionsPath, in.flag)
		}
	}
	cfg = whatif.Config{
		Engine:    cliEngine{},
		Catalogue: whatif.NewCatalogue(res.Rows, regret, items, h, period),
		Decisions: decisionsPath,
	}
	cfg.Catalogue.ByLocation = cat.ByLocation // even when every location cell is empty
	return cfg, nil
}

func runServe(c *cli.Context) error {
	stderr := c.App.ErrWriter
	timeout := c.Duration("timeout")
	if timeout <= 0 {
		return usageErr("--timeout %v: want a duration > 0, e.g. 20s", timeout)
	}
	addr := c.String("addr")
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return usageErr("--addr %s: want host:port, e.g. 127.0.0.1:8080", addr)
	}
	if !loopbackHost(host) && !c.Bool("allow-remote") {
		return usageErr("--addr %s: not a loopback address; the page has no accounts, so give --allow-remote to listen there", addr)
	}
	ctx, stop := signal.NotifyContext(c.Context, os.Interrupt, syscall.SIGTERM)
	defer stop()
	if res, err := readResultsMeta(c.String("results")); err == nil {
		warnReading(c, res, c.String("results"))
	}
	cfg, err := serveConfigWith(ctx, c.String("results"), c.String("items"), c.String("history"), c.String("decisions"),
		func(p history.Period) (batch.ReadOptions, history.Options, error) {
			iopt, err := itemsOptions(c, p)
			if err != nil {
				return iopt, history.Options{}, err
			}
			hopt, err := historyOptions(c)
			return iopt, hopt, err
		})
	if err != nil {
		return err
	}
	cfg.Timeout, cfg.Log, cfg.AllowRemote = timeout, stderr, c.Bool("allow-remote")
	srv, err := whatif.New(cfg)
	if err != nil {
		return err
	}
	fmt.Fprintf(stderr, "ergostock serve: evaluating the levels in use of %d items...\n", cfg.Catalogue.Len())
	srv.EvaluateCurrent(ctx, 0)
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		return fmt.Errorf("--addr %s: %w", addr, err)
	}
	hs := &http.Server{Handler: srv, ReadHeaderTimeout: 10 * time.Second, ReadTimeout: 30 * time.Second,
		WriteTimeout: timeout + 30*time.Second, IdleTimeout: 2 * time.Minute}
	fmt.Fprintf(stderr, "ergostock serve: http://%s/ (decisions in %s; Ctrl-C stops)\n", ln.Addr(), cfg.Decisions)
	done := make(chan error, 1)
	go func() { done <- hs.Serve(ln) }()
	select {
	case err := <-done:
		return fmt.Errorf("serve: %w", err)
	case <-ctx.Done():
	}
	// Let requests in flight finish: a decision being written is
	// committed (or left out whole) before the process exits.
	sctx, cancel := context.WithTimeout(context.Background(), timeout+5*time.Second)
	defer cancel()
	if err := hs.Shutdown(sctx); err != nil {
		return fmt.Errorf("serve: shutting down: %w", err)
	}
	if err := <-done; err != nil && !errors.Is(err, http.ErrServerClosed) {
		return fmt.Errorf("serve: %w", err)
	}
	fmt.Fprintf(stderr, "ergostock serve: stopped; decisions in %s\n", cfg.Decisions)
	return nil
}

// loopbackHost reports whether host is localhost or a loopback address.
func loopbackHost(host string) bool {
	if strings.EqualFold(host, "localhost") {
		return true
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback()
}

// cliEngine answers the server's requests by running the evaluate and
// optimize commands themselves, so the API's answers and messages are the
// command line's.
type cliEngine struct{}

func (cliEngine) Run(ctx context.Context, command string, args []string, levels bool) (*whatif.Answer, error) {
	if command != "evaluate" && command != "optimize" {
		return nil, fmt.Errorf("engine: unknown command %q", command)
	}
	var sink *levelsSink
	if levels {
		sink = &levelsSink{}
		ctx = context.WithValue(ctx, levelsKey{}, sink)
	}
	argv := append([]string{"ergostock", command}, args...)
	argv = append(argv, "--json")
	var out, errb bytes.Buffer
	code := runContext(ctx, argv, strings.NewReader(""), &out, &errb)
	if code != 0 {
		msg := strings.TrimPrefix(strings.TrimSpace(errb.String()), "ergostock: ")
		if i := strings.IndexByte(msg, '\n'); i >= 0 {
			msg = msg[:i]
		}
		return nil, &whatif.Refusal{Status: code, Message: msg}
	}
	a := &whatif.Answer{JSON: out.Bytes()}
	if sink != nil {
		a.Levels = sink.levels
	}
	return a, nil
}

// levelsKey is the context key of a levelsSink: the server asks evaluate
// for the stationary stock-level law through it (Options.Levels), without
// a flag of its own or a change to evaluate's output.
type levelsKey struct{}

type levelsSink struct{ levels *policies.LevelDistribution }

// levelsWanted reports whether ctx asks evaluate for the level law.
func levelsWanted(ctx context.Context) bool {
	if ctx == nil {
		return false
	}
	_, ok := ctx.Value(levelsKey{}).(*levelsSink)
	return ok
}

// keepLevels hands the level law of e to the sink in ctx, if any.
func keepLevels(ctx context.Context, e *policies.Evaluation) {
	if ctx == nil {
		return
	}
	if s, ok := ctx.Value(levelsKey{}).(*levelsSink); ok {
		s.levels = e.Levels
	}
}

// readResultsMeta reads the header record of a results file (nil without
// one); an unreadable file is left for serveConfigWith to report.
func readResultsMeta(path string) (*batch.Meta, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	line, err := bufio.NewReader(io.LimitReader(f, 1<<16)).ReadString('\n')
	if !strings.HasPrefix(line, "#") {
		return nil, err
	}
	return batch.ParseMeta(line, path, 1)
}
