package format

import (
	"errors"
	"io"
	"io/fs"
	"strings"
	"unicode/utf16"
	"unicode/utf8"

	"visitline/solver/fmtlite"
)

// MaxInputBytes bounds what a text reader takes in, so that a wrong file
// (a video, a disk image) is refused instead of filling memory.
const MaxInputBytes = 256 << 20

// maxInput is MaxInputBytes, lowered by tests.
var maxInput = MaxInputBytes

// record is one row of a delimited file with the line it starts on.
type record struct {
	line   int
	fields []string
}

// readText reads all of r and returns it as UTF-8 text: a UTF-8 byte order
// mark is dropped, UTF-16 with a byte order mark (what some spreadsheets
// save as "Unicode text") is decoded, and anything else that is not UTF-8
// is refused with the line of the first bad byte. Line ends of CR alone
// (old Macintosh files) become LF.
//
// The text is held once: it is read into a builder sized from the file
// when the size is known, and the string is the builder's own bytes.
func readText(r io.Reader, name string) (string, error) {
	var b strings.Builder
	if st, ok := r.(interface{ Stat() (fs.FileInfo, error) }); ok {
		if fi, err := st.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() <= int64(maxInput) {
			b.Grow(int(fi.Size()) + 1)
		}
	} else if l, ok := r.(interface{ Len() int }); ok && l.Len() <= maxInput {
		b.Grow(l.Len() + 1)
	}
	if _, err := io.Copy(&b, io.LimitReader(r, int64(maxInput)+1)); err != nil {
		return "", &ParseError{File: name, Msg: "cannot read: " + err.Error(), Err: err}
	}
	if b.Len() > maxInput {
		return "", &ParseError{File: name, Msg: fmtlite.Sprintf("input is larger than %d MiB, the most a sites file or travel matrix may be (see Size limits in the README)", MaxInputBytes>>20)}
	}
	text := b.String()
	switch {
	case strings.HasPrefix(text, "\xEF\xBB\xBF"):
		text = text[3:]
	case strings.HasPrefix(text, "\xFF\xFE"), strings.HasPrefix(text, "\xFE\xFF"):
		return decodeUTF16([]byte(text), name)
	}
	if !utf8.ValidString(text) {
		line := 1
		for i := 0; i < len(text); {
			c, size := utf8.DecodeRuneInString(text[i:])
			if c == utf8.RuneError && size <= 1 {
				return "", &ParseError{File: name, Line: line, Field: "text encoding", Msg: notUTF8(text, i)}
			}
			if c == '\n' {
				line++
			}
			i += size
		}
	}
	if i := strings.IndexRune(text, utf8.RuneError); i >= 0 {
		return "", &ParseError{File: name, Line: 1 + strings.Count(text[:i], "\n"), Field: "text encoding",
			Msg: "holds the character \ufffd, which programs put where they could not read a letter: the text was decoded from another encoding (often Windows-1252 read as UTF-8); save the file as UTF-8 (in a spreadsheet: CSV UTF-8) and read it again"}
	}
	if strings.IndexByte(text, 0) >= 0 {
		return "", &ParseError{File: name, Field: "text encoding", Msg: "holds NUL bytes: this is not a text file of sites or travel times"}
	}
	if strings.IndexByte(text, '\n') < 0 && strings.IndexByte(text, '\r') >= 0 {
		text = strings.ReplaceAll(text, "\r", "\n")
	}
	return text, nil
}

// cp1252 holds the characters of Windows-1252 at 0x80-0x9F (0 where the
// code page defines none); from 0xA0 it is Latin-1, the same as Unicode.
var cp1252 = [32]rune{'€', 0, '‚', 'ƒ', '„', '…', '†', '‡', 'ˆ', '‰', 'Š', '‹', 'Œ', 0, 'Ž', 0,
	0, '‘', '’', '“', '”', '•', '–', '—', '˜', '™', 'š', '›', 'œ', 0, 'ž', 'Ÿ'}

