package jsonlite

import (
	"strconv"
	"strings"
	"unicode"
	"unicode/utf16"
	"unicode/utf8"
)

// SyntaxError is text that is not JSON, with encoding/json's message
// ("invalid character 'x' looking for beginning of value", "unexpected
// end of JSON input") and the offset it gives (bytes read when the error
// was found).
type SyntaxError struct {
	Msg    string
	Offset int64
}

func (e *SyntaxError) Error() string { return e.Msg }

// TypeError is a value of the wrong kind for its field: Value says what
// the JSON held as encoding/json's UnmarshalTypeError does ("string",
// "number 1.5", "object", "array", "bool"), Want what was expected in
// words ("text", "a whole number", ...), Field the dotted path of JSON
// names to it ("" for the whole message).
type TypeError struct {
	Value string
	Want  string
	Field string
}

func (e *TypeError) Error() string {
	f := e.Field
	if f == "" {
		f = "the message"
	}
	return "json: " + f + ": want " + e.Want + ", not " + e.Value
}

// What a field wants, in words (as the page's messages say it).
const (
	WantText   = "text"
	WantBool   = "true or false"
	WantInt    = "a whole number"
	WantNumber = "a number"
	WantList   = "a list"
	WantObject = "an object"
)

// maxDepth is encoding/json's nesting limit.
const maxDepth = 10000

// Decoder reads one JSON value from data. The caller walks the value it
// expects with Object, Array, String, Int, Float and Bool, each of which
// takes the next value in turn; a value of another kind is skipped and
// noted as the first TypeError, and decoding goes on, as encoding/json's
// Unmarshal does. Err gives the result: a syntax error anywhere wins over
// a type error, as Unmarshal checks the whole text first.
type Decoder struct {
	data  []byte
	pos   int
	depth int
	path  []string
	syn   *SyntaxError
	typ   *TypeError
}

// NewDecoder starts reading data.
func NewDecoder(data []byte) *Decoder { return &Decoder{data: data} }

// Err is the decoding's outcome, once the value has been walked: after
// the value only white space may follow.
func (d *Decoder) Err() error {
	if d.syn == nil {
		d.skipSpace()
		if d.pos < len(d.data) {
			d.fail(d.data[d.pos], "after top-level value", d.pos+1)
		}
	}
	if d.syn != nil {
		return d.syn
	}
	if d.typ != nil {
		return d.typ
	}
	return nil
}

// failed says whether a syntax error has ended the decoding.
func (d *Decoder) failed() bool { return d.syn != nil }

func quoteChar(c byte) string {
	if c == '\'' {
		return `'\''`
	}
	if c == '"' {
		return `'"'`
	}
	s := strconv.Quote(string(rune(c)))
	return "'" + s[1:len(s)-1] + "'"
}

// fail notes a syntax error at byte c, offset off (bytes read, the bad
// one included).
func (d *Decoder) fail(c byte, context string, off int) {
	if d.syn == nil {
		d.syn = &SyntaxError{"invalid character " + quoteChar(c) + " " + context, int64(off)}
	}
}

// eof notes that the text ended inside a value.
func (d *Decoder) eof() {
	if d.syn == nil {
		d.syn = &SyntaxError{"unexpected end of JSON input", int64(len(d.data))}
	}
}

// atEnd notes the end of text in a number or a literal: encoding/json then
// reads one space more, which is an error where a space cannot stand.
func (d *Decoder) atEnd(context string) {
	if d.syn == nil {
		d.syn = &SyntaxError{"invalid character ' ' " + context, int64(len(d.data))}
	}
}

func (d *Decoder) mistype(value, want string) {
	if d.typ == nil {
		d.typ = &TypeError{Value: value, Want: want, Field: strings.Join(d.path, ".")}
	}
}

func (d *Decoder) skipSpace() {
	for d.pos < len(d.data) {
		switch d.data[d.pos] {
		case ' ', '\t', '\n', '\r':
			d.pos++
		default:
			return
		}
	}
}

