package chain

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestNewDenseValidation(t *testing.T) {
	for _, tc := range []struct {
		name string
		n    int
		data []float64
		want string
	}{
		{"not square", 2, []float64{1, 0, 1}, "want 4 (square)"},
		{"negative", 2, []float64{0.5, -0.5, 0, 1}, "row 0, column 1: -0.5: want a probability in [0,1]"},
		{"above one", 2, []float64{1, 0, 1.2, -0.2}, "row 1, column 0: 1.2"},
		{"nan", 2, []float64{1, 0, math.NaN(), 1}, "row 1, column 0: NaN: want a finite probability"},
		{"inf", 2, []float64{1, 0, 0, math.Inf(1)}, "row 1, column 1: +Inf"},
		{"row sum", 2, []float64{0.5, 0.4, 0, 1}, "row 0: 0.9: want a row sum of 1"},
		{"empty", 0, nil, "want at least 1"},
	} {
		_, err := NewDense(tc.n, tc.data)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want %q", tc.name, err, tc.want)
		}
	}
	if _, err := NewDense(2, []float64{0.5, 0.5, 1 - 1e-10, 1e-10 + 1e-10}); err != nil {
		t.Errorf("row sum within 1e-9 rejected: %v", err)
	}
}

func TestNewCSRValidation(t *testing.T) {
	for _, tc := range []struct {
		name   string
		rowPtr []int
		col    []int32
		val    []float64
		want   string
	}{
		{"ok", []int{0, 1, 2}, []int32{1, 0}, []float64{1, 1}, ""},
		{"short rowPtr", []int{0, 2}, []int32{0, 1}, []float64{.5, .5}, "len(rowPtr)"},
		{"col range", []int{0, 1, 2}, []int32{2, 0}, []float64{1, 1}, "column 2"},
		{"unsorted", []int{0, 2, 3}, []int32{1, 0, 0}, []float64{.5, .5, 1}, "increase strictly"},
		{"negative", []int{0, 2, 3}, []int32{0, 1, 0}, []float64{.5, -.5, 1}, "row 0, column 1: -0.5"},
		{"row sum", []int{0, 1, 2}, []int32{1, 0}, []float64{1, 0.5}, "row 1: 0.5"},
	} {
		_, err := NewCSR(2, tc.rowPtr, tc.col, tc.val)
		if tc.want == "" {
			if err != nil {
				t.Errorf("%s: %v", tc.name, err)
			}
			continue
		}
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want %q", tc.name, err, tc.want)
		}
	}
}

func TestBuilder(t *testing.T) {
	b := NewBuilder(3)
	b.Add(0, 1, 0.25)
	b.Add(0, 1, 0.25) // duplicate: summed
	b.Add(0, 0, 0.5)
	b.Add(1, 2, 1)
	b.Add(2, 0, 1)
	b.Add(2, 1, 0) // explicit zero: dropped
	c, err := b.Build()
	if err != nil {
		t.Fatal(err)
	}
	if c.NonZeros() != 4 {
		t.Errorf("nnz %d, want 4", c.NonZeros())
	}
	var got []float64
	c.Row(0, func(j int, p float64) { got = append(got, float64(j), p) })
	if len(got) != 4 || got[0] != 0 || got[1] != 0.5 || got[2] != 1 || got[3] != 0.5 {
		t.Errorf("row 0 = %v", got)
	}
	b = NewBuilder(2)
	b.Add(0, 5, 1)
	if _, err := b.Build(); err == nil {
		t.Error("out-of-range triplet accepted")
	}
	b = NewBuilder(2)
	b.Add(0, 0, 0.7)
	b.Add(1, 1, 1)
	var ee *EntryError
	if _, err := b.Build(); !errors.As(err, &ee) || ee.Row != 0 || ee.Col != -1 {
		t.Errorf("row sum error = %v", err)
	}
}
