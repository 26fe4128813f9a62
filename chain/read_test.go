package chain

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"
)

func TestReadGood(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		labels   []string
		at       [3]float64 // i, j, P(i,j)
	}{
		{"dense header", "a,b\n0.3,0.7\n1,0\n", []string{"a", "b"}, [3]float64{0, 1, 0.7}},
		{"dense no header", "0.3,0.7\n1,0\n", []string{"0", "1"}, [3]float64{1, 0, 1}},
		{"dense spaces crlf blank", " x , y \r\n\r\n 0.5 , 0.5\r\n1e-1,9e-1\r\n\n", []string{"x", "y"}, [3]float64{1, 1, 0.9}},
		{"dense quoted", "\"in, service\",\"say \"\"hi\"\"\"\n1,0\n0,1\n", []string{"in, service", `say "hi"`}, [3]float64{0, 0, 1}},
		{"bom", "\xef\xbb\xbfa,b\n0,1\n1,0\n", []string{"a", "b"}, [3]float64{0, 1, 1}},
		{"list", "From,TO,Probability\nx,y,1\ny,x,0.4\ny,y,0.6\n", []string{"x", "y"}, [3]float64{1, 1, 0.6}},
		{"list numbered", "from,to,probability\n7,3,1\n3,7,0.5\n3,3,0.5\n", []string{"7", "3"}, [3]float64{1, 1, 0.5}},
		{"list numbered then named", "from,to,probability\n1,2,1\n2,x,1\nx,1,1\n", []string{"1", "2", "x"}, [3]float64{2, 0, 1}},
		{"list prefixed numbers", "from,to,probability\ns10,s2,1\ns2,s10,1\n", []string{"s10", "s2"}, [3]float64{1, 0, 1}},
		{"list leading zero", "from,to,probability\n1,01,1\n01,1,1\n", []string{"1", "01"}, [3]float64{0, 1, 1}},
		{"list huge numbers", "from,to,probability\n5,99999999999999999,1\n99999999999999999,5,1\n", []string{"5", "99999999999999999"}, [3]float64{1, 0, 1}},
		{"list zero entry", "from,to,probability\nx,y,1\ny,x,1\nx,x,0\n", []string{"x", "y"}, [3]float64{0, 1, 1}},
	} {
		m, err := Read(strings.NewReader(tc.in), "t.csv")
		if err != nil {
			t.Errorf("%s: %v", tc.name, err)
			continue
		}
		if strings.Join(m.Labels, "|") != strings.Join(tc.labels, "|") {
			t.Errorf("%s: labels %q, want %q", tc.name, m.Labels, tc.labels)
		}
		var got float64
		m.Row(int(tc.at[0]), func(j int, p float64) {
			if j == int(tc.at[1]) {
				got = p
			}
		})
		if got != tc.at[2] {
			t.Errorf("%s: P(%v,%v) = %v, want %v", tc.name, tc.at[0], tc.at[1], got, tc.at[2])
		}
	}
}

