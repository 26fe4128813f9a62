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

// MaxLeadTime is the longest lead time a System may have, in periods: far
// beyond any plan, and small enough that L + 1 and L times a demand mean
// stay exact.
const MaxLeadTime = 1_000_000_000

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
	// LeadTimeLaw, when not nil, is the law of the lead time in periods
	// (LeadTime is then ignored); see ParseLeadTime and MixedDemand.
	LeadTimeLaw Distribution
	// LeadTimeModel relates the lead times of successive orders: Sequential
	// (the default, also for "") or Independent.
	LeadTimeModel LeadTimeModel
	// ReviewPeriod R: the position is reviewed and orders placed only in
	// periods 0, R, 2R, ...; 0 or 1 is every period. Costs and figures stay
	// per period.
	ReviewPeriod int
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
	if s.LeadTime > MaxLeadTime {
		return &FieldError{Field: "lead_time", Value: strconv.Itoa(s.LeadTime), Want: "a whole number of periods from 0 to 1000000000"}
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
	if s.ReviewPeriod < 0 || s.ReviewPeriod > MaxReviewPeriod {
		return &FieldError{Field: "review_period", Value: strconv.Itoa(s.ReviewPeriod), Want: "a whole number of periods from 1 to 100000"}
	}
	switch s.LeadTimeModel {
	case "", Sequential, Independent:
	default:
		return &FieldError{Field: "lead_time_model", Value: string(s.LeadTimeModel), Want: "sequential or independent"}
	}
	if s.LeadTimeLaw != nil {
		if err := checkLeadTimeLaw(s); err != nil {
			return err
		}
	}
	return checkRepresentable(s.Demand)
}

// checkRepresentable refuses a demand law that double precision cannot
// carry: one whose computed mean is not positive and finite, or whose mass
// away from 0, P(D >= 1), rounds to nothing although its mean is positive
// (a negbin with a huge variance, a discretised gamma or normal with a
// mean far below a unit): every figure would then come from a tail that
// the tables cannot see. The message says which case applies.
func checkRepresentable(d Distribution) error {
	m := d.Mean()
	up := d.Tail(1)
	if math.IsNaN(m) || math.IsInf(m, 0) || m < 0 {
		return &FieldError{Field: "demand", Value: d.String(), Want: "a distribution with a positive, finite mean, not " + ftoa(m)}
	}
	switch d.(type) {
	case Normal, Gamma:
		if !(m > 0) || !(up > 0) {
			return &FieldError{Field: "demand", Value: d.String(),
				Want: "a law that keeps some demand after rounding to whole units: this one puts all its mass at 0 in double precision (P(D >= 1) = " + ftoa(up) + ", mean of the rounded law " + ftoa(m) + "); plan in smaller units so the mean is not far below one unit", Err: ErrLimit}
		}
	default:
		if !(m > 0) {
			return &FieldError{Field: "demand", Value: d.String(), Want: "a distribution with a positive, finite mean"}
		}
		if !(up > 0) {
			return &FieldError{Field: "demand", Value: d.String(),
				Want: "a law whose mass away from 0 double precision can hold: this one has mean " + ftoa(m) + " but P(D >= 1) rounds to 0, so its mean lies in a tail too thin and too far out to tabulate (for negbin the variance is too large for the mean)", Err: ErrLimit}
		}
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
