package network

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"ergostock/inventory"
)

// Levels says what the centre's base-stock level means.
type Levels string

// The two readings of the centre's level (see the package documentation).
const (
	Echelon      Levels = "echelon"      // the position of the centre and everything below it
	Installation Levels = "installation" // the centre's own position
)

// ParseLevels reads a --levels value ("" is Echelon).
func ParseLevels(s string) (Levels, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "echelon":
		return Echelon, nil
	case "installation":
		return Installation, nil
	}
	return "", &inventory.FieldError{Field: "levels", Value: s, Want: "echelon or installation"}
}

// MaxLevel bounds the magnitude of every base-stock level and lead time
// sum handled, so that sums of levels stay exact.
const MaxLevel = 1 << 40

// Location is one place that holds stock.
type Location struct {
	Name     string
	Parent   string                 // "" for the centre
	LeadTime int                    // periods from the parent (from the supplier for the centre)
	Demand   inventory.Distribution // external demand per period; nil for none
	Holding  float64                // h per unit on hand at the end of a period
	Shortage float64                // b per unit of external demand backordered at the end of a period
	// BaseStock is the level (see Network.Levels for the centre's);
	// HasLevel is false when the file left it empty (optimize only).
	BaseStock int
	HasLevel  bool
	// MinFillRate is a fill-rate floor for Optimize (0: none).
	MinFillRate float64
	// Line is the line of the file the location came from (0 if none).
	Line int
}

// Network is a centre and the stores it replenishes.
type Network struct {
	File   string // for messages; "" when built in code
	Centre Location
	Stores []Location
	Levels Levels // what Centre.BaseStock means; "" is Echelon
	// Split says how several stores share the centre's backorders; ""
	// is Binomial.
	Split Split
}

// Split names the law of a store's share of the centre's backorders
// under the decomposition (several stores).
type Split string

// The two splits.
const (
	// Binomial: given the centre's backorders B, the store's share is
	// Binomial(B, q), q its share of mean demand, used in full (O(K^2) a
	// store for K values of B).
	Binomial Split = "binomial"
	// TwoMoment: the share's mean q E[B] and variance
	// q(1-q) E[B] + q^2 Var[B] fitted by a negative binomial (Poisson when
	// the variance is not above the mean), after Graves 1985: O(K) a store.
	TwoMoment Split = "two-moment"
)

// ParseSplit reads a --split value ("" is Binomial).
func ParseSplit(s string) (Split, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "binomial":
		return Binomial, nil
	case "two-moment":
		return TwoMoment, nil
	}
	return "", &inventory.FieldError{Field: "split", Value: s, Want: "binomial or two-moment"}
}

// LocationError is a problem with one location's field: it prints as
// FILE:LINE: column FIELD: location NAME: MESSAGE.
type LocationError struct {
	File     string
	Line     int
	Field    string
	Location string
	Err      error
}