// peek gives the first byte of the next value (0 at the end of the text,
// or after an error), having checked that it can begin one.
func (d *Decoder) peek() byte {
	if d.failed() {
		return 0
	}
	d.skipSpace()
	if d.pos >= len(d.data) {
		d.eof()
		return 0
	}
	c := d.data[d.pos]
	switch {
	case c == '{', c == '[', c == '"', c == '-', c >= '0' && c <= '9', c == 't', c == 'f', c == 'n':
		return c
	}
	d.fail(c, "looking for beginning of value", d.pos+1)
	return 0
}

// opening looks at what starts a value that must be an object or a list:
// open when its opening byte (first) is next; null (read) gives isNull;
// another kind is a TypeError, and its value is skipped.
func (d *Decoder) opening(first byte, want string) (open, isNull bool) {
	switch c := d.peek(); c {
	case 0:
		return false, false
	case 'n':
		d.literal()
		return false, true
	case first:
		return true, false
	default:
		d.mistype(d.kindAt(c), want)
		d.Skip()
		return false, false
	}
}

// Object reads an object, calling field for each key with the canonical
// name it matches (see Fields), or skipping the value when the key names
// no field. field must read the value. null leaves the target as it is;
// another kind is a TypeError. It says whether an object was read.
func (d *Decoder) Object(names []string, field func(name string)) bool {
	if open, _ := d.opening('{', WantObject); !open {
		return false
	}
	return d.object(func(key []byte) {
		name, ok := matchName(names, key)
		if !ok {
			d.Skip()
			return
		}
		d.path = append(d.path, name)
		field(name)
		d.path = d.path[:len(d.path)-1]
	})
}

// Map reads an object of any keys, calling value for each (the key
// unquoted): a map's keys are not part of a TypeError's field, as with
// encoding/json. null gives isNull.
func (d *Decoder) Map(value func(key string)) (read, isNull bool) {
	if open, isNull := d.opening('{', WantObject); !open {
		return false, isNull
	}
	return d.object(func(key []byte) { value(unquote(key)) }), false
}

// object reads an object whose '{' is next; each key's value is read by
// value (the key as written, quotes included).
func (d *Decoder) object(value func(key []byte)) bool {
	d.depth++
	if d.depth > maxDepth {
		d.fail('{', "exceeded max depth", d.pos+1)
		return false
	}
	defer func() { d.depth-- }()
	d.pos++
	d.skipSpace()
	if d.pos >= len(d.data) {
		d.eof()
		return false
	}
	if d.data[d.pos] == '}' {
		d.pos++
		return true
	}
	for {
		if d.pos >= len(d.data) {
			d.eof()
			return false
		}
		if d.data[d.pos] != '"' {
			d.fail(d.data[d.pos], "looking for beginning of object key string", d.pos+1)
			return false
		}
		start := d.pos
		if !d.scanString() {
			return false
		}
		key := d.data[start:d.pos]
		d.skipSpace()
		if d.pos >= len(d.data) {
			d.eof()
			return false
		}
		if d.data[d.pos] != ':' {
			d.fail(d.data[d.pos], "after object key", d.pos+1)
			return false
		}
		d.pos++
		value(key)
		if more, ok := d.afterValue('}', "after object key:value pair"); !more {
			return ok
		}
		d.skipSpace()
	}
}

// afterValue reads what follows an object's member or an array's element
// (what, in encoding/json's words for an error there): a comma (more) or
// the closing byte (ok, the end); anything else, or a failure while the
// value was read, is an error (neither).
func (d *Decoder) afterValue(closing byte, what string) (more, ok bool) {
	if d.failed() {
		return false, false
	}
	d.skipSpace()
	if d.pos >= len(d.data) {
		d.eof()
		return false, false
	}
	switch c := d.data[d.pos]; c {
	case ',':
		d.pos++
		return true, false
	case closing:
		d.pos++
		return false, true
	default:
		d.fail(c, what, d.pos+1)
		return false, false
	}
}

