package chain

import (
	"fmt"
	"math"
	"slices"
)

// RowSumTol is the largest |sum_j P(i,j) - 1| accepted for a row.
const RowSumTol = 1e-9

// Dense is a transition matrix stored row-major in one slice: P(i,j) is
// Data[i*n+j].
type Dense struct {
	n    int
	data []float64
}

// NewDense returns the n×n matrix whose rows are consecutive in data,
// after checking that len(data) = n*n, every entry is finite and in [0,1],
// and every row sums to 1 within RowSumTol. data is used, not copied.
func NewDense(n int, data []float64) (*Dense, error) {
	if n < 1 {
		return nil, &ShapeError{Msg: fmt.Sprintf("dense matrix of %d states: want at least 1", n)}
	}
	if len(data) != n*n {
		return nil, &ShapeError{Msg: fmt.Sprintf("dense matrix of %d states has %d entries: want %d (square)", n, len(data), n*n)}
	}
	for i := 0; i < n; i++ {
		row := data[i*n : (i+1)*n]
		for j, p := range row {
			if err := checkEntry(i, j, p); err != nil {
				return nil, err
			}
		}
		if err := checkRowSum(i, sum(row)); err != nil {
			return nil, err
		}
	}
	return &Dense{n: n, data: data}, nil
}

func checkEntry(i, j int, p float64) error {
	if math.IsNaN(p) || math.IsInf(p, 0) {
		return &EntryError{Row: i, Col: j, Value: p, Want: "a finite probability"}
	}
	if p < 0 || p > 1 {
		return &EntryError{Row: i, Col: j, Value: p, Want: "a probability in [0,1]"}
	}
	return nil
}

func checkRowSum(i int, s float64) error {
	if math.Abs(s-1) > RowSumTol {
		return &EntryError{Row: i, Col: -1, Value: s, Want: fmt.Sprintf("a row sum of 1 (within %g)", RowSumTol)}
	}
	return nil
}

func sum(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v
	}
	return s
}

// Len returns the number of states.
func (d *Dense) Len() int { return d.n }

// Row calls fn for the non-zero entries of row i in increasing column order.
func (d *Dense) Row(i int, fn func(j int, p float64)) {
	for j, p := range d.data[i*d.n : (i+1)*d.n] {
		if p != 0 {
			fn(j, p)
		}
	}
}

// At returns P(i,j).
func (d *Dense) At(i, j int) float64 { return d.data[i*d.n+j] }

// RawRow returns row i as a slice of the storage (not a copy).
func (d *Dense) RawRow(i int) []float64 { return d.data[i*d.n : (i+1)*d.n] }

// CSR is a transition matrix in compressed sparse row storage: the entries
// of row i are Col[k], Val[k] for RowPtr[i] <= k < RowPtr[i+1], with
// strictly increasing columns.
type CSR struct {
	n      int
	rowPtr []int
	col    []int32
	val    []float64
}

