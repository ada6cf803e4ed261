// Package jsonlite writes and reads JSON without reflection, for the web
// worker's build, where encoding/json (with reflect, fmt and os behind it)
// would be most of a megabyte of engine.wasm. The writer writes the bytes
// encoding/json writes for the same values: the same string escapes (HTML
// characters optionally), the same number format, two-space indentation as
// Encoder.SetIndent("", "  ") gives, and the same error for NaN and
// infinities. The reader (read.go) reports the errors encoding/json
// reports, with the same words and byte offsets. Tests compare both with
// encoding/json.
package jsonlite

import (
	"io"
	"math"
	"strconv"
	"unicode/utf8"
)

// UnsupportedValueError is a value JSON cannot carry (NaN, an infinity),
// with encoding/json's message.
type UnsupportedValueError struct{ Str string }

func (e *UnsupportedValueError) Error() string { return "json: unsupported value: " + e.Str }

// Writer builds one JSON value. Containers are opened and closed with
// Begin/End calls; commas, colons and indentation are its own. The first
// error (a NaN or an infinity) is kept and returned by Bytes and Encode,
// which then write nothing, as encoding/json does.
type Writer struct {
	b        []byte
	indent   bool
	html     bool
	open     []bool // per open container: whether it has an element yet
	afterKey bool
	err      error
}

// NewWriter makes a writer: indent gives encoding/json's SetIndent("", "  ")
// layout, html escapes <, > and & as encoding/json does by default.
func NewWriter(indent, html bool) *Writer {
	return &Writer{indent: indent, html: html}
}

// Reset empties the writer for another value, keeping its buffer.
func (w *Writer) Reset() {
	w.b, w.open, w.afterKey, w.err = w.b[:0], w.open[:0], false, nil
}

// Grow makes room for n more bytes.
func (w *Writer) Grow(n int) {
	if cap(w.b)-len(w.b) < n {
		nb := make([]byte, len(w.b), len(w.b)+n)
		copy(nb, w.b)
		w.b = nb
	}
}

// Bytes gives the value written so far, or the first error.
func (w *Writer) Bytes() ([]byte, error) {
	if w.err != nil {
		return nil, w.err
	}
	return w.b, nil
}

// Encode writes the value and a newline to out, as Encoder.Encode does.
func (w *Writer) Encode(out io.Writer) error {
	if w.err != nil {
		return w.err
	}
	w.b = append(w.b, '\n')
	_, err := out.Write(w.b)
	w.b = w.b[:len(w.b)-1]
	return err
}

func (w *Writer) newline(depth int) {
	w.b = append(w.b, '\n')
	for i := 0; i < depth; i++ {
		w.b = append(w.b, ' ', ' ')
	}
}

// elem places the next value: after a key nothing, in a container a comma
// (after its first element) and the indentation.
func (w *Writer) elem() {
	if w.afterKey {
		w.afterKey = false
		return
	}
	n := len(w.open)
	if n == 0 {
		return
	}
	if w.open[n-1] {
		w.b = append(w.b, ',')
	}
	w.open[n-1] = true
	if w.indent {
		w.newline(n)
	}
}

// BeginObject opens an object.
func (w *Writer) BeginObject() {
	w.elem()
	w.b = append(w.b, '{')
	w.open = append(w.open, false)
}

// EndObject closes the object opened last.
func (w *Writer) EndObject() { w.end('}') }

// BeginArray opens an array.
func (w *Writer) BeginArray() {
	w.elem()
	w.b = append(w.b, '[')
	w.open = append(w.open, false)
}

// EndArray closes the array opened last.
func (w *Writer) EndArray() { w.end(']') }

func (w *Writer) end(c byte) {
	n := len(w.open)
	had := w.open[n-1]
	w.open = w.open[:n-1]
	if had && w.indent {
		w.newline(n - 1)
	}
	w.b = append(w.b, c)
}

// Key writes an object's key; the next value written is its value.
func (w *Writer) Key(k string) {
	w.elem()
	w.b = AppendString(w.b, k, w.html)
	w.b = append(w.b, ':')
	if w.indent {
		w.b = append(w.b, ' ')
	}
	w.afterKey = true
}

// String writes a string.
func (w *Writer) String(s string) {
	w.elem()
	w.b = AppendString(w.b, s, w.html)
}

// StringBytes writes s as a string.
func (w *Writer) StringBytes(s []byte) {
	w.elem()
	w.b = AppendString(w.b, s, w.html)
}

// Int writes a whole number.
func (w *Writer) Int(v int64) {
	w.elem()
	w.b = strconv.AppendInt(w.b, v, 10)
}

// Float writes a number as encoding/json writes a float64; NaN and the
// infinities are an error.
func (w *Writer) Float(f float64) {
	w.elem()
	var err error
	w.b, err = AppendFloat(w.b, f)
	if err != nil && w.err == nil {
		w.err = err
	}
}

// Bool writes true or false.
func (w *Writer) Bool(v bool) {
	w.elem()
	if v {
		w.b = append(w.b, "true"...)
	} else {
		w.b = append(w.b, "false"...)
	}
}

// Null writes null.
func (w *Writer) Null() {
	w.elem()
	w.b = append(w.b, "null"...)
}

// Raw writes a value already written as JSON, as it is (it must be valid
// JSON, in the writer's layout).
func (w *Writer) Raw(v []byte) {
	w.elem()
	w.b = append(w.b, v...)
}

