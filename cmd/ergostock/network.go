package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/inventory/tabular"
	"ergostock/policies/batch"
	"ergostock/policies/network"
	"ergostock/policies/report"
)

// Defaults of the simulation that measures the error of the decomposition
// for networks of several stores (evaluate and optimize) and of simulate.
const (
	networkCheckPeriods      = 20000
	networkCheckReplications = 10
	networkCheckSeed         = 1
	networkSimPeriods        = 50000
	networkSimReplications   = 20
)

// networkCommand is `ergostock network evaluate|optimize|simulate`.
func networkCommand() *cli.Command {
	common := func() []cli.Flag {
		return []cli.Flag{
			&cli.StringFlag{Name: "network", Usage: "the locations file (CSV or .xlsx): columns location, parent (empty for the centre), lead_time, demand, holding_cost, shortage_cost, base_stock; optional min_fill_rate"},
			&cli.StringFlag{Name: "levels", Usage: "what the centre's base_stock means: echelon (its position and everything below it) or installation (its own position)", Value: "echelon"},
			&cli.BoolFlag{Name: "json", Usage: "print the result as JSON"},
			&cli.StringFlag{Name: "split", Usage: "several stores: how they share the centre's backorders in the approximation: binomial (in full) or two-moment (Graves' fit, faster for large networks)", Value: "binomial"},
		}
	}
	check := []cli.Flag{
		&cli.StringFlag{Name: "check-periods", Usage: "periods per replication of the simulation that measures the approximation's error (several stores); 0 skips it", Value: fmt.Sprint(networkCheckPeriods)},
		&cli.StringFlag{Name: "check-replications", Usage: "replications of that simulation", Value: fmt.Sprint(networkCheckReplications)},
		&cli.StringFlag{Name: "seed", Usage: "seed of the random streams", Value: fmt.Sprint(networkCheckSeed)},
	}
	simFlags := []cli.Flag{
		&cli.StringFlag{Name: "periods", Usage: "periods per replication, warm-up included", Value: fmt.Sprint(networkSimPeriods)},
		&cli.StringFlag{Name: "replications", Usage: "independent replications (>= 2)", Value: fmt.Sprint(networkSimReplications)},
		&cli.StringFlag{Name: "warmup", Usage: "leading periods of each replication left out", DefaultText: "a tenth of --periods"},
		&cli.StringFlag{Name: "seed", Usage: "seed of the random streams", Value: "1"},
		&cli.StringFlag{Name: "workers", Usage: "replications run at once (0: all cores); never changes the output", Value: "0"},
	}
	assumptions := "\n\nThe network: one centre (empty parent) replenished by an outside supplier, and stores\n" +
		"whose parent is the centre; every location follows a base-stock rule reviewed every period,\n" +
		"unmet demand is backordered everywhere, the centre serves the stores' orders first come,\n" +
		"first served, lead times are fixed, demand is independent from period to period. holding_cost\n" +
		"is per unit on hand at that location at the end of a period (stock in transit is not charged);\n" +
		"shortage_cost is per unit of a store's demand backordered at the end of a period (empty or 0 at\n" +
		"the centre). One store: exact figures. Several stores: an approximation (METRIC decomposition),\n" +
		"printed with its error measured by a seeded simulation. For critical items (medicines, safety\n" +
		"spares) the figures support, and do not replace, local practice and regulation."
	subs := []*cli.Command{
		{
			Name:        "evaluate",
			Usage:       "every location's fill rate, stock, backorders and costs for the levels in the file",
			Description: "Reads the network and its base_stock levels and prints each location's figures." + assumptions,
			Flags:       append(append(common(), check...), networkHistoryFlags(true)...),
			Action:      networkEvaluate,
		},
		{
			Name:  "optimize",
			Usage: "the cheapest levels for the whole network, under each store's fill-rate floor",
			Description: "Finds the base-stock levels of least expected cost per period (one store: the exact\n" +
				"Clark-Scarf recursion; with floors or several stores: a search described in the output) and\n" +
				"prints the levels with every figure." + assumptions,
			Flags: append(append(common(),
				&cli.StringFlag{Name: "min-fill-rate", Usage: "fill-rate floor for every store whose min_fill_rate cell is empty (0.95 or 95%)"}),
				append(check, networkHistoryFlags(true)...)...),
			Action: networkOptimize,
		},
		{
			Name:  "simulate",
			Usage: "simulate the network period by period: every figure with a 95% confidence interval",
			Description: "Plays the periods one by one on seeded streams and prints each figure's mean with the\n" +
				"half-width of its 95% Student t interval, beside the exact or approximate value." + assumptions,
			Flags:  append(append(common(), simFlags...), networkHistoryFlags(true)...),
			Action: networkSimulate,
		},
		{
			Name:  "report",
			Usage: "an HTML page of the network: a tree with each location's levels and fill rate, planned as a network against each location alone",
			Description: "Optimizes the network (or, with --as-given, evaluates the levels in the file), plans each\n" +
				"location alone for comparison, and writes one self-contained HTML page (--out)." + assumptions,
			Flags: append(append(common(),
				&cli.StringFlag{Name: "min-fill-rate", Usage: "fill-rate floor for every store whose min_fill_rate cell is empty (0.95 or 95%)"},
				&cli.BoolFlag{Name: "as-given", Usage: "show the levels in the file instead of the cheapest ones"},
				&cli.StringFlag{Name: "out", Usage: "HTML file to write"}),
				append(check, networkHistoryFlags(true)...)...),
			Action: networkReport,
		},
	}
	subs = append(subs, networkBatchCommand())
	for _, s := range subs {
		networkUsage(s)
	}
	return &cli.Command{
		Name:        "network",
		Usage:       "plan a centre and the stores it replenishes (evaluate, optimize, simulate, report, batch)",
		Subcommands: subs,
		Action: func(c *cli.Context) error {
			return usageErr("network: want a subcommand: evaluate, optimize, simulate, report or batch (see ergostock network --help)")
		},
	}
}

