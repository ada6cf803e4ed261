package format

import (
	"errors"
	"io"
	"strings"
	"unicode"
	"unicode/utf8"
)

// RFC 4180 CSV, read and written as encoding/csv does with the settings
// the readers and writers here use (encoding/csv imports fmt, which the
// web worker's build leaves out): the reader skips blank lines and
// comment lines, accepts any number of fields per record, may trim
// leading space, normalises \r\n to \n, and reports a bare or unclosed
// quote at encoding/csv's line and column; the writer quotes a field as
// encoding/csv does. csv_test.go compares both with encoding/csv.

var (
	errBareQuote = errors.New(`bare " in non-quoted-field`)
	errQuote     = errors.New(`extraneous or missing " in quoted-field`)
)

// csvError is a quoting error at a place, as encoding/csv's ParseError.
type csvError struct {
	StartLine int // line where the record starts
	Line      int // line where the error occurred
	Column    int // 1-based byte index in the line
	Err       error
}

func (e *csvError) Error() string { return e.Err.Error() }
func (e *csvError) Unwrap() error { return e.Err }

// csvReader reads the records of a text.
type csvReader struct {
	text    string
	pos     int // bytes of text read
	numLine int
	comma   rune
	comment rune
	trim    bool // trim leading white space of each field
	buf     []byte
	ends    []int
	rec     []string
	recLine int
}

// readLine gives the next line without its newline (\r\n counts as one),
// whether it had one, and false at the end of the text.
func (r *csvReader) readLine() (line string, nl, ok bool) {
	if r.pos >= len(r.text) {
		r.numLine++
		return "", false, false
	}
	rest := r.text[r.pos:]
	i := strings.IndexByte(rest, '\n')
	r.numLine++
	if i < 0 {
		r.pos = len(r.text)
		// As encoding/csv: a trailing \r before the end is dropped.
		return strings.TrimSuffix(rest, "\r"), false, true
	}
	r.pos += i + 1
	line = rest[:i]
	return strings.TrimSuffix(line, "\r"), true, true
}

// Line is the line the last record read starts on.
func (r *csvReader) Line() int { return r.recLine }

// Read gives the next record (its slice is reused by the next Read), or
// io.EOF at the end.
func (r *csvReader) Read() ([]string, error) {
	var line string
	var nl, ok bool
	for {
		line, nl, ok = r.readLine()
		if !ok {
			return nil, io.EOF
		}
		if r.comment != 0 {
			if c, _ := utf8.DecodeRuneInString(line); c == r.comment {
				continue
			}
		}
		if line == "" {
			continue // a blank line (or a last lone \r)
		}
		break
	}
	nlLen := func(has bool) int {
		if has {
			return 1
		}
		return 0
	}
	commaLen := utf8.RuneLen(r.comma)
	recLine := r.numLine
	r.recLine = recLine
	r.buf, r.ends = r.buf[:0], r.ends[:0]
	posLine, col := r.numLine, 1
	var err error
parseField:
	for {
		if r.trim {
			i := strings.IndexFunc(line, func(c rune) bool { return !unicode.IsSpace(c) })
			if i < 0 {
				// Only white space (the newline too): nothing left.
				i = len(line)
				nl = false
			}
			line = line[i:]
			col += i
		}
		if line == "" || line[0] != '"' {
			i := strings.IndexRune(line, r.comma)
			field := line
			if i >= 0 {
				field = field[:i]
			}
			if j := strings.IndexByte(field, '"'); j >= 0 {
				err = &csvError{StartLine: recLine, Line: r.numLine, Column: col + j, Err: errBareQuote}
				break parseField
			}
			r.buf = append(r.buf, field...)
			r.ends = append(r.ends, len(r.buf))
			if i >= 0 {
				line = line[i+commaLen:]
				col += i + commaLen
				continue parseField
			}
			break parseField
		}
		// A quoted field.
		line = line[1:]
		col++
		for {
			i := strings.IndexByte(line, '"')
			switch {
			case i >= 0:
				r.buf = append(r.buf, line[:i]...)
				line = line[i+1:]
				col += i + 1
				c, _ := utf8.DecodeRuneInString(line)
				switch {
				case line != "" && c == '"':
					r.buf = append(r.buf, '"')
					line = line[1:]
					col++
				case line != "" && c == r.comma:
					line = line[commaLen:]
					col += commaLen
					r.ends = append(r.ends, len(r.buf))
					continue parseField
				case line == "":
					r.ends = append(r.ends, len(r.buf))
					break parseField
				default:
					err = &csvError{StartLine: recLine, Line: r.numLine, Column: col - 1, Err: errQuote}
					break parseField
				}
			case line != "" || nl:
				// The field goes on past the end of the line.
				r.buf = append(r.buf, line...)
				if nl {
					r.buf = append(r.buf, '\n')
				}
				col += len(line) + nlLen(nl)
				var more bool
				line, nl, more = r.readLine()
				if more && (line != "" || nl) {
					posLine++
					col = 1
				}
			default:
				// The text ends inside the quotes.
				err = &csvError{StartLine: recLine, Line: posLine, Column: col, Err: errQuote}
				break parseField
			}
		}
	}
	str := string(r.buf)
	r.rec = r.rec[:0]
	prev := 0
	for _, end := range r.ends {
		r.rec = append(r.rec, str[prev:end])
		prev = end
	}
	return r.rec, err
}

// csvWriter writes records with commas, quoting a field as encoding/csv's
// Writer does (one that is empty is not; one with a comma, a quote, \r or
// \n, or that starts with white space, or is \. is).
type csvWriter struct {
	w   io.Writer
	buf []byte
	err error
}

func newCSVWriter(w io.Writer) *csvWriter { return &csvWriter{w: w} }

// Write writes one record (buffered until Flush, or a large buffer).
func (w *csvWriter) Write(record []string) error {
	if w.err != nil {
		return w.err
	}
	for n, field := range record {
		if n > 0 {
			w.buf = append(w.buf, ',')
		}
		if !csvNeedsQuotes(field) {
			w.buf = append(w.buf, field...)
			continue
		}
		w.buf = append(w.buf, '"')
		for i := 0; i < len(field); i++ {
			if field[i] == '"' {
				w.buf = append(w.buf, '"', '"')
			} else {
				w.buf = append(w.buf, field[i])
			}
		}
		w.buf = append(w.buf, '"')
	}
	w.buf = append(w.buf, '\n')
	if len(w.buf) >= 64<<10 {
		w.Flush()
	}
	return w.err
}

// Flush writes what is buffered.
func (w *csvWriter) Flush() {
	if w.err == nil && len(w.buf) > 0 {
		_, w.err = w.w.Write(w.buf)
	}
	w.buf = w.buf[:0]
}

// Error is the first error writing.
func (w *csvWriter) Error() error { return w.err }

func csvNeedsQuotes(field string) bool {
	if field == "" {
		return false
	}
	if field == `\.` {
		return true
	}
	for i := 0; i < len(field); i++ {
		switch field[i] {
		case '\n', '\r', '"', ',':
			return true
		}
	}
	r1, _ := utf8.DecodeRuneInString(field)
	return unicode.IsSpace(r1)
}
