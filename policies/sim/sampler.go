package sim

import (
	"math"
	"math/bits"
	"math/rand/v2"

	"ergostock/inventory"
)

// tableEps is the tail mass beyond the alias table: the table holds the
// values 0..K with K = Bound(tableEps); the event D > K is one more cell.
const tableEps = 1e-16

// maxTable caps the number of table cells for very heavy-tailed demand of
// a law without a direct sampler; the remaining mass is still drawn exactly
// through the tail cell.
const maxTable = 1 << 20

// aliasLimit is the widest support (in units) that gets an alias table
// when the family has a direct sampler (Poisson, negative binomial,
// discretised normal and gamma); wider laws are drawn directly.
const aliasLimit = 1 << 16

// cellBytes is the memory of one table cell with its build scratch
// (weight, scaled weight, small/large index).
const cellBytes = 16 + 8 + 8 + 8

// How a sampler draws.
const (
	byAlias   = iota // alias table plus exact tail inversion
	byPoisson        // PTRS (Hormann 1993)
	byNegBin         // gamma-Poisson mixture
	byNormal         // rounded continuous normal
	byGamma          // rounded continuous gamma
)

// cell is one column of the alias table: the value of the column itself is
// taken when the fraction part of the draw is below thr, the alias
// otherwise.
type cell struct {
	thr   uint64
	alias int64
}

// sampler draws demand in O(1) with the alias method (Walker 1977, with the
// table built by Vose 1991). Values 0..k are table cells; cell k+1 stands
// for the event D > k, drawn from the exact tail. A sampler is read-only
// after construction and may be shared by goroutines.
type sampler struct {
	by    int // byAlias, byPoisson, ...
	cells []cell
	n     uint64 // len(cells)
	k     int64  // largest value held in the table
	tail  float64
	dist  inventory.Distribution

	// Direct samplers: PTRS constants (byPoisson), the gamma shape and
	// scale (byNegBin: of the Poisson mean; byGamma: of the demand), the
	// normal's mu and sigma (byNormal).
	pois         ptrs
	shape, scale float64
	mu, sigma    float64
}

// newSampler returns the sampler of d: an alias table over 0..Bound(1e-16)
// when that support is narrow, else the family's direct sampler; an
// explicit pmf always gets the alias table over its support.
func newSampler(d inventory.Distribution) *sampler {
	if s := directSampler(d); s != nil {
		return s
	}
	return newSamplerEps(d, tableEps)
}

// tableCells returns the number of alias cells newSampler(d) builds (0 for
// a direct sampler), for the size estimate before building.
func tableCells(d inventory.Distribution) int {
	if directSampler(d) != nil {
		return 0
	}
	return min(max(d.Bound(tableEps), 0), maxTable-2) + 2
}

// directSampler returns the direct sampler of a wide law of a family that
// has one, nil otherwise.
//
//   - Poisson: PTRS (see ptrs).
//   - Negative binomial with size r and probability p: Poisson(L) with
//     L ~ Gamma(r, (1-p)/p), the gamma-Poisson mixture (Johnson, Kemp and
//     Kotz, Univariate Discrete Distributions, 3rd ed., 2005, section 5.3).
//   - Discretised normal and gamma: the continuous variate X rounded as the
//     SPEC discretises it (see roundDemand).
func directSampler(d inventory.Distribution) *sampler {
	switch d.(type) {
	case inventory.Poisson, inventory.NegBin, inventory.Normal, inventory.Gamma:
	default:
		return nil
	}
	if d.Bound(tableEps) <= aliasLimit {
		return nil
	}
	s := &sampler{k: -1, dist: d}
	switch d := d.(type) {
	case inventory.Poisson:
		s.by, s.pois = byPoisson, newPTRS(d.Mean())
	case inventory.NegBin:
		s.by, s.shape, s.scale = byNegBin, d.Size(), (1-d.Prob())/d.Prob()
	case inventory.Normal:
		s.by, s.mu, s.sigma = byNormal, d.Mu(), d.Sigma()
	case inventory.Gamma:
		s.by, s.shape, s.scale = byGamma, d.Shape(), d.Scale()
	}
	return s
}

