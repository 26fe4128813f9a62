package tabular

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Numbers reads the numbers of one table under one decimal mark. The mark
// is given ('.' or ',') or found from the numbers themselves (Decimal 0,
// "auto"): the first number that can only be read one way ("2,5",
// "1.200,5", "0.75") fixes it for the rest of the table, and a later number
// that contradicts it is refused, naming both lines. Digit grouping is read
// where it is unambiguous for the mark: "1,200.5" and "1 200" with '.',
// "1.200,5" and "1 200" with ','. A number that stays ambiguous ("1,200"
// while the mark is not yet known: one point two, or twelve hundred?) is
// refused with a request for the mark.
//
// Accepted besides: a sign, an exponent (1.5e3), spaces (also no-break
// spaces) around the number and as the grouping space. Never: hex,
// underscores, Inf or NaN. The zero value finds the mark.
type Numbers struct {
	Decimal byte   // '.' or ','; 0 finds it
	File    string // for messages

	line int    // where the mark was found (0: given, or not yet found)
	text string // the number that showed it
}

// ParseDecimal reads a --decimal value: "auto" (or ""), "." or ",";
// "point", "dot" and "comma" are taken too.
func ParseDecimal(s string) (byte, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "auto":
		return 0, nil
	case ".", "point", "dot":
		return '.', nil
	case ",", "comma":
		return ',', nil
	}
	return 0, fmt.Errorf("want auto, . or ,")
}

// Mark returns the decimal mark in force ('.' when none is known yet) and
// whether it was given or found.
func (n *Numbers) Mark() (byte, bool) {
	if n.Decimal == 0 {
		return '.', false
	}
	return n.Decimal, true
}

// Describe says which mark was used, for the summary line: "decimal
// point", "decimal comma (from line 12, "2,5")" and so on.
func (n *Numbers) Describe() string {
	switch {
	case n.Decimal == ',' && n.line > 0:
		return fmt.Sprintf("decimal comma (line %d: %q)", n.line, n.text)
	case n.Decimal == ',':
		return "decimal comma"
	case n.Decimal == '.' && n.line > 0:
		return fmt.Sprintf("decimal point (line %d: %q)", n.line, n.text)
	}
	return "decimal point"
}

var (
	reInt        = regexp.MustCompile(`^[0-9]+$`)
	rePoint      = regexp.MustCompile(`^([0-9]*)\.([0-9]+)$|^([0-9]+)\.$`)
	reComma      = regexp.MustCompile(`^([0-9]*),([0-9]+)$`)
	reGroupComma = regexp.MustCompile(`^[0-9]{1,3}(,[0-9]{3})+(\.[0-9]+)?$`) // 1,200.5 (mark '.')
	reGroupPoint = regexp.MustCompile(`^[0-9]{1,3}(\.[0-9]{3})+(,[0-9]+)?$`) // 1.200,5 (mark ',')
	reGroupSpace = regexp.MustCompile(`^[0-9]{1,3}( [0-9]{3})+([.,][0-9]+)?$`)
	reExp        = regexp.MustCompile(`^[0-9]*([.,][0-9]*)?[eE][+-]?[0-9]+$`)
)

// Parse reads one number; line is its line, for messages and for the
// decision of the mark.
func (n *Numbers) Parse(s string, line int) (float64, error) {
	t := strings.TrimSpace(strings.NewReplacer("\u00a0", " ", "\u202f", " ").Replace(s))
	neg := false
	if len(t) > 0 && (t[0] == '-' || t[0] == '+') {
		neg = t[0] == '-'
		t = strings.TrimSpace(t[1:])
	}
	if t == "" {
		return 0, fmt.Errorf("want a number, not %q", s)
	}
	v, err := n.parseBody(t, line)
	if errors.Is(err, strconv.ErrRange) {
		return 0, fmt.Errorf("%q: want a number below about 1.8e308", s)
	}
	if err != nil {
		return 0, fmt.Errorf("%q: %w", s, err)
	}
	if math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q: want a number below about 1.8e308", s)
	}
	if neg {
		v = -v
	}
	return v, nil
}

