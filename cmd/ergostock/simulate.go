package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/sim"
)

// simulateCommand runs the Monte Carlo simulator and sets each interval
// beside the exact value when the exact engine can evaluate the case.
func simulateCommand() *cli.Command {
	flags := append(systemFlags(), policyFlags()...)
	flags = append(flags,
		&cli.IntFlag{Name: "periods", Usage: "periods simulated per replication, warm-up included", Value: sim.DefaultPeriods},
		&cli.IntFlag{Name: "replications", Usage: "independent replications (>= 2)", Value: sim.DefaultReplications},
		&cli.IntFlag{Name: "seed", Usage: "seed of the random streams (>= 0)", Value: 1},
		&cli.IntFlag{Name: "warmup", Usage: "leading periods of each replication left out", DefaultText: "a tenth of --periods"},
		&cli.IntFlag{Name: "workers", Usage: "replications run at once (0: all cores); never changes the output", Value: 0},
		&cli.Int64Flag{Name: "period-budget", Usage: "refuse a run of more than this many periods in all (--periods x --replications); raise it for longer runs", Value: sim.DefaultPeriodBudget},
		&cli.BoolFlag{Name: "json", Usage: "print every figure as {\"mean\", \"ci95\"} in JSON"},
	)
	return &cli.Command{
		Name:  "simulate",
		Usage: "simulate a policy period by period and report every figure with a 95% confidence interval",
		Description: "Plays review, receipt, demand and charges period by period on independent random streams\n" +
			"derived from --seed, and reports each figure's mean across replications with the half-width\n" +
			"of its 95% Student t interval. The table sets the exact value beside each interval and marks\n" +
			"those outside it.\n\n" +
			"Limits, checked before anything runs (exit status 1): --periods x --replications at most\n" +
			"--period-budget (default 2e9, about 30 s of one idle core); --periods times the largest stock\n" +
			"level and demand within the 9.2e18 that the exact int64 sums of a replication hold; at most 1 GB\n" +
			"of memory (pipelines of --lead-time + 1 slots per worker, the demand table, the figures of each\n" +
			"replication); at most 1024 --workers. Costs whose figures overflow are refused. A --warmup\n" +
			"not longer than --lead-time is refused (exit status 2): no order would have arrived.\n\n" +
			"Random lead times and review periods are played literally. Under --lead-time-model\n" +
			"sequential each period draws a cut-off T from the law that Kaplan (1970) derives from the\n" +
			"lead-time law, and every order placed at least T periods ago arrives, so orders arrive in\n" +
			"the order placed; under independent each order draws its own lead time and may overtake\n" +
			"an earlier one. With --review-period R orders are placed only in periods 0, R, 2R, ...;\n" +
			"costs and figures stay per period. Where the exact engine does not evaluate a case\n" +
			"(independent lead times with s-S or s-nQ, and whatever it refuses), the exact column is\n" +
			"left out with a note and the figures are estimates only.",
		Flags:  flags,
		Action: simulateAction,
		OnUsageError: func(_ *cli.Context, err error, _ bool) error {
			return usageErr("simulate: %v (see ergostock simulate --help)", err)
		},
	}
}

