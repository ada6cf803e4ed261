// Package format reads and writes every input and output format of
// Visitline: the plain benchmark matrix format, sites and matrix CSV, and the
// plan outputs. Readers take an io.Reader and return errors that name the
// file, line, column and field, in the spirit of encoding/csv's ParseError.
// It never touches the file system: callers open files.
package format

import (
	"errors"
	"io"
	"strconv"
	"strings"

	"visitline/solver/fmtlite"
	"visitline/solver/jsonlite"
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
	return place(clip(e.File), e.Line, e.Column, clipMsg(e.Field)) + clipMsg(e.Msg)
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
		fmtlite.Fprintf(&b, ":%d", line)
		if col > 0 {
			fmtlite.Fprintf(&b, ":%d", col)
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

func (w Warning) String() string {
	return place(clip(w.File), w.Line, w.Column, clipMsg(w.Field)) + clipMsg(w.Msg)
}

// OptionError is a bad option value (a command-line flag or a setting of
// the page), named as Option.
type OptionError struct {
	Option string // "end", "now", "speed", ...
	Value  string
	Msg    string
}

func (e *OptionError) Error() string {
	return fmtlite.Sprintf("%s %s: %s", e.Option, clipQ(e.Value), clipMsg(e.Msg))
}

func (e *ParseError) Unwrap() error { return e.Err }

// maxErrors bounds the errors a reader lists: past it, one more entry says
// how many were left out.
const maxErrors = 50

// ErrorList is every data error a reader found, in file order. Load and
// the readers return it when the data has more than one problem to fix;
// errors.As finds its first *ParseError, so callers that show one error
// keep working.
type ErrorList []*ParseError

func (l ErrorList) Error() string {
	var b strings.Builder
	for i, e := range l {
		if i > 0 {
			b.WriteString("\n")
		}
		b.WriteString(e.Error())
	}
	return b.String()
}

// Unwrap gives each error, for errors.As and for callers that list them.
func (l ErrorList) Unwrap() []error {
	out := make([]error, len(l))
	for i, e := range l {
		out[i] = e
	}
	return out
}

// JSONError is a JSON decoding error in plain words, without the names of
// the program's types: where it went wrong and what was wanted. It reads
// the errors of package jsonlite (the web worker's messages) and, in the
// command line's build, those of encoding/json (see errors_std.go).
func JSONError(err error) string {
	var se *jsonlite.SyntaxError
	var te *jsonlite.TypeError
	switch {
	case errors.As(err, &te):
		return typeMessage(te.Field, te.Want, te.Value)
	case errors.As(err, &se):
		return syntaxMessage(se.Msg, se.Offset)
	}
	if msg, ok := stdJSONError(err); ok {
		return msg
	}
	switch {
	case errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, io.EOF):
		return "the JSON ends early; it was cut short"
	}
	msg := strings.TrimPrefix(err.Error(), "json: ")
	if strings.Contains(msg, "Go ") || strings.Contains(msg, "unmarshal") {
		return "not a JSON object of the expected form"
	}
	return clip(msg)
}

// typeMessage says that the field at path (JSON names, dotted) wants a
// value of another kind: want in words, value as encoding/json names it.
func typeMessage(path, want, value string) string {
	field := jsonPath(path)
	if field == "" {
		field = "the message"
	} else {
		field = strconv.Quote(field)
	}
	return field + ": want " + want + ", not " + jsonValue(value)
}

// syntaxMessage says where text stops being JSON.
func syntaxMessage(msg string, offset int64) string {
	if strings.Contains(msg, "unexpected end") {
		return "the JSON ends early, after " + strconv.FormatInt(offset, 10) + " bytes; it was cut short"
	}
	return "not JSON: " + strings.TrimPrefix(msg, "json: ") + " at byte " + strconv.FormatInt(offset, 10)
}

// jsonPath drops from a field path the names of embedded Go structs
// (encoding/json writes "RunOptions.budget" for a field of an embedded
// struct); the JSON names of the messages are all lower case.
func jsonPath(p string) string {
	parts := strings.Split(p, ".")
	keep := parts[:0]
	for _, s := range parts {
		if s != "" && s[0] >= 'A' && s[0] <= 'Z' {
			continue
		}
		keep = append(keep, s)
	}
	return strings.Join(keep, ".")
}

func jsonValue(v string) string {
	switch {
	case v == "string":
		return "text"
	case v == "object":
		return "an object"
	case v == "array":
		return "a list"
	case v == "bool":
		return "true or false"
	case strings.HasPrefix(v, "number"):
		return "the number " + strings.TrimSpace(strings.TrimPrefix(v, "number"))
	}
	return clip(v)
}
