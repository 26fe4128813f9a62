package batch

import (
	"fmt"
	"strconv"
	"strings"
)

// Shard selects every N-th item starting at K: the items whose 0-based
// position in the items file is K, K+N, K+2N, ... The zero value, like 0/1,
// selects all items.
type Shard struct {
	K, N int
}

// ParseShard reads "K/N" with 0 <= K < N.
func ParseShard(s string) (Shard, error) {
	ks, ns, ok := strings.Cut(s, "/")
	k, errK := strconv.Atoi(strings.TrimSpace(ks))
	n, errN := strconv.Atoi(strings.TrimSpace(ns))
	if !ok || errK != nil || errN != nil || n < 1 || k < 0 || k >= n {
		return Shard{}, fmt.Errorf("shard %q: want K/N with whole numbers 0 <= K < N", s)
	}
	return Shard{K: k, N: n}, nil
}

// Contains reports whether the item at position index belongs to the shard.
func (s Shard) Contains(index int) bool {
	if s.N <= 1 {
		return true
	}
	return index%s.N == s.K
}

// String prints the shard as "K/N".
func (s Shard) String() string {
	if s.N < 1 {
		return "0/1"
	}
	return fmt.Sprintf("%d/%d", s.K, s.N)
}
