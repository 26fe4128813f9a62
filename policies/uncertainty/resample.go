package uncertainty

import (
	"fmt"
	"hash/fnv"
	"math"
	"math/rand/v2"
	"sort"

	"ergostock/inventory"
)

// Scheme is a way of resampling a history.
type Scheme string

// The resampling schemes; see the package documentation.
const (
	IID        Scheme = "iid"
	Block      Scheme = "block"
	Auto       Scheme = "auto"
	Parametric Scheme = "parametric"
)

// ParseScheme reads a scheme name.
func ParseScheme(s string) (Scheme, error) {
	switch Scheme(s) {
	case IID, Block, Auto, Parametric:
		return Scheme(s), nil
	}
	return "", &inventory.FieldError{Field: "resampling", Value: s, Want: "iid, block, auto or parametric"}
}

// splitmix64 is one step of SplitMix64 (G. L. Steele, D. Lea and C. H.
// Flood, "Fast splittable pseudorandom number generators", OOPSLA 2014).
func splitmix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// Stream returns the random stream of resample b of the SKU under seed: a
// PCG generator whose two words are SplitMix64 outputs of the seed mixed
// with the FNV-1a hash of the SKU, and of b. It depends on nothing else,
// so the resamples are the same for any worker count or order of work.
func Stream(seed uint64, sku string, b int) *rand.Rand {
	h := fnv.New64a()
	h.Write([]byte(sku))
	k := splitmix64(seed ^ splitmix64(h.Sum64()))
	return rand.New(rand.NewPCG(k, splitmix64(k^splitmix64(uint64(b)+1))))
}

// Lag1 returns the lag-1 sample autocorrelation of y,
// r1 = sum_t (y_t - m)(y_{t+1} - m) / sum_t (y_t - m)^2, and whether it is
// significant at 5% against independence: |r1| > 1.96/sqrt(n), with
// Bartlett's large-sample standard error 1/sqrt(n) of r1 under
// independence (M. S. Bartlett, "On the theoretical specification and
// sampling properties of autocorrelated time-series", Journal of the Royal
// Statistical Society Supplement 8, 27-41, 1946). A constant series has
// r1 = 0.
func Lag1(y []int) (r1 float64, significant bool) {
	r := autocorr(y, 1)
	if len(r) < 2 {
		return 0, false
	}
	return r[1], math.Abs(r[1]) > 1.96/math.Sqrt(float64(len(y)))
}

// autocorr returns the sample autocorrelations rho(0..maxLag) of y with
// divisor n (rho(0) = 1); all zero beyond lag 0 for a constant series.
func autocorr(y []int, maxLag int) []float64 {
	n := len(y)
	if n < 2 {
		return nil
	}
	maxLag = min(maxLag, n-1)
	var m float64
	for _, v := range y {
		m += float64(v)
	}
	m /= float64(n)
	c := make([]float64, maxLag+1)
	for k := 0; k <= maxLag; k++ {
		s := 0.0
		for t := 0; t+k < n; t++ {
			s += (float64(y[t]) - m) * (float64(y[t+k]) - m)
		}
		c[k] = s / float64(n)
	}
	r := make([]float64, maxLag+1)
	r[0] = 1
	if c[0] == 0 {
		return r
	}
	for k := 1; k <= maxLag; k++ {
		r[k] = c[k] / c[0]
	}
	return r
}