// newSamplerEps builds the alias table of d over 0..Bound(eps).
func newSamplerEps(d inventory.Distribution, eps float64) *sampler {
	k := d.Bound(eps)
	if k < 0 {
		k = 0
	}
	if k > maxTable-2 {
		k = maxTable - 2
	}
	tail := d.Tail(k + 1)
	if !(tail > 0) {
		tail = 0
	}
	p := make([]float64, k+2)
	var sum float64
	for i := 0; i <= k; i++ {
		v := d.PMF(i)
		if !(v > 0) { // also refuses NaN
			v = 0
		}
		p[i] = v
		sum += v
	}
	p[k+1] = tail
	sum += tail
	s := &sampler{cells: make([]cell, len(p)), n: uint64(len(p)), k: int64(k), tail: tail, dist: d}
	s.build(p, sum)
	return s
}

// build fills the alias table from the weights p with total sum (Vose 1991,
// section III: split the scaled weights into small and large, pair each
// small one with a large donor).
func (s *sampler) build(p []float64, sum float64) {
	n := len(p)
	scaled := make([]float64, n)
	small := make([]int, 0, n)
	large := make([]int, 0, n)
	for i, v := range p {
		scaled[i] = v * float64(n) / sum
		if scaled[i] < 1 {
			small = append(small, i)
		} else {
			large = append(large, i)
		}
	}
	for len(small) > 0 && len(large) > 0 {
		l := small[len(small)-1]
		small = small[:len(small)-1]
		g := large[len(large)-1]
		s.cells[l] = cell{thr: threshold(scaled[l]), alias: int64(g)}
		scaled[g] = (scaled[g] + scaled[l]) - 1
		if scaled[g] < 1 {
			large = large[:len(large)-1]
			small = append(small, g)
		}
	}
	// What is left has weight 1 up to round-off: the column keeps itself.
	for _, i := range append(small, large...) {
		s.cells[i] = cell{thr: math.MaxUint64, alias: int64(i)}
	}
}

// threshold maps a column probability x in [0, 1) to the fraction part of
// a 64-bit draw below which the column keeps its own value.
func threshold(x float64) uint64 {
	if !(x > 0) {
		return 0
	}
	if x >= 1 {
		return math.MaxUint64
	}
	return uint64(x * (1 << 64))
}

// draw returns one demand. One 64-bit number u gives both the column,
// floor(u n / 2^64), and the fraction within it, u n mod 2^64; the fraction
// is uniform to within n / 2^64.
func (s *sampler) draw(rng *rand.PCG) int64 {
	if s.by != byAlias {
		return s.direct(rng)
	}
	col, frac := bits.Mul64(rng.Uint64(), s.n)
	c := s.cells[col]
	v := c.alias
	if frac < c.thr {
		v = int64(col)
	}
	if v > s.k {
		return s.far(rng)
	}
	return v
}

// far draws D conditional on D > k by inverting the exact tail: with V
// uniform on (0, 1] it returns the least m > k with
// P(D > m) <= V P(D > k), found by doubling then bisection on Tail.
func (s *sampler) far(rng *rand.PCG) int64 {
	v := float64(rng.Uint64()>>11+1) / (1 << 53)
	target := v * s.tail
	ok := func(m int64) bool { return s.dist.Tail(int(m+1)) <= target }
	lo, hi := s.k, s.k+1 // invariant: !ok(lo) (as P(D > k) > target or v = 1), ok(hi) sought
	if v == 1 {
		return hi // P(D > k+1) <= P(D > k) always
	}
	for step := int64(1); !ok(hi); step *= 2 {
		lo = hi
		if hi > math.MaxInt32-step { // a tail that never falls below target: stop
			return hi
		}
		hi += step
	}
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if ok(mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}

// direct draws from a direct sampler. A draw beyond 2^62 (possible only
// for laws the size checks of Run refuse) is returned as 2^62.
func (s *sampler) direct(rng *rand.PCG) int64 {
	var x float64
	switch s.by {
	case byPoisson:
		x = s.pois.draw(rng)
	case byNegBin:
		x = poisson(rng, s.scale*gammaVariate(rng, s.shape))
	case byNormal:
		x = roundDemand(s.mu + s.sigma*normal(rng))
	case byGamma:
		x = roundDemand(s.scale * gammaVariate(rng, s.shape))
	}
	if !(x < 1<<62) {
		return 1 << 62
	}
	return int64(x)
}
