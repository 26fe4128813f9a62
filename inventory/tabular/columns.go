package tabular

import (
	"errors"
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// Normalize is the form in which header names are compared: lower case,
// surrounding spaces removed, and every run of spaces, '_' and '-' made
// one '_'. "Order Cost", "order-cost" and " ORDER_COST " all read as
// "order_cost".
func Normalize(name string) string {
	var b strings.Builder
	sep := false
	for _, r := range strings.ToLower(strings.TrimSpace(name)) {
		if r == ' ' || r == '_' || r == '-' || r == '\u00a0' {
			sep = true
			continue
		}
		if sep && b.Len() > 0 {
			b.WriteByte('_')
		}
		sep = false
		b.WriteRune(r)
	}
	return b.String()
}

// ParseColumnMap reads a column map such as
// "sku=Item No,date=Posting Date,quantity=Qty": for each column the reader
// knows, the header name the file uses. flag names the option in messages;
// known lists the names that may be mapped.
func ParseColumnMap(flag, s string, known []string) (map[string]string, error) {
	m := map[string]string{}
	if strings.TrimSpace(s) == "" {
		return m, nil
	}
	isKnown := map[string]bool{}
	for _, k := range known {
		isKnown[k] = true
	}
	for _, part := range strings.Split(s, ",") {
		k, v, ok := strings.Cut(part, "=")
		k, v = Normalize(k), strings.TrimSpace(v)
		if !ok || k == "" || v == "" {
			return nil, fmt.Errorf("%s %q: want NAME=HEADER pairs separated by commas, such as sku=Item No,quantity=Qty", flag, s)
		}
		if !isKnown[k] {
			return nil, fmt.Errorf("%s %q: %q is not a column this file can have: want one of %s", flag, s, k, strings.Join(known, ", "))
		}
		if _, dup := m[k]; dup {
			return nil, fmt.Errorf("%s %q: %s is mapped twice", flag, s, k)
		}
		m[k] = v
	}
	return m, nil
}

// ErrMissingColumn is wrapped by the error of a header that lacks a
// required column.
var ErrMissingColumn = errors.New("missing column")

// Columns says which columns a table may and must have.
type Columns struct {
	Known    []string          // every column the reader uses, in normal form
	Required []string          // those that must be present (or alternatives, see Any)
	Map      map[string]string // from ParseColumnMap: known name -> header name
	MapFlag  string            // the flag that gave Map, for messages
}

// Index finds the known columns in the reader's header and returns their
// positions. It refuses a header that lacks a required column (quoting the
// header found and, when it looks like another delimiter, saying so), one
// that names a column twice, a mapped name the header does not hold, and
// an unknown column close to a known one that is absent (naming both, so a
// misspelling never silently drops a column).
func (c Columns) Index(r *Reader) (map[string]int, error) {
	idx := map[string]int{}
	byNorm := map[string][]int{}
	for i, h := range r.Header {
		byNorm[Normalize(h)] = append(byNorm[Normalize(h)], i)
	}
	used := map[int]string{}
	for _, k := range c.Known {
		want := k
		if v, ok := c.Map[k]; ok {
			want = Normalize(v)
			if len(byNorm[want]) == 0 {
				return nil, errorf(r.Name, r.HeaderLine, "", "%s maps %s to %q, but the header has no such column: it has %s", c.MapFlag, k, c.Map[k], quoteHeader(r.Header))
			}
		}
		pos := byNorm[want]
		switch {
		case len(pos) > 1:
			return nil, errorf(r.Name, r.HeaderLine, "", "column %q appears %d times in the header", r.Header[pos[0]], len(pos))
		case len(pos) == 1:
			if other, taken := used[pos[0]]; taken {
				return nil, errorf(r.Name, r.HeaderLine, "", "column %q is taken for both %s and %s", r.Header[pos[0]], other, k)
			}
			idx[k] = pos[0]
			used[pos[0]] = k
		}
	}
	// An unknown column close to an absent known one is a misspelling.
	for i, h := range r.Header {
		if _, ok := used[i]; ok || h == "" {
			continue
		}
		n := Normalize(h)
		for _, k := range c.Known {
			if _, present := idx[k]; present {
				continue
			}
			if nearName(n, k) {
				flag := c.MapFlag
				if flag == "" {
					flag = "the column map"
				}
				return nil, errorf(r.Name, r.HeaderLine, h, "not a column ergostock reads, but close to %s: rename it %s, or map it with %s %s", k, k, flag, strconv.Quote(k+"="+h))
			}
		}
	}
	for _, k := range c.Required {
		if alts := strings.Split(k, "|"); len(alts) > 1 {
			found := false
			for _, a := range alts {
				if _, ok := idx[a]; ok {
					found = true
				}
			}
			if !found {
				return nil, c.missing(r, strings.Join(alts, " or "), alts[0])
			}
			continue
		}
		if _, ok := idx[k]; !ok {
			return nil, c.missing(r, k, k)
		}
	}
	return idx, nil
}

func (c Columns) missing(r *Reader, k, mapName string) error {
	msg := fmt.Sprintf("missing column %s: the header (line %d) has %s", k, r.HeaderLine, quoteHeader(r.Header))
	if hint := r.HeaderHint(); hint != "" {
		msg += "; " + hint
	} else if c.MapFlag != "" {
		msg += fmt.Sprintf("; name the column that holds it with %s \"%s=HEADER\"", c.MapFlag, mapName)
	}
	return &Error{File: r.Name, Line: r.HeaderLine, Err: missingErr{msg}}
}

// missingErr is the message of a missing column; it wraps ErrMissingColumn.
type missingErr struct{ msg string }

func (e missingErr) Error() string { return e.msg }
func (e missingErr) Unwrap() error { return ErrMissingColumn }

// quoteHeader lists a header's cells for a message.
func quoteHeader(h []string) string {
	if len(h) == 0 {
		return "no columns"
	}
	q := make([]string, len(h))
	for i, s := range h {
		q[i] = fmt.Sprintf("%q", s)
	}
	return strings.Join(q, ", ")
}

// nearName reports whether two normal-form names are near enough to be a
// misspelling of each other: an edit distance of at most one for names of
// up to six letters, two for longer ones, or the same letters once the
// separators are ignored.
func nearName(a, b string) bool {
	if a == b {
		return true
	}
	if strings.ReplaceAll(a, "_", "") == strings.ReplaceAll(b, "_", "") {
		return true
	}
	limit := 1
	if len(b) > 6 {
		limit = 2
	}
	if len(b) < 4 {
		return false
	}
	return editDistance(a, b, limit) <= limit
}

// editDistance is the Levenshtein distance of a and b, or limit+1 once it
// is known to exceed limit.
func editDistance(a, b string, limit int) int {
	if d := len(a) - len(b); d > limit || -d > limit {
		return limit + 1
	}
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		best := cur[0]
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			best = min(best, cur[j])
		}
		if best > limit {
			return limit + 1
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

// Near lists the names of have that a user may have meant by want: the
// same ignoring case and surrounding spaces, or with leading zeros lost
// (as a spreadsheet does to "00123"). Sorted, at most three.
func Near(want string, have []string) []string {
	norm := func(s string) string { return strings.ToLower(strings.TrimSpace(s)) }
	w := norm(want)
	wz := strings.TrimLeft(w, "0")
	var out []string
	for _, h := range have {
		n := norm(h)
		if h == want {
			continue
		}
		if n == w || (wz != "" && strings.TrimLeft(n, "0") == wz) {
			out = append(out, h)
		}
	}
	sort.Strings(out)
	if len(out) > 3 {
		out = out[:3]
	}
	return out
}