// networkUsage gives a subcommand the one-line usage errors of the other
// commands, named "network NAME".
func networkUsage(cmd *cli.Command) {
	name := "network " + cmd.Name
	cmd.OnUsageError = func(_ *cli.Context, err error, _ bool) error {
		return usageErr("%s: %s (see ergostock %s --help)", name, flagMessage(cmd, err), name)
	}
	action := cmd.Action
	cmd.Action = func(c *cli.Context) error {
		if c.NArg() > 0 {
			return usageErr("%s: unexpected argument %q (every input is given by a flag)", name, c.Args().First())
		}
		if !c.IsSet("network") && cmd.Name != "batch" {
			return usageErr("%s: --network is required (see --help)", name)
		}
		return action(c)
	}
}

// wholeFlag reads a whole-number flag by the project's number rule.
func wholeFlag(c *cli.Context, name string, lo int64) (int, error) {
	s := c.String(name)
	v, err := inventory.ParseInt(strings.TrimSpace(s))
	if err != nil || v < lo || v > math.MaxInt32 {
		return 0, usageErr("--%s %s: want a whole number from %d to %d", name, showValue(s), lo, math.MaxInt32)
	}
	return int(v), nil
}

func readNetwork(c *cli.Context) (*network.Network, error) {
	levels, err := network.ParseLevels(c.String("levels"))
	if err != nil {
		return nil, usageErr("--levels %s: want echelon or installation", showValue(c.String("levels")))
	}
	split, err := network.ParseSplit(c.String("split"))
	if err != nil {
		return nil, usageErr("--split %s: want binomial or two-moment", showValue(c.String("split")))
	}
	if c.String("history") == "" && c.String("sku") != "" {
		return nil, usageErr("--sku %s: want it with --history (the SKU whose history gives the demand)", showValue(c.String("sku")))
	}
	h, err := readNetworkHistory(c)
	if err != nil {
		return nil, err
	}
	if h == nil {
		n, err := network.ReadFile(c.String("network"), levels, tabular.Options{})
		if err != nil {
			return nil, err // one line naming file, line and column: exit 1
		}
		n.Split = split
		return n, nil
	}
	sku := strings.TrimSpace(c.String("sku"))
	if sku == "" {
		return nil, usageErr("--history: want --sku too (the SKU of the history the network plans)")
	}
	opt, err := networkReadOptions(c, "")
	if err != nil {
		return nil, err
	}
	hook := historyDemand(h, c.String("network"), nil)
	opt.Demand = func(_ string, l network.Location) (inventory.Distribution, string, error) { return hook(sku, l) }
	n, notes, err := network.ReadFileWith(c.String("network"), levels, opt)
	if err != nil {
		return nil, err
	}
	for _, note := range notes {
		fmt.Fprintf(c.App.ErrWriter, "ergostock: %s\n", note)
	}
	n.Split = split
	return n, nil
}