// NewCSR returns the CSR matrix with the given arrays after checking the
// shape (len(rowPtr) = n+1, rowPtr[0] = 0, non-decreasing, rowPtr[n] =
// len(col) = len(val), columns in [0,n) strictly increasing in each row),
// that entries are finite and in [0,1], and that rows sum to 1 within
// RowSumTol. The slices are used, not copied.
func NewCSR(n int, rowPtr []int, col []int32, val []float64) (*CSR, error) {
	if n < 1 {
		return nil, &ShapeError{Msg: fmt.Sprintf("sparse matrix of %d states: want at least 1", n)}
	}
	if len(rowPtr) != n+1 || rowPtr[0] != 0 || rowPtr[n] != len(col) || len(col) != len(val) {
		return nil, &ShapeError{Msg: fmt.Sprintf("sparse matrix of %d states: want len(rowPtr) = %d, rowPtr[0] = 0, rowPtr[n] = len(col) = len(val)", n, n+1)}
	}
	for i := 0; i < n; i++ {
		lo, hi := rowPtr[i], rowPtr[i+1]
		if lo > hi {
			return nil, &ShapeError{Msg: fmt.Sprintf("sparse matrix: rowPtr decreases at row %d", i)}
		}
		cs := col[lo:hi:hi]
		vs := val[lo:hi:hi][:len(cs)]
		var s float64
		prev := int32(-1)
		for k, c := range cs {
			j := int(c)
			if j < 0 || j >= n {
				return nil, &ShapeError{Msg: fmt.Sprintf("sparse matrix: row %d has column %d: want a column in [0,%d)", i, j, n)}
			}
			if k > 0 && prev >= c {
				return nil, &ShapeError{Msg: fmt.Sprintf("sparse matrix: row %d, column %d: columns must increase strictly within a row", i, j)}
			}
			prev = c
			// A probability in [0,1] passes checkEntry (NaN and the
			// infinities fail the comparison): only the others need it.
			if p := vs[k]; !(p >= 0 && p <= 1) {
				if err := checkEntry(i, j, p); err != nil {
					return nil, err
				}
			}
			s += vs[k]
		}
		if err := checkRowSum(i, s); err != nil {
			return nil, err
		}
	}
	return &CSR{n: n, rowPtr: rowPtr, col: col, val: val}, nil
}

// Len returns the number of states.
func (c *CSR) Len() int { return c.n }

// Row calls fn for the stored entries of row i in increasing column order.
func (c *CSR) Row(i int, fn func(j int, p float64)) {
	for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
		fn(int(c.col[k]), c.val[k])
	}
}

// NonZeros returns the number of stored entries.
func (c *CSR) NonZeros() int { return len(c.val) }

// Builder collects (i, j, p) triplets for a CSR matrix. Duplicate (i, j)
// pairs are summed; zero sums are dropped. Building is O(n + nnz log r) for
// rows of at most r entries.
type Builder struct {
	n   int
	row []int32
	col []int32
	val []float64
	bad error
}

// NewBuilder returns a builder for an n-state matrix.
func NewBuilder(n int) *Builder { return &Builder{n: n} }

// Grow reserves room for k more triplets.
func (b *Builder) Grow(k int) {
	b.row = slices.Grow(b.row, k)
	b.col = slices.Grow(b.col, k)
	b.val = slices.Grow(b.val, k)
}

// Add records P(i,j) += p. An index out of range is reported by Build.
func (b *Builder) Add(i, j int, p float64) {
	if i < 0 || i >= b.n || j < 0 || j >= b.n {
		if b.bad == nil {
			b.bad = &ShapeError{Msg: fmt.Sprintf("triplet (%d, %d): want indices in [0,%d)", i, j, b.n)}
		}
		return
	}
	b.row = append(b.row, int32(i))
	b.col = append(b.col, int32(j))
	b.val = append(b.val, p)
}

// Build assembles and validates the matrix (see NewCSR).
func (b *Builder) Build() (*CSR, error) {
	if b.bad != nil {
		return nil, b.bad
	}
	if b.n < 1 {
		return nil, &ShapeError{Msg: fmt.Sprintf("sparse matrix of %d states: want at least 1", b.n)}
	}
	for k, p := range b.val {
		if err := checkEntry(int(b.row[k]), int(b.col[k]), p); err != nil {
			return nil, err
		}
	}
	rowPtr, col, val, _ := assemble(b.n, b.row, b.col, b.val, nil)
	return NewCSR(b.n, rowPtr, col, val)
}