func (e *LocationError) Error() string {
	var b strings.Builder
	if e.File != "" {
		b.WriteString(e.File)
		if e.Line > 0 {
			fmt.Fprintf(&b, ":%d", e.Line)
		}
		b.WriteString(": ")
	}
	if e.Field != "" {
		fmt.Fprintf(&b, "column %s: ", e.Field)
	}
	if e.Location != "" {
		fmt.Fprintf(&b, "location %q: ", e.Location)
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *LocationError) Unwrap() error { return e.Err }

func (n *Network) errAt(l Location, field, format string, a ...any) error {
	return &LocationError{File: n.File, Line: l.Line, Field: field, Location: l.Name, Err: fmt.Errorf(format, a...)}
}

// Validate checks the network's shape and every location's inputs. The
// levels are checked only when needLevels is set (evaluation and
// simulation; a search sets them itself).
func (n *Network) Validate(needLevels bool) error {
	if n.Levels != "" && n.Levels != Echelon && n.Levels != Installation {
		return &inventory.FieldError{Field: "levels", Value: string(n.Levels), Want: "echelon or installation"}
	}
	if n.Split != "" && n.Split != Binomial && n.Split != TwoMoment {
		return &inventory.FieldError{Field: "split", Value: string(n.Split), Want: "binomial or two-moment"}
	}
	c := n.Centre
	if c.Name == "" {
		return &LocationError{File: n.File, Field: "parent", Err: fmt.Errorf("no centre: want exactly one location with an empty parent")}
	}
	if len(n.Stores) == 0 {
		return n.errAt(c, "parent", "no store names this centre as its parent: want at least one")
	}
	if c.Demand != nil {
		return n.errAt(c, "demand", "%q: want it empty: external demand at the centre is not modelled (add a store for it with lead time 0)", c.Demand.String())
	}
	if c.Shortage != 0 {
		return n.errAt(c, "shortage_cost", "%s: want it empty or 0 at the centre: what it owes the stores is charged at the stores", ftoa(c.Shortage))
	}
	seen := map[string]int{c.Name: c.Line}
	all := append([]Location{c}, n.Stores...)
	for i, l := range all {
		if i > 0 {
			if prev, dup := seen[l.Name]; dup {
				return n.errAt(l, "location", "named twice (also line %d): want unique names", prev)
			}
			seen[l.Name] = l.Line
			if l.Parent != c.Name {
				return n.errAt(l, "parent", "%q: want the centre %q (a network has two levels: one centre and its stores)", l.Parent, c.Name)
			}
			if l.Demand == nil {
				return n.errAt(l, "demand", "empty: want a demand law at every store (such as poisson:mean=4)")
			}
			if l.Demand.Mean() <= 0 {
				return n.errAt(l, "demand", "%q: want a law with a positive mean", l.Demand.String())
			}
		}
		if l.LeadTime < 0 || l.LeadTime > 100000 {
			return n.errAt(l, "lead_time", "%d: want a whole number of periods from 0 to 100000", l.LeadTime)
		}
		for _, f := range []struct {
			name string
			v    float64
		}{{"holding_cost", l.Holding}, {"shortage_cost", l.Shortage}} {
			if math.IsNaN(f.v) || math.IsInf(f.v, 0) || f.v < 0 || f.v > 1e300 {
				return n.errAt(l, f.name, "%s: want a finite cost >= 0", ftoa(f.v))
			}
		}
		if math.IsNaN(l.MinFillRate) || l.MinFillRate < 0 || l.MinFillRate >= 1 {
			return n.errAt(l, "min_fill_rate", "%s: want a fraction from 0 to below 1", ftoa(l.MinFillRate))
		}
		if needLevels {
			if !l.HasLevel {
				return n.errAt(l, "base_stock", "empty: want a whole-number level (or run network optimize to find one)")
			}
			if l.BaseStock < -MaxLevel || l.BaseStock > MaxLevel {
				return n.errAt(l, "base_stock", "%d: want a level of magnitude at most 2^40", l.BaseStock)
			}
		}
	}
	return nil
}

// InstallationLevels returns the centre's installation level and the
// stores' levels, converting an echelon centre level.
func (n *Network) InstallationLevels() (centre int, stores []int) {
	stores = make([]int, len(n.Stores))
	sum := 0
	for i, s := range n.Stores {
		stores[i] = s.BaseStock
		sum += s.BaseStock
	}
	centre = n.Centre.BaseStock
	if n.Levels != Installation {
		centre -= sum
	}
	return centre, stores
}

// withLevels returns a copy of n with the given installation levels, in
// n's reading of the centre's level.
func (n *Network) withLevels(centre int, stores []int) *Network {
	m := *n
	m.Stores = append([]Location(nil), n.Stores...)
	sum := 0
	for i := range m.Stores {
		m.Stores[i].BaseStock, m.Stores[i].HasLevel = stores[i], true
		sum += stores[i]
	}
	m.Centre.BaseStock, m.Centre.HasLevel = centre, true
	if n.Levels != Installation {
		m.Centre.BaseStock += sum
	}
	return &m
}

func ftoa(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
