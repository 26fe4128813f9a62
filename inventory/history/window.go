package history

import (
	"cmp"
	"errors"
	"fmt"
	"slices"
	"strings"
)

// MaxSpan is the largest number of periods one SKU's series may span,
// from its first record to History.Last (about 359 years of days). A SKU
// beyond it gets an error wrapping ErrSpan before anything is allocated.
const MaxSpan = 1 << 17

// MaxCells bounds the periods of all series of a file together (1 GiB of
// counts); a file beyond it is refused as a whole before anything is
// allocated.
const MaxCells = 1 << 27

// The bulk rule (see the package documentation).
const (
	// BulkShare is the least share of a SKU's (or the file's) rows that
	// the span holding its bulk must have.
	BulkShare = 0.9
	// SpacingFactor times the usual spacing of a SKU's records is a gap
	// long enough to separate two spans (when it is also at least the
	// minimum gap of the time unit).
	SpacingFactor = 20
)

// ErrNoBulk is wrapped by SKU.Err when a SKU's rows have no clear bulk or
// every usable row was left out.
var ErrNoBulk = errors.New("no clear bulk of rows")

// ErrSpan is wrapped by SKU.Err when a SKU's series would span more than
// MaxSpan periods, and by the error of Read for more than MaxCells in all.
var ErrSpan = errors.New("too many periods")

// gapScale holds the gaps of the bulk rule in the time unit of the rows:
// a gap longer than abs always separates two spans; one longer than
// max(min, SpacingFactor × the usual spacing) does too.
type gapScale struct {
	min, abs int
	unit     string
}

func (c columns) gapScale() gapScale {
	if c.timeName == "period" && c.yearly != Week && c.yearly != Month {
		return gapScale{min: 52, abs: 520, unit: "periods"}
	}
	return gapScale{min: 366, abs: 3653, unit: "days"}
}

// Outlier is a usable record left out of a SKU's series because it lies
// far from the bulk of the SKU's rows, or of the file's.
type Outlier struct {
	File  string
	Line  int    // the first row of the SKU with this date or period
	Field string // "date" or "period"
	Value string // the date or period
	Rows  int    // the SKU's rows of that date or period, all left out
	// Quantity is the total of those rows.
	Quantity int
	// Reason says how far from which span it lies.
	Reason string
	t      int
}

// String writes the outlier in the style of a RowError:
//
//	history.csv:2: date "1900-01-01" (quantity 3) left out: 45,296 days before ...
func (o *Outlier) String() string {
	rows := ""
	if o.Rows > 1 {
		rows = fmt.Sprintf(", %d rows from this line", o.Rows)
	}
	return fmt.Sprintf("%s:%d: %s %q (quantity %d%s) left out: %s", o.File, o.Line, o.Field, o.Value, o.Quantity, rows, o.Reason)
}

// run is recs[i:j], a span of records separated from its neighbours by
// far gaps, holding rows rows.
type run struct{ i, j, rows int }

// farGap returns the gap above which two records of rs (sorted by
// distinct time) lie in separate spans: min(max(sc.min, SpacingFactor × u),
// sc.abs), u the lower median of the gaps; gaps is scratch space.
func farGap(rs []rec, sc gapScale, gaps []int) (int, []int) {
	u := 1
	if len(rs) > 1 {
		gaps = gaps[:0]
		for i := 1; i < len(rs); i++ {
			gaps = append(gaps, rs[i].t-rs[i-1].t)
		}
		slices.Sort(gaps)
		u = max(1, gaps[(len(gaps)-1)/2])
	}
	if u >= sc.abs { // and SpacingFactor*u cannot overflow below
		return sc.abs, gaps
	}
	return min(max(sc.min, SpacingFactor*u), sc.abs), gaps
}

// split cuts records sorted by distinct time into runs at the far gaps.
func split(rs []rec, sc gapScale, gaps []int) ([]run, []int) {
	if len(rs) == 0 {
		return nil, gaps
	}
	far, gaps := farGap(rs, sc, gaps)
	var runs []run
	start, rows := 0, 0
	for i := range rs {
		if i > 0 && rs[i].t-rs[i-1].t > far {
			runs = append(runs, run{start, i, rows})
			start, rows = i, 0
		}
		rows += rs[i].rows
	}
	return append(runs, run{start, len(rs), rows}), gaps
}

// bulkOf returns the run holding at least BulkShare of the rows (the
// latest on a tie), or -1 when none does.
func bulkOf(runs []run) int {
	total, b := 0, 0
	for k, r := range runs {
		total += r.rows
		if r.rows >= runs[b].rows {
			b = k
		}
	}
	if float64(runs[b].rows) < BulkShare*float64(total) {
		return -1
	}
	return b
}

