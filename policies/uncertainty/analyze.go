package uncertainty

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/policies"
)

// DefaultResamples is the number of resampled models B when none is given.
const DefaultResamples = 200

// MaxResamples caps B: each resample keeps its fitted law and figures.
const MaxResamples = 100_000

// MaxModelBytes caps the estimated memory of the refitted laws kept
// (Options.KeepModels, Robust).
const MaxModelBytes = 1 << 30

// ErrTooLarge is wrapped by the refusal of an analysis whose kept models
// would pass MaxModelBytes; it is the engine's size limit, so it is
// errors.Is policies.ErrLimit.
var ErrTooLarge = fmt.Errorf("uncertainty: %w", policies.ErrLimit)

// DefaultFloorConfidence is the share of resampled models in which the
// robust policy must meet the fill-rate floor, when none is given.
const DefaultFloorConfidence = 0.9

// Options tune an analysis. The zero value draws DefaultResamples iid
// resamples with seed 0 on all cores.
type Options struct {
	Resamples int    // B; 0 means DefaultResamples
	Seed      uint64 // of every resample's stream (see Stream)
	Scheme    Scheme // "" means IID
	Workers   int    // resamples planned at once; 0 means GOMAXPROCS
	// Kind is the policy type; "" means s-S when orders carry a fixed
	// cost, else base-stock (the rule of the batch planner).
	Kind policies.Kind
	// Search holds the service floors and the evaluation options used for
	// the point optimum and for every resampled model.
	Search policies.SearchOptions
	// Robust asks for the robust policy (see Robust).
	Robust bool
	// FloorConfidence is the share of resampled models in which the robust
	// policy must meet Search.MinFillRate; 0 means DefaultFloorConfidence.
	FloorConfidence float64
	// MaxRobustEvaluations caps the exact evaluations of the robust search
	// (candidates x resampled models); 0 means DefaultMaxRobustEvaluations.
	MaxRobustEvaluations int
	// KeepModels keeps every resample's refitted law in Resample.Demand
	// (the report's charts need them; the robust search keeps them anyway).
	// Otherwise each law is dropped once its resample is planned.
	KeepModels bool
	// Fit refits a resampled series; nil means history.Fit, the rule of
	// the command fit.
	Fit func(y []int) (history.Summary, error)
	// Context, when not nil, stops the work once done.
	Context context.Context
}

// Band is the 5th, 50th and 95th percentile of a level over the resampled
// models' optima.
type Band struct {
	P05, P50, P95 float64
}

// Spread is the mean and the 5th, 50th and 95th percentiles of a figure
// over the resampled models.
type Spread struct {
	Mean, P05, P50, P95 float64
}

// Resample is one resampled model and what the policies do under it.
type Resample struct {
	Index  int
	Model  string                 // the refitted model's family
	Demand inventory.Distribution // the refitted law; nil when Err or not kept
	// Optimum is this model's own cheapest policy (under the floors), and
	// OptimalCost its total cost.
	Optimum     policies.Policy
	OptimalCost float64
	// Held is the recommended policy's figures under this model.
	Held inventory.Figures
	// Regret is Held.TotalCost - OptimalCost: what using the recommendation
	// costs over this model's own optimum. It is >= 0 without floors; under
	// a floor it can be negative where the recommendation misses the floor
	// on this model (cheaper, but not allowed).
	Regret float64
	Err    error // why this resample has no answer
}

// Result is the analysis of one SKU.
type Result struct {
	SKU         string
	Periods     int
	Scheme      Scheme  // the scheme used (auto resolved to iid or block)
	BlockLength int     // of the block scheme; 1 otherwise
	Lag1        float64 // lag-1 autocorrelation of the history
	// Lag1Significant reports |Lag1| > 1.96/sqrt(n).
	Lag1Significant bool
	// Point is the recommendation: the optimum on the model fitted to the
	// whole history.
	Point *policies.Optimum
	// Demand is the point model (the given one, or the fit of the whole
	// history).
	Demand    inventory.Distribution
	Resamples []Resample // in order of b
	Used      int        // resamples with an answer
	// Bands of the resampled models' optimal levels; a level the policy
	// type lacks is a zero Band.
	ReorderPoint, OrderUpTo, OrderMultiple Band
	// The recommended policy held fixed, under the resampled models.
	FillRate, StockoutProbability, TotalCost Spread
	// Regret of the recommendation (see Resample.Regret).
	Regret Spread
	// FloorShare is the share of resampled models under which the
	// recommendation meets Search.MinFillRate (1 without a floor).
	FloorShare float64
	// Robust is the robust policy when Options.Robust was set.
	Robust   *Robust
	Warnings []string
}

