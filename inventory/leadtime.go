package inventory

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
)

// LeadTimeModel says how random lead times of successive orders relate.
type LeadTimeModel string

// The lead-time models.
const (
	// Sequential deliveries: orders arrive in the order they were placed,
	// in the arrival-process form of Kaplan (1970, Management Science
	// 16(7)): each period an independent random cut-off T decides that
	// every outstanding order at least T periods old arrives. The empty
	// model means Sequential.
	Sequential LeadTimeModel = "sequential"
	// Independent lead times: each order draws its own lead time from the
	// law, independently of the others, so orders may overtake each other.
	Independent LeadTimeModel = "independent"
)

// MaxReviewPeriod is the longest review period a System may have.
const MaxReviewPeriod = 100_000

// MaxLeadTimeSpan bounds the number of lead-time values (after the law is
// cut where its tail falls below LeadTimeNeglect) that a random lead time
// may take: each value costs one lead-time demand table.
const MaxLeadTimeSpan = 10_000

// MaxLeadTimeWeights is the longest fixed lead time LeadTimeWeights
// tabulates (the weights of a one-point law at it): 2^22 periods, 32 MiB.
const MaxLeadTimeWeights = 1 << 22

// LeadTimeNeglect is the tail mass at which a lead-time law of unbounded
// support (poisson, negbin, normal, gamma) is cut: the mass beyond its
// Bound(LeadTimeNeglect) is placed on that bound and reported as
// neglected.
const LeadTimeNeglect = 1e-13

// ParseLeadTimeModel reads "sequential" or "independent" (any case, spaces
// ignored); the empty string is Sequential.
func ParseLeadTimeModel(v string) (LeadTimeModel, error) {
	switch m := LeadTimeModel(strings.ToLower(strings.TrimSpace(v))); m {
	case "":
		return Sequential, nil
	case Sequential, Independent:
		return m, nil
	}
	return "", &FieldError{Field: "lead_time_model", Value: v, Want: "sequential or independent"}
}

// ParseLeadTime reads a lead time: a whole number of periods 0..MaxLeadTime
// (by ParseInt: 3, 3.0 and 3e0 are the same), or a law in the demand
// grammar of Parse (pmf:2=0.2,3=0.5,5=0.3, poisson:mean=4, ...). A law
// concentrated on one point is returned as that fixed lead time with a nil
// law, so that it gives exactly the figures of the fixed lead time.
// Errors are *FieldError values with Field "lead_time".
func ParseLeadTime(s string) (fixed int, law Distribution, err error) {
	v := strings.TrimSpace(s)
	if !strings.Contains(v, ":") {
		n, err := ParseInt(v)
		if err != nil || n < 0 || n > MaxLeadTime {
			return 0, nil, &FieldError{Field: "lead_time", Value: s,
				Want: "a whole number of periods from 0 to 1000000000, or a law such as pmf:2=0.2,3=0.5,5=0.3 or poisson:mean=4"}
		}
		return int(n), nil, nil
	}
	d, err := Parse(v)
	if err != nil {
		if fe, ok := err.(*FieldError); ok {
			return 0, nil, &FieldError{Field: "lead_time", Value: s, Want: "a lead-time law in the demand grammar: " + fe.Want, Err: fe.Err}
		}
		return 0, nil, err
	}
	if p, ok := onePoint(d); ok {
		return p, nil, nil
	}
	return 0, d, nil
}

// onePoint reports whether d puts all its mass on one point, and which.
func onePoint(d Distribution) (int, bool) {
	t, ok := d.(Table)
	if !ok {
		return 0, false
	}
	w := t.get().w
	k := -1
	for i, x := range w {
		if x > 0 {
			if k >= 0 {
				return 0, false
			}
			k = i
		}
	}
	return k, k >= 0
}

// Review returns the review period of s: ReviewPeriod, or 1 when it is 0.
func (s System) Review() int { return max(s.ReviewPeriod, 1) }

// Model returns the lead-time model of s (Sequential when empty).
func (s System) Model() LeadTimeModel {
	if s.LeadTimeModel == "" {
		return Sequential
	}
	return s.LeadTimeModel
}

// FixedTiming reports whether s has today's timing: a fixed lead time (no
// law) and review every period.
func (s System) FixedTiming() bool { return s.LeadTimeLaw == nil && s.Review() == 1 }

