package chain

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// ReadError reports input that cannot be used, in the manner of
// encoding/csv's ParseError: the file, the 1-based line and column (field)
// where it was found (0 when it does not apply), and what was wrong.
type ReadError struct {
	File   string
	Line   int
	Column int
	Err    error
}

func (e *ReadError) Error() string {
	switch {
	case e.Line == 0:
		return fmt.Sprintf("%s: %v", e.File, e.Err)
	case e.Column == 0:
		return fmt.Sprintf("%s: line %d: %v", e.File, e.Line, e.Err)
	}
	return fmt.Sprintf("%s: line %d, column %d: %v", e.File, e.Line, e.Column, e.Err)
}

func (e *ReadError) Unwrap() error { return e.Err }

// ErrEmpty is wrapped by the error for an input without any data.
var ErrEmpty = errors.New("empty input: want a dense matrix (one row a line) or a from,to,probability list")

// MaxLineBytes is the longest input line accepted.
const MaxLineBytes = 1 << 26

// lineReader yields the non-blank lines of an input split into fields.
type lineReader struct {
	br     *bufio.Reader
	line   int
	fields [][]byte
	quoted []byte // scratch for unquoted fields
	long   []byte // scratch for lines longer than the buffer
	file   string
	eof    bool
}

func newLineReader(r io.Reader, file string) *lineReader {
	return &lineReader{br: bufio.NewReaderSize(r, 64*1024), file: file}
}

func (lr *lineReader) errf(line, col int, format string, a ...any) error {
	return &ReadError{File: lr.file, Line: line, Column: col, Err: fmt.Errorf(format, a...)}
}

// readLine returns the next line without its end (LF or CRLF), as
// bufio.Scanner's ScanLines does; ok is false at the end of input.
func (lr *lineReader) readLine() (b []byte, ok bool, err error) {
	if lr.eof {
		return nil, false, nil
	}
	b, err = lr.br.ReadSlice('\n')
	if errors.Is(err, bufio.ErrBufferFull) {
		lr.long = append(lr.long[:0], b...)
		for errors.Is(err, bufio.ErrBufferFull) {
			if len(lr.long) > MaxLineBytes {
				return nil, false, lr.errf(lr.line+1, 0, "line longer than %d bytes", MaxLineBytes)
			}
			b, err = lr.br.ReadSlice('\n')
			lr.long = append(lr.long, b...)
		}
		b = lr.long
	}
	if len(b) > MaxLineBytes {
		return nil, false, lr.errf(lr.line+1, 0, "line longer than %d bytes", MaxLineBytes)
	}
	switch {
	case err == io.EOF:
		lr.eof = true
		if len(b) == 0 {
			return nil, false, nil
		}
	case err != nil:
		return nil, false, &ReadError{File: lr.file, Line: lr.line + 1, Err: err}
	}
	b = bytes.TrimSuffix(b, []byte("\n"))
	b = bytes.TrimSuffix(b, []byte("\r"))
	return b, true, nil
}

// next advances to the next non-blank line; it returns false at the end of
// input or on error (then err is set).
func (lr *lineReader) next() (ok bool, err error) {
	for {
		b, ok, err := lr.readLine()
		if !ok || err != nil {
			return false, err
		}
		lr.line++
		if lr.line == 1 {
			b = bytes.TrimPrefix(b, []byte("\xef\xbb\xbf"))
		}
		if len(bytes.TrimSpace(b)) == 0 {
			continue
		}
		if err := lr.split(b); err != nil {
			return false, err
		}
		return true, nil
	}
}