// defaultKind is the planner's rule: s-S with a fixed order cost, else
// base-stock.
func defaultKind(sys inventory.System) policies.Kind {
	if sys.OrderCost > 0 {
		return policies.SS
	}
	return policies.BaseStock
}

// Analyze resamples the history y of one SKU, refits each resample,
// optimises each resampled model and evaluates the recommendation on it.
// sys holds the costs, lead time and mode; its Demand, when not nil, is the
// point model (else y is fitted by opt.Fit). The recommendation is the
// optimum of sys under opt.Search. Every figure is exact for its model
// (policies.Optimize, policies.Evaluate); percentiles are the inverse of
// the empirical distribution function over the resamples with an answer
// (definition 1 of R. J. Hyndman and Y. Fan, "Sample quantiles in
// statistical packages", The American Statistician 50(4), 361-365, 1996),
// so the bands of integer levels are levels.
//
// A resample whose fit or search fails (a resample without demand, a floor
// no policy meets under that model) is counted out and named in a warning;
// the analysis fails when fewer than two resamples have an answer.
func Analyze(sku string, y []int, sys inventory.System, opt Options) (*Result, error) {
	B := opt.Resamples
	if B == 0 {
		B = DefaultResamples
	}
	if B < 2 || B > MaxResamples {
		return nil, &inventory.FieldError{Field: "resamples", Value: fmt.Sprint(opt.Resamples), Want: fmt.Sprintf("a count of resamples from 2 to %d", MaxResamples)}
	}
	scheme := opt.Scheme
	if scheme == "" {
		scheme = IID
	}
	if _, err := ParseScheme(string(scheme)); err != nil {
		return nil, err
	}
	conf := opt.FloorConfidence
	if conf == 0 {
		conf = DefaultFloorConfidence
	}
	if !(conf > 0 && conf <= 1) {
		return nil, &inventory.FieldError{Field: "floor_confidence", Value: fmt.Sprint(opt.FloorConfidence), Want: "a share in (0, 1]"}
	}
	if len(y) < 2 {
		return nil, &inventory.FieldError{Field: "history", Value: fmt.Sprintf("%d periods", len(y)), Want: "at least 2 periods to resample"}
	}
	fit := opt.Fit
	if fit == nil {
		fit = history.Fit
	}
	ctx := opt.Context
	if ctx == nil {
		ctx = context.Background()
	}
	if opt.Search.Eval.Context == nil {
		opt.Search.Eval.Context = opt.Context
	}
	keep := opt.KeepModels || opt.Robust
	if keep {
		top := slices.Max(y)
		// A refitted law can hold a table over its support (the empirical
		// pmf: three numbers per value up to the largest demand; the
		// discretised laws a little beyond it).
		per := 24 * (2*float64(max(top, 0)) + 64)
		if est := float64(B) * per; est > MaxModelBytes {
			return nil, &inventory.FieldError{Field: "resamples", Value: fmt.Sprint(B),
				Want: fmt.Sprintf("fewer resamples: keeping %d refitted laws of demands up to %d would take about %.3g GB (the limit is %.3g GB)", B, top, est/1e9, MaxModelBytes/1e9),
				Err:  ErrTooLarge}
		}
	}
	res := &Result{SKU: sku, Periods: len(y), BlockLength: 1}
	res.Lag1, res.Lag1Significant = Lag1(y)
	if scheme == Auto {
		scheme = IID
		if res.Lag1Significant {
			scheme = Block
		}
	} else if scheme == IID && res.Lag1Significant {
		res.Warnings = append(res.Warnings, fmt.Sprintf("lag-1 autocorrelation %.2f is significant: the iid bootstrap may understate the spread (try the block scheme)", res.Lag1))
	}
	res.Scheme = scheme
	if scheme == Block {
		res.BlockLength = BlockLength(y)
	}

	if sys.Demand == nil {
		s, err := fit(y)
		if err != nil {
			return nil, fmt.Errorf("fit of the history: %w", err)
		}
		sys.Demand = s.Demand
	}
	res.Demand = sys.Demand
	kind := opt.Kind
	if kind == "" {
		kind = defaultKind(sys)
	}
	point, err := policies.Optimize(sys, kind, opt.Search)
	if err != nil {
		return nil, fmt.Errorf("optimize %s on the point model: %w", kind, err)
	}
	res.Point = point
	rec := point.Policy

	var samp *sampler
	if scheme == Parametric {
		samp, err = newSampler(sys.Demand)
		if err != nil {
			return nil, err
		}
	}

	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, B)
	res.Resamples = make([]Resample, B)
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			buf := make([]int, len(y))
			for {
				b := int(next.Add(1) - 1)
				if b >= B {
					return
				}
				r := &res.Resamples[b]
				r.Index = b
				if err := ctx.Err(); err != nil {
					r.Err = err
					continue
				}
				rng := Stream(opt.Seed, sku, b)
				switch scheme {
				case Block:
					resampleBlocks(buf, y, res.BlockLength, rng)
				case Parametric:
					for i := range buf {
						buf[i] = samp.draw(rng)
					}
				default:
					resampleIID(buf, y, rng)
				}
				planResample(r, buf, sys, kind, rec, opt.Search, fit)
				if !keep {
					r.Demand = nil
				}
			}
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := res.summarise(kind, opt.Search.MinFillRate); err != nil {
		return nil, err
	}
	if opt.Robust {
		rb, err := robustSearch(res, sys, kind, opt, conf)
		if err != nil {
			return nil, fmt.Errorf("robust policy: %w", err)
		}
		res.Robust = rb
	}
	return res, nil
}