// LeadTimeWeights returns the lead-time law of s as weights w[l] = P(L = l),
// l = 0..len(w)-1 (a fixed lead time is a one-point law), cut where the
// tail falls below LeadTimeNeglect with the rest placed on the last point;
// neglected is the mass so moved.
//
// A fixed lead time longer than MaxLeadTimeWeights is refused (ErrLimit)
// before anything is allocated: the weights are indexed by the lead time.
func (s System) LeadTimeWeights() (w []float64, neglected float64, err error) {
	if s.LeadTimeLaw == nil {
		if s.LeadTime < 0 || s.LeadTime > MaxLeadTimeWeights {
			return nil, 0, &FieldError{Field: "lead_time", Value: strconv.Itoa(s.LeadTime),
				Want: "a lead time of at most " + strconv.Itoa(MaxLeadTimeWeights) + " periods with a review period above 1 (the lead-time demand is tabulated by the lead time; plan in longer periods)", Err: ErrLimit}
		}
		w = make([]float64, s.LeadTime+1)
		w[s.LeadTime] = 1
		return w, 0, nil
	}
	return lawWeights(s.LeadTimeLaw)
}

// lawWeights tabulates a lead-time law as in LeadTimeWeights.
func lawWeights(d Distribution) ([]float64, float64, error) {
	b := d.Bound(LeadTimeNeglect)
	if b > MaxLeadTimeSpan {
		return nil, 0, &FieldError{Field: "lead_time", Value: d.String(),
			Want: "a lead-time law whose values up to its 1e-13 tail number at most 10000 periods (this one reaches " + strconv.Itoa(b) + "; plan in longer periods)", Err: ErrLimit}
	}
	w := make([]float64, b+1)
	for k := range w {
		w[k] = d.PMF(k)
	}
	rest := d.Tail(b + 1)
	w[b] += rest
	// The lower tail likewise: the mass below the first point where the
	// CDF exceeds LeadTimeNeglect joins that point.
	lo := sort.Search(b, func(k int) bool { return d.CDF(k) > LeadTimeNeglect })
	if lo > 0 {
		var low float64
		for k := range lo {
			low += w[k]
			w[k] = 0
		}
		w[lo] += low
		rest += low
	}
	return w, rest, nil
}

// checkLeadTimeLaw refuses a law that is not a distribution of lead times
// the model can carry: it must be representable, within MaxLeadTimeSpan,
// and under Sequential deliveries realisable by Kaplan's arrival process
// (see KaplanCutoff).
func checkLeadTimeLaw(s System) error {
	d := s.LeadTimeLaw
	m := d.Mean()
	if math.IsNaN(m) || math.IsInf(m, 0) || m < 0 {
		return &FieldError{Field: "lead_time", Value: d.String(), Want: "a lead-time law with a finite mean"}
	}
	w, _, err := lawWeights(d)
	if err != nil {
		return err
	}
	if s.Model() == Sequential {
		if _, j, ok := kaplanCutoff(w); !ok {
			near := NearestKaplan(d)
			return &FieldError{Field: "lead_time", Value: d.String(),
				Want: "a law that sequential deliveries (Kaplan 1970) can realise: its hazard P(L = l)/P(L >= l) must not fall as l grows, so that the cut-off law P(T <= l) = P(L = l)/P(L >= l) is a distribution function; here it falls from l = " +
					strconv.Itoa(j) + " to " + strconv.Itoa(j+1) + "; the nearest law it admits (maximum likelihood under a rising hazard) is " + shortLaw(near.String()) + " (mean " + strconv.FormatFloat(near.Mean(), 'g', 6, 64) + ", against " + strconv.FormatFloat(d.Mean(), 'g', 6, 64) + "; or --lead-time-model independent: orders may cross)"}
		}
	}
	return nil
}

// shortLaw keeps a law's text short enough for a one-line message: a law
// whose text passes 4 KiB (hundreds of points) is cut after its first
// points, with the count of the points left out; shorter laws are printed
// whole, so that they can be copied into --lead-time.
func shortLaw(s string) string {
	const keep, most = 8, 4096
	parts := strings.Split(s, ",")
	if len(s) <= most || len(parts) <= keep+2 {
		return s
	}
	return strings.Join(parts[:keep], ",") + ",… (" + strconv.Itoa(len(parts)-keep) + " more points)"
}

