package history

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// Pattern is a demand pattern in the classification of Syntetos, Boylan
// and Croston (2005), "On the categorization of demand patterns", Journal
// of the Operational Research Society 56(5), 495-503.
type Pattern string

// The four patterns, split at ADI = 1.32 and CV² = 0.49.
const (
	Smooth       Pattern = "smooth"       // ADI < 1.32, CV² < 0.49
	Erratic      Pattern = "erratic"      // ADI < 1.32, CV² >= 0.49
	Intermittent Pattern = "intermittent" // ADI >= 1.32, CV² < 0.49
	Lumpy        Pattern = "lumpy"        // ADI >= 1.32, CV² >= 0.49
)

// The cut-offs of Syntetos, Boylan and Croston (2005).
const (
	ADICutoff = 1.32
	CV2Cutoff = 0.49
)

// Classify returns the pattern of a series with average inter-demand
// interval adi and squared coefficient of variation cv2 of its non-zero
// sizes.
func Classify(adi, cv2 float64) Pattern {
	switch {
	case adi < ADICutoff && cv2 < CV2Cutoff:
		return Smooth
	case adi < ADICutoff:
		return Erratic
	case cv2 < CV2Cutoff:
		return Intermittent
	}
	return Lumpy
}

// Stats are the descriptive figures of a demand series y_1..y_n.
type Stats struct {
	Periods int // n
	Total   int // sum of y
	Mean    float64
	// Variance is the sample variance, sum (y - mean)² / (n - 1); 0 when
	// n = 1.
	Variance     float64
	ZeroFraction float64 // share of periods with no demand
	// ADI is the average inter-demand interval, n / (number of periods
	// with y > 0). CV2 is the squared coefficient of variation of the
	// non-zero sizes, with the population variance (divisor: their count)
	// over their squared mean. Both are NaN when no period has demand.
	ADI, CV2 float64
	Pattern  Pattern // "" when no period has demand
	Trend    Trend
}

// Trend is the ordinary least squares line y = a + b*t over the period
// index t = 0..n-1 and the two-sided t-test of b = 0 with n-2 degrees of
// freedom (the textbook test of a regression slope; e.g. Montgomery, Peck
// and Vining, "Introduction to Linear Regression Analysis", section 2.3).
type Trend struct {
	Slope float64 // b, demand per period per period
	T     float64 // b / se(b)
	P     float64 // two-sided p-value; 1 when n < 3 or the series is constant
}

// Summarize computes the descriptive figures of a series.
func Summarize(y []int) Stats {
	n := len(y)
	s := Stats{Periods: n, ADI: math.NaN(), CV2: math.NaN(), Trend: Trend{P: 1}}
	if n == 0 {
		s.Mean, s.Variance = math.NaN(), math.NaN()
		return s
	}
	var sum, nz int
	var nzSum float64
	for _, v := range y {
		sum += v
		if v > 0 {
			nz++
			nzSum += float64(v)
		}
	}
	s.Total = sum
	mean := float64(sum) / float64(n)
	var ss, nzss float64
	nzMean := 0.0
	if nz > 0 {
		nzMean = nzSum / float64(nz)
	}
	for _, v := range y {
		d := float64(v) - mean
		ss += d * d
		if v > 0 {
			e := float64(v) - nzMean
			nzss += e * e
		}
	}
	s.Mean = mean
	if n > 1 {
		s.Variance = ss / float64(n-1)
	}
	s.ZeroFraction = float64(n-nz) / float64(n)
	if nz > 0 {
		s.ADI = float64(n) / float64(nz)
		s.CV2 = nzss / float64(nz) / (nzMean * nzMean)
		s.Pattern = Classify(s.ADI, s.CV2)
	}
	s.Trend = trend(y, mean, ss)
	return s
}

// trend fits y = a + b t by least squares and tests b = 0; ss is the sum of
// squared deviations of y about its mean.
func trend(y []int, mean, ss float64) Trend {
	n := len(y)
	if n < 3 || ss == 0 {
		return Trend{P: 1}
	}
	tm := float64(n-1) / 2
	var sxy float64
	for i, v := range y {
		sxy += (float64(i) - tm) * (float64(v) - mean)
	}
	nf := float64(n)
	sxx := nf * (nf*nf - 1) / 12 // sum (i - tm)² for i = 0..n-1
	b := sxy / sxx
	ssr := ss - b*sxy // residual sum of squares
	if ssr <= 1e-12*ss {
		// A perfect line: the slope is certain.
		return Trend{Slope: b, T: math.Inf(int(math.Copysign(1, b))), P: 0}
	}
	se := math.Sqrt(ssr / (nf - 2) / sxx)
	t := b / se
	st := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nf - 2}
	p := 2 * st.CDF(-math.Abs(t))
	return Trend{Slope: b, T: t, P: p}
}
