package history

import (
	"fmt"
	"time"
)

// Period is the length of a review period into which daily records are
// summed.
type Period int

// The review periods. Week is the ISO 8601 week (Monday to Sunday; the week
// belongs to the year that holds its Thursday); Month is the calendar month.
// Index is the integer period numbering of a `period` column, taken as given.
const (
	Day Period = iota
	Week
	Month
	Index
)

// String returns "day", "week", "month" or "index".
func (p Period) String() string {
	switch p {
	case Day:
		return "day"
	case Week:
		return "week"
	case Month:
		return "month"
	case Index:
		return "index"
	}
	return fmt.Sprintf("Period(%d)", int(p))
}

// ParsePeriod reads "day", "week" or "month".
func ParsePeriod(s string) (Period, error) {
	switch s {
	case "day":
		return Day, nil
	case "week":
		return Week, nil
	case "month":
		return Month, nil
	}
	return 0, fmt.Errorf("period %q: want day, week or month", s)
}

// daysFromCivil returns the number of days from 1970-01-01 to the proleptic
// Gregorian date y-m-d. It is the days_from_civil algorithm of H. Hinnant,
// "chrono-Compatible Low-Level Date Algorithms" (2013).
func daysFromCivil(y, m, d int) int {
	if m <= 2 {
		y--
	}
	era := y
	if era < 0 {
		era -= 399
	}
	era /= 400
	yoe := y - era*400
	mp := (m + 9) % 12
	doy := (153*mp+2)/5 + d - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return era*146097 + doe - 719468
}

// floorDiv returns floor(a/b) for b > 0.
func floorDiv(a, b int) int {
	q := a / b
	if a%b != 0 && a < 0 {
		q--
	}
	return q
}

// periodOf maps a date to its period number. Day numbers count days from
// 1970-01-01; week numbers count ISO weeks from the one starting Monday
// 1969-12-29 (1970-01-01 was a Thursday); month numbers are 12*year+month-1.
func periodOf(p Period, y, m, d int) int {
	switch p {
	case Week:
		return floorDiv(daysFromCivil(y, m, d)+3, 7)
	case Month:
		return 12*y + m - 1
	}
	return daysFromCivil(y, m, d)
}

// civilFromDays is the inverse of daysFromCivil: the proleptic Gregorian
// date of day number z (days from 1970-01-01), by the civil_from_days
// algorithm of the same paper.
func civilFromDays(z int) (y, m, d int) {
	z += 719468
	era := z
	if era < 0 {
		era -= 146096
	}
	era /= 146097
	doe := z - era*146097
	yoe := (doe - doe/1460 + doe/36524 - doe/146096) / 365
	y = yoe + era*400
	doy := doe - (365*yoe + yoe/4 - yoe/100)
	mp := (5*doy + 2) / 153
	d = doy - (153*mp+2)/5 + 1
	m = mp + 3
	if m > 12 {
		m -= 12
	}
	if m <= 2 {
		y++
	}
	return y, m, d
}

// periodOfDay maps day number z (days from 1970-01-01) to its period
// number, as periodOf does for the date.
func periodOfDay(p Period, z int) int {
	switch p {
	case Week:
		return floorDiv(z+3, 7)
	case Month:
		y, m, _ := civilFromDays(z)
		return 12*y + m - 1
	}
	return z
}

// Label names period number n of p: "2026-12-31" for a day, "2026-W53" for
// an ISO week (its year is the ISO year), "2026-12" for a month, and the
// number itself for an Index period.
func (p Period) Label(n int) string {
	switch p {
	case Day:
		return time.Unix(int64(n)*86400, 0).UTC().Format("2006-01-02")
	case Week:
		y, w := time.Unix(int64(n*7-3)*86400, 0).UTC().ISOWeek()
		return fmt.Sprintf("%04d-W%02d", y, w)
	case Month:
		return fmt.Sprintf("%04d-%02d", floorDiv(n, 12), n-12*floorDiv(n, 12)+1)
	}
	return fmt.Sprint(n)
}

// parseDate reads a strict YYYY-MM-DD date, checking the day against the
// length of the month (with Gregorian leap years).
func parseDate(s string) (y, m, d int, ok bool) {
	if len(s) != 10 || s[4] != '-' || s[7] != '-' {
		return 0, 0, 0, false
	}
	num := func(t string) (int, bool) {
		n := 0
		for i := 0; i < len(t); i++ {
			c := t[i]
			if c < '0' || c > '9' {
				return 0, false
			}
			n = n*10 + int(c-'0')
		}
		return n, true
	}
	var ok1, ok2, ok3 bool
	y, ok1 = num(s[0:4])
	m, ok2 = num(s[5:7])
	d, ok3 = num(s[8:10])
	if !ok1 || !ok2 || !ok3 || m < 1 || m > 12 || d < 1 || d > daysIn(y, m) {
		return 0, 0, 0, false
	}
	return y, m, d, true
}

func daysIn(y, m int) int {
	switch m {
	case 2:
		if y%4 == 0 && (y%100 != 0 || y%400 == 0) {
			return 29
		}
		return 28
	case 4, 6, 9, 11:
		return 30
	}
	return 31
}

// Of returns the number of the period of p that holds the date of t (its
// year, month and day in t's location; the time of day is ignored), in the
// numbering that Label reads: days from 1970-01-01, ISO weeks, or
// 12*year+month-1. Index has no dates; Of gives the day number for it.
func (p Period) Of(t time.Time) int {
	y, m, d := t.Date()
	return periodOf(p, y, int(m), d)
}
