package inventory

import (
	"errors"
	"fmt"
	"math"
	"strconv"
)

// ErrNumberSyntax is wrapped by the errors of ParseNumber and ParseInt for
// text that is not a plain decimal number.
var ErrNumberSyntax = errors.New("not a plain decimal number (digits with an optional sign, fraction and exponent, as 12, -0.5 or 1e-3; no underscores, hex, inf or nan)")

// ErrNumberRange is wrapped by the errors of ParseNumber and ParseInt for a
// number beyond the range of its type.
var ErrNumberRange = errors.New("beyond the range of the number type")

// NumberError reports text that ParseNumber or ParseInt refuses; Err is
// ErrNumberSyntax, ErrNumberRange or ErrNotWhole.
type NumberError struct {
	Value string
	Err   error
}

func (e *NumberError) Error() string { return fmt.Sprintf("%q: %v", e.Value, e.Err) }
func (e *NumberError) Unwrap() error { return e.Err }

// ErrNotWhole is wrapped by the errors of ParseInt for a number with a
// fractional part.
var ErrNotWhole = errors.New("not a whole number")

// plainDecimal reports whether s is [+-]? digits [. digits?]? ([eE][+-]? digits)?
// or [+-]? . digits (...) with at least one digit in the mantissa, and
// whether it has a fraction or an exponent.
func plainDecimal(s string) (ok, frac bool) {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		frac = true
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return false, frac
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		frac = true
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		exp := 0
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			exp++
		}
		if exp == 0 {
			return false, frac
		}
	}
	return i == len(s), frac
}

// ParseNumber reads a number in the one rule of every number the tool
// reads (the demand grammar, cost cells, flags): plain decimal with an
// optional sign, an optional fraction and an optional exponent, as 12,
// -0.5, .25, 3. or 1e-3. Underscores, hexadecimal, inf and nan are
// refused, and so is a number whose magnitude overflows float64 (ErrNumberRange).
// Spaces are not trimmed. Errors are *NumberError values.
func ParseNumber(s string) (float64, error) {
	if ok, _ := plainDecimal(s); !ok {
		return 0, &NumberError{Value: s, Err: ErrNumberSyntax}
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(x, 0) {
		return 0, &NumberError{Value: s, Err: fmt.Errorf("%w (float64, about 1.8e308)", ErrNumberRange)}
	}
	return x, nil
}

// ParseInt reads a whole number by the rule of ParseNumber: 12, -3, 1e6
// and 2.0 are read, 1.5 is refused (ErrNotWhole), and so is a number beyond
// the int64 range (ErrNumberRange); digits without a fraction or exponent
// are read exactly. Errors are *NumberError values.
func ParseInt(s string) (int64, error) {
	ok, frac := plainDecimal(s)
	if !ok {
		return 0, &NumberError{Value: s, Err: ErrNumberSyntax}
	}
	if !frac {
		v, err := strconv.ParseInt(s, 10, 64)
		if err != nil {
			return 0, &NumberError{Value: s, Err: fmt.Errorf("%w (whole numbers from -9223372036854775808 to 9223372036854775807)", ErrNumberRange)}
		}
		return v, nil
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(x, 0) || !(math.Abs(x) < 1<<63) {
		return 0, &NumberError{Value: s, Err: fmt.Errorf("%w (whole numbers from -9223372036854775808 to 9223372036854775807)", ErrNumberRange)}
	}
	if x != math.Trunc(x) {
		return 0, &NumberError{Value: s, Err: ErrNotWhole}
	}
	if math.Abs(x) > 1<<53 {
		// Beyond 2^53 a decimal with an exponent or fraction may not be
		// the integer it reads as; ask for the digits.
		return 0, &NumberError{Value: s, Err: fmt.Errorf("%w: beyond 2^53 give the digits without a fraction or exponent", ErrNotWhole)}
	}
	return int64(x), nil
}
