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
	return place(e.File, e.Line, e.Column, e.Field) + e.Msg
}

// place writes "file:line:column: field: " for errors and warnings. Text
// without a file name is pasted text.
func place(file string, line, col int, field string) string {
	var b strings.Builder
	if file != "" {
		b.WriteString(file)
	} else {
		b.WriteString("pasted text")
	}
	if line > 0 {
		fmt.Fprintf(&b, ":%d", line)
		if col > 0 {
			fmt.Fprintf(&b, ":%d", col)
		}
	}
	b.WriteString(": ")
	if field != "" {
		b.WriteString(field)
		b.WriteString(": ")
	}
	return b.String()
}

// Warning is suspicious but legal input: the data loads, and the user
// should look at the place named.
type Warning struct {
	File   string
	Line   int
	Column int
	Field  string
	Msg    string
}

func (w Warning) String() string { return place(w.File, w.Line, w.Column, w.Field) + w.Msg }

// OptionError is a bad option value (a command-line flag or a setting of
// the page), named as Option.
type OptionError struct {
	Option string // "end", "now", "speed", ...
	Value  string
	Msg    string
}

func (e *OptionError) Error() string {
	return fmt.Sprintf("%s %q: %s", e.Option, e.Value, e.Msg)
}

func (e *ParseError) Unwrap() error { return e.Err }