// Array reads an array, calling elem for each element (which must read
// it). null gives isNull; another kind is a TypeError (want: what the
// field wants, in words).
func (d *Decoder) Array(elem func()) (read, isNull bool) {
	if open, isNull := d.opening('[', WantList); !open {
		return false, isNull
	}
	return d.array(elem), false
}

func (d *Decoder) array(elem func()) bool {
	d.depth++
	if d.depth > maxDepth {
		d.fail('[', "exceeded max depth", d.pos+1)
		return false
	}
	defer func() { d.depth-- }()
	d.pos++
	d.skipSpace()
	if d.pos < len(d.data) && d.data[d.pos] == ']' {
		d.pos++
		return true
	}
	for {
		elem()
		if more, ok := d.afterValue(']', "after array element"); !more {
			return ok
		}
	}
}

// kindAt names the kind of the value beginning with c as encoding/json's
// UnmarshalTypeError does.
func (d *Decoder) kindAt(c byte) string {
	switch c {
	case '{':
		return "object"
	case '[':
		return "array"
	case '"':
		return "string"
	case 't', 'f':
		return "bool"
	case 'n':
		return "null"
	}
	return "number"
}

// Skip reads the next value, whatever it is, checking its syntax.
func (d *Decoder) Skip() {
	switch d.peek() {
	case 0:
	case '{':
		d.object(func([]byte) { d.Skip() })
	case '[':
		d.array(d.Skip)
	case '"':
		d.scanString()
	case 't', 'f', 'n':
		d.literal()
	default:
		d.number()
	}
}

// scanString checks the string whose '"' is next and moves past it.
func (d *Decoder) scanString() bool {
	i := d.pos + 1
	for i < len(d.data) {
		c := d.data[i]
		switch {
		case c == '"':
			d.pos = i + 1
			return true
		case c == '\\':
			i++
			if i >= len(d.data) {
				d.atEnd("in string escape code")
				return false
			}
			switch d.data[i] {
			case '"', '\\', '/', 'b', 'f', 'n', 'r', 't':
				i++
			case 'u':
				i++
				for k := 0; k < 4; k++ {
					if i >= len(d.data) {
						d.atEnd("in \\u hexadecimal character escape")
						return false
					}
					h := d.data[i]
					if !(h >= '0' && h <= '9' || h >= 'a' && h <= 'f' || h >= 'A' && h <= 'F') {
						d.fail(h, "in \\u hexadecimal character escape", i+1)
						return false
					}
					i++
				}
			default:
				d.fail(d.data[i], "in string escape code", i+1)
				return false
			}
		case c < 0x20:
			d.fail(c, "in string literal", i+1)
			return false
		default:
			i++
		}
	}
	d.eof()
	return false
}

// literal reads true, false or null (the first byte checked by peek).
func (d *Decoder) literal() string {
	var word string
	switch d.data[d.pos] {
	case 't':
		word = "true"
	case 'f':
		word = "false"
	default:
		word = "null"
	}
	for k := 1; k < len(word); k++ {
		i := d.pos + k
		ctx := "in literal " + word + " (expecting " + quoteChar(word[k]) + ")"
		if i >= len(d.data) {
			d.atEnd(ctx)
			return ""
		}
		if d.data[i] != word[k] {
			d.fail(d.data[i], ctx, i+1)
			return ""
		}
	}
	d.pos += len(word)
	return word
}

