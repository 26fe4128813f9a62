package tabular

import (
	"fmt"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"time"
)

// DateLayout is the way the dates of a column are written.
type DateLayout string

// The layouts. A timestamp in any of the written layouts counts on its
// date: "2025-03-04 14:05:00", "2025-03-04T14:05:00Z", "04.03.2025 14:05".
// Day and month may have one digit in the layouts with separators.
const (
	DateAuto    DateLayout = "auto"
	DateISO     DateLayout = "YYYY-MM-DD"
	DateDotDMY  DateLayout = "DD.MM.YYYY"
	DateDMY     DateLayout = "DD/MM/YYYY"
	DateMDY     DateLayout = "MM/DD/YYYY"
	DateCompact DateLayout = "YYYYMMDD"
	// DateSerial is a spreadsheet day number in the 1900 date system: 1 is
	// 1900-01-01 and 60 the 1900-02-29 that the system counts although it
	// never was (refused), so 61 is 1900-03-01; a fraction is the time of
	// day.
	DateSerial DateLayout = "serial"
)

// DateLayouts are the layouts auto chooses among, in the order messages
// list them.
var DateLayouts = []DateLayout{DateISO, DateDotDMY, DateDMY, DateMDY, DateCompact, DateSerial}

// ParseDateLayout reads a --date-format value.
func ParseDateLayout(s string) (DateLayout, error) {
	if s == "" || strings.EqualFold(s, "auto") {
		return DateAuto, nil
	}
	for _, l := range DateLayouts {
		if strings.EqualFold(s, string(l)) {
			return l, nil
		}
	}
	names := make([]string, len(DateLayouts))
	for i, l := range DateLayouts {
		names[i] = string(l)
	}
	return "", fmt.Errorf("want auto, %s", strings.Join(names, ", "))
}

var (
	reDateISO     = regexp.MustCompile(`^([0-9]{4})-([0-9]{1,2})-([0-9]{1,2})$`)
	reDateDot     = regexp.MustCompile(`^([0-9]{1,2})\.([0-9]{1,2})\.([0-9]{4})$`)
	reDateSlash   = regexp.MustCompile(`^([0-9]{1,2})/([0-9]{1,2})/([0-9]{4})$`)
	reDateCompact = regexp.MustCompile(`^([0-9]{4})([0-9]{2})([0-9]{2})$`)
	reSerial      = regexp.MustCompile(`^[0-9]{1,7}([.,][0-9]+)?$`)
	reTime        = regexp.MustCompile(`^[0-9]{1,2}:[0-9]{2}(:[0-9]{2}([.,][0-9]+)?)?( ?[AaPp][Mm])?(Z|[+-][0-9]{2}:?[0-9]{2})?$`)
)

// splitTime cuts a timestamp into its date and its time ("" when none),
// checking the time part's form.
func splitTime(s string) (string, bool) {
	s = strings.TrimSpace(s)
	i := strings.IndexAny(s, " T")
	if i < 0 {
		return s, true
	}
	return s[:i], reTime.MatchString(strings.TrimSpace(s[i+1:]))
}

// Parse reads a date written in layout l (not DateAuto).
func (l DateLayout) Parse(s string) (time.Time, error) {
	if l == DateSerial {
		return parseSerial(strings.TrimSpace(s))
	}
	d, ok := splitTime(s)
	if !ok {
		return time.Time{}, fmt.Errorf("%q: want a date in the layout %s (a time after it may be hh:mm or hh:mm:ss)", s, l)
	}
	var m []string
	var y, mo, day string
	switch l {
	case DateISO:
		if m = reDateISO.FindStringSubmatch(d); m != nil {
			y, mo, day = m[1], m[2], m[3]
		}
	case DateDotDMY:
		if m = reDateDot.FindStringSubmatch(d); m != nil {
			day, mo, y = m[1], m[2], m[3]
		}
	case DateDMY:
		if m = reDateSlash.FindStringSubmatch(d); m != nil {
			day, mo, y = m[1], m[2], m[3]
		}
	case DateMDY:
		if m = reDateSlash.FindStringSubmatch(d); m != nil {
			mo, day, y = m[1], m[2], m[3]
		}
	case DateCompact:
		if m = reDateCompact.FindStringSubmatch(d); m != nil {
			y, mo, day = m[1], m[2], m[3]
		}
	default:
		return time.Time{}, fmt.Errorf("unknown date layout %q", l)
	}
	if m == nil {
		return time.Time{}, fmt.Errorf("%q: want a date in the layout %s", s, l)
	}
	yi, _ := strconv.Atoi(y)
	mi, _ := strconv.Atoi(mo)
	di, _ := strconv.Atoi(day)
	t := time.Date(yi, time.Month(mi), di, 0, 0, 0, 0, time.UTC)
	if mi < 1 || mi > 12 || di < 1 || t.Day() != di {
		return time.Time{}, fmt.Errorf("%q: no such day in the layout %s", s, l)
	}
	return t, nil
}

