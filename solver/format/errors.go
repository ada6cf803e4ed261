// Package format reads and writes every input and output format of
// Visitline: the plain benchmark matrix format, sites and matrix CSV, and the
// plan outputs. Readers take an io.Reader and return errors that name the
// file, line, column and field, in the spirit of encoding/csv's ParseError.
// It never touches the file system: callers open files.
package format

import (
	"fmt"
	"strings"
)

// ParseError is an input problem at a place in a file.
type ParseError struct {
	File   string // file name as the user gave it ("" for pasted text)
	Line   int    // 1-based line, 0 when not tied to a line
	Column int    // 1-based column (field number in a CSV record), 0 when unknown
	Field  string // what the value is: "travel time", "earliest", "id" ...
	Msg    string // what is wrong and what would be right
	Err    error  // underlying error, if any
}

func (e *ParseError) Error() string {
	var b strings.Builder
	if e.File != "" {
		b.WriteString(e.File)
	} else {
		b.WriteString("input")
	}
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ":%d", e.Column)
		}
	}
	b.WriteString(": ")
	if e.Field != "" {
		b.WriteString(e.Field)
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

func (e *ParseError) Unwrap() error { return e.Err }
