package history

import (
	"testing"
	"time"
)

// The reference for ISO 8601 weeks is Go's time.Time.ISOWeek; the dates of
// week 53 are from ISO 8601 itself: a year has 53 weeks when it starts on a
// Thursday, or is a leap year starting on a Wednesday (2020 and 2026 start
// on a Wednesday and a Thursday).
func TestWeekLabels(t *testing.T) {
	for _, c := range []struct {
		date, week string
	}{
		{"2026-12-28", "2026-W53"}, // Monday of week 53
		{"2026-12-31", "2026-W53"},
		{"2027-01-03", "2026-W53"}, // Sunday, still ISO year 2026
		{"2027-01-04", "2027-W01"},
		{"2024-12-30", "2025-W01"}, // Monday in December, ISO year 2025
		{"2025-01-05", "2025-W01"},
		{"2020-12-31", "2020-W53"},
		{"2021-01-03", "2020-W53"},
		{"2021-01-04", "2021-W01"},
		{"1969-12-29", "1970-W01"},
		{"1969-12-28", "1969-W52"},
	} {
		y, m, d, ok := parseDate(c.date)
		if !ok {
			t.Fatalf("parseDate(%q) failed", c.date)
		}
		if got := Week.Label(periodOf(Week, y, m, d)); got != c.week {
			t.Errorf("week of %s = %s, want %s", c.date, got, c.week)
		}
	}
}

// TestPeriodsAgainstTime walks every day of 1999..2041 and checks the day
// numbers against time.Time.Unix, the week numbers against ISOWeek (a new
// number exactly when the ISO week changes, always on a Monday) and the
// month numbers against the calendar.
func TestPeriodsAgainstTime(t *testing.T) {
	start := time.Date(1999, 1, 1, 0, 0, 0, 0, time.UTC)
	prevWeek, prevY, prevW := 0, 0, 0
	for tm := start; tm.Year() < 2042; tm = tm.AddDate(0, 0, 1) {
		s := tm.Format("2006-01-02")
		y, m, d, ok := parseDate(s)
		if !ok {
			t.Fatalf("parseDate(%q) failed", s)
		}
		if got, want := periodOf(Day, y, m, d), int(tm.Unix()/86400); got != want {
			t.Fatalf("day number of %s = %d, want %d", s, got, want)
		}
		if got := Day.Label(periodOf(Day, y, m, d)); got != s {
			t.Fatalf("day label %s, want %s", got, s)
		}
		w := periodOf(Week, y, m, d)
		iy, iw := tm.ISOWeek()
		if tm != start {
			changed := iy != prevY || iw != prevW
			if changed != (w == prevWeek+1) || (!changed && w != prevWeek) {
				t.Fatalf("%s: week number %d after %d, ISO week %d-W%02d after %d-W%02d", s, w, prevWeek, iy, iw, prevY, prevW)
			}
			if changed != (tm.Weekday() == time.Monday) {
				t.Fatalf("%s: ISO week changed on a %v", s, tm.Weekday())
			}
		}
		prevWeek, prevY, prevW = w, iy, iw
		if got, want := Month.Label(periodOf(Month, y, m, d)), tm.Format("2006-01"); got != want {
			t.Fatalf("month of %s = %s, want %s", s, got, want)
		}
	}
}

// Calendar facts: February has 29 days in 2024 and 2028 (divisible by 4),
// 28 in 2027 and 2100 (divisible by 100, not 400), 29 in 2000.
func TestParseDate(t *testing.T) {
	for _, c := range []struct {
		s  string
		ok bool
	}{
		{"2024-02-29", true}, {"2028-02-29", true}, {"2000-02-29", true},
		{"2027-02-29", false}, {"2100-02-29", false}, {"2026-04-31", false},
		{"2026-04-30", true}, {"2026-12-31", true}, {"2026-13-01", false},
		{"2026-00-10", false}, {"2026-01-00", false}, {"2026-1-05", false},
		{"26-01-05", false}, {"2026/01/05", false}, {"", false}, {"2026-01-05T00", false},
	} {
		if _, _, _, ok := parseDate(c.s); ok != c.ok {
			t.Errorf("parseDate(%q) ok = %v, want %v", c.s, ok, c.ok)
		}
	}
}

func TestParsePeriod(t *testing.T) {
	for _, s := range []string{"day", "week", "month"} {
		p, err := ParsePeriod(s)
		if err != nil || p.String() != s {
			t.Errorf("ParsePeriod(%q) = %v, %v", s, p, err)
		}
	}
	if _, err := ParsePeriod("fortnight"); err == nil {
		t.Error("ParsePeriod(fortnight) succeeded")
	}
}
