// Package fmtlite formats messages without reflection, for the packages
// the web worker links (package fmt brings reflect and os into engine.wasm,
// about 0.35 MB). It does what fmt does for the verbs, flags and argument
// types those packages use, byte for byte (tests compare it with fmt on
// each, and check that every call in those packages uses only them):
//
//	%s %v %q %d %x %X %g %f %w %%, width (a number or *), precision for
//	%f and %g, the flags - and 0 (and + for numbers);
//	string, []byte, error and String() methods, int, int64, int32 (rune),
//	uint8, uint64, float64, bool, []string (with %v), nil.
//
// Anything else is written as %!verb(unsupported), as fmt writes a verb
// it does not know.
package fmtlite

import (
	"errors"
	"io"
	"strconv"
	"unicode/utf8"
)

type stringer interface{ String() string }

// wrapError is an error with a wrapped one (%w), as fmt.Errorf makes.
type wrapError struct {
	msg string
	err error
}

func (e *wrapError) Error() string { return e.msg }
func (e *wrapError) Unwrap() error { return e.err }

// Errorf formats an error; a %w operand is wrapped, for errors.Is and As.
func Errorf(format string, a ...any) error {
	s, w := sprintf(format, a, true)
	if w == nil {
		return errors.New(s)
	}
	return &wrapError{s, w}
}

// Sprintf formats as fmt.Sprintf does.
func Sprintf(format string, a ...any) string {
	s, _ := sprintf(format, a, false)
	return s
}

// Fprintf writes the formatted text to w.
func Fprintf(w io.Writer, format string, a ...any) (int, error) {
	return io.WriteString(w, Sprintf(format, a...))
}

// Sprint writes the operands with %v, a space between two that are not
// strings, as fmt.Sprint does.
func Sprint(a ...any) string {
	var b []byte
	for i, v := range a {
		_, isStr := v.(string)
		if i > 0 && !isStr {
			if _, prevStr := a[i-1].(string); !prevStr {
				b = append(b, ' ')
			}
		}
		b = appendArg(b, 'v', noSpec, v)
	}
	return string(b)
}

// Fprint writes Sprint's text to w.
func Fprint(w io.Writer, a ...any) (int, error) {
	return io.WriteString(w, Sprint(a...))
}

// Fprintln writes the operands with %v, spaces between, and a newline.
func Fprintln(w io.Writer, a ...any) (int, error) {
	var b []byte
	for i, v := range a {
		if i > 0 {
			b = append(b, ' ')
		}
		b = appendArg(b, 'v', noSpec, v)
	}
	b = append(b, '\n')
	return w.Write(b)
}

// noSpec is a verb with no flags, width or precision.
var noSpec = spec{width: -1, prec: -1}

// spec is one verb's flags, width and precision.
type spec struct {
	minus, zero, plus bool
	width, prec       int // -1: none
}

func sprintf(format string, a []any, errorf bool) (string, error) {
	b := make([]byte, 0, len(format)+16*len(a))
	var wrapped error
	ai := 0
	for i := 0; i < len(format); {
		c := format[i]
		if c != '%' {
			j := i
			for j < len(format) && format[j] != '%' {
				j++
			}
			b = append(b, format[i:j]...)
			i = j
			continue
		}
		i++
		sp := spec{width: -1, prec: -1}
	flags:
		for ; i < len(format); i++ {
			switch format[i] {
			case '-':
				sp.minus = true
			case '0':
				sp.zero = true
			case '+':
				sp.plus = true
			default:
				break flags
			}
		}
		if i < len(format) && format[i] == '*' {
			i++
			if ai < len(a) {
				if n, ok := a[ai].(int); ok {
					sp.width = n
					if n < 0 {
						sp.minus, sp.width = true, -n
					}
				} else {
					b = append(b, "%!(BADWIDTH)"...)
				}
				ai++
			} else {
				b = append(b, "%!(BADWIDTH)"...)
			}
		} else {
			i, sp.width = number(format, i)
		}
		if i < len(format) && format[i] == '.' {
			i++
			i, sp.prec = number(format, i)
			if sp.prec < 0 {
				sp.prec = 0
			}
		}
		if i >= len(format) {
			b = append(b, "%!(NOVERB)"...)
			break
		}
		verb, size := rune(format[i]), 1
		if verb >= utf8.RuneSelf {
			verb, size = utf8.DecodeRuneInString(format[i:])
		}
		i += size
		if verb == '%' {
			b = append(b, '%')
			continue
		}
		if ai >= len(a) {
			b = append(b, '%', '!')
			b = utf8.AppendRune(b, verb)
			b = append(b, "(MISSING)"...)
			continue
		}
		arg := a[ai]
		ai++
		if verb == 'w' {
			err, ok := arg.(error)
			if !errorf || !ok || err == nil {
				b = append(b, "%!w("...)
				b = appendArg(b, 'v', spec{width: -1, prec: -1}, arg)
				b = append(b, ')')
				continue
			}
			if wrapped == nil {
				wrapped = err
			}
			verb = 'v'
		}
		b = appendArg(b, verb, sp, arg)
	}
	if ai < len(a) {
		b = append(b, "%!(EXTRA)"...)
	}
	return string(b), wrapped
}

func number(s string, i int) (int, int) {
	if i >= len(s) || s[i] < '0' || s[i] > '9' {
		return i, -1
	}
	n := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		n = n*10 + int(s[i]-'0')
		i++
	}
	return i, n
}

func bad(b []byte, verb rune) []byte {
	b = append(b, '%', '!')
	b = utf8.AppendRune(b, verb)
	return append(b, "(unsupported)"...)
}