// sortRecs sorts a SKU's records by time (then line) and merges those of
// one time.
func sortRecs(rs []rec) []rec {
	if !slices.IsSortedFunc(rs, func(a, b rec) int { return cmp.Compare(a.t, b.t) }) {
		slices.SortStableFunc(rs, func(a, b rec) int {
			if c := cmp.Compare(a.t, b.t); c != 0 {
				return c
			}
			return cmp.Compare(a.line, b.line)
		})
	}
	out := rs[:0]
	for _, r := range rs {
		if n := len(out); n > 0 && out[n-1].t == r.t {
			out[n-1].q += r.q
			out[n-1].rows += r.rows
			out[n-1].line = min(out[n-1].line, r.line)
			continue
		}
		out = append(out, r)
	}
	return out
}

// build turns the records read into the series: it sorts each SKU's
// records, applies the bulk rule to each SKU and then to the file, checks
// the spans against MaxSpan and MaxCells, and only then allocates.
func (h *History) build(order []*acc, cols columns) error {
	sc := cols.gapScale()
	kept := make([][]rec, len(order))
	var gaps []int
	var runs []run
	for k, a := range order {
		s := a.sku
		a.recs = sortRecs(a.recs)
		if len(a.recs) == 0 {
			continue
		}
		runs, gaps = split(a.recs, sc, gaps)
		b := bulkOf(runs)
		if b < 0 {
			s.Err = noBulk(h.File, cols, sc, a.recs, runs)
			continue
		}
		r := runs[b]
		kept[k] = a.recs[r.i:r.j]
		h.leaveOut(s, cols, a.recs[:r.i], a.recs[r.i].t, a.recs[r.j-1].t, "this SKU's rows")
		h.leaveOut(s, cols, a.recs[r.j:], a.recs[r.i].t, a.recs[r.j-1].t, "this SKU's rows")
	}

	// The file's bulk, from the records kept so far.
	if lo, hi, ok := h.fileBulk(kept, sc); ok {
		for k, rs := range kept {
			if len(rs) == 0 || (rs[0].t >= lo && rs[len(rs)-1].t <= hi) {
				continue
			}
			i, j := 0, len(rs)
			for i < j && rs[i].t < lo {
				i++
			}
			for j > i && rs[j-1].t > hi {
				j--
			}
			s := order[k].sku
			h.leaveOut(s, cols, rs[:i], lo, hi, "the file's rows")
			h.leaveOut(s, cols, rs[j:], lo, hi, "the file's rows")
			kept[k] = rs[i:j]
			if i == j {
				s.Err = fmt.Errorf("%w: all %d usable rows were left out, far from %s .. %s, the span holding the bulk of the file's rows (first %v)",
					ErrNoBulk, rowsOf(rs), cols.timeLabel(lo), cols.timeLabel(hi), s.LeftOut[0])
			}
		}
	}

	h.dropPartial(kept)

	// Periods, spans and limits, before any allocation.
	per := func(t int) int {
		if h.Period == Index {
			return t
		}
		return periodOfDay(h.Period, t)
	}
	first := make([]int, len(order))
	have := false
	for k, rs := range kept {
		if len(rs) == 0 {
			continue
		}
		first[k] = per(rs[0].t)
		if span := per(rs[len(rs)-1].t) - first[k] + 1; span > MaxSpan {
			order[k].sku.Err = spanErr(h, cols, order[k].sku.SKU, rs[0], &rs[len(rs)-1], span)
			kept[k] = nil
			continue
		}
		if end := per(rs[len(rs)-1].t); !have || end > h.Last {
			h.Last = end
		}
		have = true
	}
	cells, earliest := 0, -1
	for k, rs := range kept {
		if len(rs) == 0 {
			continue
		}
		span := h.Last - first[k] + 1
		if span > MaxSpan {
			order[k].sku.Err = spanErr(h, cols, order[k].sku.SKU, rs[0], nil, span)
			kept[k] = nil
			continue
		}
		cells += span
		if earliest < 0 || first[k] < first[earliest] {
			earliest = k
		}
	}
	if cells > MaxCells {
		rs := kept[earliest]
		return fmt.Errorf("%s:%d: %w: the series of the file's SKUs would hold %d periods in all, from %s (the %s on this line, sku %q) to %s, more than the limit of %d; check the dates, or use a longer period",
			h.File, rs[0].line, ErrSpan, cells, h.Label(first[earliest]), cols.timeName, order[earliest].sku.SKU, h.Label(h.Last), MaxCells)
	}

	h.SKUs = make([]*SKU, len(order))
	for k, a := range order {
		s := a.sku
		h.SKUs[k] = s
		rs := kept[k]
		a.recs = nil
		if len(rs) == 0 {
			continue
		}
		s.Start = first[k]
		s.Demand = make([]int, h.Last-s.Start+1)
		for _, r := range rs {
			s.Demand[per(r.t)-s.Start] += r.q
			s.Records += r.rows
		}
		if a.net {
			for i, q := range s.Demand {
				s.Demand[i] = max(q, 0) // returns beyond a period's demand
			}
		}
		peak := 0
		for i, q := range s.Demand {
			if q > s.Demand[peak] {
				peak = i
			}
		}
		s.peakFile = h.File
		for _, r := range rs {
			if per(r.t)-s.Start == peak && (s.peakLine == 0 || r.line < s.peakLine) {
				s.peakLine = r.line
			}
		}
	}
	if !have {
		h.Last = 0
	}
	return nil
}