// notUTF8 explains the byte at i that is not UTF-8, showing the word
// around it as Windows-1252 would read it when that makes sense.
func notUTF8(text string, i int) string {
	c := text[i]
	msg := fmtlite.Sprintf("byte 0x%02X is not UTF-8", c)
	if c >= 0x80 && (c >= 0xA0 || cp1252[c-0x80] != 0) {
		from, to := i, i+1
		for from > 0 && i-from < 20 && text[from-1] != '\n' && text[from-1] != ',' && text[from-1] != ';' && text[from-1] != '\t' {
			from--
		}
		for to < len(text) && to-i < 20 && text[to] != '\n' && text[to] != '\r' && text[to] != ',' && text[to] != ';' && text[to] != '\t' {
			to++
		}
		var w strings.Builder
		for _, b := range []byte(text[from:to]) {
			switch {
			case b < 0x80:
				w.WriteByte(b)
			case b < 0xA0 && cp1252[b-0x80] != 0:
				w.WriteRune(cp1252[b-0x80])
			case b < 0xA0:
				w.WriteRune('?')
			default:
				w.WriteRune(rune(b))
			}
		}
		msg += fmtlite.Sprintf(": the file looks like Windows-1252 or Latin-1 text (read that way, it says %s)", clipQ(w.String()))
	}
	return msg + "; save the file as UTF-8 (in a spreadsheet: CSV UTF-8) and read it again"
}

func decodeUTF16(data []byte, name string) (string, error) {
	be := data[0] == 0xFE
	data = data[2:]
	if len(data)%2 != 0 {
		return "", &ParseError{File: name, Field: "text encoding", Msg: "UTF-16 text with an odd number of bytes; save the file as UTF-8"}
	}
	u := make([]uint16, len(data)/2)
	for i := range u {
		if be {
			u[i] = uint16(data[2*i])<<8 | uint16(data[2*i+1])
		} else {
			u[i] = uint16(data[2*i+1])<<8 | uint16(data[2*i])
		}
	}
	s := string(utf16.Decode(u))
	if strings.IndexByte(s, 0) >= 0 {
		return "", &ParseError{File: name, Field: "text encoding", Msg: "holds NUL characters: this is not a text file of sites or travel times"}
	}
	return s, nil
}

// sepLine handles a first line "sep=;" that some spreadsheets write to
// name the delimiter: it returns the delimiter and the text with that line
// turned into a comment, so that line numbers stay as the user sees them.
func sepLine(text string) (rune, string) {
	first, rest, _ := strings.Cut(text, "\n")
	t := strings.TrimSpace(strings.TrimRight(first, "\r"))
	if len(t) >= 5 && strings.EqualFold(t[:4], "sep=") {
		r, size := utf8.DecodeRuneInString(t[4:])
		if 4+size == len(t) && r != '"' && r != '#' {
			return r, "#" + first + "\n" + rest
		}
	}
	return 0, text
}

// delimiters in order of preference when a sample fits more than one.
var delimiters = []rune{'\t', ';', ','}

// sniffComma picks the field delimiter from the first lines of text: the
// first of tab, semicolon and comma that splits every sampled line into the
// same number of fields (more than one), else the one most frequent on the
// first line. It returns 0 when none of them occurs on the first line.
// Quoted stretches are skipped, so "Café, Main St" does not count.
func sniffComma(text string) rune {
	var lines []string
	for _, l := range strings.Split(text, "\n") {
		l = strings.TrimRight(l, "\r")
		t := strings.TrimSpace(l)
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		lines = append(lines, l)
		if len(lines) == 5 {
			break
		}
	}
	if len(lines) == 0 {
		return 0
	}
	count := func(l string, d rune) int {
		n, quoted := 0, false
		for _, c := range l {
			switch {
			case c == '"':
				quoted = !quoted
			case c == d && !quoted:
				n++
			}
		}
		return n
	}
	for _, d := range delimiters {
		first := count(lines[0], d)
		if first == 0 {
			continue
		}
		same := true
		for _, l := range lines[1:] {
			if count(l, d) != first {
				same = false
				break
			}
		}
		if same {
			return d
		}
	}
	best, most := rune(0), 0
	for _, d := range delimiters {
		if c := count(lines[0], d); c > most {
			best, most = d, c
		}
	}
	return best
}

