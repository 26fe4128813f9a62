package history

import (
	"errors"
	"math"
	"strconv"
)

// maxExact is 2^53: every whole number below it is exact in a float64, so
// quantities, totals and the statistics formed from them stay exact.
const maxExact = 1 << 53

var errNumber = errors.New("want a plain decimal number")

// parseNumber reads a number in the one form the project's files accept: a
// plain decimal with an optional sign, digits with an optional fraction
// (at least one digit in all) and an optional exponent, such as 12, -3,
// 0.25, .5, 1e6 or 2.5E-3. Underscores, hexadecimal, "inf", "nan",
// spaces and overflow to infinity are refused.
//
// It stands in for inventory.ParseNumber, the shared form of this rule,
// until that lands.
func parseNumber(s string) (float64, error) {
	i, n := 0, len(s)
	if i < n && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
		digits++
	}
	if i < n && s[i] == '.' {
		for i++; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
			digits++
		}
	}
	if digits == 0 {
		return 0, errNumber
	}
	if i < n && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < n && (s[i] == '+' || s[i] == '-') {
			i++
		}
		exp := 0
		for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
			exp++
		}
		if exp == 0 {
			return 0, errNumber
		}
	}
	if i != n {
		return 0, errNumber
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, errNumber
	}
	return v, nil
}

// parseWhole reads a whole number by the rule of parseNumber ("12", "12.0"
// and "1.2e1" are all 12) whose magnitude is below limit (at most 2^53).
func parseWhole(s string, limit int) (int, bool) {
	v, err := parseNumber(s)
	if err != nil || v != math.Trunc(v) || math.Abs(v) >= float64(limit) {
		return 0, false
	}
	return int(v), true
}