// fileBulk applies the bulk rule to all records kept, pooled: it returns
// the times lo..hi of the span holding the bulk of the file's rows, and
// false when there is one span only or no clear bulk.
func (h *History) fileBulk(kept [][]rec, sc gapScale) (lo, hi int, ok bool) {
	n := 0
	lo, hi = 0, 0
	for _, rs := range kept {
		if len(rs) == 0 {
			continue
		}
		if n == 0 || rs[0].t < lo {
			lo = rs[0].t
		}
		if n == 0 || rs[len(rs)-1].t > hi {
			hi = rs[len(rs)-1].t
		}
		n += len(rs)
	}
	if n == 0 || hi-lo <= sc.min {
		return 0, 0, false // no gap can be far
	}
	var pool []rec
	if hi-lo < 4*n+(1<<16) {
		// Dates are within MinYear..MaxYear (about 110,000 days): count.
		cnt := make([]int, hi-lo+1)
		for _, rs := range kept {
			for _, r := range rs {
				cnt[r.t-lo] += r.rows
			}
		}
		for i, c := range cnt {
			if c > 0 {
				pool = append(pool, rec{t: lo + i, rows: c})
			}
		}
	} else {
		pool = make([]rec, 0, n)
		for _, rs := range kept {
			pool = append(pool, rs...)
		}
		pool = sortRecs(pool)
	}
	runs, _ := split(pool, sc, nil)
	b := bulkOf(runs)
	if len(runs) == 1 || b < 0 {
		return 0, 0, false
	}
	return pool[runs[b].i].t, pool[runs[b].j-1].t, true
}

// leaveOut records rs as outliers of s, far from the span lo..hi of whose.
func (h *History) leaveOut(s *SKU, cols columns, rs []rec, lo, hi int, whose string) {
	sc := cols.gapScale()
	for _, r := range rs {
		where := fmt.Sprintf("%d %s before", lo-r.t, sc.unit)
		if r.t > hi {
			where = fmt.Sprintf("%d %s after", r.t-hi, sc.unit)
		}
		s.LeftOut = append(s.LeftOut, &Outlier{File: h.File, Line: r.line, Field: cols.timeName,
			Value: cols.timeLabel(r.t), Rows: r.rows, Quantity: r.q, t: r.t,
			Reason: fmt.Sprintf("%s %s .. %s, the span holding the bulk of %s", where, cols.timeLabel(lo), cols.timeLabel(hi), whose)})
	}
	slices.SortStableFunc(s.LeftOut, func(a, b *Outlier) int { return cmp.Compare(a.t, b.t) })
}

func rowsOf(rs []rec) int {
	n := 0
	for _, r := range rs {
		n += r.rows
	}
	return n
}

// noBulk is the error of a SKU whose rows fall in spans of which none
// holds BulkShare of them; it lists up to four of them.
func noBulk(file string, cols columns, sc gapScale, rs []rec, runs []run) error {
	var b strings.Builder
	for k, r := range runs {
		if k == 4 {
			fmt.Fprintf(&b, "; and %d more spans", len(runs)-4)
			break
		}
		if k > 0 {
			b.WriteString("; ")
		}
		first := rs[r.i]
		for _, x := range rs[r.i:r.j] {
			first.line = min(first.line, x.line)
		}
		span := cols.timeLabel(first.t)
		if r.j-r.i > 1 {
			span += " .. " + cols.timeLabel(rs[r.j-1].t)
		}
		if r.rows == 1 {
			fmt.Fprintf(&b, "%s: 1 row at %s:%d", span, file, first.line)
		} else {
			fmt.Fprintf(&b, "%s: %d rows, the first at %s:%d", span, r.rows, file, first.line)
		}
	}
	return fmt.Errorf("%w: its %d rows fall in %d spans separated by gaps of more than %s and none holds %.0f%% of them (%s); check the %ss",
		ErrNoBulk, rowsOf(rs), len(runs), farText(rs, sc), 100*BulkShare, b.String(), cols.timeName)
}

