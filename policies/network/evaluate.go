package network

import (
	"errors"
	"fmt"
	"math"

	"ergostock/inventory"
)

// cutEps is the tail probability beyond which the law of the centre's
// lead-time demand (and so of its backorders) is cut; the mass cut is
// reported in Result.Neglected.
const cutEps = 1e-15

// maxSupport bounds the tables of the evaluation (laws and levels): about
// 4 million points.
const maxSupport = 1 << 22

// maxConvolveWork bounds the multiply-adds of summing the stores' laws.
const maxConvolveWork = 2e9

// ErrLimit is wrapped by refusals of networks too large to evaluate.
var ErrLimit = inventory.ErrLimit

// Figures are one location's long-run averages per period. A location's
// on hand is its own stock at the end of a period, after it has shipped to
// the stores below it; stock in transit is not counted. At the centre,
// backorders are the units it owes the stores, the stockout probability is
// P(it owes any at the end of a period), the fill rate is the fraction of
// the units the stores order that it ships in the period they are ordered,
// and the shortage cost is 0 (the stores are charged for their own
// backorders).
type Figures struct {
	Location string `json:"location"`
	Parent   string `json:"parent"`
	LeadTime int    `json:"lead_time"`
	// InstallationLevel is the base-stock level on the location's own
	// position; EchelonLevel on its echelon position (the same at a
	// store).
	InstallationLevel   int     `json:"installation_base_stock"`
	EchelonLevel        int     `json:"echelon_base_stock"`
	MeanDemand          float64 `json:"mean_demand"` // per period; at the centre the stores' total
	FillRate            float64 `json:"fill_rate"`
	StockoutProbability float64 `json:"stockout_probability"`
	MeanOnHand          float64 `json:"mean_on_hand"`
	MeanBackorders      float64 `json:"mean_backorders"`
	HoldingCost         float64 `json:"holding_cost"`
	ShortageCost        float64 `json:"shortage_cost"`
	TotalCost           float64 `json:"total_cost"`
}

// Result is a network's figures, centre first, then the stores in the
// order given.
type Result struct {
	Locations []Figures
	TotalCost float64
	// Method names the evaluation; Exact says whether the figures are
	// exact (one store) or an approximation (several stores).
	Method string
	Exact  bool
	// Neglected is the largest probability mass any one cut table left
	// out (each is bounded separately).
	Neglected float64
}

// Method names.
const (
	MethodSerial    = "exact serial decomposition (Clark-Scarf)"
	MethodMETRIC    = "METRIC decomposition, binomial split of the centre's backorders"
	MethodTwoMoment = "METRIC decomposition, two-moment (Graves) split of the centre's backorders"
)

// Evaluate computes every location's figures for the levels of n: exactly
// for one store, by the METRIC-type decomposition for several (see the
// package documentation).
func Evaluate(n *Network) (*Result, error) {
	if err := n.Validate(true); err != nil {
		return nil, err
	}
	m, err := newModel(n)
	if err != nil {
		return nil, err
	}
	s0, s := n.InstallationLevels()
	return m.evaluate(s0, s)
}

// model holds the laws that do not depend on the levels.
type model struct {
	n        *Network
	x0       inventory.Distribution // total store demand over L0 periods
	w0       inventory.Distribution // over L0 - 1 periods (L0 >= 1), else one period
	total    float64                // mean total demand per period
	share    []float64              // each store's share of it
	xl, xl1  []inventory.Distribution
	neglect  float64
	x0Bound  int
	supplier int
}

