package tabular

import (
	"fmt"
	"strconv"
	"strings"
)

// Error is a problem at a place in a table, in the manner of
// encoding/csv's ParseError: "FILE:LINE: column C: MESSAGE". Line 0 means
// the file as a whole; an empty Column means the line as a whole.
type Error struct {
	File   string
	Line   int
	Column string
	Err    error
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Column != "" {
		fmt.Fprintf(&b, ": column %s", Shown(e.Column))
	}
	b.WriteString(": ")
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *Error) Unwrap() error { return e.Err }

// Shown writes a name from a file for a message: as it is, or quoted when
// it holds a line break, a control character or surrounding spaces, so
// that every message stays one line and says exactly what the file holds.
func Shown(s string) string {
	for _, r := range s {
		if r < ' ' || r == 0x7f {
			return strconv.Quote(s)
		}
	}
	if strings.TrimSpace(s) != s {
		return strconv.Quote(s)
	}
	return s
}

// errorf makes an *Error.
func errorf(file string, line int, column, format string, a ...any) *Error {
	return &Error{File: file, Line: line, Column: column, Err: fmt.Errorf(format, a...)}
}