func simulateAction(c *cli.Context) error {
	sys, err := systemFromFlags(c)
	if err != nil {
		return err
	}
	p, err := policyFromFlags(c, sys.Mode)
	if err != nil {
		return err
	}
	seed := c.Int("seed")
	if seed < 0 {
		return usageErr("--seed %d: want an integer >= 0", seed)
	}
	opt := sim.Options{
		Periods:      c.Int("periods"),
		Warmup:       sim.DefaultWarmup(c.Int("periods")),
		Replications: c.Int("replications"),
		Seed:         uint64(seed),
		Workers:      c.Int("workers"),
		PeriodBudget: c.Int64("period-budget"),
	}
	if c.IsSet("warmup") {
		opt.Warmup = c.Int("warmup")
	}
	if opt.PeriodBudget < 1 {
		return usageErr("--period-budget %d: want a number of periods >= 1", opt.PeriodBudget)
	}
	if err := sim.Check(sys, p, opt); err != nil {
		return simErr(err)
	}
	if sys.LeadTime > 0 && opt.Warmup <= sys.LeadTime {
		return usageErr("--warmup %d: want a warm-up longer than the lead time %d, so that the orders of the counted periods can arrive (raise --periods or --warmup)", opt.Warmup, sys.LeadTime)
	}
	if lmax := simLongestLead(sys); !sys.FixedTiming() && opt.Warmup <= lmax+sys.Review()-1 {
		return usageErr("--warmup %d: want a warm-up longer than the longest lead time %d plus the review period %d less one, so that the first orders can arrive (raise --periods or --warmup)", opt.Warmup, lmax, sys.Review())
	}
	res, err := sim.Run(sys, p, opt)
	if err != nil {
		return simErr(err)
	}
	out := c.App.Writer
	if c.Bool("json") {
		return simWriteJSON(out, sys, p, res)
	}
	var exact *inventory.Figures
	if n := simChainSize(sys, p); n > float64(c.Int("max-states")) {
		fmt.Fprintf(c.App.ErrWriter, "ergostock: simulate: exact values not shown: the chain of %v would have about %.3g states, over --max-states %d\n", p, n, c.Int("max-states"))
	} else if ev, err := policies.Evaluate(sys, p, evalOptions(c)); errors.Is(err, policies.ErrNotExact) {
		fmt.Fprintf(c.App.ErrWriter, "ergostock: simulate: no exact values: the exact engine does not evaluate this case (%v); the figures are simulation estimates only\n", oneLine(err.Error()))
	} else if err != nil {
		fmt.Fprintf(c.App.ErrWriter, "ergostock: simulate: exact values not shown: %v\n", oneLine(err.Error()))
	} else if f := simInfinite(ev.Figures); f != "" {
		fmt.Fprintf(c.App.ErrWriter, "ergostock: simulate: exact values not shown: the exact %s overflows float64 (costs too large)\n", f)
	} else {
		exact = &ev.Figures
	}
	return simWriteTable(out, sys, p, res, exact)
}

// simErr maps the simulator's errors to messages: a refused size or an
// overflow names its flag and exits 1, a bad option is a usage error
// naming its flag (exit 2).
func simErr(err error) error {
	var le interface{ FlagMessage() string }
	if errors.As(err, &le) { // *sim.LimitError, *sim.RangeError
		return fmt.Errorf("simulate: %s", le.FlagMessage())
	}
	return flagErr(err)
}

// simInfinite returns the label of the first infinite figure of f, "" if
// none.
func simInfinite(f inventory.Figures) string {
	for _, x := range f.Fields() {
		if math.IsInf(x.Value, 0) {
			return x.Label
		}
	}
	return ""
}

// simLongestLead returns the longest lead time of sys: the fixed lead
// time, or the last point of its law as the System cuts it.
func simLongestLead(sys inventory.System) int {
	if sys.LeadTimeLaw == nil {
		return sys.LeadTime
	}
	w, _, err := sys.LeadTimeWeights()
	if err != nil {
		return sys.LeadTime
	}
	return len(w) - 1
}

// simTiming describes the lead time, model and review period for the
// table's heading: "lead time 2" for today's timing, as before.
func simTiming(sys inventory.System) string {
	s := fmt.Sprintf("lead time %d", sys.LeadTime)
	if sys.LeadTimeLaw != nil {
		s = fmt.Sprintf("lead time %s (%s)", sys.LeadTimeLaw, sys.Model())
	}
	if sys.Review() > 1 {
		s += fmt.Sprintf(", review every %d periods", sys.Review())
	}
	return s
}