// number reads a number (its first byte checked by peek) and gives its
// text, "" on a syntax error.
func (d *Decoder) number() string {
	start, i := d.pos, d.pos
	n := len(d.data)
	digit := func(i int) bool { return i < n && d.data[i] >= '0' && d.data[i] <= '9' }
	if d.data[i] == '-' {
		i++
		if i >= n {
			d.atEnd("in numeric literal")
			return ""
		}
		if !digit(i) {
			d.fail(d.data[i], "in numeric literal", i+1)
			return ""
		}
	}
	if d.data[i] == '0' {
		i++
	} else {
		for digit(i) {
			i++
		}
	}
	if i < n && d.data[i] == '.' {
		i++
		if i >= n {
			d.atEnd("after decimal point in numeric literal")
			return ""
		}
		if !digit(i) {
			d.fail(d.data[i], "after decimal point in numeric literal", i+1)
			return ""
		}
		for digit(i) {
			i++
		}
	}
	if i < n && (d.data[i] == 'e' || d.data[i] == 'E') {
		i++
		if i < n && (d.data[i] == '+' || d.data[i] == '-') {
			i++
		}
		if i >= n {
			d.atEnd("in exponent of numeric literal")
			return ""
		}
		if !digit(i) {
			d.fail(d.data[i], "in exponent of numeric literal", i+1)
			return ""
		}
		for digit(i) {
			i++
		}
	}
	d.pos = i
	return string(d.data[start:i])
}

// String reads a string into *s; null leaves it as it is.
func (d *Decoder) String(s *string) {
	c := d.peek()
	switch c {
	case 0:
	case '"':
		start := d.pos
		if d.scanString() {
			*s = unquote(d.data[start:d.pos])
		}
	case 'n':
		d.literal()
	default:
		d.mistypeScalar(c, WantText)
	}
}

// mistypeScalar notes a value of the wrong kind for a string, a number or
// a boolean field, and skips it: a number is quoted for a number field
// only, as encoding/json does.
func (d *Decoder) mistypeScalar(c byte, want string) {
	start := d.pos
	d.Skip()
	if d.failed() {
		return
	}
	v := d.kindAt(c)
	if v == "number" && (want == WantInt || want == WantNumber) {
		v += " " + string(d.data[start:d.pos])
	}
	d.mistype(v, want)
}

// Bool reads true or false into *b; null leaves it as it is.
func (d *Decoder) Bool(b *bool) {
	c := d.peek()
	switch c {
	case 0:
	case 't', 'f':
		if w := d.literal(); w != "" {
			*b = w == "true"
		}
	case 'n':
		d.literal()
	default:
		d.mistypeScalar(c, WantBool)
	}
}

// Int reads a whole number into *v; null leaves it as it is. A number
// with a fraction or an exponent, or beyond int64, is a TypeError.
func (d *Decoder) Int(v *int64) {
	c := d.peek()
	switch c {
	case 0:
	case 'n':
		d.literal()
	case '-', '0', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		s := d.number()
		if s == "" {
			return
		}
		n, err := strconv.ParseInt(s, 10, 64)
		if err != nil {
			d.mistype("number "+s, WantInt)
			return
		}
		*v = n
	default:
		d.mistypeScalar(c, WantInt)
	}
}

// IntInt reads a whole number into an int.
func (d *Decoder) IntInt(v *int) {
	n := int64(*v)
	d.Int(&n)
	*v = int(n)
}

// Float reads a number into *v; null leaves it as it is.
func (d *Decoder) Float(v *float64) {
	c := d.peek()
	switch c {
	case 0:
	case 'n':
		d.literal()
	case '-', '0', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		s := d.number()
		if s == "" {
			return
		}
		f, err := strconv.ParseFloat(s, 64)
		if err != nil {
			d.mistype("number "+s, WantNumber)
			return
		}
		*v = f
	default:
		d.mistypeScalar(c, WantNumber)
	}
}

// List reads an array into *s, one element at a time through elem, reusing
// *s as encoding/json does (an element given as null keeps the value
// there); null sets it to nil.
func List[T any](d *Decoder, s *[]T, elem func(*T)) {
	old := *s
	out := old[:0]
	read, isNull := d.Array(func() {
		var v T
		if i := len(out); i < len(old) {
			v = old[i]
		}
		elem(&v)
		out = append(out, v)
	})
	switch {
	case isNull:
		*s = nil
	case read:
		if out == nil {
			out = []T{}
		}
		*s = out
	}
}