// split cuts a line at commas into trimmed fields. A field may be quoted
// with double quotes ("" inside stands for one quote), as in RFC 4180.
func (lr *lineReader) split(b []byte) error {
	lr.fields = lr.fields[:0]
	lr.quoted = lr.quoted[:0]
	pos := 0
	for {
		// Skip leading blanks.
		for pos < len(b) && (b[pos] == ' ' || b[pos] == '\t') {
			pos++
		}
		col := len(lr.fields) + 1
		if pos < len(b) && b[pos] == '"' {
			start := len(lr.quoted)
			pos++
			for {
				if pos >= len(b) {
					return lr.errf(lr.line, col, "quoted field has no closing quote")
				}
				c := b[pos]
				pos++
				if c == '"' {
					if pos < len(b) && b[pos] == '"' {
						lr.quoted = append(lr.quoted, '"')
						pos++
						continue
					}
					break
				}
				lr.quoted = append(lr.quoted, c)
			}
			for pos < len(b) && (b[pos] == ' ' || b[pos] == '\t' || b[pos] == '\r') {
				pos++
			}
			if pos < len(b) && b[pos] != ',' {
				return lr.errf(lr.line, col, "text after the closing quote: want a comma")
			}
			lr.fields = append(lr.fields, lr.quoted[start:len(lr.quoted):len(lr.quoted)])
		} else {
			end := bytes.IndexByte(b[pos:], ',')
			if end < 0 {
				end = len(b)
			} else {
				end += pos
			}
			if q := bytes.IndexByte(b[pos:end], '"'); q >= 0 {
				return lr.errf(lr.line, col, "bare \" in an unquoted field")
			}
			lr.fields = append(lr.fields, bytes.TrimRight(b[pos:end], " \t\r"))
			pos = end
		}
		if pos >= len(b) {
			return nil
		}
		pos++ // the comma
	}
}

// parseProb parses a probability cell.
func (lr *lineReader) parseProb(f []byte, col int) (float64, error) {
	if len(f) == 0 {
		return 0, lr.errf(lr.line, col, "empty cell: want a probability (a number in [0,1])")
	}
	p, err := strconv.ParseFloat(string(f), 64)
	if err != nil {
		return 0, lr.errf(lr.line, col, "%q: want a probability (a number in [0,1])", f)
	}
	if math.IsNaN(p) || math.IsInf(p, 0) {
		return 0, lr.errf(lr.line, col, "%q: want a finite probability in [0,1]", f)
	}
	if p < 0 || p > 1 {
		return 0, lr.errf(lr.line, col, "%s: want a probability in [0,1]", f)
	}
	return p, nil
}

func isNumber(f []byte) bool {
	_, err := strconv.ParseFloat(string(f), 64)
	return err == nil
}

// firstLine starts reading name and reads its first non-blank line; an
// input without one is ErrEmpty.
func firstLine(r io.Reader, name string) (*lineReader, error) {
	lr := newLineReader(r, name)
	ok, err := lr.next()
	if err != nil {
		return nil, err
	}
	if !ok {
		return nil, &ReadError{File: name, Err: ErrEmpty}
	}
	return lr, nil
}

// Read reads a transition matrix in either format: a from,to,probability
// list, recognised by that header (case-insensitive), or otherwise a dense
// CSV matrix (see ReadDense and ReadList). name is used in error messages.
func Read(r io.Reader, name string) (Labeled, error) {
	lr, err := firstLine(r, name)
	if err != nil {
		return Labeled{}, err
	}
	if isListHeader(lr.fields) {
		return readList(lr)
	}
	if err := notAListHeader(lr); err != nil {
		return Labeled{}, err
	}
	return readDense(lr)
}

// notAListHeader refuses a first line that is meant as the header of a
// from,to,probability list but is misspelt ("from,to,prob",
// "From State,To State,p", "source,target,probability"), or that is
// already a transition line ("a,b,0.5": two labels and a probability)
// because the header is missing. Read would otherwise take it as the state
// labels of a dense matrix and fail, or worse succeed, on the next lines.
func notAListHeader(lr *lineReader) error {
	f := lr.fields
	if len(f) != 3 || isNumber(f[0]) || isNumber(f[1]) {
		return nil
	}
	if fromish(f[0]) && toish(f[1]) {
		return lr.errf(lr.line, 0, "header %q looks like the header of a transition list: want exactly from,to,probability (any case), or state labels of a dense matrix", joinFields(f))
	}
	if p, err := strconv.ParseFloat(string(f[2]), 64); err == nil && p >= 0 && p <= 1 {
		return lr.errf(lr.line, 0, "first line %q looks like a transition (two state labels and a probability): a from,to,probability list needs that header on its first line", joinFields(f))
	}
	return nil
}

// letters returns the lower-case letters of b.
func letters(b []byte) string {
	out := make([]byte, 0, len(b))
	for _, c := range bytes.ToLower(b) {
		if c >= 'a' && c <= 'z' {
			out = append(out, c)
		}
	}
	return string(out)
}

func fromish(b []byte) bool {
	s := letters(b)
	switch s {
	case "i", "src", "source", "origin", "start", "state", "current", "fr", "frm", "form":
		return true
	}
	return strings.HasPrefix(s, "from")
}