// networkCheck simulates n (several stores) to measure the error of the
// approximation; nil when skipped.
func networkCheck(c *cli.Context, n *network.Network, res *network.Result) (*checkObject, error) {
	if res.Exact {
		return nil, nil
	}
	periods, err := wholeFlag(c, "check-periods", 0)
	if err != nil {
		return nil, err
	}
	reps, err := wholeFlag(c, "check-replications", 2)
	if err != nil {
		return nil, err
	}
	seed, err := wholeFlag(c, "seed", 0)
	if err != nil {
		return nil, err
	}
	if periods == 0 {
		return nil, nil
	}
	sr, err := network.Simulate(n, network.SimOptions{Periods: periods, Warmup: periods / 10, Replications: reps, Seed: uint64(seed)})
	if err != nil {
		return nil, err
	}
	ck := &checkObject{Method: "simulation of the same network", Periods: periods, Replications: reps, Seed: seed}
	for i, l := range res.Locations {
		s := sr.Locations[i]
		ck.MaxFillRateError = math.Max(ck.MaxFillRateError, math.Abs(l.FillRate-s.FillRate.Mean))
		ck.MaxFillRateCI95 = math.Max(ck.MaxFillRateCI95, s.FillRate.CI95)
	}
	ck.TotalCostError = math.Abs(res.TotalCost - sr.TotalCost.Mean)
	ck.TotalCostCI95 = sr.TotalCost.CI95
	return ck, nil
}

type checkObject struct {
	Method           string  `json:"method"`
	Periods          int     `json:"periods"`
	Replications     int     `json:"replications"`
	Seed             int     `json:"seed"`
	MaxFillRateError float64 `json:"max_abs_fill_rate_error"`
	MaxFillRateCI95  float64 `json:"max_fill_rate_ci95"`
	TotalCostError   float64 `json:"abs_total_cost_error"`
	TotalCostCI95    float64 `json:"total_cost_ci95"`
}

type networkObject struct {
	Locations []network.Figures `json:"locations"`
	TotalCost float64           `json:"total_cost"`
	Method    string            `json:"method"`
	Exact     bool              `json:"exact"`
	Levels    string            `json:"levels"`
	Neglected float64           `json:"neglected"`
	Search    string            `json:"search,omitempty"`
	Check     *checkObject      `json:"approximation_error,omitempty"`
	Alone     *aloneObject      `json:"each_location_alone,omitempty"`
}

// aloneObject is the network planned one location at a time, evaluated as
// a network, for comparison with the network plan (optimize).
type aloneObject struct {
	TotalCost float64           `json:"total_cost"`
	Locations []network.Figures `json:"locations"`
	// ExpectedFillRates are what each store's own plan promised.
	ExpectedFillRates []float64 `json:"expected_fill_rates"`
	Method            string    `json:"method"`
}

func networkEvaluate(c *cli.Context) error {
	n, err := readNetwork(c)
	if err != nil {
		return err
	}
	res, err := network.Evaluate(n)
	if err != nil {
		return err
	}
	ck, err := networkCheck(c, n, res)
	if err != nil {
		return err
	}
	return writeNetwork(c.App.Writer, c.Bool("json"), n, res, "", ck)
}

