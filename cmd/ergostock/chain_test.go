package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"
)

// chainRun runs `ergostock chain args...` with stdin and returns the exit
// status, stdout and stderr.
func chainRun(stdin string, args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(append([]string{"ergostock", "chain"}, args...), strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

type chainOut struct {
	States       []string  `json:"states"`
	Distribution []float64 `json:"distribution"`
	Method       string    `json:"method"`
	Iterations   int       `json:"iterations"`
	Residual     float64   `json:"residual"`
	Balance      float64   `json:"balance"`
	Period       int       `json:"period"`
	Lazy         bool      `json:"lazy"`
	Transient    []string  `json:"transient"`
}

func chainJSONRun(t *testing.T, stdin string, args ...string) chainOut {
	t.Helper()
	code, out, errs := chainRun(stdin, append(args, "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var v chainOut
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatalf("bad JSON %q: %v", out, err)
	}
	return v
}

// The tram chain, both file formats, every general method, against the
// Markov chain tree theorem: pi_i is proportional to the sum over spanning
// trees directed into i of the products of their transition probabilities
// (Freidlin & Wentzell, Random Perturbations of Dynamical Systems, 1984,
// ch. 6, Lemma 3.1; reference from memory).
func TestChainAllMethodsTram(t *testing.T) {
	P := [3][3]float64{{0.92, 0.06, 0.02}, {0.55, 0.35, 0.10}, {0.30, 0.05, 0.65}}
	// In-trees to root r over the other two states a, b: a->r b->r, a->b b->r, b->a a->r.
	tree := func(r, a, b int) float64 {
		return P[a][r]*P[b][r] + P[a][b]*P[b][r] + P[b][a]*P[a][r]
	}
	w := []float64{tree(0, 1, 2), tree(1, 0, 2), tree(2, 0, 1)}
	s := w[0] + w[1] + w[2]
	for _, meth := range []string{"auto", "power", "eigen", "direct", "gth", "gauss-seidel"} {
		for _, file := range []string{"../../data/tram-availability.csv", "../../testdata/chain/tram-list.csv"} {
			v := chainJSONRun(t, "", "--matrix", file, "--method", meth)
			if strings.Join(v.States, "|") != "in service|minor fault|in workshop" {
				t.Errorf("%s %s: states %q", file, meth, v.States)
			}
			for i := range w {
				if math.Abs(v.Distribution[i]-w[i]/s) > 1e-12 {
					t.Errorf("%s %s: pi[%d]=%v, want %v", file, meth, i, v.Distribution[i], w[i]/s)
				}
			}
			if v.Residual > 1e-12 || v.Balance > 1e-12 || v.Period != 1 {
				t.Errorf("%s %s: residual %v balance %v period %d", file, meth, v.Residual, v.Balance, v.Period)
			}
			if want := meth; want != "auto" && v.Method != want {
				t.Errorf("method %q, want %q", v.Method, want)
			}
		}
	}
}

func TestChainHumanOutput(t *testing.T) {
	code, out, errs := chainRun("", "--matrix", "../../data/tram-availability.csv")
	if code != 0 || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	for _, want := range []string{"state        probability", "in service   0.8444", "method      gth", "residual", "balance", "period 1", "transient   none"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestChainStdinPeriodicTransient(t *testing.T) {
	v := chainJSONRun(t, "from,to,probability\na,b,1\nb,c,1\nc,a,1\n", "--matrix", "-", "--method", "power")
	if v.Period != 3 || !v.Lazy || math.Abs(v.Distribution[0]-1.0/3) > 1e-12 {
		t.Errorf("periodic: %+v", v)
	}
	code, out, _ := chainRun("", "--matrix", "../../testdata/chain/periodic.csv", "--method", "power")
	if code != 0 || !strings.Contains(out, "lazy chain") || !strings.Contains(out, "period 3") {
		t.Errorf("periodic human output: %d %s", code, out)
	}
	v = chainJSONRun(t, "", "--matrix", "../../testdata/chain/transient.csv")
	// Closed class {running, resting}: two-state closed form, a = 0.6, b = 0.9
	// (Kemeny & Snell 1960).
	if v.Distribution[0] != 0 || math.Abs(v.Distribution[1]-0.6) > 1e-14 || strings.Join(v.Transient, ",") != "new" {
		t.Errorf("transient: %+v", v)
	}
}

// Every unusable input: exit status 1 (2 for flags), one line on stderr
// naming the file, line and column, nothing on stdout, no panic.
func TestChainBadInput(t *testing.T) {
	for _, tc := range []struct {
		name  string
		stdin string
		args  []string
		code  int
		want  string
	}{
		{"missing file", "", []string{"--matrix", "no/such.csv"}, 1, "--matrix no/such.csv: cannot open: no such file or directory"},
		{"empty file", "", []string{"--matrix", "../../testdata/chain/empty.csv"}, 1, "empty.csv: empty input"},
		{"ragged", "", []string{"--matrix", "../../testdata/chain/ragged.csv"}, 1, "ragged.csv: line 3: 2 cells: want 3"},
		{"duplicate", "", []string{"--matrix", "../../testdata/chain/duplicate.csv"}, 1, `duplicate.csv: line 5: duplicate transition "x" -> "y": first given on line 2`},
		{"reducible", "", []string{"--matrix", "../../testdata/chain/reducible.csv"}, 1, "reducible.csv: chain is reducible: 2 closed classes, so no unique stationary distribution: {depot A}, {depot B}"},
		{"non-numeric", "a,b\n0.5,half\n1,0\n", []string{"--matrix", "-"}, 1, `stdin: line 2, column 2: "half": want a probability`},
		{"negative", "a,b\n1.5,-0.5\n1,0\n", []string{"--matrix", "-"}, 1, "stdin: line 2, column 1: 1.5: want a probability in [0,1]"},
		{"nan", "a,b\nNaN,1\n1,0\n", []string{"--matrix", "-"}, 1, "line 2, column 1: \"NaN\": want a finite probability"},
		{"inf", "a,b\n0,+Inf\n1,0\n", []string{"--matrix", "-"}, 1, "line 2, column 2: \"+Inf\": want a finite probability"},
		{"row sum", "a,b\n0.5,0.4\n1,0\n", []string{"--matrix", "-"}, 1, `stdin: line 2: row of state "a" sums to 0.9`},
		{"non-square", "a,b\n0.5,0.5\n", []string{"--matrix", "-"}, 1, "stdin: line 2: 1 rows for 2 columns: want a square matrix"},
		{"unknown label", "from,to,probability\nx,y,1\ny,x,0.5\ny,z,0.5\n", []string{"--matrix", "-"}, 1, `stdin: line 4, column 2: state "z" has no row`},
		{"list row sum", "from,to,probability\nx,y,1\ny,x,0.5\n", []string{"--matrix", "-"}, 1, `stdin: line 3: row of state "y"`},
		{"forward mismatch", "", []string{"--matrix", "../../data/tram-availability.csv", "--method", "forward"}, 1, "method forward does not apply: transition from state in workshop back to state minor fault"},
		{"uniform mismatch", "", []string{"--matrix", "../../data/tram-availability.csv", "--method", "uniform"}, 1, "method uniform does not apply"},
		{"not converged", "", []string{"--matrix", "../../data/tram-availability.csv", "--method", "power", "--max-iter", "3"}, 1, "power: did not converge after 3 iterations: residual"},
		{"bad method", "", []string{"--matrix", "x", "--method", "magic"}, 2, `--method magic: unknown method "magic": want one of auto, power`},
		{"bad tol", "", []string{"--matrix", "x", "--tol", "-1"}, 2, "--tol -1: want a finite number > 0"},
		{"tol above 2", "", []string{"--matrix", "x", "--tol", "10"}, 2, "--tol 10: want a number < 2 (the residual ||pi P - pi||_1 of any probability vector is at most 2"},
		{"tol 2", "", []string{"--matrix", "x", "--tol", "2"}, 2, "--tol 2: want a number < 2"},
		{"tol inf", "", []string{"--matrix", "x", "--tol", "Inf"}, 2, "--tol Inf: want a number written as a plain decimal"},
		{"tol below round-off", "", []string{"--matrix", "../../data/tram-availability.csv", "--tol", "1e-17"}, 2, "--tol 1e-17: ../../data/tram-availability.csv: want at least 8.3e-16 for this chain (double precision cannot reach a smaller residual"},
		{"misspelt list header", "from,to,prob\nx,y,1\ny,x,1\n", []string{"--matrix", "-"}, 1, `stdin: line 1: header "from,to,prob" looks like the header of a transition list: want exactly from,to,probability`},
		{"list without header", "x,y,1\ny,x,1\n", []string{"--matrix", "-"}, 1, `stdin: line 1: first line "x,y,1" looks like a transition`},
		{"gth too large", wideList(5000), []string{"--matrix", "-", "--method", "gth"}, 1, "stdin: method gth does not apply: 5000 states in the closed class with bandwidth"},
		{"direct too large", wideList(5000), []string{"--matrix", "-", "--method", "direct"}, 1, "stdin: method direct does not apply: 5000 states in the closed class: direct LU is dense O(n^3), limit 4000 states; refused before allocating 381 MiB"},
		{"eigen too large", wideList(5000), []string{"--matrix", "-", "--method", "eigen"}, 1, "limit 1000 states; refused before allocating"},
		{"dense too wide", strings.Repeat("0,", 20000) + "1\n", []string{"--matrix", "-"}, 1, "stdin: line 1: 20001 cells: a dense matrix of 20001 states would take 2.98 GiB, limit 11585 states"},
		{"bad max-iter", "", []string{"--matrix", "x", "--max-iter", "0"}, 2, "--max-iter 0: want an integer >= 1"},
		{"no matrix", "", nil, 2, "--matrix: want a file name"},
		{"tol not a number", "", []string{"--matrix", "x", "--tol", "abc"}, 2, `chain: --tol abc: want a number`},
		{"stray argument", "", []string{"--matrix", "x", "extra"}, 2, `unexpected argument "extra"`},
	} {
		code, out, errs := chainRun(tc.stdin, tc.args...)
		if code != tc.code {
			t.Errorf("%s: exit %d, want %d (stderr %q)", tc.name, code, tc.code, errs)
		}
		if out != "" && tc.code == 1 {
			t.Errorf("%s: stdout %q, want nothing", tc.name, out)
		}
		if !strings.HasPrefix(errs, "ergostock: ") || !strings.Contains(errs, tc.want) {
			t.Errorf("%s: stderr %q, want %q", tc.name, errs, tc.want)
		}
		if strings.Count(errs, "\n") != 1 || strings.Contains(errs, "goroutine") {
			t.Errorf("%s: stderr is not one line: %q", tc.name, errs)
		}
	}
}

// TestChainIAD: --method iad on a small nearly decomposable chain (two
// blocks coupled at about 1e-10) agrees componentwise with GTH, which is
// componentwise accurate on such chains (Grassmann, Taksar & Heyman 1985).
func TestChainIAD(t *testing.T) {
	const m = "0.3,0.6999999999,0.0000000001,0\n0.6,0.4,0,0\n0,0,0.5,0.5\n0,0.0000000002,0.5,0.4999999998\n"
	var got [2]chainOut
	for i, method := range []string{"iad", "gth"} {
		code, out, errs := chainRun(m, "--matrix", "-", "--method", method, "--json")
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", method, code, errs)
		}
		if err := json.Unmarshal([]byte(out), &got[i]); err != nil {
			t.Fatal(err)
		}
	}
	if got[0].Method != "iad" {
		t.Errorf("method %q, want iad", got[0].Method)
	}
	for k, p := range got[0].Distribution {
		if q := got[1].Distribution[k]; math.Abs(p-q) > 1e-12*q {
			t.Errorf("state %d: iad %.17g, gth %.17g", k, p, q)
		}
	}
}

// wideList returns a from,to,probability list of an n-state ring with a
// chord to the far side (bandwidth about n/2): neither dense nor banded
// methods apply above their limits.
func wideList(n int) string {
	var b strings.Builder
	b.WriteString("from,to,probability\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "%d,%d,0.5\n%d,%d,0.5\n", i, (i+1)%n, i, (i+n/2)%n)
	}
	return b.String()
}

// Issue 10: a strongly drifting 8000-state birth-death list (up 0.5, down
// 0.45, the rest a self-loop, reflecting ends) printed NaN with exit 0.
// The answer is the product form pi_j = c (0.5/0.45)^j (Kemeny & Snell,
// Finite Markov Chains, 1960, sec. 7.1), here evaluated in logarithms;
// states whose probability is below half the smallest subnormal print 0.
func TestChainDriftingBirthDeath(t *testing.T) {
	const n = 8000
	var b strings.Builder
	b.WriteString("from,to,probability\n")
	for i := 0; i < n; i++ {
		switch i {
		case 0:
			fmt.Fprintf(&b, "0,1,0.5\n0,0,0.5\n")
		case n - 1:
			fmt.Fprintf(&b, "%d,%d,0.45\n%d,%d,0.55\n", i, i-1, i, i)
		default:
			fmt.Fprintf(&b, "%d,%d,0.5\n%d,%d,0.45\n%d,%d,0.05\n", i, i+1, i, i-1, i, i)
		}
	}
	for _, json := range []bool{false, true} {
		args := []string{"--matrix", "-"}
		if json {
			args = append(args, "--json")
		}
		code, out, errs := chainRun(b.String(), args...)
		if code != 0 || strings.Contains(out, "NaN") || strings.Contains(out, "Inf") {
			t.Fatalf("json=%v: exit %d, NaN or Inf in the output: %v, stderr %q", json, code, strings.Contains(out, "NaN"), errs)
		}
	}
	v := chainJSONRun(t, b.String(), "--matrix", "-")
	// log pi_j = log(1 - q) - log(1 - q^n) + (n-1-j) log q, q = 0.45/0.5.
	q := 0.45 / 0.5
	zeros := 0
	for j, p := range v.Distribution {
		lw := math.Log1p(-q) - math.Log1p(-math.Pow(q, n)) + float64(n-1-j)*math.Log(q)
		w := math.Exp(lw)
		if w == 0 {
			zeros++
		}
		if p < 0 || math.Abs(p-w) > 1e-9*w+2*0x1p-1074 {
			t.Fatalf("state %d: %g, want %g", j, p, w)
		}
	}
	if zeros < 900 || v.Residual > 1e-15 {
		t.Errorf("%d states below the subnormal range, residual %g", zeros, v.Residual)
	}
}

// A chain on which Gauss-Seidel crawls: 25 blocks of 100 states (a ring
// with two chords inside each block), each state sending 1e-4 of its mass
// to the next block, with no gap of three decades between the entries (so
// no aggregation): auto switches to GMRES and says so, in the table and in
// --json, and meets the residual target.
func TestChainFallbackShown(t *testing.T) {
	const blocks, size, eps = 25, 100, 1e-4
	var b strings.Builder
	b.WriteString("from,to,probability\n")
	for i := 0; i < blocks*size; i++ {
		blk, l := i/size, i%size
		w := 0.2 + 0.06*float64(l*7%10) // uneven, so not doubly stochastic
		fmt.Fprintf(&b, "%d,%d,%.17g\n", i, blk*size+(l+1)%size, w*(1-eps))
		fmt.Fprintf(&b, "%d,%d,%.17g\n", i, blk*size+(l+37)%size, (0.99-w)*(1-eps))
		fmt.Fprintf(&b, "%d,%d,%.17g\n", i, blk*size+(l+61)%size, 0.01*(1-eps)) // no gap of three decades down to eps
		fmt.Fprintf(&b, "%d,%d,%g\n", i, ((blk+1)%blocks)*size+l, eps)
	}
	v := chainJSONRun(t, b.String(), "--matrix", "-")
	if v.Method != "gauss-seidel->gmres" || v.Residual > 1e-13 {
		t.Errorf("method %q, residual %g", v.Method, v.Residual)
	}
	var fb struct {
		Fallback string `json:"fallback"`
	}
	_, out, _ := chainRun(b.String(), "--matrix", "-", "--json")
	if err := json.Unmarshal([]byte(out), &fb); err != nil || !strings.HasPrefix(fb.Fallback, "gauss-seidel after ") {
		t.Errorf("fallback %q (%v)", fb.Fallback, err)
	}
	code, out, _ := chainRun(b.String(), "--matrix", "-")
	if code != 0 || !strings.Contains(out, "method      gauss-seidel->gmres") || !strings.Contains(out, "fallback    gauss-seidel after") {
		t.Errorf("exit %d, table output lacks the fallback:\n%s", code, out[strings.Index(out, "method"):])
	}
}