func toish(b []byte) bool {
	s := letters(b)
	switch s {
	case "j", "dst", "dest", "destination", "target", "next", "end", "nextstate", "tostate", "too":
		return true
	}
	return strings.HasPrefix(s, "to")
}

// ReadDense reads a dense matrix: one row a line, comma-separated, with an
// optional first line of state labels (taken as a header when any of its
// cells is not a number; without one the labels are "0".."n-1"). Every
// row must have n cells, there must be n rows, entries must be finite and
// in [0,1], and each row must sum to 1 within RowSumTol.
func ReadDense(r io.Reader, name string) (Labeled, error) {
	lr, err := firstLine(r, name)
	if err != nil {
		return Labeled{}, err
	}
	return readDense(lr)
}

// ReadList reads a from,to,probability list: a header line with those
// three names (any case), then one transition a line. States are numbered
// in order of first appearance. Every state must have a row (a line with it
// as from), a pair may appear once, entries must be finite and in [0,1],
// and each row must sum to 1 within RowSumTol.
func ReadList(r io.Reader, name string) (Labeled, error) {
	lr, err := firstLine(r, name)
	if err != nil {
		return Labeled{}, err
	}
	if !isListHeader(lr.fields) {
		return Labeled{}, lr.errf(lr.line, 0, "header %q: want from,to,probability", joinFields(lr.fields))
	}
	return readList(lr)
}

func joinFields(f [][]byte) string {
	s := make([]string, len(f))
	for i, b := range f {
		s[i] = string(b)
	}
	return strings.Join(s, ",")
}

func isListHeader(f [][]byte) bool {
	return len(f) == 3 && strings.EqualFold(string(f[0]), "from") &&
		strings.EqualFold(string(f[1]), "to") && strings.EqualFold(string(f[2]), "probability")
}

func readDense(lr *lineReader) (Labeled, error) {
	var labels []string
	header := false
	for _, f := range lr.fields {
		if !isNumber(f) {
			header = true
			break
		}
	}
	n := len(lr.fields)
	if n > MaxDenseStates {
		return Labeled{}, lr.errf(lr.line, 0, "%d cells: a dense matrix of %d states would take %s, limit %d states: give a from,to,probability list instead", n, n, bytesText(8*float64(n)*float64(n)), MaxDenseStates)
	}
	if header {
		seen := make(map[string]int, n)
		for c, f := range lr.fields {
			s := string(f)
			if s == "" {
				return Labeled{}, lr.errf(lr.line, c+1, "empty state label in the header")
			}
			if prev, dup := seen[s]; dup {
				return Labeled{}, lr.errf(lr.line, c+1, "state label %q repeats column %d", s, prev+1)
			}
			seen[s] = c
			labels = append(labels, s)
		}
	} else {
		labels = make([]string, n)
		for i := range labels {
			labels[i] = strconv.Itoa(i)
		}
	}
	headerLine := lr.line
	var data []float64
	rows, lastLine := 0, lr.line
	for {
		if rows > 0 || header {
			ok, err := lr.next()
			if err != nil {
				return Labeled{}, err
			}
			if !ok {
				break
			}
		}
		lastLine = lr.line
		if len(lr.fields) != n {
			return Labeled{}, lr.errf(lr.line, 0, "%d cells: want %d, one per state (ragged row)%s", len(lr.fields), n, listHint(n))
		}
		if rows == n {
			return Labeled{}, lr.errf(lr.line, 0, "row %d: the matrix has %d columns, so want %d rows (square)%s", rows+1, n, n, listHint(n))
		}
		var s float64
		for c, f := range lr.fields {
			p, err := lr.parseProb(f, c+1)
			if err != nil {
				if n == 3 && c == 0 && !isNumber(lr.fields[0]) && !isNumber(lr.fields[1]) && isNumber(lr.fields[2]) {
					return Labeled{}, lr.errf(lr.line, 0, "%q looks like a transition (two state labels and a probability), but the header %q is not from,to,probability: want that header for a transition list, or a row of probabilities for a dense matrix", joinFields(lr.fields), strings.Join(labels, ","))
				}
				return Labeled{}, err
			}
			s += p
			data = append(data, p)
		}
		if math.Abs(s-1) > RowSumTol {
			return Labeled{}, lr.errf(lr.line, 0, "row of state %q sums to %.17g: want 1 (within %g)%s", labels[rows], s, RowSumTol, listHint(n))
		}
		rows++
	}
	if rows == 0 {
		return Labeled{}, lr.errf(headerLine, 0, "a header and no rows: want %d rows", n)
	}
	if rows != n {
		return Labeled{}, lr.errf(lastLine, 0, "%d rows for %d columns: want a square matrix%s", rows, n, listHint(n))
	}
	return Labeled{Matrix: &Dense{n: n, data: data}, Labels: labels}, nil
}