// Every unusable input gives a *ReadError naming file, line and column.
func TestReadBad(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		line     int
		col      int
		want     string
	}{
		{"empty", "", 0, 0, "empty input"},
		{"blank", "\n  \n", 0, 0, "empty input"},
		{"non-numeric", "a,b\n0.5,x\n1,0\n", 2, 2, `"x": want a probability`},
		{"empty cell", "a,b\n0.5,\n1,0\n", 2, 2, "empty cell"},
		{"ragged", "a,b\n0.5,0.5\n1\n", 3, 0, "1 cells: want 2"},
		{"negative", "a,b\n0.5,-0.5\n1,0\n", 2, 2, "-0.5: want a probability in [0,1]"},
		{"above one", "2,-1\n1,0\n", 1, 1, "2: want a probability in [0,1]"},
		{"nan", "a,b\nNaN,1\n1,0\n", 2, 1, "want a finite probability"},
		{"inf", "a,b\n0,Inf\n1,0\n", 2, 2, "want a finite probability"},
		{"row sum", "a,b\n1,0\n0.5,0.4\n", 3, 0, `row of state "b" sums to 0.9`},
		{"too few rows", "a,b,c\n1,0,0\n0,1,0\n", 3, 0, "2 rows for 3 columns: want a square matrix"},
		{"too many rows", "1,0\n0,1\n1,0\n", 3, 0, "want 2 rows (square)"},
		{"header only", "a,b\n", 1, 0, "a header and no rows"},
		{"duplicate label", "a,a\n1,0\n0,1\n", 1, 2, `"a" repeats column 1`},
		{"bad quote", "\"a,b\n1,0\n", 1, 1, "no closing quote"},
		{"bare quote", "a\"b,c\n1,0\n", 1, 1, `bare "`},
		{"list fields", "from,to,probability\nx,y\n", 2, 0, `2 fields "x,y": want 3`},
		{"list header misspelt", "from,to,prob\nx,y,1\ny,x,1\n", 1, 0, `header "from,to,prob" looks like the header of a transition list: want exactly from,to,probability`},
		{"list header words", "From State,To State,p\nx,y,1\ny,x,1\n", 1, 0, `header "From State,To State,p" looks like the header of a transition list`},
		{"list header synonyms", "source,target,probability\nx,y,1\ny,x,1\n", 1, 0, "want exactly from,to,probability"},
		{"list without header", "a,b,1\nb,a,1\n", 1, 0, `first line "a,b,1" looks like a transition (two state labels and a probability): a from,to,probability list needs that header`},
		{"list rows under labels", "x,y,z\na,b,0.5\n", 2, 0, `"a,b,0.5" looks like a transition (two state labels and a probability), but the header "x,y,z" is not from,to,probability`},
		{"numeric list without header", "0,1,1\n1,0,1\n", 1, 0, `row of state "0" sums to 2: want 1 (within 1e-09) (a transition list needs the header from,to,probability)`},
		{"dense too wide", strings.Repeat("0,", MaxDenseStates) + "1\n", 1, 0, "11586 cells: a dense matrix of 11586 states would take 1 GiB, limit 11585 states: give a from,to,probability list instead"},
		{"list prob", "from,to,probability\nx,y,abc\n", 2, 3, `"abc": want a probability`},
		{"list empty label", "from,to,probability\n,y,1\n", 2, 1, "empty state label"},
		{"list duplicate", "from,to,probability\nx,y,0.5\ny,x,1\nx,y,0.5\n", 4, 0, `duplicate transition "x" -> "y": first given on line 2`},
		{"list unknown", "from,to,probability\nx,y,1\nx,z,0\ny,x,1\n", 3, 2, `state "z" has no row`},
		{"list row sum", "from,to,probability\nx,y,0.5\ny,x,1\n", 2, 0, `row of state "x" (first line with it as from) sums to 0.5`},
		{"list header only", "from,to,probability\n", 1, 0, "no transitions"},
	} {
		_, err := Read(strings.NewReader(tc.in), "m.csv")
		var re *ReadError
		if !errors.As(err, &re) {
			t.Errorf("%s: err = %v, want *ReadError", tc.name, err)
			continue
		}
		if re.File != "m.csv" || re.Line != tc.line || re.Column != tc.col || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: got %q (line %d col %d), want line %d col %d and %q", tc.name, err, re.Line, re.Column, tc.line, tc.col, tc.want)
		}
		if strings.ContainsAny(err.Error(), "\n\r") {
			t.Errorf("%s: message has a line break: %q", tc.name, err)
		}
	}
	if _, err := ReadList(strings.NewReader("a,b\n1,0\n"), "l.csv"); err == nil || !strings.Contains(err.Error(), "want from,to,probability") {
		t.Errorf("ReadList on a dense file: %v", err)
	}
	if m, err := ReadDense(strings.NewReader("1\n"), "d.csv"); err != nil || m.Len() != 1 {
		t.Errorf("ReadDense 1x1: %v", err)
	}
}

// A list and the equivalent dense file give the same solution.
func TestReadFormatsAgree(t *testing.T) {
	d, err := Read(strings.NewReader("p,q,r\n0.1,0.6,0.3\n0.4,0.4,0.2\n0.5,0,0.5\n"), "d")
	if err != nil {
		t.Fatal(err)
	}
	l, err := Read(strings.NewReader("from,to,probability\nr,p,0.5\nr,r,0.5\np,p,0.1\np,q,0.6\np,r,0.3\nq,p,0.4\nq,q,0.4\nq,r,0.2\n"), "l")
	if err != nil {
		t.Fatal(err)
	}
	rd, rl := mustSolve(t, d, Options{}), mustSolve(t, l, Options{})
	// List labels are in order of first appearance: r, p, q.
	for i, lab := range d.Labels {
		for k, lab2 := range l.Labels {
			if lab == lab2 && math.Abs(rd.Pi[i]-rl.Pi[k]) > 1e-15 {
				t.Errorf("state %s: %v vs %v", lab, rd.Pi[i], rl.Pi[k])
			}
		}
	}
}

