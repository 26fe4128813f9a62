package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/policies"
)

// systemFlags are shared by evaluate, optimize and simulate.
func systemFlags() []cli.Flag {
	return []cli.Flag{
		&cli.StringFlag{Name: "demand", Usage: "demand per period, e.g. poisson:mean=4, negbin:mean=4,var=9, normal:mean=40,sd=8, gamma:mean=5,sd=4, pmf:0=0.2,1=0.5,2=0.3", Required: true},
		&cli.GenericFlag{Name: "lead-time", Usage: "lead time: whole periods L >= 0, or a law in the demand grammar, e.g. pmf:2=0.2,3=0.6,4=0.2 or poisson:mean=3 (see --lead-time-model)", Value: &leadTimeValue{}},
		&cli.StringFlag{Name: "lead-time-model", Usage: "how random lead times of successive orders relate: sequential (orders arrive in the order placed; Kaplan 1970) or independent (each order its own lead time; orders may cross)", Value: string(inventory.Sequential)},
		intFlag("review-period", "review period R in periods: the position is reviewed and orders placed only every R periods (figures and costs stay per period)", 1),
		floatFlag("holding-cost", "holding cost h per unit on hand per period (required)", false),
		floatFlag("shortage-cost", "shortage cost b per unit backordered per period, or per unit of lost demand (required)", false),
		floatFlag("order-cost", "fixed cost K per order", false),
		floatFlag("unit-cost", "purchase cost c per unit ordered", false),
		&cli.StringFlag{Name: "unmet", Usage: "what happens to demand not served at once: backorder or lost (any case)", Value: "backorder"},
		intFlag("max-states", "largest chain to build, in states (lost-sales chains grow fast with the lead time)", policies.DefaultMaxStates),
	}
}

// policyFlags name a policy's levels (evaluate, simulate).
func policyFlags() []cli.Flag {
	return []cli.Flag{
		intFlag("reorder-point", "reorder point s: order when inventory position <= s", 0),
		intFlag("order-up-to", "order-up-to level S (alone: base-stock S)", 0),
		intFlag("order-multiple", "order multiple Q (with --reorder-point: s-nQ)", 0),
	}
}

// number is the value of a numeric flag, read by the one number rule of
// inventory.ParseNumber (or ParseInt): plain decimal with an optional sign,
// fraction and exponent; no underscores, hex, inf or nan. It keeps the
// text as typed, for messages. Its String is the number in a form that
// the cli package's Int and Float64 read back exactly.
type number struct {
	isInt bool
	f     float64
	i     int64
	typed string
}

func (n *number) Set(s string) error {
	t := strings.TrimSpace(s)
	var err error
	if n.isInt {
		n.i, err = inventory.ParseInt(t)
		if err == nil && int64(int(n.i)) != n.i {
			err = &inventory.NumberError{Value: t, Err: inventory.ErrNumberRange}
		}
	} else {
		n.f, err = inventory.ParseNumber(t)
	}
	switch {
	case err == nil:
		n.typed = t
		return nil
	case errors.Is(err, inventory.ErrNumberSyntax):
		return errors.New("want a plain decimal number (digits with an optional sign, fraction and exponent, as 12, -0.5 or 1e-3; no underscores, hex, inf or nan)")
	case errors.Is(err, inventory.ErrNotWhole):
		return errors.New("want a whole number")
	case n.isInt:
		return fmt.Errorf("want a whole number from %d to %d", math.MinInt, math.MaxInt)
	}
	return errors.New("want a number within the float64 range (about 1.8e308)")
}

// flagValueRE matches the flag package's error for a value that does not parse.
var flagValueRE = regexp.MustCompile(`^invalid value "(.*)" for flag -+([A-Za-z0-9-]+): (.*)$`)

// parseErr is the one-line usage error of command cmd for a flag that does
// not parse: "--shortage-cost NaN: want a plain decimal number (...)".
func parseErr(cmd string, err error) error {
	if m := flagValueRE.FindStringSubmatch(err.Error()); m != nil {
		return usageErr("--%s %s: %s", m[2], m[1], m[3])
	}
	return usageErr("%s: %v (see --help)", cmd, err)
}

func (n *number) String() string {
	if n.isInt {
		return strconv.FormatInt(n.i, 10)
	}
	return strconv.FormatFloat(n.f, 'g', -1, 64)
}

// intFlag is a whole-number flag read by inventory.ParseInt.
func intFlag(name, usage string, value int) *cli.GenericFlag {
	return &cli.GenericFlag{Name: name, Usage: usage, Value: &number{isInt: true, i: int64(value)}}
}