// kaplanTol is the amount by which a computed hazard may fall before a law
// is refused as not realisable (round-off of printed laws).
const kaplanTol = 1e-9

// KaplanCutoff returns the law of the cut-off T of Kaplan's arrival process
// that realises the lead-time law w (w[l] = P(L = l)): F[l] = P(T <= l) is
// the hazard P(L = l)/P(L >= l), since an order of age l still out arrives
// exactly when the period's cut-off is at most l, independently of the
// past, so P(L > l) = prod_{j<=l} (1 - F[j]) (Kaplan 1970, Management
// Science 16(7); Zipkin 2000, Foundations of Inventory Management, section
// 7.4, from memory). The law is realisable if and only if F is a
// distribution function: non-decreasing, reaching 1 at the largest lead
// time. ok is false otherwise, and j is then the first l with F[l+1] <
// F[l] (less kaplanTol).
func KaplanCutoff(w []float64) (F []float64, j int, ok bool) { return kaplanCutoff(w) }

func kaplanCutoff(w []float64) ([]float64, int, bool) {
	F := make([]float64, len(w))
	suf := suffix(w) // suf[l] = P(L >= l), summed from the far end
	for l, p := range w {
		if suf[l] <= 1e-12 || l == len(w)-1 {
			F[l] = 1
			for k := l + 1; k < len(F); k++ {
				F[k] = 1
			}
			break
		}
		F[l] = min(p/suf[l], 1)
	}
	for l := 0; l+1 < len(F); l++ {
		if F[l+1] < F[l]-kaplanTol {
			return F, l, false
		}
	}
	return F, -1, true
}

// NearestKaplan returns the law nearest to d that Kaplan's sequential
// arrival process can realise: the hazards h_l = P(L = l)/P(L >= l) are
// replaced by their isotonic (non-decreasing) regression weighted by the
// mass at risk P(L >= l), computed by pooling adjacent violators (Barlow,
// Bartholomew, Bremner & Brunk 1972, Statistical Inference under Order
// Restrictions): for lead times observed with these relative frequencies
// it is the maximum-likelihood law with a non-decreasing hazard. Printed
// to 10 significant digits as a pmf; a law already admissible is returned
// unchanged.
func NearestKaplan(d Distribution) Distribution {
	w, _, err := lawWeights(d)
	if err != nil {
		return d
	}
	if _, _, ok := kaplanCutoff(w); ok {
		return d
	}
	// Hazards and weights up to the last point with mass.
	last := len(w) - 1
	for last > 0 && w[last] == 0 {
		last--
	}
	type block struct {
		h, wt float64
		n     int
	}
	var bs []block
	suf := suffix(w)
	for l := 0; l <= last; l++ {
		h := 1.0
		if l < last && suf[l] > 0 {
			h = min(w[l]/suf[l], 1)
		}
		bs = append(bs, block{h, max(suf[l], 1e-300), 1})
		for len(bs) > 1 && bs[len(bs)-1].h < bs[len(bs)-2].h {
			a, b := bs[len(bs)-2], bs[len(bs)-1]
			bs = bs[:len(bs)-2]
			bs = append(bs, block{(a.h*a.wt + b.h*b.wt) / (a.wt + b.wt), a.wt + b.wt, a.n + b.n})
		}
	}
	// Cut where the survival falls below 1e-9, the rest on the last point
	// (a hazard of 1 there keeps the hazard non-decreasing).
	p := make([]float64, 0, last+1)
	s := 1.0
blocks:
	for _, b := range bs {
		for range b.n {
			if s < 1e-9 {
				break blocks
			}
			p = append(p, s*b.h)
			s *= 1 - b.h
		}
	}
	p[len(p)-1] += s
	var parts []string
	for k, x := range p {
		if x > 0 {
			parts = append(parts, strconv.Itoa(k)+"="+strconv.FormatFloat(x, 'g', 10, 64))
		}
	}
	spec := "pmf:" + strings.Join(parts, ",")
	if t, err := Parse(spec); err == nil {
		return t
	}
	t, _ := NewPMF(p)
	return t
}

// suffix returns suf[l] = sum_{k >= l} w[k].
func suffix(w []float64) []float64 {
	suf := make([]float64, len(w)+1)
	for l := len(w) - 1; l >= 0; l-- {
		suf[l] = suf[l+1] + w[l]
	}
	return suf
}

