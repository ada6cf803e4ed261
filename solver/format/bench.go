package format

import (
	"bufio"
	"errors"
	"io"
	"math"
	"strconv"
	"strings"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// MaxDecimals caps the fixed-point scale: values with more decimals are
// rounded to this many.
const MaxDecimals = 6

// MaxNodes bounds the instance size the benchmark reader accepts: the
// travel matrix takes 8 bytes per pair of nodes (800 MB at 10,000), so a
// typo in the node count cannot ask for more. The count is checked before
// anything of that size is made. See "Size limits" in the README.
const MaxNodes = 10000

// maxLine is the longest line the benchmark reader takes.
const maxLine = 64 << 20

type token struct {
	text      string
	line, col int
}

// ReadBenchmark reads the plain matrix format of the published TSPTW
// collections: the node count n, n rows of n travel times (service already
// folded in), n rows "earliest latest"; lines starting with '#' are comments.
// Node 0 is the depot and the tour is closed. name is used in errors.
//
// It streams: the text is read line by line into the travel matrix, which
// is all the memory it holds (8 bytes per pair of nodes).
func ReadBenchmark(r io.Reader, name string) (*solver.Instance, error) {
	in, err := readBenchmark(r, name)
	if err != nil {
		return nil, tidy(err)
	}
	return in, nil
}

func readBenchmark(r io.Reader, name string) (*solver.Instance, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), maxLine)
	sc.Split(scanAnyLines)
	var (
		in    *solver.Instance
		n     int
		line  int
		dec   int   // decimals of the values read so far
		scale int64 // 10^dec
		k     int   // matrix values read
		w     int   // window values read
		pend  token // earliest of the window being read
		last  token
		count int // numbers after the node count
	)
	scale = 1
	var pendV int64
	var fields []string
	for sc.Scan() {
		line++
		text := sc.Text()
		if line == 1 {
			text = strings.TrimPrefix(text, "\ufeff")
		}
		if strings.HasPrefix(strings.TrimSpace(text), "#") {
			continue
		}
		fields = appendFields(fields, text)
		if len(fields) == 0 {
			continue
		}
		col := 0
		if in == nil {
			t := token{fields[0], line, 1}
			n64, err := strconv.ParseInt(t.text, 10, 64)
			if err != nil || n64 < 1 {
				return nil, &ParseError{File: name, Line: t.line, Column: t.col, Field: "node count",
					Msg: fmtlite.Sprintf("%s is not a whole number of nodes of 1 or more", clipQ(t.text))}
			}
			if n64 > MaxNodes {
				return nil, &ParseError{File: name, Line: t.line, Column: t.col, Field: "node count",
					Msg: fmtlite.Sprintf("%d nodes is more than the %d this reader accepts (see Size limits in the README)", n64, MaxNodes)}
			}
			n = int(n64)
			in = &solver.Instance{Name: name, N: n, Shape: solver.Closed,
				Travel: make([]int64, n*n), Service: make([]int64, n), Early: make([]int64, n), Late: make([]int64, n)}
			fields, col = fields[1:], 1
			last = t
			if len(fields) == 0 {
				continue
			}
		}
		if k < n*n {
			// A row of the matrix: n numbers on one line.
			if len(fields) != n {
				return nil, &ParseError{File: name, Line: line, Field: "travel matrix",
					Msg: fmtlite.Sprintf("row %d has %d numbers, want %d (the matrix must be %d×%d)", k/n+1, len(fields), n, n, n)}
			}
		}
		for _, f := range fields {
			col++
			t := token{f, line, col}
			last = t
			count++
			if k == n*n && w == 2*n {
				return nil, &ParseError{File: name, Line: t.line, Column: t.col, Field: "end of data",
					Msg: fmtlite.Sprintf("unexpected %s after the %d windows; want nothing more", clipQ(t.text), n)}
			}
			// field names the value in an error; made only then.
			field := func() string {
				switch {
				case k < n*n:
					return fmtlite.Sprintf("travel time row %d column %d", k/n+1, k%n+1)
				case w%2 == 0:
					return fmtlite.Sprintf("earliest of node %d", w/2)
				}
				return fmtlite.Sprintf("latest of node %d", w/2)
			}
			v, d, err := parseScaled(t.text)
			if err != nil {
				return nil, &ParseError{File: name, Line: t.line, Column: t.col, Field: field(), Msg: fmtlite.Sprintf("%s %s", clipQ(t.text), err.Error())}
			}
			if d > dec {
				if err := rescaleAll(in, k, w, &pendV, &dec, &scale, d, t, field(), name); err != nil {
					return nil, err
				}
			}
			for i := d; i < dec; i++ {
				if v > math.MaxInt64/10 || v < math.MinInt64/10 {
					return nil, &ParseError{File: name, Line: t.line, Column: t.col, Field: field(), Msg: fmtlite.Sprintf("%s is too large", clipQ(t.text))}
				}
				v *= 10
			}
			switch {
			case k < n*n:
				if v < 0 {
					return nil, &ParseError{File: name, Line: t.line, Column: t.col, Field: field(),
						Msg: fmtlite.Sprintf("%s is negative; travel times must be 0 or more", clipQ(t.text))}
				}
				in.Travel[k] = v
				k++
			case w%2 == 0:
				pend, pendV = t, v
				w++
			default:
				i := w / 2
				if pend.line != t.line {
					return nil, &ParseError{File: name, Line: pend.line, Field: fmtlite.Sprintf("time window of node %d", i),
						Msg: "want two numbers, earliest and latest, on one line"}
				}
				if v < pendV {
					return nil, &ParseError{File: name, Line: t.line, Column: t.col, Field: field(),
						Msg: fmtlite.Sprintf("%s is before the earliest %s; want latest ≥ earliest", clip(t.text), clip(pend.text))}
				}
				in.Early[i], in.Late[i] = pendV, v
				w++
			}
		}
	}
	if err := sc.Err(); err != nil {
		msg := "cannot read: " + err.Error()
		if errors.Is(err, bufio.ErrTooLong) {
			msg = fmtlite.Sprintf("a line longer than %d MiB; this is not a benchmark file with one matrix row per line", maxLine>>20)
		}
		return nil, &ParseError{File: name, Line: line + 1, Msg: msg, Err: err}
	}
	if in == nil {
		return nil, &ParseError{File: name, Line: 1, Field: "node count", Msg: "file is empty; want the number of nodes on the first line"}
	}
	if w < 2*n {
		if w%2 == 1 {
			return nil, &ParseError{File: name, Line: pend.line, Field: fmtlite.Sprintf("time window of node %d", w/2),
				Msg: "want two numbers, earliest and latest, on one line"}
		}
		what := "travel matrix"
		if k == n*n {
			what = "time window"
		}
		return nil, &ParseError{File: name, Line: last.line + 1, Field: what,
			Msg: fmtlite.Sprintf("file ends early: %d numbers after the node count, want %d (n×n travel times then n windows)", count, n*n+2*n)}
	}
	in.Scale = scale
	if err := in.Validate(); err != nil {
		return nil, &ParseError{File: name, Msg: err.Error(), Err: err}
	}
	return in, nil
}