// floatFlag is a number flag read by inventory.ParseNumber.
func floatFlag(name, usage string, required bool) *cli.GenericFlag {
	return &cli.GenericFlag{Name: name, Usage: usage, Value: &number{}, Required: required}
}

var _ cli.Generic = (*number)(nil)

// typed returns the text given for a number flag, or its value printed.
func typed(c *cli.Context, name string) string {
	if n, ok := c.Generic(name).(*number); ok {
		if n.typed != "" {
			return n.typed
		}
		return n.String()
	}
	return c.String(name)
}

// flagName turns a field name ("order_up_to") into its flag
// ("--order-up-to"); a name with a space is a phrase and passes unchanged.
func flagName(field string) string {
	if strings.Contains(field, " ") {
		return field
	}
	return "--" + strings.ReplaceAll(field, "_", "-")
}

// limitErr is an input refused for its size or a limit: exit status 1.
func limitErr(format string, a ...any) error {
	return &exitError{code: 1, err: fmt.Errorf(format, a...)}
}

// fieldMessage formats a *inventory.FieldError with its flag, using the
// text typed on the command line when c has that flag.
func fieldMessage(c *cli.Context, fe *inventory.FieldError) string {
	name := flagName(fe.Field)
	value := fe.Value
	if c != nil && fe.Field != "demand" {
		if f := strings.TrimPrefix(name, "--"); c.IsSet(f) {
			value = typed(c, f)
		}
	}
	msg := fmt.Sprintf("%s %s: want %s", name, value, fe.Want)
	if fe.Err != nil {
		msg += ": " + fe.Err.Error()
	}
	return msg
}

// flagErr turns a *inventory.FieldError into a message naming the flag.
func flagErr(err error) error {
	var fe *inventory.FieldError
	if errors.As(err, &fe) {
		return usageErr("%s", fieldMessage(nil, fe))
	}
	return err
}

// engineErr is the one mapping of the errors of Evaluate and Optimize to
// messages and exit statuses (evaluate, optimize, report, simulate): an input refused for its
// size (a *policies.SizeError), for a limit (policies.ErrLimit) or for
// figures that overflow (policies.ErrOverflow) names its flag and exits 1;
// another unusable input names its flag and exits 2 (see flagErr); anything
// else (a failed solve) passes through, exit 1.
func engineErr(c *cli.Context, err error) error {
	var me *policies.LostMemoryError
	if errors.As(err, &me) {
		// Memory does not depend on --max-states: the lead time drives it.
		return limitErr("--lead-time %s: %v", typed(c, "lead-time"), err)
	}
	var se *policies.SizeError
	if errors.As(err, &se) {
		if se.Input != "" || se.Reason != "" {
			e := *se
			if e.Input != "" && e.Input != "demand" && c.IsSet(strings.TrimPrefix(flagName(e.Input), "--")) {
				e.Value = typed(c, strings.TrimPrefix(flagName(e.Input), "--"))
			}
			return limitErr("%s", e.Message(flagName))
		}
		return limitErr("--max-states %s: %v", typed(c, "max-states"), err)
	}
	var fe *inventory.FieldError
	if errors.As(err, &fe) {
		if errors.Is(err, inventory.ErrLimit) || errors.Is(err, policies.ErrOverflow) {
			return limitErr("%s", fieldMessage(c, fe))
		}
		return usageErr("%s", fieldMessage(c, fe))
	}
	return err
}