func networkOptimize(c *cli.Context) error {
	n, err := readNetwork(c)
	if err != nil {
		return err
	}
	if err := applyFloor(c, n); err != nil {
		return err
	}
	plan, err := network.Optimize(n)
	if err != nil {
		return err
	}
	ck, err := networkCheck(c, plan.Network, plan.Result)
	if err != nil {
		return err
	}
	alone, err := network.Alone(n)
	if err != nil {
		return err
	}
	al := &aloneObject{TotalCost: alone.Result.TotalCost, Locations: alone.Result.Locations, ExpectedFillRates: alone.Expected, Method: alone.Search}
	return writeNetworkAlone(c.App.Writer, c.Bool("json"), plan.Network, plan.Result, plan.Search, ck, al)
}

// applyFloor gives --min-fill-rate to every store without a floor of its own.
func applyFloor(c *cli.Context, n *network.Network) error {
	if c.IsSet("min-fill-rate") {
		var nums tabular.Numbers
		v, _, err := nums.Fraction(c.String("min-fill-rate"), 0)
		if err != nil || v < 0 || v > network.MaxFillRate {
			return usageErr("--min-fill-rate %s: want a fraction from 0 to 1 - 1e-9 (such as 0.95 or 95%%)", showValue(c.String("min-fill-rate")))
		}
		for i := range n.Stores {
			if n.Stores[i].MinFillRate == 0 {
				n.Stores[i].MinFillRate = v
			}
		}
	}
	return nil
}

func networkReport(c *cli.Context) error {
	out := c.String("out")
	if out == "" {
		return usageErr("network report: --out is required (see --help)")
	}
	n, err := readNetwork(c)
	if err != nil {
		return err
	}
	if err := applyFloor(c, n); err != nil {
		return err
	}
	var plan *network.Plan
	if c.Bool("as-given") {
		res, err := network.Evaluate(n)
		if err != nil {
			return err
		}
		plan = &network.Plan{Network: n, Result: res, Search: "the levels of " + n.File}
	} else if plan, err = network.Optimize(n); err != nil {
		return err
	}
	alone, err := network.Alone(n)
	if err != nil {
		return err
	}
	ck, err := networkCheck(c, plan.Network, plan.Result)
	if err != nil {
		return err
	}
	check := ""
	if ck != nil {
		check = fmt.Sprintf("The figures are an approximation: against a simulation of the same network (%d replications of %d periods, seed %d) the largest fill-rate error was %.3g (simulation half-width up to %.2g) and the total cost error %.3g (half-width %.2g).",
			ck.Replications, ck.Periods, ck.Seed, ck.MaxFillRateError, ck.MaxFillRateCI95, ck.TotalCostError, ck.TotalCostCI95)
	} else if !plan.Result.Exact {
		check = "The figures are an approximation whose error was not measured (--check-periods 0)."
	}
	in := report.NetworkInput{Version: version, Plan: plan, Alone: alone, Check: check}
	if err := batch.WriteFileAtomic(out, func(w io.Writer) error { return report.WriteNetworkPage(w, in) }); err != nil {
		return fmt.Errorf("--out %s: %w", out, err)
	}
	fmt.Fprintf(c.App.ErrWriter, "ergostock: network report: wrote %s (network %s per period, each location alone %s)\n", out, num(plan.Result.TotalCost), num(alone.Result.TotalCost))
	return nil
}

func writeNetwork(w io.Writer, asJSON bool, n *network.Network, res *network.Result, search string, ck *checkObject) error {
	return writeNetworkAlone(w, asJSON, n, res, search, ck, nil)
}

