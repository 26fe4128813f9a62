package policies

import (
	"context"
	"fmt"
	"math"

	"ergostock/inventory"
)

// kernelEps is the probability mass of single-period demand left out of the
// renewal kernel at each end (see boModel.q): far below the round-off of a
// sum of order one.
const kernelEps = 1e-17

// maxLevel bounds every level a search may consider, so that bad input
// (a holding cost of 1e-300, say) ends in an error rather than a hang.
const maxLevel = 1 << 26

// cumTable holds the distribution function of a demand law X on 0, 1, 2, ...
// with its running sums, so that for every integer y
//
//	F(y)     = P(X <= y),
//	below(y) = E[(y-X)^+] = sum_{k=0}^{y-1} F(k),
//	above(y) = E[(X-y)^+] = E[X] - y + below(y)
//
// in O(1) (the first-order loss identities; Zipkin 2000, Foundations of
// Inventory Management, appendix C, from memory). F is stored on 0..len-1
// and held constant beyond, where it differs from 1 by at most the mass
// neglected by the distribution's own truncation (reported by Neglected of a
// lead-time Table) plus kernelEps.
type cumTable struct {
	mean float64
	f    []float64 // f[k] = P(X <= k)
	a    []float64 // a[k] = below(k), len(a) = len(f)+1
}

// newCumTable tabulates x up to the point where P(X > k) <= kernelEps; a nil
// x is the law concentrated at 0.
func newCumTable(x inventory.Distribution) *cumTable {
	if x == nil {
		return &cumTable{f: []float64{1}, a: []float64{0, 1}}
	}
	n := x.Bound(kernelEps) + 1
	t := &cumTable{mean: x.Mean(), f: make([]float64, n), a: make([]float64, n+1)}
	var cdf float64
	for k := range n {
		cdf += x.PMF(k)
		t.f[k] = min(cdf, 1)
		t.a[k+1] = t.a[k] + t.f[k]
	}
	return t
}

func (t *cumTable) cdf(y int) float64 {
	switch {
	case y < 0:
		return 0
	case y < len(t.f):
		return t.f[y]
	}
	return t.f[len(t.f)-1]
}

func (t *cumTable) below(y int) float64 {
	switch {
	case y <= 0:
		return 0
	case y < len(t.a):
		return t.a[y]
	}
	n := len(t.a) - 1
	return t.a[n] + float64(y-n)*t.f[n-1]
}

func (t *cumTable) above(y int) float64 {
	return max(t.mean-float64(y)+t.below(y), 0)
}

// boModel is the cost structure of one system in backorder mode, from which
// every s-S, base-stock and s-nQ cost follows without building a chain.
//
// With Y the inventory position just after review and X = X_{L+1} the
// demand over L+1 periods, the expected holding and backorder cost charged
// L periods later is
//
//	G(y) = h E[(y - X)^+] + b E[(X - y)^+],
//
// a convex function of y with G(y+1) - G(y) = (h+b) P(X <= y) - b (the
// standard one-period cost of periodic review; Veinott 1966, Management
// Science 12(11); Zheng and Federgruen 1991). The fill rate and the
// stockout probability are likewise averages over Y of
//
//	fill(y) = (E[(y-X_L)^+] - E[(y-X_{L+1})^+]) / E[D],   so(y) = P(X_{L+1} > y),
//
// both non-decreasing (resp. non-increasing) in y. The purchase cost c E[D]
// does not depend on the policy: in the long run every unit demanded is
// ordered once.
//
// For s-S the renewal mass of single-period demand,
//
//	m(0) = 1/(1-p0),  m(j) = sum_{i=1}^{j} p_i m(j-i) / (1-p0),
//
// counts the expected periods of an order cycle during which the demand
// since the order totals j, and M(n) = sum_{j<n} m(j) is the expected cycle
// length of a policy with S - s = n (Zheng and Federgruen 1991).
type boModel struct {
	h, b, k, c float64
	mu         float64
	x1, x0     *cumTable              // X_{L+1} and X_L (mixed: see timing)
	pos        inventory.Distribution // demand between reviews (the kernel's)

	q        []float64 // q[i] = P(D = i)/(1-p0) for i in qlo..len(q)-1
	qlo      int
	m, cm    []float64 // m(j), and cm[n] = M(n)
	negl     float64   // mass left out of the kernel and the lead-time laws
	glo      int       // arrays below hold y = glo .. glo+len(g)-1
	g, fr, s []float64 // G(y), fill(y), so(y)
	// Prefix sums: pg[i] = sum_{k<i} g[k], likewise pfr and ps.
	pg, pfr, ps []float64

	limit int             // the state limit: widest S - s and level range searched
	zf    *zfResult       // the unconstrained s-S optimum, once found (zfOnce)
	ctx   context.Context // nil: none
	ticks int             // loop steps since the last look at ctx
}

// levelCap is the widest range of levels a search may walk: maxLevel, or
// the state limit if smaller (the tables grow with the range).
func (mo *boModel) levelCap() int { return min(maxLevel, max(mo.limit, 1)) }