// Mixture is the law of X_M, the demand over a random number M of periods
// drawn independently of demand, on 0, 1, 2, ...: P(X_M = k) = sum_m
// P(M = m) P(X_m = k). Its mean and variance are those of the random sum,
// E[M] E[D] and E[M] Var[D] + E[D]^2 Var[M] (Silver, Pyke & Thomas 2017,
// Inventory and Production Management in Supply Chains, section 6.10,
// from memory), computed here from the components as sum_m P(M = m) E[X_m]
// and sum_m P(M = m) (Var[X_m] + (E[X_m] - mean)^2).
//
// A Mixture refers to immutable shared data, so copies are cheap.
type Mixture struct {
	*mixture
}

type mixture struct {
	w    []float64 // weights of the components, summing to 1
	c    []Distribution
	mean float64
	vari float64
	negl float64
	lo   int // the smallest number of periods
	span int // the length of the table (mixtureSpan)
	// A table of the law on 0..len(pmf)-1, where the tail of every
	// component is below mixtureCacheEps: pmf, cdf[k] = P(X <= k) by
	// prefix sums and tail[k] = P(X >= k) by suffix sums from the
	// components' closed tails at the end, so both ends keep their
	// relative accuracy. Beyond it the components are summed directly.
	pmf, cdf, tail []float64
}

// mixtureCacheEps is the tail beyond which a Mixture stops its table.
const mixtureCacheEps = 1e-30

// maxMixtureCache bounds the entries of a Mixture's table.
const maxMixtureCache = 1 << 22

// maxMixtureWork bounds the entries (components times table length) that
// one Mixture tabulates: about a second of work.
const maxMixtureWork = 1e9

// mixtureSpan is the length of the table of x: the largest component's
// Bound(mixtureCacheEps) + 1.
func mixtureSpan(x *mixture) int {
	hi := 0
	for _, c := range x.c {
		hi = max(hi, c.Bound(mixtureCacheEps))
	}
	return hi + 1
}

// mixCache keeps what the mixtures of one demand law share (see
// MixedDemands): the sums Sum(d, n), their bounds and their pmf tables,
// by the number of periods n.
type mixCache struct {
	sums   map[int]Distribution
	bounds map[int]int
	tabs   map[int][]float64
	// later holds the numbers of periods that the mixtures still to be
	// built use: only their tables are kept; the others are written
	// into scratch.
	later   map[int]bool
	scratch []float64
}

func newMixCache() *mixCache {
	return &mixCache{sums: map[int]Distribution{}, bounds: map[int]int{}, tabs: map[int][]float64{}}
}

// mixCacheEntries caps the pmf tables a mixCache keeps (32 MiB).
const mixCacheEntries = 1 << 22

// tabulate fills the table of x (skipped when it would be too long); ns
// are the numbers of periods of its components, whose pmf tables come
// from mc when it holds one at least as long (nil: none kept). A table's
// values do not depend on its length (componentPMF), so a shared one gives
// the same numbers.
func (x *mixture) tabulate(mc *mixCache, ns []int) {
	hi := x.span - 1
	if hi+1 > maxMixtureCache {
		return
	}
	n := hi + 1
	pmf := make([]float64, n)
	keep := mc != nil && n*len(x.c) <= mixCacheEntries
	var scratch []float64
	if mc != nil {
		scratch = mc.scratch
		defer func() { mc.scratch = scratch }()
	}
	var top float64 // P(X >= n)
	for i, c := range x.c {
		var comp []float64
		if t, ok := mc.tab(ns[i]); ok && len(t) >= n {
			comp = t[:n]
		} else {
			if keep && mc.later[ns[i]] {
				comp = make([]float64, n)
				mc.tabs[ns[i]] = comp
			} else {
				if cap(scratch) < n {
					scratch = make([]float64, n)
				}
				comp = scratch[:n]
			}
			componentPMF(c, comp)
		}
		for k, v := range comp {
			pmf[k] += x.w[i] * v
		}
		top += x.w[i] * c.Tail(n)
	}
	cdf := make([]float64, n)
	tail := make([]float64, n+1)
	var acc float64
	for k, v := range pmf {
		acc += v
		cdf[k] = min(acc, 1)
	}
	tail[n] = top
	for k := n - 1; k >= 0; k-- {
		tail[k] = min(tail[k+1]+pmf[k], 1)
	}
	tail[0] = 1
	x.pmf, x.cdf, x.tail = pmf, cdf, tail
}