func (n *Numbers) parseBody(t string, line int) (float64, error) {
	switch {
	case reInt.MatchString(t):
		return strconv.ParseFloat(t, 64)
	case reExp.MatchString(t):
		if strings.Contains(t, ",") {
			if err := n.decide(',', t, line); err != nil {
				return 0, err
			}
			t = strings.Replace(t, ",", ".", 1)
		} else if strings.Contains(t, ".") {
			if err := n.decide('.', t, line); err != nil {
				return 0, err
			}
		}
		return strconv.ParseFloat(t, 64)
	case rePoint.MatchString(t):
		// "0.5", "12.25": a decimal point, unless it may be grouping
		// ("1.200": twelve hundred under a decimal comma).
		if groupingLike(t, '.') {
			switch n.Decimal {
			case '.':
				return strconv.ParseFloat(t, 64)
			case ',':
				return strconv.ParseFloat(strings.ReplaceAll(t, ".", ""), 64)
			}
			return 0, fmt.Errorf("a point that may be a decimal point or digit grouping (one point two, or twelve hundred?): give the decimal mark (--decimal . or --decimal ,)")
		}
		if err := n.decide('.', t, line); err != nil {
			return 0, err
		}
		return strconv.ParseFloat(t, 64)
	case reComma.MatchString(t):
		if groupingLike(t, ',') {
			switch n.Decimal {
			case ',':
				return strconv.ParseFloat(strings.Replace(t, ",", ".", 1), 64)
			case '.':
				return strconv.ParseFloat(strings.ReplaceAll(t, ",", ""), 64)
			}
			return 0, fmt.Errorf("a comma that may be a decimal comma or digit grouping (one point two, or twelve hundred?): give the decimal mark (--decimal . or --decimal ,)")
		}
		if err := n.decide(',', t, line); err != nil {
			return 0, err
		}
		return strconv.ParseFloat(strings.Replace(t, ",", ".", 1), 64)
	case reGroupComma.MatchString(t):
		if err := n.decide('.', t, line); err != nil {
			return 0, err
		}
		return strconv.ParseFloat(strings.ReplaceAll(t, ",", ""), 64)
	case reGroupPoint.MatchString(t):
		if err := n.decide(',', t, line); err != nil {
			return 0, err
		}
		return strconv.ParseFloat(strings.Replace(strings.ReplaceAll(t, ".", ""), ",", ".", 1), 64)
	case reGroupSpace.MatchString(t):
		t = strings.ReplaceAll(t, " ", "")
		if i := strings.IndexAny(t, ".,"); i >= 0 {
			if err := n.decide(t[i], t, line); err != nil {
				return 0, err
			}
			t = t[:i] + "." + t[i+1:]
		}
		return strconv.ParseFloat(t, 64)
	}
	return 0, fmt.Errorf("want a number written in decimal digits (such as 12, 0.5, 1,5 or 1 200)")
}

// groupingLike reports whether t, a number with one mark sep, could also
// be read with sep as digit grouping: 1 to 3 digits, sep, exactly 3.
func groupingLike(t string, sep byte) bool {
	i := strings.IndexByte(t, sep)
	return i >= 1 && i <= 3 && len(t)-i-1 == 3 && t[0] != '0'
}

// decide records that the number t of line uses mark, or refuses it if the
// table's mark is the other one.
func (n *Numbers) decide(mark byte, t string, line int) error {
	if n.Decimal == 0 {
		n.Decimal, n.line, n.text = mark, line, t
		return nil
	}
	if n.Decimal == mark {
		return nil
	}
	other := "a decimal point"
	if mark == ',' {
		other = "a decimal comma"
	}
	if n.line > 0 {
		return fmt.Errorf("written with %s, but line %d (%q) showed the file uses %s", other, n.line, n.text, markName(n.Decimal))
	}
	return fmt.Errorf("written with %s, but the decimal mark is %s (--decimal)", other, markName(n.Decimal))
}

func markName(m byte) string {
	if m == ',' {
		return "a decimal comma"
	}
	return "a decimal point"
}

// currencySigns are the signs and codes stripped from money cells.
var currencySigns = []string{"€", "$", "£", "¥", "₹", "CHF", "EUR", "USD", "GBP", "JPY", "SEK", "NOK", "DKK", "PLN", "CZK", "HUF", "CAD", "AUD", "NZD", "INR", "CNY", "ZAR"}

// Money reads an amount with an optional currency sign or code before or
// after it ("€12.50", "12,50 EUR", "$3"), returning the amount and the
// currency as written ("" when none).
func (n *Numbers) Money(s string, line int) (float64, string, error) {
	t := strings.TrimSpace(s)
	cur := ""
	for _, c := range currencySigns {
		switch {
		case strings.HasPrefix(t, c):
			cur, t = c, strings.TrimSpace(t[len(c):])
		case strings.HasSuffix(t, c):
			cur, t = c, strings.TrimSpace(t[:len(t)-len(c)])
		case strings.HasPrefix(t, "-"+c):
			cur, t = c, "-"+strings.TrimSpace(t[1+len(c):])
		}
		if cur != "" {
			break
		}
	}
	v, err := n.Parse(t, line)
	if err != nil {
		return 0, "", fmt.Errorf("%q: want an amount such as 12.50, €12.50 or 12,50 EUR", s)
	}
	return v, canonicalCurrency(cur), nil
}

func canonicalCurrency(c string) string {
	switch c {
	case "€":
		return "EUR"
	case "$":
		return "$"
	case "£":
		return "GBP"
	case "¥":
		return "¥"
	case "₹":
		return "INR"
	}
	return c
}

// Fraction reads a share such as a fill rate: a plain number (0.98) or a
// percentage ("98%", "98,5 %"), returned as a fraction, with whether it was
// written as a percentage.
func (n *Numbers) Fraction(s string, line int) (float64, bool, error) {
	t := strings.TrimSpace(s)
	if strings.HasSuffix(t, "%") {
		v, err := n.Parse(strings.TrimSuffix(t, "%"), line)
		if err != nil {
			return 0, true, fmt.Errorf("%q: want a percentage such as 98%% or 98,5 %%", s)
		}
		return v / 100, true, nil
	}
	v, err := n.Parse(t, line)
	return v, false, err
}

// IsNumberLike reports whether a cell looks like a number of some dialect
// (digits with at most separators, sign, exponent, percent or currency):
// used to tell a header from data.
func IsNumberLike(s string) bool {
	t := strings.TrimSpace(s)
	if t == "" {
		return false
	}
	digits := 0
	for _, r := range t {
		switch {
		case r >= '0' && r <= '9':
			digits++
		case strings.ContainsRune(" .,+-eE%'", r), r == '\u00a0', r >= utf8.RuneSelf:
		default:
			return false
		}
	}
	return digits > 0
}