func newModel(n *Network) (*model, error) {
	m := &model{n: n}
	l0 := n.Centre.LeadTime
	var over, less []inventory.Distribution
	for _, st := range n.Stores {
		if b := st.Demand.Bound(cutEps); b > maxSupport {
			return nil, n.errAt(st, "demand", "%q: its table would need %d points, over the limit of %d (plan in larger units)", st.Demand.String(), b, maxSupport)
		}
		m.total += st.Demand.Mean()
		for _, p := range []struct {
			dst *[]inventory.Distribution
			k   int
		}{{&m.xl, st.LeadTime}, {&m.xl1, st.LeadTime + 1}} {
			d, err := inventory.Sum(st.Demand, p.k)
			if err != nil {
				return nil, n.errAt(st, "lead_time", "%d with demand %q: %v", st.LeadTime, st.Demand.String(), err)
			}
			*p.dst = append(*p.dst, d)
			m.neglect = math.Max(m.neglect, inventory.Neglected(d))
		}
		a, err := inventory.Sum(st.Demand, l0)
		if err != nil {
			return nil, n.errAt(n.Centre, "lead_time", "%d with demand %q at %s: %v", l0, st.Demand.String(), st.Name, err)
		}
		over = append(over, a)
		k := l0 - 1 // W: the demand over L0 - 1 periods, or one period when L0 = 0
		if l0 == 0 {
			k = 1
		}
		b, err := inventory.Sum(st.Demand, k)
		if err != nil {
			return nil, n.errAt(n.Centre, "lead_time", "%d with demand %q at %s: %v", l0, st.Demand.String(), st.Name, err)
		}
		less = append(less, b)
	}
	for _, st := range n.Stores {
		m.share = append(m.share, st.Demand.Mean()/m.total)
	}
	var err error
	var neg float64
	if m.x0, neg, err = sumLaws(over); err != nil {
		return nil, n.errAt(n.Centre, "lead_time", "%d: the stores' total demand over it: %v", l0, err)
	}
	m.neglect = math.Max(m.neglect, neg)
	if m.w0, neg, err = sumLaws(less); err != nil {
		return nil, n.errAt(n.Centre, "lead_time", "%d: the stores' total demand: %v", l0, err)
	}
	m.neglect = math.Max(m.neglect, neg)
	m.x0Bound = m.x0.Bound(cutEps)
	if m.x0Bound > maxSupport {
		return nil, n.errAt(n.Centre, "lead_time", "%d: the stores' total demand over it needs a table of %d points, over the limit of %d", l0, m.x0Bound, maxSupport)
	}
	return m, nil
}

// sumLaws returns the law of the sum of independent laws: closed for
// Poisson laws, otherwise a table convolved from factors cut at a tail of
// cutEps/len(ds) each; the mass left out is returned.
func sumLaws(ds []inventory.Distribution) (inventory.Distribution, float64, error) {
	if len(ds) == 1 {
		return ds[0], inventory.Neglected(ds[0]), nil
	}
	mean, allPoisson := 0.0, true
	for _, d := range ds {
		mean += d.Mean()
		if _, ok := d.(inventory.Poisson); !ok {
			allPoisson = false
		}
	}
	if allPoisson {
		if mean == 0 {
			t, err := inventory.NewPMF([]float64{1})
			return t, 0, err
		}
		p, err := inventory.NewPoisson(mean)
		return p, 0, err
	}
	acc := []float64{1}
	neg, work := 0.0, 0.0
	eps := cutEps / float64(len(ds))
	for _, d := range ds {
		b := d.Bound(eps)
		if b > maxSupport || len(acc)+b > maxSupport {
			return nil, 0, fmt.Errorf("a table of %d points, over the limit of %d: %w", len(acc)+b, maxSupport, ErrLimit)
		}
		if work += float64(len(acc)) * float64(b+1); work > maxConvolveWork {
			return nil, 0, fmt.Errorf("convolving the %d stores' laws would take more than %g operations (Poisson laws sum in closed form): %w", len(ds), maxConvolveWork, ErrLimit)
		}
		f := make([]float64, b+1)
		for k := range f {
			f[k] = d.PMF(k)
		}
		neg += d.Tail(b+1) + inventory.Neglected(d)
		acc = convolve(acc, f)
	}
	// Renormalise what is kept: the cut mass is reported, not placed.
	t, err := inventory.NewPMF(trimZeros(acc))
	return t, neg, err
}

func trimZeros(p []float64) []float64 {
	for len(p) > 1 && p[len(p)-1] == 0 {
		p = p[:len(p)-1]
	}
	return p
}

func convolve(a, b []float64) []float64 {
	out := make([]float64, len(a)+len(b)-1)
	for i, x := range a {
		if x == 0 {
			continue
		}
		for j, y := range b {
			out[i+j] += x * y
		}
	}
	return out
}

// backorderLaw returns the law of the centre's backorders (X0 - s0)^+ at
// the end of a period, on 0..K, and the tail mass cut beyond K.
func (m *model) backorderLaw(s0 int) ([]float64, float64, error) {
	top := m.x0Bound - s0 // largest backorder kept
	if top < 0 {
		return []float64{1}, 0, nil
	}
	if top >= maxSupport {
		return nil, 0, m.n.errAt(m.n.Centre, "base_stock", "%d as the centre's own level: its backorders would span %d values, beyond the limit of %d (raise the centre's level)", s0, top+1, maxSupport)
	}
	p := make([]float64, top+1)
	if s0 >= 0 {
		p[0] = m.x0.CDF(s0)
	}
	for k := 1; k <= top; k++ {
		if s0+k >= 0 {
			p[k] = m.x0.PMF(s0 + k)
		}
	}
	return p, m.x0.Tail(m.x0Bound + 1), nil
}

