package policies

import (
	"math/rand/v2"
	"testing"
)

// TestStateIndexDense checks that the dense first level of stateIndex
// gives every pipeline the offset the map gives it, for the same sequence
// of lookups (so buildLost numbers the states alike and builds the same
// chain, bit for bit), and counts the same groups.
func TestStateIndexDense(t *testing.T) {
	for _, c := range []struct{ top, n int }{{60, 3}, {40, 2}, {70, 1}, {45, 3}} {
		var dense, sparse stateIndex
		dense.reset(c.top, c.n, 8, 1<<21)
		sparse.reset(c.top, c.n, 8, 0)
		if !dense.useD {
			t.Fatalf("top %d, n %d: the dense level is not used with room for it", c.top, c.n)
		}
		if c.n == 3 && sparse.useD {
			t.Fatalf("top %d, n %d: the dense level is used without room for it", c.top, c.n)
		}
		rng := rand.New(rand.NewPCG(uint64(c.top), uint64(c.n)))
		o := make([]int32, c.n)
		for range 20000 {
			left := c.top
			for j := range o {
				v := rng.IntN(min(left, 12) + 1)
				o[j] = int32(v)
				left -= v
			}
			if g, w := dense.group(o), sparse.group(o); g != w {
				t.Fatalf("top %d, n %d, pipeline %v: offset %d, the map gives %d", c.top, c.n, o, g, w)
			}
		}
		if dense.groups() != sparse.groups() || len(dense.slots) != len(sparse.slots) {
			t.Fatalf("top %d, n %d: %d groups and %d slots, the map %d and %d", c.top, c.n, dense.groups(), len(dense.slots), sparse.groups(), len(sparse.slots))
		}
	}
}