// serialEpoch is day 0 of the 1900 date system for serials after the
// fictitious 1900-02-29.
var serialEpoch = time.Date(1899, 12, 30, 0, 0, 0, 0, time.UTC)

func parseSerial(s string) (time.Time, error) {
	if !reSerial.MatchString(s) {
		return time.Time{}, fmt.Errorf("%q: want a spreadsheet day number such as 45720", s)
	}
	whole, _, _ := strings.Cut(strings.ReplaceAll(s, ",", "."), ".")
	n, _ := strconv.Atoi(whole)
	switch {
	case n < 1:
		return time.Time{}, fmt.Errorf("%q: spreadsheet day numbers start at 1 (1900-01-01)", s)
	case n == 60:
		return time.Time{}, fmt.Errorf("%q: day number 60 is 1900-02-29, which spreadsheets count but which never was", s)
	case n < 60:
		return serialEpoch.AddDate(0, 0, n+1), nil
	}
	t := serialEpoch.AddDate(0, 0, n)
	if t.Year() > 9999 {
		return time.Time{}, fmt.Errorf("%q: a day number beyond the year 9999", s)
	}
	return t, nil
}

// DateSample is one date of a column with its line.
type DateSample struct {
	Text string
	Line int
}

// DetectDates picks the one layout in which every date of samples reads
// (the dates of a whole column, or its distinct values). It refuses, with
// the rows that disagree or the layouts that remain, when no layout or
// several fit; serial day numbers are a candidate only between 1 and
// 109574 (2199-12-31). file names the file in messages.
func DetectDates(file, column string, samples []DateSample) (DateLayout, error) {
	if len(samples) == 0 {
		return DateISO, nil
	}
	fits := map[DateLayout]bool{}
	for _, l := range DateLayouts {
		fits[l] = true
	}
	var firstFail = map[DateLayout]DateSample{}
	for _, s := range samples {
		for _, l := range DateLayouts {
			if !fits[l] {
				continue
			}
			t, err := l.Parse(s.Text)
			if err == nil && l == DateSerial && t.Year() >= 2200 {
				err = fmt.Errorf("beyond 2199")
			}
			if err != nil {
				fits[l] = false
				firstFail[l] = s
			}
		}
	}
	var left []DateLayout
	for _, l := range DateLayouts {
		if fits[l] {
			left = append(left, l)
		}
	}
	switch len(left) {
	case 1:
		return left[0], nil
	case 0:
		// Name two rows that no single layout reads together.
		a, b := disagree(samples)
		if b.Line == 0 {
			return "", errorf(file, a.Line, column, "date %q is in none of the layouts %s: give --date-format", a.Text, layoutList(DateLayouts))
		}
		return "", errorf(file, 0, column, "no one date layout reads every date: line %d (%q) reads as %s, line %d (%q) as %s; give --date-format",
			a.Line, a.Text, layoutList(readsAs(a.Text)), b.Line, b.Text, layoutList(readsAs(b.Text)))
	}
	return "", errorf(file, 0, column, "the dates read in several layouts (%s; no day above 12, so day and month cannot be told apart): give --date-format", layoutList(left))
}

// readsAs lists the layouts in which s reads.
func readsAs(s string) []DateLayout {
	var out []DateLayout
	for _, l := range DateLayouts {
		if t, err := l.Parse(s); err == nil && (l != DateSerial || t.Year() < 2200) {
			out = append(out, l)
		}
	}
	return out
}

// disagree finds two samples that share no layout (b zero if one sample
// reads in none).
func disagree(samples []DateSample) (a, b DateSample) {
	seen := map[string]DateSample{}
	var kinds []string
	for _, s := range samples {
		ls := readsAs(s.Text)
		if len(ls) == 0 {
			return s, DateSample{}
		}
		k := layoutList(ls)
		if _, ok := seen[k]; !ok {
			seen[k] = s
			kinds = append(kinds, k)
		}
	}
	sort.Strings(kinds)
	for i := range kinds {
		for j := i + 1; j < len(kinds); j++ {
			x, y := seen[kinds[i]], seen[kinds[j]]
			if !shareLayout(readsAs(x.Text), readsAs(y.Text)) {
				if x.Line > y.Line {
					x, y = y, x
				}
				return x, y
			}
		}
	}
	return samples[0], samples[len(samples)-1]
}

func shareLayout(a, b []DateLayout) bool {
	for _, x := range a {
		for _, y := range b {
			if x == y {
				return true
			}
		}
	}
	return false
}

func layoutList(ls []DateLayout) string {
	s := make([]string, len(ls))
	for i, l := range ls {
		s[i] = string(l)
	}
	return strings.Join(s, ", ")
}
