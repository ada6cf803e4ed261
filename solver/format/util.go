package format

import (
	"strconv"
	"strings"
	"unicode"
)

// maxEcho is the most characters of the user's text a message repeats.
const maxEcho = 80

// clip shortens s to maxEcho characters, marking the cut with "…", so that
// a message about a 50 MB line is a line.
func clip(s string) string {
	if len(s) <= maxEcho {
		return s
	}
	n := 0
	for i := range s {
		if n == maxEcho {
			return s[:i] + "…"
		}
		n++
	}
	return s
}

// clipQ is clip in Go quotes, as messages quote a value.
func clipQ(s string) string {
	c := clip(s)
	if c == s {
		return strconv.Quote(s)
	}
	return strconv.Quote(strings.TrimSuffix(c, "…")) + "…"
}

// clipMsg shortens every quoted value in a message to maxEcho characters.
// Messages quote the user's text with %q; this keeps each such quote
// short wherever it was made, so that no message repeats a huge cell.
func clipMsg(msg string) string {
	if len(msg) <= 2*maxEcho {
		return msg
	}
	var b strings.Builder
	for {
		i := strings.IndexByte(msg, '"')
		if i < 0 {
			b.WriteString(msg)
			break
		}
		b.WriteString(msg[:i])
		msg = msg[i:]
		qp, err := strconv.QuotedPrefix(msg)
		if err != nil {
			b.WriteByte('"')
			msg = msg[1:]
			continue
		}
		if len(qp) > maxEcho+2 {
			if u, err := strconv.Unquote(qp); err == nil {
				b.WriteString(clipQ(u))
			} else {
				b.WriteString(qp[:maxEcho] + `…"`)
			}
		} else {
			b.WriteString(qp)
		}
		msg = msg[len(qp):]
	}
	out := b.String()
	if len(out) > 20*maxEcho {
		// An unquoted echo (a field label, a list): cut the whole message.
		out = clip(out[:20*maxEcho])
	}
	return out
}

// tidy clips the messages of a reader's errors in place (see clipMsg).
func tidy(err error) error {
	switch e := err.(type) {
	case *ParseError:
		e.Msg, e.Field = clipMsg(e.Msg), clipMsg(e.Field)
	case ErrorList:
		for _, pe := range e {
			pe.Msg, pe.Field = clipMsg(pe.Msg), clipMsg(pe.Field)
		}
	case *OptionError:
		e.Value, e.Msg = clip(e.Value), clipMsg(e.Msg)
	}
	return err
}

// tidyWarnings clips the messages of warnings in place.
func tidyWarnings(ws []Warning) {
	for i := range ws {
		ws[i].Msg, ws[i].Field = clipMsg(ws[i].Msg), clipMsg(ws[i].Field)
	}
}

// appendFields appends the fields of s, split as strings.Fields splits
// them (around runs of Unicode white space), to dst[:0] and returns it: the
// readers of large matrices reuse one slice for every line instead of a new
// one per line, which on a 5,000-site matrix was 400 MB of garbage.
func appendFields(dst []string, s string) []string {
	dst = dst[:0]
	start := -1
	for i, r := range s {
		if unicode.IsSpace(r) {
			if start >= 0 {
				dst = append(dst, s[start:i])
				start = -1
			}
		} else if start < 0 {
			start = i
		}
	}
	if start >= 0 {
		dst = append(dst, s[start:])
	}
	return dst
}
