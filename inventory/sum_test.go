package inventory

import (
	"fmt"
	"math"
	"testing"
)

// explicitConv returns the n-fold convolution of the pmf of d on 0..K by
// the schoolbook double loop, one period at a time: the reference for Sum.
func explicitConv(d Distribution, n, K int) []float64 {
	f := make([]float64, K+1)
	for k := range f {
		f[k] = d.PMF(k)
	}
	out := make([]float64, K+1)
	out[0] = 1
	for i := 0; i < n; i++ {
		next := make([]float64, K+1)
		for s := 0; s <= K; s++ {
			for j := 0; j <= s; j++ {
				next[s] += out[s-j] * f[j]
			}
		}
		out = next
	}
	return out
}

func TestSum(t *testing.T) {
	for _, c := range []struct {
		spec string
		n    int
		kind string
	}{
		{"poisson:mean=3", 4, "poisson:mean=12"},
		{"negbin:mean=2,var=5", 3, "negbin:mean=6,var=15"},
		{"normal:mean=6,sd=2", 3, ""},
		{"normal:mean=1,sd=3", 5, ""},
		{"gamma:mean=4,sd=3", 4, ""},
		{"pmf:0=0.2,1=0.5,3=0.3", 6, ""},
		{"pmf:0=0.2,1=0.5,3=0.3", 1, "pmf:0=0.2,1=0.5,3=0.3"},
	} {
		d := mustDist(t, c.spec)
		s, err := Sum(d, c.n)
		if err != nil {
			t.Fatalf("Sum(%s, %d): %v", c.spec, c.n, err)
		}
		if c.kind != "" && s.String() != c.kind {
			t.Errorf("Sum(%s, %d) = %s, want %s", c.spec, c.n, s, c.kind)
		}
		K := s.Bound(1e-13) + 5
		ref := explicitConv(d, c.n, K)
		// Exact on 0..B, the cut of each factor; beyond it a lower bound
		// short by at most the neglected mass.
		B := d.Bound(SumNeglect / float64(c.n))
		for k := 0; k <= K; k++ {
			got := s.PMF(k)
			if k <= B && !near(got, ref[k], 1e-11, 1e-16) {
				t.Errorf("Sum(%s, %d).PMF(%d) = %v, explicit convolution %v", c.spec, c.n, k, got, ref[k])
			}
			if k > B && (got > ref[k]*(1+1e-11) || ref[k]-got > Neglected(s)+1e-11*ref[k]) {
				t.Errorf("Sum(%s, %d).PMF(%d) = %v beyond the cut, explicit convolution %v", c.spec, c.n, k, got, ref[k])
			}
		}
		if !near(s.Mean(), float64(c.n)*d.Mean(), 1e-14, 0) || !near(s.Variance(), float64(c.n)*d.Variance(), 1e-14, 0) {
			t.Errorf("Sum(%s, %d): mean %v var %v", c.spec, c.n, s.Mean(), s.Variance())
		}
		if nb := Neglected(s); nb > SumNeglect || nb < 0 {
			t.Errorf("Sum(%s, %d): neglected %v", c.spec, c.n, nb)
		}
		// The table's own mass plus the neglected mass is 1.
		var tot sum
		for k := 0; k <= s.Bound(0)+1; k++ {
			tot.Add(s.PMF(k))
		}
		if !near(tot.Value()+Neglected(s), 1, 0, 1e-14) {
			t.Errorf("Sum(%s, %d): mass %v + neglected %v", c.spec, c.n, tot.Value(), Neglected(s))
		}
		up, err := SumUpTo(d, c.n, K)
		if err != nil {
			t.Fatal(err)
		}
		for k := 0; k <= K; k++ {
			if !near(up[k], ref[k], 1e-11, 1e-16) {
				t.Errorf("SumUpTo(%s, %d, %d)[%d] = %v, explicit %v", c.spec, c.n, K, k, up[k], ref[k])
			}
		}
	}
	z, _ := Sum(mustDist(t, "poisson:mean=2"), 0)
	if z.PMF(0) != 1 || z.Tail(1) != 0 || z.Mean() != 0 {
		t.Errorf("Sum(d, 0) = %s, want the point mass at 0", z)
	}
	if _, err := Sum(z, -1); err == nil {
		t.Errorf("Sum(d, -1) accepted")
	}
}

// The normal sum is not a discretised normal: the discretisation adds
// 1/12 of variance per period, so the sum has var n (sd^2 + 1/12) whereas
// normal:mean=n mu,sd=sqrt(n) sd has n sd^2 + 1/12.
func TestSumNormalNotNormal(t *testing.T) {
	d, _ := NewNormal(100, 10)
	s, _ := Sum(d, 4)
	if want := 4 * (100 + 1.0/12); !near(s.Variance(), want, 1e-14, 0) {
		t.Errorf("variance %v, want %v", s.Variance(), want)
	}
	naive, _ := NewNormal(400, 20)
	if math.Abs(naive.Variance()-s.Variance()) < 0.2 {
		t.Errorf("the naive normal should differ in variance by 3/12")
	}
}

func BenchmarkSumUpToPoisson(b *testing.B) {
	d, _ := NewPoisson(400)
	for i := 0; i < b.N; i++ {
		if _, err := SumUpTo(d, 4, 3000); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSumNormal(b *testing.B) {
	d, _ := NewNormal(400, 60)
	for i := 0; i < b.N; i++ {
		if _, err := Sum(d, 4); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSumUpToNormal(b *testing.B) {
	d, _ := NewNormal(400, 60)
	for i := 0; i < b.N; i++ {
		if _, err := SumUpTo(d, 4, 3000); err != nil {
			b.Fatal(err)
		}
	}
}

func ExampleSum() {
	d, _ := Parse("pmf:0=0.5,1=0.5")
	s, _ := Sum(d, 3)
	fmt.Println(s)
	p, _ := Parse("poisson:mean=1.5")
	s, _ = Sum(p, 2)
	fmt.Println(s, Neglected(s))
	// Output:
	// pmf:0=0.125,1=0.375,2=0.375,3=0.125
	// poisson:mean=3 0
}

// The zero Table is the point mass at 0 and is safe to use and compare.
func TestZeroTable(t *testing.T) {
	var z Table
	if z.PMF(0) != 1 || z.CDF(0) != 1 || z.Tail(1) != 0 || z.Mean() != 0 || z.Len() != 1 || z.String() != "pmf:0=1" {
		t.Errorf("zero Table: %s %v %v", z, z.PMF(0), z.Tail(1))
	}
	s, err := Sum(z, 5)
	if err != nil || s.PMF(0) != 1 {
		t.Errorf("Sum(zero Table, 5) = %v, %v", s, err)
	}
	var a, b Distribution = z, Table{}
	if a != b {
		t.Errorf("zero Tables should compare equal")
	}
}

// Sums too costly to tabulate are refused, not attempted.
func TestSumRefusesHugeWork(t *testing.T) {
	d := mustDist(t, "normal:mean=1e6,sd=4e5")
	if _, err := Sum(d, 3); err == nil {
		t.Errorf("Sum of a very wide normal over 3 periods accepted")
	}
	if _, err := SumUpTo(d, 3, 1<<23); err == nil {
		t.Errorf("SumUpTo with K = 2^23 accepted")
	}
	if w := convolutionWork(10, 1, -1); w != 10 {
		t.Errorf("convolutionWork(10, 1) = %v, want 10", w)
	}
}