// assemble sorts triplets into CSR order by a counting sort on rows and an
// insertion sort on the (short) rows. If dup is nil, duplicates are summed
// and zeros dropped; otherwise dup(a, b) is called with the triplet indices
// of the first duplicate pair found, and its error returned.
func assemble(n int, ri, ci []int32, vi []float64, dup func(a, b int) error) ([]int, []int32, []float64, error) {
	m := len(ri)
	rowPtr := make([]int, n+1)
	for _, r := range ri {
		rowPtr[r+1]++
	}
	for i := 0; i < n; i++ {
		rowPtr[i+1] += rowPtr[i]
	}
	pos := make([]int, n)
	copy(pos, rowPtr[:n])
	perm := make([]int32, m)
	for k, r := range ri {
		perm[pos[r]] = int32(k)
		pos[r]++
	}
	pos = nil
	// Sort each row's triplets by column (stable, so by input order on ties).
	for i := 0; i < n; i++ {
		seg := perm[rowPtr[i]:rowPtr[i+1]]
		if len(seg) < 32 {
			for a := 1; a < len(seg); a++ {
				x := seg[a]
				b := a - 1
				for b >= 0 && ci[seg[b]] > ci[x] {
					seg[b+1] = seg[b]
					b--
				}
				seg[b+1] = x
			}
		} else {
			slices.SortStableFunc(seg, func(x, y int32) int { return int(ci[x]) - int(ci[y]) })
		}
	}
	if dup != nil {
		best := -1
		var ba, bb int
		for i := 0; i < n; i++ {
			seg := perm[rowPtr[i]:rowPtr[i+1]]
			for a := 1; a < len(seg); a++ {
				if ci[seg[a]] == ci[seg[a-1]] {
					x, y := int(seg[a-1]), int(seg[a])
					if best < 0 || y < best {
						best, ba, bb = y, x, y
					}
				}
			}
		}
		if best >= 0 {
			return nil, nil, nil, dup(ba, bb)
		}
	}
	col := make([]int32, 0, m)
	val := make([]float64, 0, m)
	out := make([]int, n+1)
	for i := 0; i < n; i++ {
		seg := perm[rowPtr[i]:rowPtr[i+1]]
		for a := 0; a < len(seg); {
			j := ci[seg[a]]
			p := vi[seg[a]]
			a++
			for a < len(seg) && ci[seg[a]] == j {
				p += vi[seg[a]]
				a++
			}
			if p != 0 {
				col = append(col, j)
				val = append(val, p)
			}
		}
		out[i+1] = len(col)
	}
	return out, col, val, nil
}

// ToCSR returns m in CSR storage (m itself if it already is).
func ToCSR(m Matrix) *CSR {
	m = unwrap(m)
	if c, ok := m.(*CSR); ok {
		return c
	}
	n := m.Len()
	rowPtr := make([]int, n+1)
	var col []int32
	var val []float64
	for i := 0; i < n; i++ {
		m.Row(i, func(j int, p float64) {
			if p != 0 {
				col = append(col, int32(j))
				val = append(val, p)
			}
		})
		rowPtr[i+1] = len(col)
	}
	return &CSR{n: n, rowPtr: rowPtr, col: col, val: val}
}

// toDense returns a fresh row-major copy of m.
func toDense(m Matrix) []float64 {
	n := m.Len()
	a := make([]float64, n*n)
	for i := 0; i < n; i++ {
		row := a[i*n : (i+1)*n]
		m.Row(i, func(j int, p float64) { row[j] += p })
	}
	return a
}

// Labeled is a matrix with state labels. Solve and the structure functions
// unwrap it, so labels cost nothing in the numerical loops; they are used
// only in messages.
type Labeled struct {
	Matrix
	Labels []string // Labels[i] names state i; nil means "0".."n-1"
}

// Label returns the label of state i.
func (l Labeled) Label(i int) string {
	if l.Labels == nil || i >= len(l.Labels) {
		return fmt.Sprint(i)
	}
	return l.Labels[i]
}

func unwrap(m Matrix) Matrix {
	for {
		switch v := m.(type) {
		case Labeled:
			m = v.Matrix
		case *Labeled:
			m = v.Matrix
		default:
			return m
		}
	}
}

func labelsOf(m Matrix) []string {
	switch v := m.(type) {
	case Labeled:
		return v.Labels
	case *Labeled:
		return v.Labels
	}
	return nil
}

// nonZeros counts the entries with p != 0.
func nonZeros(m Matrix) int {
	if c, ok := m.(*CSR); ok {
		return len(c.val)
	}
	k := 0
	for i := 0; i < m.Len(); i++ {
		m.Row(i, func(int, float64) { k++ })
	}
	return k
}
