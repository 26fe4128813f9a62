package policies

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// SizeError reports a chain, table or search too large to build under the
// limit (Options.MaxStates, the --max-states flag of the command). It is
// returned before the memory is taken, from an estimate computed in
// float64 (so a level near the int range cannot wrap it).
type SizeError struct {
	Chain string  // "lost-sales", "inventory-position", or what else is sized ("loss table", "s-S search")
	Bound float64 // upper bound on the count, e.g. C(top+L+1, L+1) states
	Limit int
	What  string // "states", "transitions", "inventory positions", "entries" or "units"
	// Counted is set when Bound is not an a-priori bound but the count
	// reached while enumerating the reachable states, when it passed Limit.
	Counted bool

	// Input, when set, is the field of the input that drives the size
	// (snake_case, as in inventory.FieldError: "order_up_to", "demand",
	// "order_cost", "lead_time"), and Value its value as given.
	Input, Value string
	// Reason, when set, says how the input drives the size, e.g. "makes
	// the economic order quantity about 2.1e+08 units".
	Reason string
	// Bytes is the estimated memory, 0 when not estimated.
	Bytes float64
	// LimitField names the limit; "" means "max_states".
	LimitField string
}

func (e *SizeError) Error() string { return e.Message(func(f string) string { return f }) }

// Message formats the error with the fields named by name, such as a
// function that turns "order_up_to" into the flag "--order-up-to":
//
//	--order-up-to 2000000000: the inventory-position chain would need 2000000001 states (about 16 GB); the limit is 5000000 states (--max-states)
func (e *SizeError) Message(name func(field string) string) string {
	lim := e.LimitField
	if lim == "" {
		lim = "max_states"
	}
	if e.Input == "" && e.Reason == "" {
		// The form of the lost-sales chain, which names no input.
		if e.Counted {
			return fmt.Sprintf("%s chain has more than %d reachable %s (the a-priori bound is %.0f; raise --max-states, or lower the order-up-to level or the lead time)",
				e.Chain, e.Limit, e.What, e.Bound)
		}
		return fmt.Sprintf("%s chain of up to %.0f %s exceeds the limit of %d (raise --max-states, or lower the order-up-to level or the lead time)",
			e.Chain, e.Bound, e.What, e.Limit)
	}
	var b strings.Builder
	if e.Input != "" {
		b.WriteString(name(e.Input))
		if e.Value != "" {
			b.WriteString(" " + e.Value)
		}
		b.WriteString(": ")
	}
	if e.Reason != "" {
		b.WriteString(e.Reason + ", so ")
	}
	fmt.Fprintf(&b, "the %s would need %s %s", e.Chain, count(e.Bound), e.What)
	if e.Bytes > 0 {
		fmt.Fprintf(&b, " (about %s)", bytesText(e.Bytes))
	}
	fmt.Fprintf(&b, "; the limit is %d %s (%s)", e.Limit, limitUnit(e.What), name(lim))
	return b.String()
}

// limitUnit is the unit of the limit for a count of what.
func limitUnit(what string) string {
	switch what {
	case "transitions", "multiply-adds", "operations":
		return what
	}
	return "states"
}

// count prints a count exactly below 2^53 and as %.3g beyond.
func count(x float64) string {
	if x >= 0 && x < 1<<53 && x == math.Trunc(x) {
		return strconv.FormatFloat(x, 'f', 0, 64)
	}
	return strconv.FormatFloat(x, 'g', 3, 64)
}

// bytesText prints a memory size as "16 GB" and the like (powers of 1000).
func bytesText(b float64) string {
	units := []string{"bytes", "kB", "MB", "GB", "TB", "PB", "EB"}
	i := 0
	for b >= 1000 && i < len(units)-1 {
		b /= 1000
		i++
	}
	return strconv.FormatFloat(b, 'g', 3, 64) + " " + units[i]
}

// span returns hi - lo + 1 as a float64, exact for the int range (no
// wrapping when lo and hi lie far apart).
func span(lo, hi int) float64 { return float64(hi) - float64(lo) + 1 }

// bytesPerPosition estimates the memory per state of the inventory-position
// chain with its loss tables: the stationary vector, the row pointers and
// about a dozen float64 tables over the positions.
const bytesPerPosition = 8 * 16

// bytesPerEntry estimates the memory per entry of a search table (the
// renewal mass, the cost, fill and stockout tables and their prefix sums).
const bytesPerEntry = 8 * 10