func writeNetworkAlone(w io.Writer, asJSON bool, n *network.Network, res *network.Result, search string, ck *checkObject, al *aloneObject) error {
	levels := string(n.Levels)
	if levels == "" {
		levels = string(network.Echelon)
	}
	if asJSON {
		return writeJSON(w, networkObject{Locations: res.Locations, TotalCost: res.TotalCost, Method: res.Method,
			Exact: res.Exact, Levels: levels, Neglected: res.Neglected, Search: search, Check: ck, Alone: al})
	}
	t := newTable(w)
	fmt.Fprintln(t, "location\tparent\tlead time\tbase-stock (own)\tbase-stock (echelon)\tfill rate\tstockout\ton hand\tbackorders\tholding\tshortage\ttotal")
	for _, l := range res.Locations {
		fmt.Fprintf(t, "%s\t%s\t%d\t%d\t%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", l.Location, dash(l.Parent), l.LeadTime,
			l.InstallationLevel, l.EchelonLevel, num(l.FillRate), num(l.StockoutProbability), num(l.MeanOnHand),
			num(l.MeanBackorders), num(l.HoldingCost), num(l.ShortageCost), num(l.TotalCost))
	}
	if err := t.Flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "total cost: %s per period\n", num(res.TotalCost))
	kind := "exact"
	if !res.Exact {
		kind = "approximation"
	}
	fmt.Fprintf(w, "method: %s; figures %s; neglected mass %.2g\n", res.Method, kind, res.Neglected)
	if search != "" {
		fmt.Fprintf(w, "search: %s\n", search)
	}
	if ck != nil {
		fmt.Fprintf(w, "approximation error, measured by simulation (%d replications of %d periods, seed %d): largest |fill rate error| %.3g (simulation half-width up to %.2g), total cost error %.3g (half-width %.2g)\n",
			ck.Replications, ck.Periods, ck.Seed, ck.MaxFillRateError, ck.MaxFillRateCI95, ck.TotalCostError, ck.TotalCostCI95)
	} else if !res.Exact {
		fmt.Fprintln(w, "approximation error: not measured (--check-periods 0)")
	}
	if al != nil {
		var lv []string
		for i, l := range al.Locations {
			s := fmt.Sprintf("%s %d", l.Location, l.InstallationLevel)
			if i > 0 {
				s += fmt.Sprintf(" (fill rate %s, its own plan promised %s)", num(l.FillRate), num(al.ExpectedFillRates[i-1]))
			}
			lv = append(lv, s)
		}
		fmt.Fprintf(w, "each location planned alone: total cost %s per period, %s more than the network plan; levels %s\n",
			num(al.TotalCost), num(al.TotalCost-res.TotalCost), strings.Join(lv, ", "))
	}
	return nil
}

func dash(s string) string {
	if s == "" {
		return "-"
	}
	return s
}

type simNetworkObject struct {
	Locations    []network.SimFigures `json:"locations"`
	TotalCost    network.Estimate     `json:"total_cost"`
	Method       string               `json:"method"`
	Exact        bool                 `json:"exact"`
	Periods      int                  `json:"periods"`
	Warmup       int                  `json:"warmup"`
	Replications int                  `json:"replications"`
	Seed         uint64               `json:"seed"`
}

func networkSimulate(c *cli.Context) error {
	n, err := readNetwork(c)
	if err != nil {
		return err
	}
	periods, err := wholeFlag(c, "periods", 1)
	if err != nil {
		return err
	}
	reps, err := wholeFlag(c, "replications", 2)
	if err != nil {
		return err
	}
	seed, err := wholeFlag(c, "seed", 0)
	if err != nil {
		return err
	}
	workers, err := wholeFlag(c, "workers", 0)
	if err != nil {
		return err
	}
	warmup := periods / 10
	if c.IsSet("warmup") {
		if warmup, err = wholeFlag(c, "warmup", 0); err != nil {
			return err
		}
		if warmup >= periods {
			return usageErr("--warmup %d: want fewer periods than --periods (%d)", warmup, periods)
		}
	}
	// The model's figures first: a network it cannot evaluate is refused
	// before the simulation runs.
	res, err := network.Evaluate(n)
	if err != nil {
		return err
	}
	sr, err := network.Simulate(n, network.SimOptions{Periods: periods, Warmup: warmup, Replications: reps, Seed: uint64(seed), Workers: workers})
	if err != nil {
		var fe *inventory.FieldError
		if errors.As(err, &fe) {
			if errors.Is(err, inventory.ErrLimit) {
				return limitErr("%s", fieldMessage(c, fe))
			}
			return usageErr("%s", fieldMessage(c, fe))
		}
		return err
	}
	w := c.App.Writer
	if c.Bool("json") {
		return writeJSON(w, simNetworkObject{Locations: sr.Locations, TotalCost: sr.TotalCost, Method: "simulation",
			Exact: false, Periods: sr.Periods, Warmup: sr.Warmup, Replications: sr.Replications, Seed: sr.Seed})
	}
	kind := "exact"
	if !res.Exact {
		kind = "approximate"
	}
	t := newTable(w)
	fmt.Fprintf(t, "location\tfigure\tsimulated\t95%% half-width\t%s\t\n", kind)
	for i, l := range sr.Locations {
		e := res.Locations[i]
		for _, f := range []struct {
			name string
			s    network.Estimate
			v    float64
		}{
			{"fill rate", l.FillRate, e.FillRate}, {"stockout probability", l.StockoutProbability, e.StockoutProbability},
			{"mean on hand", l.MeanOnHand, e.MeanOnHand}, {"mean backorders", l.MeanBackorders, e.MeanBackorders},
			{"holding cost", l.HoldingCost, e.HoldingCost}, {"shortage cost", l.ShortageCost, e.ShortageCost},
			{"total cost", l.TotalCost, e.TotalCost},
		} {
			mark := ""
			if math.Abs(f.s.Mean-f.v) > f.s.CI95 {
				mark = "outside"
			}
			fmt.Fprintf(t, "%s\t%s\t%s\t%.2g\t%s\t%s\n", l.Location, f.name, num(f.s.Mean), f.s.CI95, num(f.v), mark)
		}
	}
	if err := t.Flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "total cost: %s +- %.2g per period (%s: %s)\n", num(sr.TotalCost.Mean), sr.TotalCost.CI95, kind, num(res.TotalCost))
	fmt.Fprintf(w, "%d replications of %d periods (warm-up %d), seed %d\n", sr.Replications, sr.Periods, sr.Warmup, sr.Seed)
	return nil
}