// readRecords splits text into records. comma is the delimiter; 0 splits on
// runs of spaces and tabs (no quoting). Blank lines, lines of delimiters
// only and lines starting with '#' are skipped. Fields are trimmed.
func readRecords(text, name string, comma rune) ([]record, error) {
	var out []record
	err := eachRecord(text, name, comma, nil, func(line int, fields []string) error {
		out = append(out, record{line: line, fields: append([]string(nil), fields...)})
		return nil
	})
	return out, err
}

// eachRecord calls fn with each record of text, as readRecords splits them.
// The fields slice is reused between calls: fn copies what it keeps. p,
// when not nil, counts the pass's progress through text (and its error,
// a cancel, ends the pass).
func eachRecord(text, name string, comma rune, p *pass, fn func(line int, fields []string) error) error {
	if comma == 0 {
		line := 0
		for rest := text; rest != ""; {
			l, r, _ := strings.Cut(rest, "\n")
			rest = r
			line++
			if err := p.at(int64(len(text) - len(rest))); err != nil {
				return err
			}
			t := strings.TrimSpace(l)
			if t == "" || strings.HasPrefix(t, "#") {
				continue
			}
			if err := fn(line, strings.Fields(t)); err != nil {
				return err
			}
		}
		return nil
	}
	// A tab is white space: trimming leading space there would swallow an
	// empty cell between two tabs and shift the columns.
	cr := &csvReader{text: text, comma: comma, comment: '#', trim: comma != '\t'}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return p.end(text)
		}
		if e := p.at(int64(cr.pos)); e != nil {
			return e
		}
		if err != nil {
			var pe *csvError
			if errors.As(err, &pe) {
				return &ParseError{File: name, Line: pe.Line, Field: "quoting",
					Msg: csvMessage(pe) + fmtlite.Sprintf(" (near character %d)", pe.Column), Err: err}
			}
			return &ParseError{File: name, Msg: "cannot read: " + err.Error(), Err: err}
		}
		line := cr.Line()
		empty := true
		for i := range rec {
			rec[i] = strings.TrimSpace(rec[i])
			if rec[i] != "" {
				empty = false
			}
		}
		if empty {
			continue
		}
		if err := fn(line, rec); err != nil {
			return err
		}
	}
}

func csvMessage(pe *csvError) string {
	switch {
	case errors.Is(pe.Err, errBareQuote):
		return `a double quote inside a field that does not start with one; put the whole field in double quotes and double the inner quote ("Café ""Le Coin""")`
	case errors.Is(pe.Err, errQuote):
		return fmtlite.Sprintf("a quoted field that starts on line %d is not closed, or a quote is followed by text; end the field with a double quote", pe.StartLine)
	}
	return pe.Err.Error()
}

// fastUnits converts a plain non-negative decimal (digits, at most one
// '.' or, when commaDecimal, ','; at most 15 digits) to internal units
// with per units per input unit, rounding half up, as ratUnits does. It
// reports false for anything else, which the exact reader then handles:
// travel matrices hold millions of such cells, and big.Rat for each is
// slow.
func fastUnits(s string, per int64, commaDecimal bool) (int64, bool) {
	if len(s) == 0 || len(s) > 16 {
		return 0, false
	}
	var m int64
	dec, dot, digits := 0, false, 0
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= '0' && c <= '9':
			m = m*10 + int64(c-'0')
			digits++
			if dot {
				dec++
			}
		case (c == '.' || c == ',' && commaDecimal) && !dot:
			dot = true
		default:
			return 0, false
		}
	}
	if digits == 0 || digits > 15 {
		return 0, false
	}
	p := int64(1)
	for i := 0; i < dec; i++ {
		p *= 10
	}
	if m > (1<<62)/per {
		return 0, false
	}
	v := (2*m*per + p) / (2 * p)
	if v >= horizon {
		return 0, false
	}
	return v, true
}