// maxThinWork bounds the multiply-adds of splitting the centre's
// backorders among the stores (len(B)^2/2 a store).
const maxThinWork = 2e9

// checkThin refuses a split that would take more than maxThinWork.
func (m *model) checkThin(s0 int, b0 []float64) error {
	if len(m.n.Stores) < 2 {
		return nil
	}
	if w := float64(len(b0)) * float64(len(b0)) / 2 * float64(len(m.n.Stores)); w > maxThinWork {
		return m.n.errAt(m.n.Centre, "base_stock", "%d as the centre's own level: its backorders span %d values, and splitting them among %d stores would take %.2g operations, over the limit of %g (raise the centre's level or plan in larger units): %w",
			s0, len(b0), len(m.n.Stores), w, maxThinWork, ErrLimit)
	}
	return nil
}

// split returns the law of the part of the centre's backorders b0 owed
// to store i, by the network's Split.
func (m *model) split(b0 []float64, i int) ([]float64, error) {
	q := m.share[i]
	if m.n.Split != TwoMoment {
		return thin(b0, q), nil
	}
	var mu, m2 float64
	for k, p := range b0 {
		mu += p * float64(k)
		m2 += p * float64(k) * float64(k)
	}
	v := math.Max(0, m2-mu*mu)
	mean := q * mu
	vari := q*(1-q)*mu + q*q*v
	if mean <= 0 {
		return []float64{1}, nil
	}
	var d inventory.Distribution
	var err error
	if vari > mean*(1+1e-9) {
		d, err = inventory.NewNegBin(mean, vari)
	} else {
		d, err = inventory.NewPoisson(mean)
	}
	if err != nil {
		return nil, m.n.errAt(m.n.Stores[i], "demand", "the two-moment split (mean %g, variance %g): %v", mean, vari, err)
	}
	k := d.Bound(cutEps)
	if k >= maxSupport {
		return nil, m.n.errAt(m.n.Stores[i], "demand", "the two-moment split needs %d points, over the limit of %d", k, maxSupport)
	}
	pb := make([]float64, k+1)
	for j := range pb {
		pb[j] = d.PMF(j)
	}
	return pb, nil
}

// thin returns the law of Binomial(B, q) given the law of B: the part of
// the centre's backorders owed to a store with share q of the demand.
func thin(b []float64, q float64) []float64 {
	if q >= 1 {
		return b
	}
	out := make([]float64, len(b))
	row := make([]float64, len(b)) // Binomial(n, q) pmf
	row[0] = 1
	out[0] = b[0]
	for n := 1; n < len(b); n++ {
		for k := n; k >= 1; k-- {
			row[k] = (1-q)*row[k] + q*row[k-1]
		}
		row[0] *= 1 - q
		if b[n] == 0 {
			continue
		}
		for k := 0; k <= n; k++ {
			out[k] += b[n] * row[k]
		}
	}
	return trimZeros(out)
}

// storeFigures are a store's figures for level s when the units owed to
// it by the centre have law pb.
type storeFigures struct {
	onHand, backorders, stockout, fill float64
}

func (m *model) store(i, s int, pb []float64) (storeFigures, error) {
	st := m.n.Stores[i]
	k := len(pb) - 1
	lo, hi := s-k, s+1
	if hi >= maxSupport || lo <= -maxSupport || hi-lo >= maxSupport {
		return storeFigures{}, m.n.errAt(st, "base_stock", "%d: its tables would span %d..%d, beyond the limit of %d points", s, lo, hi, maxSupport)
	}
	tl, err := inventory.NewLossTable(m.xl[i], lo, hi)
	if err != nil {
		return storeFigures{}, m.n.errAt(st, "base_stock", "%d: %v", s, err)
	}
	tl1, err := inventory.NewLossTable(m.xl1[i], lo, hi)
	if err != nil {
		return storeFigures{}, m.n.errAt(st, "base_stock", "%d: %v", s, err)
	}
	var oh, bo, so, served, unserved inventory.CompensatedSum
	for b, p := range pb {
		if p == 0 {
			continue
		}
		y := s - b
		oh.Add(p * tl1.Under(y))
		bo.Add(p * tl1.Over(y))
		so.Add(p * tl1.Tail(y+1))
		served.Add(p * math.Max(0, tl.Under(y)-tl1.Under(y)))
		unserved.Add(p * math.Max(0, tl1.Over(y)-tl.Over(y)))
	}
	mean := st.Demand.Mean()
	f := storeFigures{onHand: oh.Value(), backorders: bo.Value(), stockout: so.Value()}
	if served.Value() <= unserved.Value() {
		f.fill = served.Value() / mean
	} else {
		f.fill = 1 - unserved.Value()/mean
	}
	f.fill = math.Min(1, math.Max(0, f.fill))
	return f, nil
}

