package inventory

import (
	"math"
	"strconv"
	"strings"
)

// Mode says what happens to demand that cannot be served at once.
type Mode string

// The two modes of unmet demand.
const (
	Backorder Mode = "backorder"
	Lost      Mode = "lost"
)

// System is a single item at a single location under periodic review; see
// the package documentation for the order of events within a period.
type System struct {
	Demand    Distribution // demand per period
	LeadTime  int          // L >= 0 periods
	Holding   float64      // h per unit on hand at the end of a period
	Shortage  float64      // b per unit backordered per period, or per unit lost
	OrderCost float64      // K per order placed
	UnitCost  float64      // c per unit ordered
	Mode      Mode
}

// Validate refuses a system that cannot be evaluated. Errors are
// *FieldError values naming the offending field.
func (s System) Validate() error {
	if s.Demand == nil {
		return &FieldError{Field: "demand", Want: "a demand distribution (see Parse)"}
	}
	if s.LeadTime < 0 {
		return &FieldError{Field: "lead_time", Value: strconv.Itoa(s.LeadTime), Want: "a whole number of periods >= 0"}
	}
	for _, c := range []struct {
		name string
		v    float64
	}{{"holding_cost", s.Holding}, {"shortage_cost", s.Shortage}, {"order_cost", s.OrderCost}, {"unit_cost", s.UnitCost}} {
		if math.IsNaN(c.v) || math.IsInf(c.v, 0) || c.v < 0 {
			return &FieldError{Field: c.name, Value: ftoa(c.v), Want: "a finite cost >= 0"}
		}
	}
	switch s.Mode {
	case Backorder, Lost:
	default:
		return &FieldError{Field: "unmet", Value: string(s.Mode), Want: "backorder or lost"}
	}
	if m := s.Demand.Mean(); !(m > 0) || math.IsInf(m, 0) {
		return &FieldError{Field: "demand", Value: s.Demand.String(), Want: "a distribution with a positive, finite mean"}
	}
	return nil
}

// ParseMode reads "backorder" or "lost", in any case and with surrounding
// spaces ignored: the one rule of the command line and the items file.
func ParseMode(v string) (Mode, error) {
	switch m := Mode(strings.ToLower(strings.TrimSpace(v))); m {
	case Backorder, Lost:
		return m, nil
	}
	return "", &FieldError{Field: "unmet", Value: v, Want: "backorder or lost"}
}