// systemFromFlags builds and validates the system from the shared flags.
func systemFromFlags(c *cli.Context) (inventory.System, error) {
	var sys inventory.System
	// Required, checked here (the report command needs them only for a
	// one-SKU page).
	for _, f := range []string{"holding-cost", "shortage-cost"} {
		if !c.IsSet(f) {
			return sys, usageErr("--%s: required (see --help)", f)
		}
	}
	d, err := inventory.Parse(c.String("demand"))
	if err != nil {
		return sys, flagErr(err)
	}
	mode, err := inventory.ParseMode(c.String("unmet"))
	if err != nil {
		return sys, flagErr(err)
	}
	sys = inventory.System{
		Demand:    d,
		LeadTime:  leadTimeOf(c).fixed,
		Holding:   c.Float64("holding-cost"),
		Shortage:  c.Float64("shortage-cost"),
		OrderCost: c.Float64("order-cost"),
		UnitCost:  c.Float64("unit-cost"),
		Mode:      mode,
	}
	sys.LeadTimeLaw = leadTimeOf(c).law
	model, err := inventory.ParseLeadTimeModel(c.String("lead-time-model"))
	if err != nil {
		return sys, flagErr(err)
	}
	sys.LeadTimeModel = model
	if r := c.Int("review-period"); r < 1 || r > inventory.MaxReviewPeriod {
		return sys, usageErr("--review-period %s: want a whole number of periods from 1 to %d", typed(c, "review-period"), inventory.MaxReviewPeriod)
	}
	sys.ReviewPeriod = c.Int("review-period")
	if c.Command != nil && !sys.FixedTiming() {
		switch name := c.Command.Name; {
		case !simulateHandlesTiming && (name == "simulate" || name == "report" && c.Bool("simulate")):
			return sys, usageErr("%s: --lead-time with a law, --lead-time-model and --review-period are not simulated yet (evaluate and optimize answer them exactly in backorder mode)", name)
		case !reportHandlesTiming && name == "report":
			return sys, usageErr("report: --lead-time with a law, --lead-time-model and --review-period are not drawn on the page yet (its cost map assumes a fixed lead time; evaluate and optimize answer them exactly in backorder mode)")
		}
	}
	if err := sys.Validate(); err != nil {
		return sys, engineErr(c, err)
	}
	if v := c.Int("max-states"); v < 1 || v > math.MaxInt32 {
		return sys, usageErr("--max-states %s: want a state count from 1 to %d", typed(c, "max-states"), math.MaxInt32)
	}
	return sys, nil
}

// policyFromFlags reads the policy's levels: --order-up-to alone is
// base-stock; with --reorder-point it is s-S; --reorder-point with
// --order-multiple is s-nQ.
func policyFromFlags(c *cli.Context, mode inventory.Mode) (policies.Policy, error) {
	var p policies.Policy
	hasS, hasBigS, hasQ := c.IsSet("reorder-point"), c.IsSet("order-up-to"), c.IsSet("order-multiple")
	switch {
	case hasBigS && hasQ:
		return p, usageErr("--order-up-to and --order-multiple: give one of them, not both")
	case hasBigS && !hasS:
		p = policies.Policy{Kind: policies.BaseStock, OrderUpTo: c.Int("order-up-to")}
	case hasBigS && hasS:
		p = policies.Policy{Kind: policies.SS, ReorderPoint: c.Int("reorder-point"), OrderUpTo: c.Int("order-up-to")}
	case hasQ && hasS:
		p = policies.Policy{Kind: policies.SNQ, ReorderPoint: c.Int("reorder-point"), OrderMultiple: c.Int("order-multiple")}
	case hasQ:
		return p, usageErr("--order-multiple needs --reorder-point")
	case hasS:
		return p, usageErr("--reorder-point needs --order-up-to (s-S) or --order-multiple (s-nQ)")
	default:
		return p, usageErr("no policy: give --order-up-to S, or --reorder-point s with --order-up-to S or --order-multiple Q")
	}
	if err := p.Validate(mode); err != nil {
		var fe *inventory.FieldError
		if errors.As(err, &fe) {
			return p, usageErr("%s", fieldMessage(c, fe))
		}
		return p, usageErr("policy: %v", err)
	}
	return p, nil
}

// evalOptions reads the evaluation options shared by the commands.
func evalOptions(c *cli.Context) policies.Options {
	return policies.Options{MaxStates: c.Int("max-states"), Context: c.Context, Levels: levelsWanted(c.Context)}
}

// writeJSON prints v as indented JSON followed by a newline.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// table is an aligned text table (text/tabwriter, two spaces between
// columns) whose lines lose the padding that empty trailing cells leave.
type table struct {
	*tabwriter.Writer
	buf bytes.Buffer
	out io.Writer
}

func newTable(w io.Writer) *table {
	t := &table{out: w}
	t.Writer = tabwriter.NewWriter(&t.buf, 0, 0, 2, ' ', 0)
	return t
}

// Flush aligns the rows written so far and writes them, trimmed, to the
// table's writer.
func (t *table) Flush() error {
	if err := t.Writer.Flush(); err != nil {
		return err
	}
	for _, line := range strings.SplitAfter(t.buf.String(), "\n") {
		if line == "" {
			continue
		}
		if _, err := io.WriteString(t.out, strings.TrimRight(line, " \n")+"\n"); err != nil {
			return err
		}
	}
	t.buf.Reset()
	return nil
}

// simulateHandlesTiming says whether policies/sim models lead-time laws,
// the lead-time models and review periods (it does: Kaplan cut-offs or
// per-order lead times, and reviews every R periods, in both modes).
const simulateHandlesTiming = true

// reportHandlesTiming says the same of the one-SKU page of policies/report
// (it does: the page shows the law, the model and the review period, draws
// the law, and its cost map evaluates each cell on its chain).
const reportHandlesTiming = true