// centre returns the centre's figures at installation level s0.
func (m *model) centre(s0 int) (storeFigures, error) {
	if s0 >= maxSupport || s0 <= -maxSupport {
		own := ""
		if m.n.Levels != Installation {
			own = " (its echelon level less the stores' levels)"
		}
		return storeFigures{}, m.n.errAt(m.n.Centre, "base_stock", "%d as the centre's own level%s: want it within %d of 0", s0, own, maxSupport)
	}
	over, under, err := inventory.Loss(m.x0, s0)
	if err != nil {
		return storeFigures{}, m.n.errAt(m.n.Centre, "base_stock", "%d: %v", s0, err)
	}
	f := storeFigures{onHand: under, backorders: over, stockout: m.x0.Tail(s0 + 1)}
	switch {
	case m.n.Centre.LeadTime == 0 && s0 >= 0:
		f.fill = 1
	case m.n.Centre.LeadTime == 0:
		o, _, err := inventory.Loss(m.w0, -s0)
		if err != nil {
			return storeFigures{}, err
		}
		f.fill = o / m.total
	default:
		// Units of this period's orders shipped at once:
		// (s0 - W)^+ - (s0 - X0)^+, W the total demand over L0 - 1 periods.
		wo, wu, err := inventory.Loss(m.w0, s0)
		if err != nil {
			return storeFigures{}, err
		}
		served, unserved := wu-under, over-wo
		if served <= unserved {
			f.fill = served / m.total
		} else {
			f.fill = 1 - unserved/m.total
		}
	}
	f.fill = math.Min(1, math.Max(0, f.fill))
	return f, nil
}

// evaluate computes the figures at installation levels s0 and s.
func (m *model) evaluate(s0 int, s []int) (*Result, error) {
	n := m.n
	exact := len(n.Stores) == 1
	res := &Result{Exact: exact, Method: MethodSerial, Neglected: m.neglect}
	if !exact {
		res.Method = MethodMETRIC
		if n.Split == TwoMoment {
			res.Method = MethodTwoMoment
		}
	}
	cf, err := m.centre(s0)
	if err != nil {
		return nil, err
	}
	b0, cut, err := m.backorderLaw(s0)
	if err != nil {
		return nil, err
	}
	if m.n.Split != TwoMoment {
		if err := m.checkThin(s0, b0); err != nil {
			return nil, err
		}
	}
	res.Neglected = math.Max(res.Neglected, cut)
	echelon := s0
	for _, v := range s {
		echelon += v
	}
	c := n.Centre
	res.Locations = append(res.Locations, Figures{
		Location: c.Name, LeadTime: c.LeadTime, InstallationLevel: s0, EchelonLevel: echelon,
		MeanDemand: m.total, FillRate: cf.fill, StockoutProbability: cf.stockout,
		MeanOnHand: cf.onHand, MeanBackorders: cf.backorders, HoldingCost: c.Holding * cf.onHand,
	})
	for i, st := range n.Stores {
		pb := b0
		if !exact {
			if pb, err = m.split(b0, i); err != nil {
				return nil, err
			}
		}
		f, err := m.store(i, s[i], pb)
		if err != nil {
			return nil, err
		}
		res.Locations = append(res.Locations, Figures{
			Location: st.Name, Parent: st.Parent, LeadTime: st.LeadTime, InstallationLevel: s[i], EchelonLevel: s[i],
			MeanDemand: st.Demand.Mean(), FillRate: f.fill, StockoutProbability: f.stockout,
			MeanOnHand: f.onHand, MeanBackorders: f.backorders,
			HoldingCost: st.Holding * f.onHand, ShortageCost: st.Shortage * f.backorders,
		})
	}
	for i := range res.Locations {
		l := &res.Locations[i]
		l.TotalCost = l.HoldingCost + l.ShortageCost
		res.TotalCost += l.TotalCost
	}
	if math.IsNaN(res.TotalCost) || math.IsInf(res.TotalCost, 0) {
		return nil, errors.New("network: the costs overflow: want smaller cost rates")
	}
	return res, nil
}
