package inventory

import (
	"errors"
	"math"
	"testing"
)

func TestSystemValidate(t *testing.T) {
	pois, _ := NewPoisson(4)
	zero, _ := NewPMF([]float64{1})
	ok := System{Demand: pois, LeadTime: 2, Holding: 1, Shortage: 9, OrderCost: 20, UnitCost: 3, Mode: Backorder}
	if err := ok.Validate(); err != nil {
		t.Fatalf("valid system refused: %v", err)
	}
	for _, c := range []struct {
		name  string
		edit  func(*System)
		field string
		value string
	}{
		{"no demand", func(s *System) { s.Demand = nil }, "demand", ""},
		{"zero-mean demand", func(s *System) { s.Demand = zero }, "demand", "pmf:0=1"},
		{"negative lead time", func(s *System) { s.LeadTime = -1 }, "lead_time", "-1"},
		{"negative holding cost", func(s *System) { s.Holding = -0.5 }, "holding_cost", "-0.5"},
		{"NaN shortage cost", func(s *System) { s.Shortage = math.NaN() }, "shortage_cost", "NaN"},
		{"infinite order cost", func(s *System) { s.OrderCost = math.Inf(1) }, "order_cost", "+Inf"},
		{"negative unit cost", func(s *System) { s.UnitCost = -1 }, "unit_cost", "-1"},
		{"unknown mode", func(s *System) { s.Mode = "backlog" }, "unmet", "backlog"},
		{"empty mode", func(s *System) { s.Mode = "" }, "unmet", ""},
	} {
		s := ok
		c.edit(&s)
		err := s.Validate()
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Field != c.field || fe.Value != c.value || fe.Want == "" {
			t.Errorf("%s: Validate() = %v, want a *FieldError on %s with value %q", c.name, err, c.field, c.value)
		}
	}
	lost := ok
	lost.Mode = Lost
	lost.LeadTime = 0
	if err := lost.Validate(); err != nil {
		t.Errorf("lost-sales system refused: %v", err)
	}
}

func TestParseMode(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Mode
		ok   bool
	}{{"backorder", Backorder, true}, {"lost", Lost, true}, {"Lost", Lost, true}, {" LOST ", Lost, true},
		{"BackOrder", Backorder, true}, {"", "", false}, {"lost sales", "", false}} {
		m, err := ParseMode(c.in)
		if (err == nil) != c.ok || m != c.want {
			t.Errorf("ParseMode(%q) = %q, %v", c.in, m, err)
		}
	}
}

func TestFieldError(t *testing.T) {
	base := errors.New("boom")
	e := &FieldError{Field: "lead_time", Value: "x", Want: "a whole number", Err: base}
	if e.Error() != `lead_time "x": want a whole number: boom` || !errors.Is(e, base) {
		t.Errorf("Error() = %q", e.Error())
	}
}
