package history

import (
	"testing"
	"time"
)

// Of numbers a date's period as Label names it; checked against the ISO
// weeks and months of the standard library's calendar.
func TestPeriodOf(t *testing.T) {
	for _, c := range []struct {
		date string
		p    Period
		want string
	}{
		{"2025-03-03", Day, "2025-03-03"},
		{"2025-03-03", Week, "2025-W10"},
		{"2025-03-09", Week, "2025-W10"},
		{"2025-03-10", Week, "2025-W11"},
		{"2024-12-30", Week, "2025-W01"},
		{"2027-01-01", Week, "2026-W53"},
		{"2025-03-31", Month, "2025-03"},
		{"1900-01-01", Week, "1900-W01"},
		{"2200-12-31", Month, "2200-12"},
	} {
		d, err := time.Parse(time.DateOnly, c.date)
		if err != nil {
			t.Fatal(err)
		}
		if got := c.p.Label(c.p.Of(d)); got != c.want {
			t.Errorf("%s in %s: %s, want %s", c.date, c.p, got, c.want)
		}
		if c.p == Week {
			y, w := d.ISOWeek()
			n := c.p.Of(d)
			if got := c.p.Label(n); got != time.Date(y, 1, 1, 0, 0, 0, 0, time.UTC).Format("2006")+"-W"+twoDigits(w) {
				t.Errorf("%s: %s against ISOWeek %d-W%02d", c.date, got, y, w)
			}
		}
	}
	// A timestamp counts on its date, in its own location.
	at := time.Date(2025, 3, 9, 23, 30, 0, 0, time.FixedZone("UTC+2", 2*3600))
	if got := Week.Label(Week.Of(at)); got != "2025-W10" {
		t.Errorf("Sunday 23:30 in UTC+2: %s, want 2025-W10", got)
	}
}

func twoDigits(n int) string {
	return string([]byte{byte('0' + n/10), byte('0' + n%10)})
}