// tab returns the table of n periods kept in mc (nil mc: none).
func (mc *mixCache) tab(n int) ([]float64, bool) {
	if mc == nil {
		return nil, false
	}
	t, ok := mc.tabs[n]
	return t, ok
}

// componentPMF writes P(C = k), k = 0..len(out)-1. A Poisson law is
// evaluated at its mode and carried to the others by the ratio
// P(k+1)/P(k) = m/(k+1); every other law point by point.
func componentPMF(c Distribution, out []float64) {
	if p, ok := c.(Poisson); ok && len(out) > 0 {
		mode := min(int(p.m), len(out)-1)
		out[mode] = p.PMF(mode)
		// Re-anchored on the closed form every 256 points, so the error
		// stays below about 256 units of round-off.
		for k := mode; k+1 < len(out); k++ {
			if (k+1-mode)%256 == 0 {
				out[k+1] = p.PMF(k + 1)
				continue
			}
			out[k+1] = out[k] * p.m / float64(k+1)
		}
		for k := mode; k > 0; k-- {
			if (mode-k+1)%256 == 0 {
				out[k-1] = p.PMF(k - 1)
				continue
			}
			out[k-1] = out[k] * float64(k) / p.m
		}
		return
	}
	for k := range out {
		out[k] = c.PMF(k)
	}
}

// MixedDemand returns the law of the demand D over M + extra periods, with
// M = L + phase, L the lead time of s (its law, or the fixed lead time)
// and phase uniform on 0..R-1 for the review period R, all independent of
// demand. Under sequential deliveries (Kaplan 1970) the net inventory at
// the end of a period is Y - X where X has the law MixedDemand(s, 1) and
// Y, the position after the last review whose orders have all arrived,
// has the stationary law of the position at reviews; the stock before the
// period's demand is Y - MixedDemand(s, 0). With a fixed lead time L and
// R = 1 it is the sum over L + extra periods.
func MixedDemand(s System, extra int) (Distribution, error) {
	return mixedDemand(s, extra, nil)
}

// MixedDemands returns MixedDemand(s, e) for each e of extras, computing
// each sum of demand over a number of periods once for all of them (the
// laws of X_{V+f} and X_{V+f+1} share all but two of their components).
func MixedDemands(s System, extras ...int) ([]Distribution, error) {
	mc := newMixCache()
	out := make([]Distribution, len(extras))
	// The longest first, so that its tables serve the shorter ones.
	order := make([]int, len(extras))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return extras[b] - extras[a] })
	w, _, err := phaseWeights(s)
	if err != nil {
		return nil, err
	}
	for j, i := range order {
		mc.later = map[int]bool{}
		for _, k := range order[j+1:] {
			for m, p := range w {
				if p > 0 {
					mc.later[m+extras[k]] = true
				}
			}
		}
		x, err := mixedDemand(s, extras[i], mc)
		if err != nil {
			return nil, err
		}
		out[i] = x
	}
	return out, nil
}

func mixedDemand(s System, extra int, mc *mixCache) (Distribution, error) {
	w, negl, err := phaseWeights(s)
	if err != nil {
		return nil, err
	}
	return newMixture(s.Demand, w, extra, negl, mc)
}

// phaseWeights returns the law of M = L + phase of MixedDemand: the
// lead-time law convolved with the uniform phase on 0..R-1.
func phaseWeights(s System) ([]float64, float64, error) {
	lw, negl, err := s.LeadTimeWeights()
	if err != nil {
		return nil, 0, err
	}
	r := s.Review()
	// Convolve the lead-time law with the uniform phase on 0..r-1.
	w := make([]float64, len(lw)+r-1)
	for l, p := range lw {
		if p == 0 {
			continue
		}
		for f := range r {
			w[l+f] += p / float64(r)
		}
	}
	return w, negl, nil
}

// NewMixture returns the law of X_{m+extra}, m drawn with P(M = m) = w[m]
// (weights >= 0 summing to 1), the components summed by Sum; neglected is
// mass already moved in w, added to the Neglected of the result. A weight
// vector of one point gives that component itself.
func NewMixture(d Distribution, w []float64, extra int, neglected float64) (Distribution, error) {
	return newMixture(d, w, extra, neglected, nil)
}

