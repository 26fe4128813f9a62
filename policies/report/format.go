package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// num prints a figure with six significant digits, without exponent for
// ordinary magnitudes; NaN prints as "n/a".
func num(v float64) string {
	switch {
	case math.IsNaN(v):
		return "n/a"
	case math.IsInf(v, 0):
		return fmt.Sprint(v)
	case v == 0:
		return "0"
	}
	a := math.Abs(v)
	if a >= 1e-4 && a < 1e9 {
		digits := 5 - int(math.Floor(math.Log10(a)))
		if digits < 0 {
			digits = 0
		}
		s := strconv.FormatFloat(v, 'f', digits, 64)
		if strings.Contains(s, ".") {
			s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
		}
		return s
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// pct prints a fraction as a percentage with two decimals.
func pct(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return strconv.FormatFloat(100*v, 'f', 2, 64) + "%"
}

// money prints a cost with two decimals and grouped thousands.
func money(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	s := strconv.FormatFloat(math.Abs(v), 'f', 2, 64)
	intPart, frac, _ := strings.Cut(s, ".")
	var b strings.Builder
	if v < 0 && s != "0.00" {
		b.WriteByte('-')
	}
	for i := range len(intPart) {
		if i > 0 && (len(intPart)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteByte(intPart[i])
	}
	b.WriteByte('.')
	b.WriteString(frac)
	return b.String()
}

// sci prints a diagnostic such as a residual in short scientific form.
func sci(v float64) string {
	if v == 0 {
		return "0"
	}
	return strconv.FormatFloat(v, 'e', 1, 64)
}

// figureValue prints one figure by its kind: probabilities as fraction and
// percentage, costs as money, the rest with six significant digits.
func figureValue(name string, v float64) string {
	switch name {
	case "fill_rate", "stockout_probability", "order_frequency":
		return num(v) + " (" + pct(v) + ")"
	case "holding_cost", "shortage_cost", "ordering_cost", "purchase_cost", "total_cost":
		return money(v)
	}
	return num(v)
}