// farText says how long a separating gap is, for a message.
func farText(rs []rec, sc gapScale) string {
	far, _ := farGap(rs, sc, nil)
	return fmt.Sprintf("%d %s", far, sc.unit)
}

// spanErr is the error of a SKU whose series would be too long; to nil
// means up to the file's last period.
func spanErr(h *History, cols columns, sku string, from rec, to *rec, span int) error {
	end := "the file's last period " + h.Label(h.Last)
	if to != nil {
		end = fmt.Sprintf("%s %q at %s:%d", cols.timeName, cols.timeLabel(to.t), h.File, to.line)
	}
	return fmt.Errorf("%w: the series of sku %q would span %d %s periods, from %s %q at %s:%d to %s, more than the limit of %d; check the %ss",
		ErrSpan, sku, span, h.Period, cols.timeName, cols.timeLabel(from.t), h.File, from.line, end, MaxSpan, cols.timeName)
}

// periodDays returns the first and last day numbers of period n of p
// (Week or Month).
func periodDays(p Period, n int) (first, last int) {
	if p == Week {
		return n*7 - 3, n*7 + 3
	}
	y, m := floorDiv(n, 12), n-12*floorDiv(n, 12)+1
	first = daysFromCivil(y, m, 1)
	if m == 12 {
		return first, daysFromCivil(y+1, 1, 1) - 1
	}
	return first, daysFromCivil(y, m+1, 1) - 1
}

// MinWholePeriods is the number of whole periods a dated history must keep
// for a partial first or last period to be left out.
const MinWholePeriods = 4

// dropPartial leaves out, for a history of daily rows summed into weeks or
// months, a first or a last period of the file that its rows cover for
// less than half its days (the rows start after the period's middle day,
// or end before it): such a period would read as a dip in demand. A file
// of daily rows is one with rows on at least half the days from its first
// row to its last (sparser files do not show where their data stop). It
// does so only when at least MinWholePeriods periods remain between them,
// and records a note and the rows left out (History.PartialRows).
func (h *History) dropPartial(kept [][]rec) {
	if h.Period != Week && h.Period != Month {
		return
	}
	lo, hi, any := 0, 0, false
	for _, rs := range kept {
		if len(rs) == 0 {
			continue
		}
		if !any || rs[0].t < lo {
			lo = rs[0].t
		}
		if !any || rs[len(rs)-1].t > hi {
			hi = rs[len(rs)-1].t
		}
		any = true
	}
	if !any {
		return
	}
	pf, pl := periodOfDay(h.Period, lo), periodOfDay(h.Period, hi)
	f0, f1 := periodDays(h.Period, pf)
	l0, l1 := periodDays(h.Period, pl)
	dropFirst := lo > f0+(f1-f0)/2
	dropLast := hi < l0+(l1-l0)/2
	whole := pl - pf + 1
	if dropFirst {
		whole--
	}
	if dropLast {
		whole--
	}
	if (!dropFirst && !dropLast) || whole < MinWholePeriods || pf == pl || hi-lo > 1<<17 {
		return
	}
	// Only a file of daily rows shows where its data stop: at least half
	// the days from its first row to its last hold some row.
	seen := make([]bool, hi-lo+1)
	days := 0
	for _, rs := range kept {
		for _, r := range rs {
			if !seen[r.t-lo] {
				seen[r.t-lo] = true
				days++
			}
		}
	}
	if 2*days < len(seen) {
		return
	}
	var rowsFirst, rowsLast int
	for k, rs := range kept {
		i, j := 0, len(rs)
		for dropFirst && i < j && periodOfDay(h.Period, rs[i].t) == pf {
			rowsFirst += rs[i].rows
			i++
		}
		for dropLast && j > i && periodOfDay(h.Period, rs[j-1].t) == pl {
			rowsLast += rs[j-1].rows
			j--
		}
		kept[k] = rs[i:j]
	}
	h.PartialRows = rowsFirst + rowsLast
	if dropFirst {
		h.Notes = append(h.Notes, fmt.Sprintf("%s: the first %s, %s, left out as partial: its rows start on %s (%d rows)", h.File, h.Period, h.Label(pf), Day.Label(lo), rowsFirst))
	}
	if dropLast {
		h.Notes = append(h.Notes, fmt.Sprintf("%s: the last %s, %s, left out as partial: its rows end on %s (%d rows)", h.File, h.Period, h.Label(pl), Day.Label(hi), rowsLast))
	}
}