// BlockLength returns the block length of the moving-block bootstrap for
// y by the automatic rule of Politis and White (2004), as corrected by
// Patton, Politis and White (2009), for the circular and moving-block
// bootstraps (the two share it):
//
//	b = (2 G^2 / D)^(1/3) n^(1/3),  G = sum_{|k|<=M} lambda(k/M) |k| R(k),
//	D = (4/3) g^2,                  g = sum_{|k|<=M} lambda(k/M) R(k),
//
// R the sample autocovariances, lambda the flat-top window (1 on
// |t| <= 1/2, 2(1 - |t|) on 1/2 < |t| <= 1), M = 2m with m the least lag
// after which K_n = max(5, sqrt(log10 n)) autocorrelations in a row stay
// within 2 sqrt(log10(n)/n) (Politis 2003). The result is rounded up and
// kept within 1..max(1, n/3). These constants are as recalled from the
// papers (from memory); a series without autocorrelation gets 1 (the iid
// bootstrap).
func BlockLength(y []int) int {
	n := len(y)
	if n < 4 {
		return 1
	}
	kn := max(5, int(math.Ceil(math.Sqrt(math.Log10(float64(n))))))
	mMax := int(math.Ceil(math.Sqrt(float64(n)))) + kn
	rho := autocorr(y, min(n-1, mMax+kn))
	thr := 2 * math.Sqrt(math.Log10(float64(n))/float64(n))
	m := -1
	for cand := 0; cand+kn < len(rho); cand++ {
		ok := true
		for k := 1; k <= kn; k++ {
			if math.Abs(rho[cand+k]) >= thr {
				ok = false
				break
			}
		}
		if ok {
			m = cand
			break
		}
	}
	if m < 0 {
		m = mMax
	}
	M := min(2*m, len(rho)-1)
	if M == 0 {
		return 1
	}
	var mean, c0 float64
	for _, v := range y {
		mean += float64(v)
	}
	mean /= float64(n)
	acov := func(k int) float64 {
		s := 0.0
		for t := 0; t+k < n; t++ {
			s += (float64(y[t]) - mean) * (float64(y[t+k]) - mean)
		}
		return s / float64(n)
	}
	c0 = acov(0)
	if c0 == 0 {
		return 1
	}
	lambda := func(t float64) float64 {
		t = math.Abs(t)
		switch {
		case t <= 0.5:
			return 1
		case t <= 1:
			return 2 * (1 - t)
		}
		return 0
	}
	G, g := 0.0, c0
	for k := 1; k <= M; k++ {
		w := lambda(float64(k) / float64(M))
		r := acov(k)
		G += 2 * w * float64(k) * r
		g += 2 * w * r
	}
	if g <= 0 {
		return 1
	}
	D := 4.0 / 3.0 * g * g
	b := math.Cbrt(2*G*G/D) * math.Cbrt(float64(n))
	l := int(math.Ceil(b))
	return max(1, min(l, n/3))
}

// resampleIID fills dst with len(y) draws with replacement from y.
func resampleIID(dst, y []int, r *rand.Rand) {
	for i := range dst {
		dst[i] = y[r.IntN(len(y))]
	}
}

// resampleBlocks fills dst by the moving-block bootstrap with blocks of l
// consecutive periods of y, each starting uniformly on 0..n-l, the last
// cut to length.
func resampleBlocks(dst, y []int, l int, r *rand.Rand) {
	n := len(y)
	l = max(1, min(l, n))
	for i := 0; i < len(dst); {
		st := r.IntN(n - l + 1)
		for j := 0; j < l && i < len(dst); j++ {
			dst[i] = y[st+j]
			i++
		}
	}
}

// sampler draws from a demand law by inverting its CDF, tabulated up to
// the point beyond which the law has mass at most 1e-15; a draw beyond it
// walks up with the law's closed tail.
type sampler struct {
	d   inventory.Distribution
	cdf []float64
}

// maxSamplerTable caps the table of a parametric sampler.
const maxSamplerTable = 1 << 22

func newSampler(d inventory.Distribution) (*sampler, error) {
	top := d.Bound(1e-15)
	if top < 0 || top > maxSamplerTable {
		return nil, fmt.Errorf("parametric resampling: the fitted %s needs a table of %d values, more than %d", d, top+1, maxSamplerTable)
	}
	s := &sampler{d: d, cdf: make([]float64, top+1)}
	acc := 0.0
	for k := 0; k <= top; k++ {
		acc += d.PMF(k)
		s.cdf[k] = acc
	}
	return s, nil
}

func (s *sampler) draw(r *rand.Rand) int {
	u := r.Float64()
	k := sort.SearchFloat64s(s.cdf, u)
	if k < len(s.cdf) {
		return k
	}
	// u beyond the table: P(D > top) is at most 1e-15; walk the tail.
	k = len(s.cdf)
	for i := 0; i < 1<<20 && 1-s.d.Tail(k+1) < u; i++ {
		k++
	}
	return k
}