func FuzzReadDense(f *testing.F) {
	for _, s := range []string{"a,b\n0.3,0.7\n1,0\n", "0.5,0.5\n0.5,0.5\n", "1\n", "\"a\",b\n1,0\n0,1\n", "a,b\nNaN,1\n", "", "x\n",
		"0.5,0.5,0\n1e-300,0,1\n0,1,0\n", "a,b,c\n0,1,0\n0,0,1\n1,0,0\n", "from,to,prob\n1,0,0\n0,1,0\n0,0,1\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		m, err := ReadDense(strings.NewReader(in), "fuzz")
		if err != nil {
			if strings.ContainsAny(err.Error(), "\n") {
				t.Fatalf("multi-line error %q", err)
			}
			return
		}
		checkReadMatrix(t, m)
	})
}

func FuzzReadList(f *testing.F) {
	for _, s := range []string{"from,to,probability\nx,y,1\ny,x,1\n", "from,to,probability\na,a,1\n", "from,to,probability\nx,y,0.5\nx,y,0.5\n", "FROM,TO,PROBABILITY\n\"a,b\",c,1\nc,\"a,b\",1\n",
		"from,to,prob\nx,y,1\ny,x,1\n", "a,b,0.5\nb,a,1\n", "x,y,z\na,b,0.5\n", "0,1,1\n1,0,1\n", "p,q,r\n0.1,0.6,0.3\n0.4,0.4,0.2\n0.5,0,0.5\n",
		"from,to,probability\n0,1,0.5\n0,0,0.5\n1,0,1e-300\n1,1,1\n", "from,to,probability\n1,2,1\n2,3,1\n3,1,1\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		m, err := Read(strings.NewReader(in), "fuzz")
		if err != nil {
			if strings.ContainsAny(err.Error(), "\n") {
				t.Fatalf("multi-line error %q", err)
			}
			return
		}
		checkReadMatrix(t, m)
	})
}

// checkReadMatrix re-validates what a reader accepted and solves it.
func checkReadMatrix(t *testing.T, m Labeled) {
	n := m.Len()
	if len(m.Labels) != n {
		t.Fatalf("%d labels for %d states", len(m.Labels), n)
	}
	for i := 0; i < n; i++ {
		var s float64
		m.Row(i, func(j int, p float64) {
			if j < 0 || j >= n || !(p >= 0 && p <= 1) {
				t.Fatalf("bad entry (%d,%d)=%v", i, j, p)
			}
			s += p
		})
		if math.Abs(s-1) > RowSumTol {
			t.Fatalf("row %d sums to %v", i, s)
		}
	}
	if n > 200 {
		return
	}
	for _, meth := range []Method{MethodAuto, MethodGaussSeidel, MethodGMRES} {
		r, err := Solve(m, Options{Method: meth, MaxIter: 1000})
		if err != nil {
			if strings.ContainsAny(err.Error(), "\n") {
				t.Fatalf("multi-line error %q", err)
			}
			continue
		}
		if k := badEntry(r.Pi); k >= 0 {
			t.Fatalf("%s: pi[%d] = %v", meth, k, r.Pi[k])
		}
		if math.Abs(sum(r.Pi)-1) > 1e-9 {
			t.Fatalf("%s: pi sums to %v", meth, sum(r.Pi))
		}
	}
}

// The label table keeps first-appearance order through many growths.
func TestReadListManyLabels(t *testing.T) {
	var b strings.Builder
	b.WriteString("from,to,probability\n")
	n := 5000
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "door sensor %d,door sensor %d,1\n", i, (i+1)%n)
	}
	m, err := Read(strings.NewReader(b.String()), "ring.csv")
	if err != nil {
		t.Fatal(err)
	}
	for i, l := range m.Labels {
		if l != fmt.Sprintf("door sensor %d", i) {
			t.Fatalf("label %d = %q", i, l)
		}
	}
	r := mustSolve(t, m, Options{})
	if r.Diagnostics.Period != n || math.Abs(r.Pi[17]-1/float64(n)) > 1e-15 {
		t.Errorf("ring: period %d, pi[17] %v", r.Diagnostics.Period, r.Pi[17])
	}
}

// Numbered labels index a table only while the values stay near the
// number of lines: a few huge numbers cannot make it large (issue 10,
// size checks before allocation).
func TestLabelTableBounded(t *testing.T) {
	l := newLabels()
	for i, b := range []string{"3", "30000000", "4", "999999999999"} {
		l.index([]byte(b), i+1)
	}
	if l.fast || len(l.table) > 1<<20 {
		t.Errorf("fast %v, table of %d entries", l.fast, len(l.table))
	}
	if got := strings.Join(l.strings(), ","); got != "3,30000000,4,999999999999" {
		t.Errorf("labels %q", got)
	}
	l = newLabels()
	for i := 0; i < 5000; i++ {
		l.index([]byte(strconv.Itoa(4999-i)), i+1)
	}
	if !l.fast || len(l.table) > 1<<20 {
		t.Errorf("dense numbers: fast %v, table of %d entries", l.fast, len(l.table))
	}
}