// Fields of the kinds the reports have: a key and its value.

// StringField writes "k": s.
func (w *Writer) StringField(k, s string) { w.Key(k); w.String(s) }

// IntField writes "k": v.
func (w *Writer) IntField(k string, v int64) { w.Key(k); w.Int(v) }

// FloatField writes "k": f.
func (w *Writer) FloatField(k string, f float64) { w.Key(k); w.Float(f) }

// BoolField writes "k": v.
func (w *Writer) BoolField(k string, v bool) { w.Key(k); w.Bool(v) }

// FloatPtrField writes "k": *f, or null when f is nil.
func (w *Writer) FloatPtrField(k string, f *float64) {
	w.Key(k)
	if f == nil {
		w.Null()
		return
	}
	w.Float(*f)
}

// StringsField writes "k": [...], or null for a nil slice, as
// encoding/json writes a []string.
func (w *Writer) StringsField(k string, s []string) {
	w.Key(k)
	w.Strings(s)
}

// Strings writes a list of strings (null for a nil slice).
func (w *Writer) Strings(s []string) {
	if s == nil {
		w.Null()
		return
	}
	w.BeginArray()
	for _, v := range s {
		w.String(v)
	}
	w.EndArray()
}

// IntsField writes "k": [...], or null for a nil slice.
func (w *Writer) IntsField(k string, s []int) {
	w.Key(k)
	if s == nil {
		w.Null()
		return
	}
	w.BeginArray()
	for _, v := range s {
		w.Int(int64(v))
	}
	w.EndArray()
}

// FloatMap writes a map of numbers with its keys in order, as
// encoding/json writes a map[string]float64 (null for a nil map).
func (w *Writer) FloatMap(m map[string]float64) {
	if m == nil {
		w.Null()
		return
	}
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sortStrings(keys)
	w.BeginObject()
	for _, k := range keys {
		w.FloatField(k, m[k])
	}
	w.EndObject()
}

// sortStrings sorts a few keys (insertion sort: the maps written are
// small, and package sort is not needed for them).
func sortStrings(s []string) {
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
}

// AppendFloat appends f as encoding/json writes a float64: like strconv's
// shortest 'f' form, 'e' form below 1e-6 and from 1e21 on with the
// exponent unpadded (1e-7, not 1e-07). NaN and the infinities are an
// UnsupportedValueError, and append nothing.
func AppendFloat(b []byte, f float64) ([]byte, error) {
	if math.IsInf(f, 0) || math.IsNaN(f) {
		return b, &UnsupportedValueError{strconv.FormatFloat(f, 'g', -1, 64)}
	}
	abs := math.Abs(f)
	fm := byte('f')
	if abs != 0 && (abs < 1e-6 || abs >= 1e21) {
		fm = 'e'
	}
	b = strconv.AppendFloat(b, f, fm, -1, 64)
	if fm == 'e' {
		n := len(b)
		if n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
			b[n-2] = b[n-1]
			b = b[:n-1]
		}
	}
	return b, nil
}

const hex = "0123456789abcdef"

// AppendString appends s as a JSON string with encoding/json's escapes:
// quotes, backslashes and control characters (\b, \f, \n, \r, \t by
// name), invalid UTF-8 as \ufffd, U+2028 and U+2029 always, and with html
// <, > and &.
func AppendString[T []byte | string](dst []byte, src T, html bool) []byte {
	dst = append(dst, '"')
	start := 0
	for i := 0; i < len(src); {
		if c := src[i]; c < utf8.RuneSelf {
			if c >= 0x20 && c != '"' && c != '\\' && (!html || c != '<' && c != '>' && c != '&') {
				i++
				continue
			}
			dst = append(dst, src[start:i]...)
			switch c {
			case '\\', '"':
				dst = append(dst, '\\', c)
			case '\b':
				dst = append(dst, '\\', 'b')
			case '\f':
				dst = append(dst, '\\', 'f')
			case '\n':
				dst = append(dst, '\\', 'n')
			case '\r':
				dst = append(dst, '\\', 'r')
			case '\t':
				dst = append(dst, '\\', 't')
			default:
				dst = append(dst, '\\', 'u', '0', '0', hex[c>>4], hex[c&0xF])
			}
			i++
			start = i
			continue
		}
		n := min(len(src)-i, utf8.UTFMax)
		r, size := utf8.DecodeRuneInString(string(src[i : i+n]))
		if r == utf8.RuneError && size == 1 {
			dst = append(dst, src[start:i]...)
			dst = append(dst, `\ufffd`...)
			i += size
			start = i
			continue
		}
		if r == '\u2028' || r == '\u2029' {
			dst = append(dst, src[start:i]...)
			dst = append(dst, '\\', 'u', '2', '0', '2', hex[r&0xF])
			i += size
			start = i
			continue
		}
		i += size
	}
	dst = append(dst, src[start:]...)
	return append(dst, '"')
}

// Compact appends src (valid JSON) without the spaces and newlines
// between its tokens, as json.Compact does.
func Compact(dst, src []byte) []byte {
	in := false
	start := 0
	for i := 0; i < len(src); i++ {
		c := src[i]
		if in {
			switch c {
			case '\\':
				i++
			case '"':
				in = false
			}
			continue
		}
		switch c {
		case '"':
			in = true
		case ' ', '\t', '\n', '\r':
			dst = append(dst, src[start:i]...)
			start = i + 1
		}
	}
	return append(dst, src[start:]...)
}