// simChainSize estimates the states of the exact engine's chain for p, so
// that simulate skips the exact column rather than ask for a chain it
// cannot build: the inventory positions s+1..top in backorder mode, about
// C(top+L+1, L+1) in lost mode, and never less than the largest level in
// magnitude (the engine's loss tables run over 0..top).
func simChainSize(sys inventory.System, p policies.Policy) float64 {
	s, S, Q := float64(p.ReorderPoint), float64(p.OrderUpTo), float64(p.OrderMultiple)
	lo, top := s+1, S
	switch p.Kind {
	case policies.BaseStock:
		lo = S
	case policies.SNQ:
		top = s + Q
	}
	if sys.Mode == inventory.Lost && !sys.FixedTiming() {
		// The chain at reviews: on hand and one component per review whose
		// order can still be out, k = ceil(lmax/R), at most C(top+k, k).
		R := sys.Review()
		k := max(1, (simLongestLead(sys)+R-1)/R)
		return math.Max(policies.LostStateBound(int(math.Max(top, 0)), k), top)
	}
	if sys.Mode == inventory.Lost {
		L := float64(simLongestLead(sys))
		a, _ := math.Lgamma(top + L + 2)
		b, _ := math.Lgamma(L + 2)
		d, _ := math.Lgamma(top + 1)
		return math.Max(math.Exp(a-b-d), top)
	}
	return math.Max(top-lo+1, math.Max(math.Abs(lo), math.Abs(top)))
}

// simSettings records how the simulation ran; it holds nothing that depends
// on the number of workers.
type simSettings struct {
	Periods      int     `json:"periods"`
	Warmup       int     `json:"warmup"`
	Replications int     `json:"replications"`
	Seed         uint64  `json:"seed"`
	Confidence   float64 `json:"confidence"`
	TQuantile    float64 `json:"t_quantile"`
	Demand       string  `json:"demand"`
	LeadTime     any     `json:"lead_time"` // whole periods, or the law as text
	Unmet        string  `json:"unmet"`
	// LeadTimeModel and ReviewPeriod as simulated (sequential and 1 for
	// today's timing).
	LeadTimeModel string  `json:"lead_time_model"`
	ReviewPeriod  int     `json:"review_period"`
	HoldingCost   float64 `json:"holding_cost"`
	ShortageCost  float64 `json:"shortage_cost"`
	OrderCost     float64 `json:"order_cost"`
	UnitCost      float64 `json:"unit_cost"`
}

// simNumber encodes a float as JSON, NaN (an undefined figure) as null.
func simNumber(v float64) json.RawMessage {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return json.RawMessage("null")
	}
	b, _ := json.Marshal(v)
	return b
}

// simWriteJSON prints every figure as {"mean": x, "ci95": h} under its
// SPEC name, in the fixed order of Figures.Fields, then policy and settings.
func simWriteJSON(w io.Writer, sys inventory.System, p policies.Policy, res *sim.Result) error {
	var b bytes.Buffer
	b.WriteByte('{')
	hw := res.HalfWidth.Fields()
	for i, f := range res.Mean.Fields() {
		fmt.Fprintf(&b, `%q:{"mean":%s,"ci95":%s},`, f.Name, simNumber(f.Value), simNumber(hw[i].Value))
	}
	pol, err := json.Marshal(newPolicyObject(p))
	if err != nil {
		return err
	}
	set, err := json.Marshal(simSettings{
		Periods: res.Periods, Warmup: res.Warmup, Replications: res.Replications, Seed: res.Seed,
		Confidence: res.Level, TQuantile: res.TQuantile,
		Demand: sys.Demand.String(), LeadTime: newTimingJSON(sys).LeadTime, Unmet: string(sys.Mode),
		LeadTimeModel: string(sys.Model()), ReviewPeriod: sys.Review(),
		HoldingCost: sys.Holding, ShortageCost: sys.Shortage, OrderCost: sys.OrderCost, UnitCost: sys.UnitCost,
	})
	if err != nil {
		return err
	}
	fmt.Fprintf(&b, `"policy":%s,"settings":%s}`, pol, set)
	return writeJSON(w, json.RawMessage(b.Bytes()))
}