// rescaleAll moves every value read so far to d decimals: the scale of a
// benchmark file is decided by the most decimals any value has, which a
// streaming reader learns as it goes (at most MaxDecimals times).
func rescaleAll(in *solver.Instance, k, w int, pendV *int64, dec *int, scale *int64, d int, t token, field, name string) error {
	f := int64(1)
	for i := *dec; i < d; i++ {
		f *= 10
	}
	lim := int64(math.MaxInt64) / f
	tooBig := func() error {
		return &ParseError{File: name, Line: t.line, Column: t.col, Field: field,
			Msg: fmtlite.Sprintf("%s has %d decimals, and with that many the values before it no longer fit; write fewer decimals", clipQ(t.text), d)}
	}
	for i := 0; i < k; i++ {
		if in.Travel[i] > lim {
			return tooBig()
		}
		in.Travel[i] *= f
	}
	for i := 0; i < w/2; i++ {
		if in.Late[i] > lim || in.Early[i] > lim {
			return tooBig()
		}
		in.Early[i] *= f
		in.Late[i] *= f
	}
	if w%2 == 1 {
		if *pendV > lim || *pendV < -lim {
			return tooBig()
		}
		*pendV *= f
	}
	*dec, *scale = d, *scale*f
	return nil
}

// parseScaled reads a number with its decimals (at most MaxDecimals; more
// are rounded away). Exponent forms are read as floats at MaxDecimals.
func parseScaled(s string) (int64, int, error) {
	t := strings.TrimLeft(s, "+-")
	ip, frac, _ := strings.Cut(t, ".")
	simple := len(t) > 0 && len(ip) <= 15 && (ip != "" || frac != "") && len(t) <= len(s) && len(s)-len(t) <= 1
	for _, c := range ip + frac {
		if c < '0' || c > '9' {
			simple = false
			break
		}
	}
	d := len(frac)
	if !simple {
		d = MaxDecimals
	} else if d > MaxDecimals {
		d = MaxDecimals
	}
	v, err := parseFixed(s, d)
	return v, d, err
}

// scanAnyLines is bufio.ScanLines that also ends a line at a lone CR, as
// files saved on old Macintosh systems do.
func scanAnyLines(data []byte, atEOF bool) (advance int, token []byte, err error) {
	for i, c := range data {
		switch c {
		case '\n':
			return i + 1, data[:i], nil
		case '\r':
			if i+1 < len(data) {
				if data[i+1] == '\n' {
					return i + 2, data[:i], nil
				}
				return i + 1, data[:i], nil
			}
			if atEOF {
				return i + 1, data[:i], nil
			}
			return 0, nil, nil // a CRLF may be split across reads
		}
	}
	if atEOF && len(data) > 0 {
		return len(data), data, nil
	}
	return 0, nil, nil
}

// parseFixed reads a decimal number into an integer with dec decimals,
// exactly where the text has at most dec decimals, rounded otherwise.
func parseFixed(s string, dec int) (int64, error) {
	neg := false
	t := s
	if strings.HasPrefix(t, "-") {
		neg = true
		t = t[1:]
	} else if strings.HasPrefix(t, "+") {
		t = t[1:]
	}
	intPart, frac, hasDot := strings.Cut(t, ".")
	simple := intPart != "" || (hasDot && frac != "")
	for _, c := range intPart + frac {
		if c < '0' || c > '9' {
			simple = false
		}
	}
	if !simple || len(intPart) > 15 {
		f, err := strconv.ParseFloat(s, 64)
		if err != nil || f != f || f > 1e15 || f < -1e15 {
			return 0, fmtlite.Errorf("is not a number")
		}
		p := 1.0
		for i := 0; i < dec; i++ {
			p *= 10
		}
		v := f * p
		if v < 0 {
			return int64(v - 0.5), nil
		}
		return int64(v + 0.5), nil
	}
	var v int64
	for _, c := range intPart {
		v = v*10 + int64(c-'0')
	}
	for i := 0; i < dec; i++ {
		v *= 10
		if i < len(frac) {
			v += int64(frac[i] - '0')
		}
	}
	if len(frac) > dec && frac[dec] >= '5' {
		v++
	}
	if neg {
		v = -v
	}
	return v, nil
}
