package history

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"testing"
)

// series104 returns deterministic 104-period series of the four patterns.
func series104() [][]int {
	rng := rand.New(rand.NewPCG(1, 2))
	out := make([][]int, 4)
	for k := range out {
		y := make([]int, 104)
		for i := range y {
			switch k {
			case 0: // smooth, mean about 40
				y[i] = 30 + rng.IntN(21)
			case 1: // erratic
				y[i] = rng.IntN(3) * rng.IntN(60)
			case 2: // intermittent
				if rng.IntN(3) == 0 {
					y[i] = 1 + rng.IntN(2)
				}
			case 3: // lumpy
				if rng.IntN(4) == 0 {
					y[i] = 1 + rng.IntN(40)
				}
			}
		}
		out[k] = y
	}
	return out
}

// BenchmarkFit104 fits one 104-period series per iteration, cycling over a
// smooth, an erratic, an intermittent and a lumpy series.
func BenchmarkFit104(b *testing.B) {
	ss := series104()
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		if _, err := Fit(ss[i%4]); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRead reads a daily history of 1,000 SKUs over 1,000 days
// (1,000,000 rows, 35 MB), summed into ISO weeks.
func BenchmarkRead(b *testing.B) {
	var buf bytes.Buffer
	buf.WriteString("date,sku,depot,quantity\n")
	for d := 0; d < 1000; d++ {
		date := Day.Label(20059 + d)
		for s := 0; s < 1000; s++ {
			fmt.Fprintf(&buf, "%s,SKU-%04d,north,%d\n", date, s, (s+d)%7)
		}
	}
	data := buf.Bytes()
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		h, err := Read(bytes.NewReader(data), "bench.csv", Week)
		if err != nil || len(h.SKUs) != 1000 {
			b.Fatal(err)
		}
	}
}