// appendArg writes one operand.
func appendArg(b []byte, verb rune, sp spec, arg any) []byte {
	if arg == nil {
		if verb == 'v' {
			return pad(b, "<nil>", sp)
		}
		b = append(b, '%', '!')
		b = utf8.AppendRune(b, verb)
		return append(b, "(<nil>)"...)
	}
	switch verb {
	case 'v', 's', 'q', 'x', 'X':
		switch v := arg.(type) {
		case error:
			return appendString(b, verb, sp, v.Error())
		case stringer:
			return appendString(b, verb, sp, v.String())
		}
	}
	switch v := arg.(type) {
	case string:
		return appendString(b, verb, sp, v)
	case []byte:
		return appendString(b, verb, sp, string(v))
	case int:
		return appendInt(b, verb, sp, int64(v), false)
	case int64:
		return appendInt(b, verb, sp, v, false)
	case int32:
		return appendInt(b, verb, sp, int64(v), true)
	case uint8:
		return appendUint(b, verb, sp, uint64(v))
	case uint64:
		return appendUint(b, verb, sp, v)
	case float64:
		return appendFloat(b, verb, sp, v)
	case bool:
		if verb != 'v' && verb != 't' {
			return bad(b, verb)
		}
		return pad(b, strconv.FormatBool(v), sp)
	case []string:
		if verb != 'v' {
			return bad(b, verb)
		}
		var s []byte
		s = append(s, '[')
		for k, e := range v {
			if k > 0 {
				s = append(s, ' ')
			}
			s = append(s, e...)
		}
		s = append(s, ']')
		return pad(b, string(s), sp)
	}
	return bad(b, verb)
}

func appendString(b []byte, verb rune, sp spec, s string) []byte {
	switch verb {
	case 'v', 's':
		if sp.prec >= 0 {
			s = truncate(s, sp.prec)
		}
		return pad(b, s, sp)
	case 'q':
		if sp.plus {
			return pad(b, strconv.QuoteToASCII(s), sp)
		}
		return pad(b, strconv.Quote(s), sp)
	}
	return bad(b, verb)
}

func truncate(s string, n int) string {
	for i := range s {
		if n == 0 {
			return s[:i]
		}
		n--
	}
	return s
}

// pad writes s within the width, spaces on the left (on the right with -,
// zeros on the left with 0).
func pad(b []byte, s string, sp spec) []byte {
	n := sp.width - utf8.RuneCountInString(s)
	if n <= 0 {
		return append(b, s...)
	}
	if sp.minus {
		b = append(b, s...)
		for ; n > 0; n-- {
			b = append(b, ' ')
		}
		return b
	}
	c := byte(' ')
	if sp.zero {
		c = '0'
	}
	for ; n > 0; n-- {
		b = append(b, c)
	}
	return append(b, s...)
}

// padNumber writes a number's digits within the width: with the 0 flag
// (and no -) zeros go after the sign.
func padNumber(b []byte, sign string, digits string, sp spec) []byte {
	if sp.zero && !sp.minus && sp.width > 0 {
		n := sp.width - len(sign) - len(digits)
		b = append(b, sign...)
		for ; n > 0; n-- {
			b = append(b, '0')
		}
		return append(b, digits...)
	}
	sp.zero = false
	return pad(b, sign+digits, sp)
}

func appendInt(b []byte, verb rune, sp spec, v int64, isRune bool) []byte {
	sign := ""
	u := uint64(v)
	if v < 0 {
		sign, u = "-", uint64(-v)
	} else if sp.plus {
		sign = "+"
	}
	switch verb {
	case 'd', 'v':
		return padNumber(b, sign, strconv.FormatUint(u, 10), sp)
	case 'x':
		return padNumber(b, sign, strconv.FormatUint(u, 16), sp)
	case 'X':
		return padNumber(b, sign, upper(strconv.FormatUint(u, 16)), sp)
	case 'q':
		if isRune {
			return pad(b, strconv.QuoteRune(rune(v)), sp)
		}
	case 'c':
		return pad(b, string(rune(v)), sp)
	}
	return bad(b, verb)
}

func appendUint(b []byte, verb rune, sp spec, u uint64) []byte {
	sign := ""
	if sp.plus {
		sign = "+"
	}
	switch verb {
	case 'd', 'v':
		return padNumber(b, sign, strconv.FormatUint(u, 10), sp)
	case 'x':
		return padNumber(b, sign, strconv.FormatUint(u, 16), sp)
	case 'X':
		return padNumber(b, sign, upper(strconv.FormatUint(u, 16)), sp)
	}
	return bad(b, verb)
}

func upper(s string) string {
	out := []byte(s)
	for i, c := range out {
		if c >= 'a' && c <= 'f' {
			out[i] = c - 'a' + 'A'
		}
	}
	return string(out)
}

func appendFloat(b []byte, verb rune, sp spec, v float64) []byte {
	var s string
	switch verb {
	case 'v', 'g':
		s = strconv.FormatFloat(v, 'g', sp.prec, 64)
	case 'f':
		prec := sp.prec
		if prec < 0 {
			prec = 6
		}
		s = strconv.FormatFloat(v, 'f', prec, 64)
	default:
		return bad(b, verb)
	}
	sign := ""
	switch {
	case s[0] == '-' || s[0] == '+':
		sign, s = s[:1], s[1:]
	case sp.plus:
		sign = "+"
	}
	if s == "Inf" || s == "NaN" {
		// fmt writes +Inf with its sign, and pads both with spaces.
		sp.zero = false
		return pad(b, sign+s, sp)
	}
	return padNumber(b, sign, s, sp)
}
