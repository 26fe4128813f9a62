package batch

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"

	"ergostock/inventory"
	"ergostock/policies"
)

// A decisions file records what a planner decided about items, one
// decision a line, oldest first: the what-if page of `ergostock serve`
// appends to it and `ergostock batch --decisions` takes the latest decision
// of each SKU as the item's current policy. It is a log: a later decision
// for a SKU supersedes an earlier one, which stays in the file.
//
// Columns (header required, in this order):
//
//	sku, version, decision, policy, reorder_point, order_up_to,
//	order_multiple, note, decided_at
//
// A run that plans by (sku, location) keeps a location column after sku
// (header sku, location, version, ...): a decision then belongs to one
// (sku, location) and versions count per pair.
//
// version counts the decisions of the SKU (1 for its first); decision is
// accept (the recommended levels), keep (the levels in use) or override
// (levels the planner chose); policy and the level columns give the
// levels the decision settles on, as in the results file; note is free
// text; decided_at is an RFC 3339 time in UTC.

// DecisionKind says what a planner did with a recommendation.
type DecisionKind string

// The decisions.
const (
	Accept   DecisionKind = "accept"   // take the recommended levels
	Keep     DecisionKind = "keep"     // keep the levels in use
	Override DecisionKind = "override" // levels of the planner's choosing
)

// ParseDecisionKind reads a decision name, ignoring letter case.
func ParseDecisionKind(s string) (DecisionKind, bool) {
	for _, k := range []DecisionKind{Accept, Keep, Override} {
		if strings.EqualFold(strings.TrimSpace(s), string(k)) {
			return k, true
		}
	}
	return "", false
}

// Decision is one line of a decisions file.
type Decision struct {
	Line int // in the file; 0 for a decision not read from one
	SKU  string
	// Location is the decision's location in a run by (sku, location);
	// "" otherwise.
	Location string
	Version  int
	Kind     DecisionKind
	Policy   policies.Policy // the levels the decision settles on
	Note     string
	At       time.Time
}

// Key is the decision's planning key, PlanKey(SKU, Location): the key of
// the item it applies to.
func (d Decision) Key() string { return PlanKey(d.SKU, d.Location) }

// DecisionHeader returns the column names of a decisions file.
func DecisionHeader() []string {
	return []string{"sku", "version", "decision", "policy", "reorder_point", "order_up_to",
		"order_multiple", "note", "decided_at"}
}

// DecisionHeaderLocation returns the column names of the decisions file
// of a run by (sku, location): DecisionHeader with location after sku.
func DecisionHeaderLocation() []string {
	h := DecisionHeader()
	return append([]string{h[0], "location"}, h[1:]...)
}

// WriteDecisions writes the header and the decisions ds as CSV, with the
// location column when any decision has a location.
func WriteDecisions(w io.Writer, ds []Decision) error {
	loc := false
	for _, d := range ds {
		loc = loc || d.Location != ""
	}
	return WriteDecisionsLocation(w, ds, loc)
}