// newMixture is NewMixture with the sums Sum(d, n) kept in sums (when not
// nil) for the next mixture of the same demand.
func newMixture(d Distribution, w []float64, extra int, neglected float64, mc *mixCache) (Distribution, error) {
	mx := &mixture{negl: neglected, lo: -1}
	var ns []int
	for m, p := range w {
		if p <= 0 {
			continue
		}
		var x Distribution
		ok := false
		if mc != nil {
			x, ok = mc.sums[m+extra]
		}
		if !ok {
			var err error
			if x, err = Sum(d, m+extra); err != nil {
				return nil, err
			}
			if mc != nil {
				mc.sums[m+extra] = x
			}
		}
		ns = append(ns, m+extra)
		if mx.lo < 0 {
			mx.lo = m + extra
		}
		mx.w = append(mx.w, p)
		mx.c = append(mx.c, x)
	}
	if len(mx.c) == 1 && neglected == 0 {
		return mx.c[0], nil
	}
	if len(mx.c) == 0 {
		return nil, &FieldError{Field: "lead_time", Value: "", Want: "a lead-time law with some mass"}
	}
	for i, x := range mx.c {
		mx.mean += mx.w[i] * x.Mean()
		mx.negl += mx.w[i] * Neglected(x)
	}
	for i, x := range mx.c {
		dm := x.Mean() - mx.mean
		mx.vari += mx.w[i] * (x.Variance() + dm*dm)
	}
	hi := 0
	for i, c := range mx.c {
		b, ok := 0, false
		if mc != nil {
			b, ok = mc.bounds[ns[i]]
		}
		if !ok {
			b = c.Bound(mixtureCacheEps)
			if mc != nil {
				mc.bounds[ns[i]] = b
			}
		}
		hi = max(hi, b)
	}
	mx.span = hi + 1
	if work := float64(len(mx.c)) * float64(mx.span); work > maxMixtureWork {
		return nil, &FieldError{Field: "lead_time", Value: "a law of " + strconv.Itoa(len(mx.c)) + " values",
			Want: fmt.Sprintf("a lead-time law whose demand tables need at most 1e9 entries (%d values times %d units of demand; plan in longer periods or larger units)", len(mx.c), mx.span), Err: ErrLimit}
	}
	mx.tabulate(mc, ns)
	return Mixture{mx}, nil
}

// PMF returns P(X_M = k).
func (x Mixture) PMF(k int) float64 {
	if k < 0 {
		return 0
	}
	if k < len(x.pmf) {
		return x.pmf[k]
	}
	var s float64
	for i, c := range x.c {
		s += x.w[i] * c.PMF(k)
	}
	return s
}

// CDF returns P(X_M <= k).
func (x Mixture) CDF(k int) float64 {
	if k < 0 {
		return 0
	}
	if k < len(x.cdf) {
		return x.cdf[k]
	}
	if k+1 < len(x.tail) {
		return 1 - x.tail[k+1]
	}
	var s float64
	for i, c := range x.c {
		s += x.w[i] * c.CDF(k)
	}
	return min(s, 1)
}

// Tail returns P(X_M >= k) from the components' closed tails.
func (x Mixture) Tail(k int) float64 {
	if k <= 0 {
		return 1
	}
	if k < len(x.tail) {
		return x.tail[k]
	}
	var s float64
	for i, c := range x.c {
		s += x.w[i] * c.Tail(k)
	}
	return min(s, 1)
}

func (x Mixture) Mean() float64     { return x.mean }
func (x Mixture) Variance() float64 { return x.vari }

// Neglected is the mass the components' tables and the lead-time law's cut
// left out or moved.
func (x Mixture) Neglected() float64 { return x.negl }

// Bound returns the smallest k with P(X_M > k) <= eps.
func (x Mixture) Bound(eps float64) int {
	hi := 0
	for _, c := range x.c {
		hi = max(hi, c.Bound(eps))
	}
	return sort.Search(hi+1, func(k int) bool { return x.Tail(k+1) <= eps })
}

// Components returns the weights and component laws (shared; do not
// modify).
func (x Mixture) Components() ([]float64, []Distribution) { return x.w, x.c }

// String describes the mixture (it is not in the grammar of Parse).
func (x Mixture) String() string {
	return "demand over a random number of periods (" + strconv.Itoa(len(x.c)) + " values from " + strconv.Itoa(x.lo) + "), mean " + ftoa(x.mean)
}