// networkPage is the network page for `report --network`.
type networkPage struct{ in report.NetworkInput }

func (p networkPage) WriteHTML(w io.Writer) error { return report.WriteNetworkPage(w, p.in) }

// reportNetworkPage builds the page of `report --network FILE`: the
// cheapest levels (echelon reading), each location planned alone, and
// for several stores the error measured by a simulation seeded by --seed.
func reportNetworkPage(c *cli.Context) (networkPage, error) {
	n, err := network.ReadFile(c.String("network"), network.Echelon, tabular.Options{})
	if err != nil {
		return networkPage{}, err
	}
	if c.IsSet("min-fill-rate") {
		v := c.Float64("min-fill-rate")
		if !(v >= 0 && v <= network.MaxFillRate) {
			return networkPage{}, usageErr("--min-fill-rate %v: want a fraction from 0 to 1 - 1e-9", v)
		}
		for i := range n.Stores {
			if n.Stores[i].MinFillRate == 0 {
				n.Stores[i].MinFillRate = v
			}
		}
	}
	plan, err := network.Optimize(n)
	if err != nil {
		return networkPage{}, err
	}
	alone, err := network.Alone(n)
	if err != nil {
		return networkPage{}, err
	}
	check := ""
	if !plan.Result.Exact {
		seed := c.Int("seed")
		if seed < 0 {
			return networkPage{}, usageErr("--seed %d: want an integer >= 0", seed)
		}
		sr, err := network.Simulate(plan.Network, network.SimOptions{Periods: networkCheckPeriods, Warmup: networkCheckPeriods / 10, Replications: networkCheckReplications, Seed: uint64(seed)})
		if err != nil {
			return networkPage{}, err
		}
		var fe, ci float64
		for i, l := range plan.Result.Locations {
			fe = math.Max(fe, math.Abs(l.FillRate-sr.Locations[i].FillRate.Mean))
			ci = math.Max(ci, sr.Locations[i].FillRate.CI95)
		}
		check = fmt.Sprintf("The figures are an approximation: against a simulation of the same network (%d replications of %d periods, seed %d) the largest fill-rate error was %.3g (simulation half-width up to %.2g) and the total cost error %.3g (half-width %.2g).",
			networkCheckReplications, networkCheckPeriods, seed, fe, ci, math.Abs(plan.Result.TotalCost-sr.TotalCost.Mean), sr.TotalCost.CI95)
	}
	return networkPage{in: report.NetworkInput{Version: version, Plan: plan, Alone: alone, Check: check}}, nil
}