// planResample refits one resampled series, finds its model's optimum and
// evaluates the recommendation rec on it.
func planResample(r *Resample, y []int, sys inventory.System, kind policies.Kind, rec policies.Policy, search policies.SearchOptions, fit func([]int) (history.Summary, error)) {
	s, err := fit(y)
	if err != nil {
		r.Err = fmt.Errorf("fit: %w", err)
		return
	}
	if s.Demand == nil {
		r.Err = errors.New("fit: no model")
		return
	}
	sys.Demand = s.Demand
	o, err := policies.Optimize(sys, kind, search)
	if err != nil {
		r.Err = fmt.Errorf("optimize %s: %w", kind, err)
		return
	}
	e, err := policies.Evaluate(sys, rec, search.Eval)
	if err != nil {
		r.Err = fmt.Errorf("evaluate %v: %w", rec, err)
		return
	}
	r.Model, r.Demand = s.Model(), s.Demand
	r.Optimum, r.OptimalCost = o.Policy, o.Figures.TotalCost
	r.Held = e.Figures
	r.Regret = e.Figures.TotalCost - o.Figures.TotalCost
}

// Quantile returns the p-quantile of the sorted sample x by the inverse of
// the empirical distribution function, x_(ceil(n p)) (Hyndman and Fan
// 1996, definition 1); NaN for an empty sample.
func Quantile(x []float64, p float64) float64 {
	n := len(x)
	if n == 0 {
		return math.NaN()
	}
	i := int(math.Ceil(float64(n)*p)) - 1
	return x[max(0, min(i, n-1))]
}

func band(x []float64) Band {
	slices.Sort(x)
	return Band{P05: Quantile(x, 0.05), P50: Quantile(x, 0.5), P95: Quantile(x, 0.95)}
}

func spread(x []float64) Spread {
	var m float64
	for _, v := range x {
		m += v
	}
	b := band(x)
	return Spread{Mean: m / float64(len(x)), P05: b.P05, P50: b.P50, P95: b.P95}
}

// summarise computes the bands, spreads and regret over the resamples with
// an answer.
func (res *Result) summarise(kind policies.Kind, floor float64) error {
	var s, S, Q, fill, so, cost, regret []float64
	var firstErr error
	failed, meets := 0, 0
	for i := range res.Resamples {
		r := &res.Resamples[i]
		if r.Err != nil {
			failed++
			if firstErr == nil {
				firstErr = fmt.Errorf("resample %d: %w", r.Index, r.Err)
			}
			continue
		}
		s = append(s, float64(r.Optimum.ReorderPoint))
		S = append(S, float64(r.Optimum.OrderUpTo))
		Q = append(Q, float64(r.Optimum.OrderMultiple))
		fill = append(fill, r.Held.FillRate)
		so = append(so, r.Held.StockoutProbability)
		cost = append(cost, r.Held.TotalCost)
		regret = append(regret, r.Regret)
		if floor == 0 || r.Held.FillRate >= floor-1e-12 {
			meets++
		}
	}
	res.Used = len(fill)
	if res.Used < 2 {
		return fmt.Errorf("%d of %d resamples could be planned, want at least 2: %v", res.Used, len(res.Resamples), firstErr)
	}
	if failed > 0 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d of %d resamples left out, first %v", failed, len(res.Resamples), oneLine(firstErr.Error())))
	}
	switch kind {
	case policies.BaseStock:
		res.OrderUpTo = band(S)
	case policies.SS:
		res.ReorderPoint, res.OrderUpTo = band(s), band(S)
	case policies.SNQ:
		res.ReorderPoint, res.OrderMultiple = band(s), band(Q)
	}
	res.FillRate, res.StockoutProbability, res.TotalCost = spread(fill), spread(so), spread(cost)
	res.Regret = spread(regret)
	res.FloorShare = float64(meets) / float64(res.Used)
	return nil
}

func oneLine(s string) string {
	b := []byte(s)
	for i, c := range b {
		if c == '\n' || c == '\r' {
			b[i] = ' '
		}
	}
	return string(b)
}
