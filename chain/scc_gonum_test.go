package chain

import (
	"gonum.org/v1/gonum/graph/simple"
	"gonum.org/v1/gonum/graph/topo"
)

// sccGonum labels strongly connected components with gonum's TarjanSCC.
func sccGonum(p pattern) []int32 {
	g := simple.NewDirectedGraph()
	for v := 0; v < p.n; v++ {
		g.AddNode(simple.Node(v))
	}
	for u := 0; u < p.n; u++ {
		for _, v := range p.adj[p.ptr[u]:p.ptr[u+1]] {
			if int(v) != u {
				g.SetEdge(simple.Edge{F: simple.Node(u), T: simple.Node(v)})
			}
		}
	}
	comp := make([]int32, p.n)
	for c, scc := range topo.TarjanSCC(g) {
		for _, nd := range scc {
			comp[nd.ID()] = int32(c)
		}
	}
	return comp
}
