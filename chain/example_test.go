package chain_test

import (
	"fmt"
	"log"
	"strings"

	"ergostock/chain"
)

// A two-state chain P = [[1-a, a], [b, 1-b]] has pi = (b/(a+b), a/(a+b)).
// Every two-state chain only moves forward or back to state 0, so auto
// picks the exact forward substitution.
func ExampleSolve() {
	m, err := chain.NewDense(2, []float64{
		0.7, 0.3,
		0.6, 0.4,
	})
	if err != nil {
		log.Fatal(err)
	}
	r, err := chain.Solve(m, chain.Options{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("pi = %.6f %.6f (method %s)\n", r.Pi[0], r.Pi[1], r.Diagnostics.Method)
	fmt.Println("balance below 1e-15:", r.Diagnostics.Balance < 1e-15)
	// Output:
	// pi = 0.666667 0.333333 (method forward)
	// balance below 1e-15: true
}

// Daily status of a tram, read from a from,to,probability list.
func ExampleRead() {
	const list = `from,to,probability
in service,in service,0.92
in service,minor fault,0.06
in service,in workshop,0.02
minor fault,in service,0.55
minor fault,minor fault,0.35
minor fault,in workshop,0.10
in workshop,in service,0.30
in workshop,minor fault,0.05
in workshop,in workshop,0.65
`
	m, err := chain.Read(strings.NewReader(list), "tram.csv")
	if err != nil {
		log.Fatal(err)
	}
	r, err := chain.Solve(m, chain.Options{Method: chain.MethodGaussSeidel})
	if err != nil {
		log.Fatal(err)
	}
	for i, p := range r.Pi {
		fmt.Printf("%-12s %.6f\n", m.Labels[i], p)
	}
	// Output:
	// in service   0.844402
	// minor fault  0.083491
	// in workshop  0.072106
}

// Errors name the file, line and column.
func ExampleReadError() {
	_, err := chain.Read(strings.NewReader("a,b\n0.5,0.5\n0.2,x\n"), "bad.csv")
	fmt.Println(err)
	// Output:
	// bad.csv: line 3, column 2: "x": want a probability (a number in [0,1])
}

// The flow out of a set of states equals the flow back under pi.
func ExampleCutFlow() {
	b := chain.NewBuilder(3)
	for _, t := range []struct {
		i, j int
		p    float64
	}{{0, 1, 1}, {1, 0, 0.5}, {1, 2, 0.5}, {2, 0, 1}} {
		b.Add(t.i, t.j, t.p)
	}
	m, err := b.Build()
	if err != nil {
		log.Fatal(err)
	}
	r, err := chain.Solve(m, chain.Options{})
	if err != nil {
		log.Fatal(err)
	}
	out, back := chain.CutFlow(m, r.Pi, []bool{true, false, false})
	fmt.Printf("pi = %.4f, out %.4f, back %.4f\n", r.Pi, out, back)
	// Output:
	// pi = [0.4000 0.4000 0.2000], out 0.4000, back 0.4000
}

// Classify finds communicating classes, closed classes and periods.
func ExampleClassify() {
	m, _ := chain.NewDense(3, []float64{
		0.5, 0.5, 0,
		0, 0, 1,
		0, 1, 0,
	})
	s := chain.Classify(m)
	for k, c := range s.Closed {
		fmt.Println("closed class", s.Classes[c], "period", s.Period[k])
	}
	fmt.Println("transient", s.Transient)
	// Output:
	// closed class [1 2] period 2
	// transient [0]
}
