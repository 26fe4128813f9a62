package chain

import (
	"bufio"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"testing"
)

// go test -run '^$' -bench . -benchtime 1x ./chain/

func BenchmarkDense500(b *testing.B) {
	m := randomDense(500, 1)
	for _, meth := range []Method{MethodPower, MethodEigen, MethodDirect, MethodGTH, MethodGaussSeidel, MethodAuto} {
		b.Run(string(meth), func(b *testing.B) {
			var r Result
			for b.Loop() {
				var err error
				if r, err = Solve(m, Options{Method: meth}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(r.Diagnostics.Residual*1e15, "residual-1e-15")
		})
	}
}

func BenchmarkGTHDense1000(b *testing.B) {
	m := randomDense(1000, 2)
	var r Result
	for b.Loop() {
		var err error
		if r, err = Solve(m, Options{Method: MethodGTH}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(r.Diagnostics.Residual*1e15, "residual-1e-15")
}

// A seeded sparse chain of 1e6 states with 5 non-zeros a row, solved by
// Gauss-Seidel to residual 1e-12.
func BenchmarkGaussSeidelSparse1e6(b *testing.B) {
	m := randomSparse(1_000_000, 5, 3)
	var r Result
	for b.Loop() {
		var err error
		if r, err = Solve(m, Options{Method: MethodGaussSeidel, Tol: 1e-12}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(r.Diagnostics.Residual*1e15, "residual-1e-15")
	b.ReportMetric(float64(r.Diagnostics.Iterations), "sweeps")
}

// Forward substitution on a 1e6-state restart chain (O(nnz)).
func BenchmarkForward1e6(b *testing.B) {
	n := 1_000_000
	bl := NewBuilder(n)
	rng := rand.New(rand.NewPCG(5, 5))
	for j := 0; j < n; j++ {
		p := 0.3 + 0.6*rng.Float64()
		bl.Add(j, (j+1)%n, p)
		bl.Add(j, 0, 1-p)
		bl.Add(j, j, 0)
	}
	m, err := bl.Build()
	if err != nil {
		b.Fatal(err)
	}
	var r Result
	for b.Loop() {
		if r, err = Solve(m, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	if r.Diagnostics.Method != MethodForward {
		b.Fatalf("auto chose %s", r.Diagnostics.Method)
	}
	b.ReportMetric(r.Diagnostics.Residual*1e15, "residual-1e-15")
}

// writeList1e6 writes the seeded 1e6-state, 5-per-row chain as a
// from,to,probability file with labels s0, s1, ...
func writeList(b *testing.B, n, k int) string {
	b.Helper()
	m := randomSparse(n, k, 4)
	path := filepath.Join(b.TempDir(), "chain.csv")
	f, err := os.Create(path)
	if err != nil {
		b.Fatal(err)
	}
	w := bufio.NewWriterSize(f, 1<<20)
	w.WriteString("from,to,probability\n")
	var buf []byte
	for i := 0; i < n; i++ {
		m.Row(i, func(j int, p float64) {
			buf = buf[:0]
			buf = append(buf, 's')
			buf = strconv.AppendInt(buf, int64(i), 10)
			buf = append(buf, ",s"...)
			buf = strconv.AppendInt(buf, int64(j), 10)
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, p, 'g', -1, 64)
			buf = append(buf, '\n')
			w.Write(buf)
		})
	}
	if err := w.Flush(); err != nil {
		b.Fatal(err)
	}
	if err := f.Close(); err != nil {
		b.Fatal(err)
	}
	return path
}

// Reads a 1e6-state from,to,probability file and solves it (auto). Reports
// the heap in use after the solve and the total allocated; peak resident
// memory of the whole command is measured with /usr/bin/time -v (see the
// developer notes).
func BenchmarkReadSolveList1e6(b *testing.B) {
	path := writeList(b, 1_000_000, 5)
	var r Result
	var ms runtime.MemStats
	for b.Loop() {
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		m, err := Read(f, path)
		f.Close()
		if err != nil {
			b.Fatal(err)
		}
		if r, err = Solve(m, Options{Tol: 1e-12}); err != nil {
			b.Fatal(err)
		}
		runtime.ReadMemStats(&ms)
	}
	b.ReportMetric(r.Diagnostics.Residual*1e15, "residual-1e-15")
	b.ReportMetric(float64(ms.HeapSys)/(1<<20), "heap-sys-MB")
	b.ReportMetric(float64(ms.TotalAlloc)/float64(b.N)/(1<<20), "alloc-MB/op")
}

// Reads the seeded 1e6-state, 5-per-row from,to,probability file (labels
// s0, s1, ...; 5e6 lines, 177 MB) without solving it.
func BenchmarkReadList1e6(b *testing.B) {
	path := writeList(b, 1_000_000, 5)
	for b.Loop() {
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		m, err := Read(f, path)
		f.Close()
		if err != nil || m.Len() != 1_000_000 {
			b.Fatal(err)
		}
	}
}
