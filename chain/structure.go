package chain

import (
	"slices"
)

// Structure describes the communicating classes of a chain: the strongly
// connected components of its transition graph (an edge i -> j for every
// P(i,j) > 0). A class is closed when no transition leaves it; states
// outside closed classes are transient. See Kemeny & Snell, Finite Markov
// Chains (1960), ch. 2.
type Structure struct {
	// Classes are the communicating classes, each sorted, ordered by their
	// smallest state.
	Classes [][]int
	// Closed holds the indices into Classes of the closed classes.
	Closed []int
	// Period[k] is the period of closed class Closed[k]: the gcd of the
	// lengths of its cycles, computed as the gcd of level(u)+1-level(v) over
	// its edges u -> v for breadth-first levels from any state (common
	// practice; see Stewart 1994, sec. 1.4, for periodicity).
	Period []int
	// Transient lists the transient states in increasing order.
	Transient []int
}

// Classes are found by an iterative Tarjan over the CSR pattern (a few
// int32 arrays, no recursion). gonum's graph/topo.TarjanSCC, which this
// package used below 20,000 transitions, keeps the edges in maps: measured
// here, building its graph for a dense 1000-state chain (1e6 edges) took
// 0.8 s, more than the GTH solve itself, and even on the small lost-sales
// chains of a search it cost a tenth of the exchange curve of the demo
// report (issue 14). It stays as the independent check in the tests, which
// compare the two on random chains.

// pattern is the adjacency structure of the edges with p > 0.
type pattern struct {
	n   int
	ptr []int
	adj []int32
}

func patternOf(m Matrix) pattern {
	m = unwrap(m)
	n := m.Len()
	if c, ok := m.(*CSR); ok {
		zero := false
		for _, p := range c.val {
			if p == 0 {
				zero = true
				break
			}
		}
		if !zero {
			return pattern{n: n, ptr: c.rowPtr, adj: c.col}
		}
	}
	ptr := make([]int, n+1)
	var adj []int32
	for i := 0; i < n; i++ {
		m.Row(i, func(j int, p float64) {
			if p > 0 {
				adj = append(adj, int32(j))
			}
		})
		ptr[i+1] = len(adj)
	}
	return pattern{n: n, ptr: ptr, adj: adj}
}

// Classify returns the communicating classes, closed classes, their periods
// and the transient states of m, in O(n + nnz).
func Classify(m Matrix) Structure {
	g := patternOf(m)
	return structureFrom(g, sccTarjan(g))
}

// structureFrom builds the Structure from a component id per state.
func structureFrom(g pattern, comp []int32) Structure {
	n := g.n
	// Renumber components by smallest state.
	nc := int32(0)
	remap := make([]int32, n) // component ids are in [0,n)
	for i := range remap {
		remap[i] = -1
	}
	id := make([]int32, n)
	for v := 0; v < n; v++ {
		c := remap[comp[v]]
		if c < 0 {
			c = nc
			remap[comp[v]] = c
			nc++
		}
		id[v] = c
	}
	size := make([]int, nc)
	for _, c := range id {
		size[c]++
	}
	classes := make([][]int, nc)
	for c := range classes {
		classes[c] = make([]int, 0, size[c])
	}
	for v := 0; v < n; v++ {
		classes[id[v]] = append(classes[id[v]], v)
	}
	closed := make([]bool, nc)
	for c := range closed {
		closed[c] = true
	}
	for u := 0; u < n; u++ {
		for _, v := range g.adj[g.ptr[u]:g.ptr[u+1]] {
			if id[v] != id[u] {
				closed[id[u]] = false
			}
		}
	}
	var s Structure
	s.Classes = classes
	var level []int32
	for c := range classes {
		if closed[c] {
			s.Closed = append(s.Closed, c)
			if level == nil {
				level = make([]int32, n)
				for i := range level {
					level[i] = -1
				}
			}
			s.Period = append(s.Period, period(g, id, int32(c), classes[c], level))
		} else {
			s.Transient = append(s.Transient, classes[c]...)
		}
	}
	slices.Sort(s.Transient)
	return s
}

// period returns the gcd of level(u)+1-level(v) over edges u -> v inside
// class c, with breadth-first levels from the class's first state. level is
// shared scratch of length n, -1 where unvisited; each state is visited once
// over all classes.
func period(g pattern, id []int32, c int32, members []int, level []int32) int {
	root := int32(members[0])
	level[root] = 0
	queue := make([]int32, 0, len(members))
	queue = append(queue, root)
	d := 0
	for h := 0; h < len(queue); h++ {
		u := queue[h]
		for _, v := range g.adj[g.ptr[u]:g.ptr[u+1]] {
			if id[v] != c {
				continue
			}
			if level[v] < 0 {
				level[v] = level[u] + 1
				queue = append(queue, v)
				continue
			}
			d = gcd(d, abs(int(level[u])+1-int(level[v])))
		}
	}
	if d == 0 {
		return 1 // defensive: a closed class always has a cycle
	}
	return d
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

func abs(a int) int {
	if a < 0 {
		return -a
	}
	return a
}

// sccTarjan labels strongly connected components with an iterative version
// of Tarjan's algorithm (Tarjan, SIAM J. Computing 1(2), 1972) using an
// explicit stack, O(n + nnz) time and a few int32 arrays of length n.
func sccTarjan(p pattern) []int32 {
	n := p.n
	const unvisited = -1
	index := make([]int32, n)
	low := make([]int32, n)
	comp := make([]int32, n)
	for i := range index {
		index[i] = unvisited
		comp[i] = -1
	}
	next := make([]int, n) // next edge position to explore per state
	stack := make([]int32, 0, 64)
	call := make([]int32, 0, 64)
	var counter, nc int32
	for s := 0; s < n; s++ {
		if index[s] != unvisited {
			continue
		}
		call = append(call, int32(s))
		index[s], low[s] = counter, counter
		counter++
		stack = append(stack, int32(s))
		next[s] = p.ptr[s]
		for len(call) > 0 {
			u := call[len(call)-1]
			if k := next[u]; k < p.ptr[u+1] {
				next[u]++
				v := p.adj[k]
				if index[v] == unvisited {
					index[v], low[v] = counter, counter
					counter++
					stack = append(stack, v)
					next[v] = p.ptr[v]
					call = append(call, v)
				} else if comp[v] < 0 && index[v] < low[u] {
					low[u] = index[v]
				}
				continue
			}
			call = call[:len(call)-1]
			if low[u] == index[u] {
				for {
					w := stack[len(stack)-1]
					stack = stack[:len(stack)-1]
					comp[w] = nc
					if w == u {
						break
					}
				}
				nc++
			}
			if len(call) > 0 {
				parent := call[len(call)-1]
				if low[u] < low[parent] {
					low[parent] = low[u]
				}
			}
		}
	}
	return comp
}