// WriteDecisionsLocation writes the header and the decisions ds as CSV,
// with the location column when location is true (the log of a run by
// (sku, location), even before its first decision).
func WriteDecisionsLocation(w io.Writer, ds []Decision, location bool) error {
	cw := csv.NewWriter(w)
	header := DecisionHeader()
	if location {
		header = DecisionHeaderLocation()
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, d := range ds {
		s, S, q := levelCells(&d.Policy)
		rec := []string{Guard(d.SKU), strconv.Itoa(d.Version), string(d.Kind), string(d.Policy.Kind),
			s, S, q, Guard(d.Note), d.At.UTC().Format(time.RFC3339)}
		if location {
			rec = append([]string{rec[0], Guard(d.Location)}, rec[1:]...)
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// ReadDecisions reads a decisions file from r; name is the file name used
// in errors. An empty input has no decisions. Errors are one line naming
// the file, the line and the column (*LineError). The versions of a SKU
// must count up from 1 in file order. A location column after sku (see
// DecisionHeaderLocation) gives each decision its location (an empty cell
// is the location "", as in an items file).
func ReadDecisions(r io.Reader, name string) ([]Decision, error) {
	log, err := ReadDecisionLog(r, name)
	if err != nil {
		return nil, err
	}
	return log.Decisions, nil
}

// DecisionLog is a decisions file as read.
type DecisionLog struct {
	Decisions []Decision
	// Location is true when the file has a location column.
	Location bool
}

// ReadDecisionLog reads a decisions file as ReadDecisions does, and says
// whether it has a location column.
func ReadDecisionLog(r io.Reader, name string) (*DecisionLog, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err == io.EOF {
		return &DecisionLog{}, nil
	}
	if err != nil {
		return nil, csvErr(name, 1, err)
	}
	want := DecisionHeader()
	if len(header) > 0 {
		header[0] = strings.TrimPrefix(header[0], "\ufeff")
	}
	location := len(header) > 1 && strings.ToLower(strings.TrimSpace(header[1])) == "location"
	if location {
		want = DecisionHeaderLocation()
	}
	if len(header) != len(want) {
		return nil, &LineError{File: name, Line: 1, Err: fmt.Errorf("header has %d columns: want %s", len(header), strings.Join(want, ","))}
	}
	for i, h := range header {
		if strings.ToLower(strings.TrimSpace(h)) != want[i] {
			return nil, &LineError{File: name, Line: 1, Err: fmt.Errorf("column %d is %q: want %q (header %s)", i+1, h, want[i], strings.Join(want, ","))}
		}
	}
	var ds []Decision
	last := map[string]int{}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return &DecisionLog{Decisions: ds, Location: location}, nil
		}
		line, _ := cr.FieldPos(0)
		if err != nil {
			return nil, csvErr(name, line, err)
		}
		if len(rec) != len(want) {
			return nil, &LineError{File: name, Line: line, Err: fmt.Errorf("%d fields: want %d", len(rec), len(want))}
		}
		var loc string
		if location {
			loc = Unguard(strings.TrimSpace(rec[1]))
			rec = append(rec[:1:1], rec[2:]...)
		}
		d, err := parseDecision(rec, len(want)-map[bool]int{true: 1}[location])
		if err != nil {
			return nil, &LineError{File: name, Line: line, Err: err}
		}
		d.Location = loc
		if k := d.Key(); d.Version != last[k]+1 {
			what := fmt.Sprintf("sku %q", d.SKU)
			if loc != "" {
				what += fmt.Sprintf(" at location %q", loc)
			}
			return nil, &LineError{File: name, Line: line, Err: &inventory.FieldError{Field: "version", Value: rec[1],
				Want: fmt.Sprintf("%d, the next version of %s", last[k]+1, what)}}
		}
		last[d.Key()] = d.Version
		d.Line = line
		ds = append(ds, d)
	}
}

func parseDecision(rec []string, n int) (Decision, error) {
	var d Decision
	if len(rec) != n {
		return d, fmt.Errorf("%d fields: want %d", len(rec), n)
	}
	d.SKU = Unguard(strings.TrimSpace(rec[0]))
	if d.SKU == "" {
		return d, &inventory.FieldError{Field: "sku", Value: rec[0], Want: "a SKU"}
	}
	v, err := strconv.Atoi(strings.TrimSpace(rec[1]))
	if err != nil || v < 1 {
		return d, &inventory.FieldError{Field: "version", Value: rec[1], Want: "a whole number >= 1"}
	}
	d.Version = v
	k, ok := ParseDecisionKind(rec[2])
	if !ok {
		return d, &inventory.FieldError{Field: "decision", Value: rec[2], Want: "accept, keep or override"}
	}
	d.Kind = k
	kind, ok := parseKind(strings.TrimSpace(rec[3]))
	if !ok {
		return d, &inventory.FieldError{Field: "policy", Value: rec[3], Want: "base-stock, s-S or s-nQ"}
	}
	p := policies.Policy{Kind: kind}
	for i, c := range []struct {
		col  string
		dst  *int
		need bool
	}{
		{"reorder_point", &p.ReorderPoint, kind != policies.BaseStock},
		{"order_up_to", &p.OrderUpTo, kind != policies.SNQ},
		{"order_multiple", &p.OrderMultiple, kind == policies.SNQ},
	} {
		cell := strings.TrimSpace(rec[4+i])
		if cell == "" {
			if c.need {
				return d, &inventory.FieldError{Field: c.col, Value: cell, Want: "a whole number for a " + string(kind) + " policy"}
			}
			continue
		}
		if !c.need {
			return d, &inventory.FieldError{Field: c.col, Value: cell, Want: "an empty cell for a " + string(kind) + " policy"}
		}
		n, big, ok := parseWhole(cell)
		if !ok {
			want := "a whole number"
			if big {
				want = fmt.Sprintf("a whole number below %d (2^53) in magnitude", maxWhole)
			}
			return d, &inventory.FieldError{Field: c.col, Value: cell, Want: want}
		}
		*c.dst = n
	}
	d.Policy = p
	d.Note = Unguard(rec[7])
	if t := strings.TrimSpace(rec[8]); t != "" {
		at, err := time.Parse(time.RFC3339, t)
		if err != nil {
			return d, &inventory.FieldError{Field: "decided_at", Value: t, Want: "an RFC 3339 time such as 2026-12-02T15:04:05Z"}
		}
		d.At = at
	}
	return d, nil
}

// LatestDecisions returns the last decision of every planning key
// (Decision.Key: the SKU, or SKU and location) in ds.
func LatestDecisions(ds []Decision) map[string]Decision {
	m := make(map[string]Decision, len(ds))
	for _, d := range ds {
		m[d.Key()] = d
	}
	return m
}

// ApplyDecisions makes the latest decision of each SKU (of each (sku,
// location) in a run by location) the current policy of its items (file is the decisions file's name, for errors): an
// accepted recommendation, a kept policy and an override alike set
// Item.Current to the decision's levels. Items that already failed are
// left alone. A decision whose levels do not suit the item's mode fails
// that item with a one-line error naming the decisions file and line. It
// returns how many items took a decision and the SKUs of decisions that
// match no item ("SKU @ location" in a run by location), in order of
// first appearance.
func ApplyDecisions(items []Item, ds []Decision, file string) (applied int, unmatched []string) {
	latest := LatestDecisions(ds)
	used := map[string]bool{}
	for i := range items {
		it := &items[i]
		d, ok := latest[it.Key()]
		if !ok {
			continue
		}
		used[it.Key()] = true
		if it.Err != nil {
			continue
		}
		p := d.Policy
		if err := p.Validate(it.System.Mode); err != nil {
			var fe *inventory.FieldError
			if !errors.As(err, &fe) {
				err = fmt.Errorf("policy %v: %w", p, err)
			}
			it.Err = &LineError{File: file, Line: d.Line, Err: err}
			continue
		}
		it.Current = &p
		applied++
	}
	seen := map[string]bool{}
	for _, d := range ds {
		if k := d.Key(); !used[k] && !seen[k] {
			seen[k] = true
			name := d.SKU
			if d.Location != "" {
				name += " @ " + d.Location
			}
			unmatched = append(unmatched, name)
		}
	}
	return applied, unmatched
}

// CheckDecisionsLocation refuses a decisions log (of the file named file)
// that does not match the planning key of the items: a run by (sku,
// location) (byLocation) wants a log with a location column, and in a run
// by SKU no decision may have a location. The error is one line naming
// the file and the line of the first decision concerned.
func CheckDecisionsLocation(log *DecisionLog, byLocation bool, file string) error {
	if byLocation && !log.Location && len(log.Decisions) > 0 {
		d := log.Decisions[0]
		return &LineError{File: file, Line: d.Line, Err: fmt.Errorf("sku %q: no location, but the items file plans by (sku, location): want a decisions file with a location column after sku (serve writes one for such a run)", d.SKU)}
	}
	for _, d := range log.Decisions {
		switch {
		case !byLocation && d.Location != "":
			return &LineError{File: file, Line: d.Line, Err: fmt.Errorf("sku %q: location %q, but the items file has no location column (it plans each SKU on its whole history): give the decisions of this run", d.SKU, d.Location)}
		}
	}
	return nil
}