// capErr reports a search that would walk past levelCap.
func (mo *boModel) capErr(search, what string, v float64) error {
	return &SizeError{Chain: search + "'s tables", Bound: v, Limit: mo.levelCap(), What: "entries",
		Reason: fmt.Sprintf("%s: the %s reaches %s without an optimum in range", search, what, count(v))}
}

// tick returns the context's error every 1024 calls (nil otherwise or
// without a context): the searches' loops call it once a step.
func (mo *boModel) tick() error {
	if mo.ctx == nil {
		return nil
	}
	mo.ticks++
	if mo.ticks&1023 != 0 {
		return nil
	}
	if err := mo.ctx.Err(); err != nil {
		return fmt.Errorf("search stopped: %w", err)
	}
	return nil
}

// newBOModel builds the tables of sys in backorder mode under the default
// limits.
func newBOModel(sys inventory.System) (*boModel, error) { return newBOModelOpt(sys, Options{}) }

// newBOModelOpt builds the tables of sys in backorder mode. The tables of
// demand run from 0 to where its tail is below kernelEps; they are refused
// with a *SizeError naming the demand (and the lead time) before they are
// allocated when they would exceed opt.MaxStates entries, and every level
// the searches visit is kept within opt.MaxStates of the others (see
// levelCap). opt.Context, when not nil, is checked in the searches' loops.
func newBOModelOpt(sys inventory.System, opt Options) (*boModel, error) {
	return newBOModelKind(sys, opt, SS)
}

// newBOModelKind is newBOModelOpt for a search of policies of kind k (the
// lead-time model admits some kinds only; see timingOf).
func newBOModelKind(sys inventory.System, opt Options, kind Kind) (*boModel, error) {
	limit := opt.MaxStates
	if limit <= 0 {
		limit = DefaultMaxStates
	}
	tm, err := opt.Tables.timing(sys, kind)
	if err != nil {
		return nil, err
	}
	// The renewal kernel is the demand between reviews; G, fill and so use
	// the lead-time laws of the timing (mixed over the lead-time law and
	// the phase of the review cycle), all per period.
	d := tm.pos
	x1d, n1, x0d, n0 := tm.x1, tm.negl1, tm.x0, tm.negl0
	b1 := 1.0
	if x1d != nil {
		b1 = float64(x1d.Bound(kernelEps)) + 1
	}
	if b := max(b1, float64(d.Bound(kernelEps))+1); b > float64(limit) {
		field, value, what := "demand", d.String(), "demand"
		if sys.LeadTime > 0 {
			what = fmt.Sprintf("demand over the lead time plus one period (%d periods)", sys.LeadTime+1)
		}
		return nil, &SizeError{Chain: "search tables", Bound: b, Limit: limit, What: "entries",
			Input: field, Value: value, Bytes: b * bytesPerEntry,
			Reason: "the search tabulates " + what + " from 0 to its 1e-17 tail (plan in larger units, e.g. packs of 100)"}
	}
	mo := &boModel{
		limit: limit, ctx: opt.Context,
		h: sys.Holding, b: sys.Shortage, k: sys.OrderCost / float64(tm.r), c: sys.UnitCost,
		mu: sys.Demand.Mean(), x1: newCumTable(x1d), x0: newCumTable(x0d),
		negl: n1 + n0, pos: d,
	}
	p0 := d.PMF(0)
	if !(p0 < 1) {
		return nil, &inventory.FieldError{Field: "demand", Value: d.String(), Want: "a distribution with positive demand"}
	}
	hi := d.Bound(kernelEps)
	lo := 1
	for lo < hi && d.CDF(lo)-p0 <= kernelEps {
		lo++
	}
	mo.negl += d.Tail(hi+1) + max(d.CDF(lo-1)-p0, 0)
	mo.qlo = lo
	mo.q = make([]float64, hi+1)
	for i := lo; i <= hi; i++ {
		mo.q[i] = d.PMF(i) / (1 - p0)
	}
	mo.m = []float64{1 / (1 - p0)}
	mo.cm = []float64{0, mo.m[0]}
	return mo, nil
}

// ensureM extends the renewal mass to m(0..n-1) and M(0..n).
func (mo *boModel) ensureM(n int) {
	for j := len(mo.m); j < n; j++ {
		var v float64
		hi := min(j, len(mo.q)-1)
		for i := mo.qlo; i <= hi; i++ {
			v += mo.q[i] * mo.m[j-i]
		}
		mo.m = append(mo.m, v)
		mo.cm = append(mo.cm, mo.cm[j]+v)
	}
}