// listHint is added to the shape errors of a dense matrix of 3 columns,
// which may be a transition list without its header.
func listHint(n int) string {
	if n == 3 {
		return " (a transition list needs the header from,to,probability)"
	}
	return ""
}

// Size limits of the readers, checked before the storage grows past them.
const (
	// MaxDenseStates is the most states of a dense file: its storage is
	// n*n float64, 1 GiB at this size.
	MaxDenseStates = 11585
	// MaxListTransitions is the most lines of a from,to,probability list
	// (about 40 bytes each while reading: 2 GB at this size).
	MaxListTransitions = 50_000_000
)

func readList(lr *lineReader) (Labeled, error) {
	headerLine := lr.line
	idx := newLabels()
	var firstSeen, firstFrom []int32
	var ri, ci []int32
	var vi []float64
	var li []int32
	line := 0
	state := func(f []byte, col int) (int32, error) {
		if idx.len() == math.MaxInt32-1 {
			return 0, lr.errf(line, col, "state %q: too many states (limit %d)", f, math.MaxInt32-1)
		}
		k, added := idx.index(f, len(ri)+1)
		if added {
			firstSeen = append(firstSeen, int32(line))
			firstFrom = append(firstFrom, 0)
		}
		return k, nil
	}
	lastFrom := int32(-1)
	var prevFrom []byte
	err := parseListLines(lr, func(c *listChunk) error {
		for t, p := range c.p {
			line = int(c.line[t])
			if len(ri) == MaxListTransitions {
				return lr.errf(line, 0, "more than %d transitions: the list is too large to read (limit %d lines, about %s)", MaxListTransitions, MaxListTransitions, bytesText(40*MaxListTransitions))
			}
			from := c.lab[c.off[2*t]:c.off[2*t+1]]
			to := c.lab[c.off[2*t+1]:c.off[2*t+2]]
			// Lines of one row usually come together: reuse the last from.
			var i int32
			if lastFrom >= 0 && bytes.Equal(from, prevFrom) {
				i = lastFrom
			} else {
				var err error
				if i, err = state(from, 1); err != nil {
					return err
				}
				lastFrom = i
				prevFrom = append(prevFrom[:0], from...)
			}
			j, err := state(to, 2)
			if err != nil {
				return err
			}
			if firstFrom[i] == 0 {
				firstFrom[i] = int32(line)
			}
			ri = append(ri, i)
			ci = append(ci, j)
			vi = append(vi, p)
			li = append(li, int32(line))
		}
		return nil
	})
	if err != nil {
		return Labeled{}, err
	}
	if len(ri) == 0 {
		return Labeled{}, lr.errf(headerLine, 0, "a header and no transitions: want from,to,probability lines")
	}
	labels := idx.strings()
	n := len(labels)
	idx = nil
	for k := range labels {
		if firstFrom[k] == 0 {
			return Labeled{}, lr.errf(int(firstSeen[k]), 2, "state %q has no row: no line has it as from (unknown label)", labels[k])
		}
	}
	rowPtr, col, val, err := assemble(n, ri, ci, vi, func(a, b int) error {
		return lr.errf(int(li[b]), 0, "duplicate transition %q -> %q: first given on line %d", labels[ri[a]], labels[ci[a]], li[a])
	})
	if err != nil {
		return Labeled{}, err
	}
	for i := 0; i < n; i++ {
		s := sum(val[rowPtr[i]:rowPtr[i+1]])
		if math.Abs(s-1) > RowSumTol {
			return Labeled{}, lr.errf(int(firstFrom[i]), 0, "row of state %q (first line with it as from) sums to %.17g: want 1 (within %g)", labels[i], s, RowSumTol)
		}
	}
	return Labeled{Matrix: &CSR{n: n, rowPtr: rowPtr, col: col, val: val}, Labels: labels}, nil
}