// leadTimeValue is the value of --lead-time: a whole number of periods or
// a law, read by inventory.ParseLeadTime (a one-point law is the fixed
// lead time).
type leadTimeValue struct {
	fixed int
	law   inventory.Distribution
	typed string
}

func (v *leadTimeValue) Set(s string) error {
	fixed, law, err := inventory.ParseLeadTime(s)
	if err != nil {
		var fe *inventory.FieldError
		if errors.As(err, &fe) {
			return errors.New("want " + fe.Want)
		}
		return err
	}
	v.fixed, v.law, v.typed = fixed, law, strings.TrimSpace(s)
	return nil
}

func (v *leadTimeValue) String() string {
	if v.typed != "" {
		return v.typed
	}
	return strconv.Itoa(v.fixed)
}

// leadTimeOf returns the value of --lead-time (0 when the command has no
// such flag).
func leadTimeOf(c *cli.Context) *leadTimeValue {
	if v, ok := c.Generic("lead-time").(*leadTimeValue); ok {
		return v
	}
	return &leadTimeValue{}
}

// timingJSON is the lead-time law, model and review period in the JSON of
// evaluate and optimize (beside the fields of SPEC section 2).
type timingJSON struct {
	// LeadTime is the whole number of periods, or the law as a string.
	LeadTime      any     `json:"lead_time"`
	LeadTimeMean  float64 `json:"lead_time_mean"`
	LeadTimeModel string  `json:"lead_time_model"`
	ReviewPeriod  int     `json:"review_period"`
}

func newTimingJSON(sys inventory.System) timingJSON {
	t := timingJSON{LeadTime: sys.LeadTime, LeadTimeMean: float64(sys.LeadTime), LeadTimeModel: string(sys.Model()), ReviewPeriod: sys.Review()}
	if sys.LeadTimeLaw != nil {
		t.LeadTime, t.LeadTimeMean = sys.LeadTimeLaw.String(), sys.LeadTimeLaw.Mean()
	}
	return t
}

// writeTiming prints the rows of the lead time and review period.
func writeTiming(tw io.Writer, sys inventory.System) {
	if sys.LeadTimeLaw == nil {
		fmt.Fprintf(tw, "lead time\t%d\tperiods\n", sys.LeadTime)
	} else {
		fmt.Fprintf(tw, "lead time\t%s\tperiods (mean %s)\n", sys.LeadTimeLaw, strconv.FormatFloat(sys.LeadTimeLaw.Mean(), 'g', 6, 64))
		fmt.Fprintf(tw, "lead-time model\t%s\t%s\n", sys.Model(), modelNote(sys.Model()))
	}
	fmt.Fprintf(tw, "review period\t%d\tperiods between reviews\n", sys.Review())
}

func modelNote(m inventory.LeadTimeModel) string {
	if m == inventory.Independent {
		return "each order its own lead time; orders may cross"
	}
	return "orders arrive in the order placed (Kaplan 1970)"
}

// timingHelp states the modelling assumptions of lead-time laws and review
// periods, for the --help of evaluate and optimize.
const timingHelp = `Lead times and reviews (every figure and cost is per period):
  --lead-time L            a whole number of periods: the order placed at a review arrives L periods
                           later, before that period's demand.
  --lead-time LAW          a law in the demand grammar (pmf:2=0.2,3=0.6,4=0.2, poisson:mean=3, ...),
                           independent of demand. A one-point law is the fixed lead time.
  --lead-time-model sequential (default): orders arrive in the order placed, in the form of Kaplan
                           (1970): each period a random cut-off T, independent across periods, lets
                           every order at least T periods old arrive. The net inventory at the end of
                           a period is the position after the last review all of whose orders have
                           arrived less the demand since that review, so every figure is exact with
                           the lead-time demand mixed over the law. The model realises exactly the
                           laws whose hazard P(L = l)/P(L >= l) does not fall as l grows; another law
                           is refused, and the message offers the nearest law it admits.
  --lead-time-model independent: each order draws its own lead time (orders may cross). Exact for
                           base-stock with backorders only; other policies and lost sales are
                           refused here (use simulate).
  --review-period R        the position is reviewed and an order placed only in periods 0, R, 2R, ...;
                           the chain is that of the position at reviews with R-period demand, the
                           figures are averaged over the R periods of a cycle, and the order frequency
                           and ordering cost are per period (orders per review / R).
  Lost sales (--unmet lost) are exact with sequential deliveries and any R: the chain of on-hand and
                           the orders outstanding by age, at reviews, with a whole cycle's transitions
                           (it grows with the longest lead time over R; --max-states bounds it).`