// Strings reads a list of strings into *s (null: nil).
func (d *Decoder) Strings(s *[]string) { List(d, s, d.String) }

// Ints reads a list of whole numbers into *s (null: nil).
func (d *Decoder) Ints(s *[]int) { List(d, s, d.IntInt) }

// FloatMap reads an object of numbers into *m, adding to the map there
// (null: nil), as encoding/json does.
func (d *Decoder) FloatMap(m *map[string]float64) {
	mm := *m
	read, isNull := d.Map(func(key string) {
		var v float64
		d.Float(&v)
		if mm == nil {
			mm = map[string]float64{}
		}
		mm[key] = v
	})
	switch {
	case isNull:
		*m = nil
	case read:
		if mm == nil {
			mm = map[string]float64{}
		}
		*m = mm
	}
}

// matchName finds the field a key names: exactly, else ignoring case as
// encoding/json does (Unicode simple folding).
func matchName(names []string, key []byte) (string, bool) {
	k := unquote(key)
	for _, n := range names {
		if n == k {
			return n, true
		}
	}
	f := fold(k)
	for _, n := range names {
		if fold(n) == f {
			return n, true
		}
	}
	return "", false
}

// fold maps s to encoding/json's folded form of a name: each letter upper
// case after lower case.
func fold(s string) string {
	var b strings.Builder
	for _, r := range s {
		if r < utf8.RuneSelf {
			if 'a' <= r && r <= 'z' {
				r -= 'a' - 'A'
			}
			b.WriteRune(r)
			continue
		}
		b.WriteRune(unicode.ToUpper(unicode.ToLower(r)))
	}
	return b.String()
}

// unquote decodes a string as written (quotes included, syntax checked):
// escapes resolved, invalid UTF-8 and lone surrogates as U+FFFD.
func unquote(q []byte) string {
	s := q[1 : len(q)-1]
	simple := true
	for _, c := range s {
		if c == '\\' || c >= utf8.RuneSelf {
			simple = false
			break
		}
	}
	if simple {
		return string(s)
	}
	b := make([]byte, 0, len(s)+8)
	for r := 0; r < len(s); {
		c := s[r]
		switch {
		case c == '\\':
			r++
			switch s[r] {
			case 'b':
				b = append(b, '\b')
			case 'f':
				b = append(b, '\f')
			case 'n':
				b = append(b, '\n')
			case 'r':
				b = append(b, '\r')
			case 't':
				b = append(b, '\t')
			case 'u':
				rr := getu4(s[r-1:])
				r += 5
				if utf16.IsSurrogate(rr) {
					if rr1 := getu4(s[r:]); rr1 >= 0 {
						if dec := utf16.DecodeRune(rr, rr1); dec != unicode.ReplacementChar {
							r += 6
							b = utf8.AppendRune(b, dec)
							continue
						}
					}
					rr = unicode.ReplacementChar
				}
				b = utf8.AppendRune(b, rr)
				continue
			default: // '"', '\\', '/'
				b = append(b, s[r])
			}
			r++
		case c < utf8.RuneSelf:
			b = append(b, c)
			r++
		default:
			rr, size := utf8.DecodeRune(s[r:])
			r += size
			b = utf8.AppendRune(b, rr)
		}
	}
	return string(b)
}

// getu4 decodes \uXXXX at the start of s, or gives -1.
func getu4(s []byte) rune {
	if len(s) < 6 || s[0] != '\\' || s[1] != 'u' {
		return -1
	}
	var r rune
	for _, c := range s[2:6] {
		switch {
		case '0' <= c && c <= '9':
			c = c - '0'
		case 'a' <= c && c <= 'f':
			c = c - 'a' + 10
		case 'A' <= c && c <= 'F':
			c = c - 'A' + 10
		default:
			return -1
		}
		r = r*16 + rune(c)
	}
	return r
}