// ensureY extends the arrays of G, fill and so to cover lo..hi, growing
// geometrically so that the total work stays linear in the range used.
func (mo *boModel) ensureY(lo, hi int) {
	if len(mo.g) > 0 && lo >= mo.glo && hi < mo.glo+len(mo.g) {
		return
	}
	if len(mo.g) > 0 {
		span := len(mo.g)
		lo = min(lo, mo.glo-span/2)
		hi = max(hi, mo.glo+len(mo.g)-1+span/2)
	}
	n := hi - lo + 1
	g, fr, so := make([]float64, n), make([]float64, n), make([]float64, n)
	pg, pfr, ps := make([]float64, n+1), make([]float64, n+1), make([]float64, n+1)
	for i := range n {
		y := lo + i
		bl1 := mo.x1.below(y)
		g[i] = mo.h*bl1 + mo.b*mo.x1.above(y)
		fr[i] = min(max((mo.x0.below(y)-bl1)/mo.mu, 0), 1)
		so[i] = 1 - mo.x1.cdf(y)
		pg[i+1], pfr[i+1], ps[i+1] = pg[i]+g[i], pfr[i]+fr[i], ps[i]+so[i]
	}
	mo.glo, mo.g, mo.fr, mo.s = lo, g, fr, so
	mo.pg, mo.pfr, mo.ps = pg, pfr, ps
}

// sums returns the sums of G, fill and so over the positions a..b.
func (mo *boModel) sums(a, b int) (g, fill, so float64) {
	mo.ensureY(a, b)
	i, j := a-mo.glo, b+1-mo.glo
	return mo.pg[j] - mo.pg[i], mo.pfr[j] - mo.pfr[i], mo.ps[j] - mo.ps[i]
}

// G returns the expected holding and backorder cost of position y.
func (mo *boModel) G(y int) float64 {
	mo.ensureY(y, y)
	return mo.g[y-mo.glo]
}

// fractile returns the smallest y with P(X_{L+1} <= y) >= b/(b+h), the
// smallest minimiser of G.
func (mo *boModel) fractile() (int, error) {
	r := mo.b / (mo.b + mo.h)
	lo, hi := 0, 1
	for mo.x1.cdf(hi) < r {
		if hi >= mo.levelCap() || hi >= len(mo.x1.f) {
			return 0, &inventory.FieldError{Field: "shortage_cost", Value: fmt.Sprint(mo.b),
				Want: fmt.Sprintf("a shortage cost whose critical fractile b/(b+h) = %.17g lies within the demand's support (P(X <= %d) = %.17g); keep b/h below about 1e15", r, hi, mo.x1.cdf(hi))}
		}
		lo, hi = hi, min(2*hi, mo.levelCap())
	}
	for lo < hi {
		mid := lo + (hi-lo)/2
		if mo.x1.cdf(mid) >= r {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return lo, nil
}

// ssWindow returns, for the s-S policy with order-up-to level S and S-s = n,
// the numerator K + sum_{j<n} m(j) G(S-j) of its cost (Zheng and Federgruen
// 1991) and the expected cycle length M(n).
func (mo *boModel) ssWindow(s, S int) (num, den float64) {
	n := S - s
	mo.ensureM(n)
	mo.ensureY(s+1, S)
	g := mo.g[s+1-mo.glo : S+1-mo.glo]
	m := mo.m[:n]
	num = mo.k
	for j, w := range m {
		num += w * g[n-1-j]
	}
	return num, mo.cm[n]
}

// ssCost is c(s, S), the long-run cost per period without the purchase term.
func (mo *boModel) ssCost(s, S int) float64 {
	num, den := mo.ssWindow(s, S)
	return num / den
}

// ssService returns the cost, fill rate and stockout probability of s-S in
// one pass; the stationary law of Y is m(S-y)/M(S-s) on s+1..S.
func (mo *boModel) ssService(s, S int) (cost, fill, so float64) {
	n := S - s
	mo.ensureM(n)
	mo.ensureY(s+1, S)
	off := s + 1 - mo.glo
	g, fr, st := mo.g[off:off+n], mo.fr[off:off+n], mo.s[off:off+n]
	num := mo.k
	for j, w := range mo.m[:n] {
		i := n - 1 - j
		num += w * g[i]
		fill += w * fr[i]
		so += w * st[i]
	}
	den := mo.cm[n]
	return num / den, fill / den, so / den
}

// floors is a service requirement; a zero field is no requirement.
type floors struct{ minFill, maxStockout float64 }

func (f floors) none() bool { return f.minFill == 0 && f.maxStockout == 0 }

func (f floors) meets(fill, so float64) bool {
	return (f.minFill == 0 || fill >= f.minFill) && (f.maxStockout == 0 || so <= f.maxStockout)
}

// violation measures how far figures miss the floors (0 when met).
func (f floors) violation(fill, so float64) float64 {
	var v float64
	if f.minFill > 0 && fill < f.minFill {
		v += f.minFill - fill
	}
	if f.maxStockout > 0 && so > f.maxStockout {
		v += so - f.maxStockout
	}
	return v
}

func (f floors) String() string {
	switch {
	case f.minFill > 0 && f.maxStockout > 0:
		return fmt.Sprintf("fill rate >= %g and stockout probability <= %g", f.minFill, f.maxStockout)
	case f.minFill > 0:
		return fmt.Sprintf("fill rate >= %g", f.minFill)
	case f.maxStockout > 0:
		return fmt.Sprintf("stockout probability <= %g", f.maxStockout)
	}
	return "no service floor"
}

// isFinite reports whether x is a finite number.
func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