// simDecimals is the number of decimals that shows a half-width to two
// significant digits (at most 9; 4 when the half-width is 0 or undefined).
func simDecimals(h float64) int {
	if !(h > 0) || math.IsInf(h, 0) {
		return 4
	}
	return min(max(1-int(math.Floor(math.Log10(h))), 0), 9)
}

// simWriteTable prints the aligned table: figure | mean ± ci95 | exact |
// mark | unit, with a summary of how many exact values fall outside.
func simWriteTable(w io.Writer, sys inventory.System, p policies.Policy, res *sim.Result, exact *inventory.Figures) error {
	fmt.Fprintf(w, "simulated %v: demand %s, %s, unmet %s, h=%g b=%g K=%g c=%g\n",
		p, sys.Demand, simTiming(sys), sys.Mode, sys.Holding, sys.Shortage, sys.OrderCost, sys.UnitCost)
	fmt.Fprintf(w, "%d replications of %d periods (first %d discarded), seed %d; %g%% intervals, Student t with %d df (t = %.4f)\n\n",
		res.Replications, res.Periods, res.Warmup, res.Seed, 100*res.Level, res.Replications-1, res.TQuantile)
	rows := [][]string{{"figure", "mean", "", "ci95", "exact", "", "unit"}}
	var ex []inventory.Field
	if exact != nil {
		ex = exact.Fields()
	}
	hw := res.HalfWidth.Fields()
	compared, outside := 0, 0
	for i, f := range res.Mean.Fields() {
		h := hw[i].Value
		d := simDecimals(h)
		row := []string{f.Label, simFormat(f.Value, d), "±", simFormat(h, d), "", "", f.Unit}
		if ex != nil {
			e := ex[i].Value
			row[4] = simFormat(e, d+2)
			// The exact engine is exact to round-off: allow 1e-9 relative.
			tol := 1e-9 * math.Max(1, math.Abs(e))
			// Figures that cannot vary (0 by the mode, or every order of size Q) are not compared.
			if !(h == 0 && math.Abs(e-f.Value) <= tol) && !math.IsNaN(h) {
				compared++
				if !(math.Abs(e-f.Value) <= h+tol) {
					outside++
					row[5] = "OUTSIDE"
				}
			}
		} else {
			row[4] = "-"
		}
		rows = append(rows, row)
	}
	simAlign(w, rows)
	if exact != nil {
		fmt.Fprintf(w, "\nexact values outside their interval: %d of %d (about 1 in 20 is expected by chance at %g%%)\n",
			outside, compared, 100*res.Level)
	}
	return nil
}

func simFormat(v float64, d int) string {
	if math.IsNaN(v) {
		return "undefined"
	}
	return fmt.Sprintf("%.*f", d, v)
}

// simAlign prints rows with the first and last columns left-aligned and
// the others right-aligned, two spaces apart (one around "±").
func simAlign(w io.Writer, rows [][]string) {
	width := make([]int, len(rows[0]))
	for _, r := range rows {
		for j, c := range r {
			width[j] = max(width[j], utf8.RuneCountInString(c))
		}
	}
	for _, r := range rows {
		var b strings.Builder
		for j, c := range r {
			pad := strings.Repeat(" ", width[j]-utf8.RuneCountInString(c))
			switch {
			case j == 0 || j == len(r)-1:
				b.WriteString(c + pad)
			default:
				b.WriteString(pad + c)
			}
			switch {
			case j == len(r)-1:
			case j == 1 || j == 2:
				b.WriteString(" ")
			default:
				b.WriteString("  ")
			}
		}
		fmt.Fprintln(w, strings.TrimRight(b.String(), " "))
	}
}
