package tabular

import (
	"fmt"
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
		fmt.Fprintf(&b, ": column %s", e.Column)
	}
	b.WriteString(": ")
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *Error) Unwrap() error { return e.Err }

// errorf makes an *Error.
func errorf(file string, line int, column, format string, a ...any) *Error {
	return &Error{File: file, Line: line, Column: column, Err: fmt.Errorf(format, a...)}
}
