package chain

import (
	"errors"
	"fmt"
	"strings"
)

// ErrNotConverged is wrapped by the error of an iterative method that did not
// reach its tolerance.
var ErrNotConverged = errors.New("did not converge")

// EntryError reports an entry or a row that makes a matrix unusable as a
// transition matrix. Col is -1 when the problem concerns the whole row.
type EntryError struct {
	Row, Col int
	Value    float64
	Want     string
}

func (e *EntryError) Error() string {
	if e.Col < 0 {
		return fmt.Sprintf("row %d: %v: want %s", e.Row, e.Value, e.Want)
	}
	return fmt.Sprintf("row %d, column %d: %v: want %s", e.Row, e.Col, e.Value, e.Want)
}

// ShapeError reports storage whose shape is inconsistent.
type ShapeError struct{ Msg string }

func (e *ShapeError) Error() string { return e.Msg }

// MethodError reports an unknown method name.
type MethodError struct{ Name string }

func (e *MethodError) Error() string {
	names := make([]string, len(Methods))
	for i, m := range Methods {
		names[i] = string(m)
	}
	return fmt.Sprintf("unknown method %q: want one of %s", e.Name, strings.Join(names, ", "))
}

// ReducibleError reports a chain with more than one closed class (or none,
// which cannot happen for a finite stochastic matrix), so the stationary
// distribution is not unique. Labels, when set, name the states.
type ReducibleError struct {
	Closed [][]int
	Labels []string
}

const (
	maxClassesShown = 4
	maxStatesShown  = 5
)

func (e *ReducibleError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "chain is reducible: %d closed classes, so no unique stationary distribution:", len(e.Closed))
	for c, cl := range e.Closed {
		if c == maxClassesShown {
			fmt.Fprintf(&b, " ... and %d more", len(e.Closed)-c)
			break
		}
		if c > 0 {
			b.WriteByte(',')
		}
		b.WriteString(" {")
		for k, s := range cl {
			if k == maxStatesShown {
				fmt.Fprintf(&b, ", ... %d more", len(cl)-k)
				break
			}
			if k > 0 {
				b.WriteString(", ")
			}
			if e.Labels != nil && s < len(e.Labels) {
				b.WriteString(e.Labels[s])
			} else {
				fmt.Fprintf(&b, "%d", s)
			}
		}
		b.WriteByte('}')
	}
	return b.String()
}

// MethodMismatchError reports a method that does not apply to the chain
// (for example forward on a chain with a backward transition).
type MethodMismatchError struct {
	Method Method
	Reason string
}

func (e *MethodMismatchError) Error() string {
	return fmt.Sprintf("method %s does not apply: %s", e.Method, e.Reason)
}
