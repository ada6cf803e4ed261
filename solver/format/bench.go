package format

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"

	"visitline/solver"
)

// MaxDecimals caps the fixed-point scale: values with more decimals are
// rounded to this many.
const MaxDecimals = 6

// MaxNodes bounds the instance size a reader accepts, so that a typo in the
// node count cannot ask for terabytes.
const MaxNodes = 20000

type token struct {
	text      string
	line, col int
}

// ReadBenchmark reads the plain matrix format of the published TSPTW
// collections: the node count n, n rows of n travel times (service already
// folded in), n rows "earliest latest"; lines starting with '#' are comments.
// Node 0 is the depot and the tour is closed. name is used in errors.
func ReadBenchmark(r io.Reader, name string) (*solver.Instance, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 64*1024*1024)
	var toks []token
	line := 0
	for sc.Scan() {
		line++
		text := sc.Text()
		if line == 1 {
			text = strings.TrimPrefix(text, "\ufeff")
		}
		if strings.HasPrefix(strings.TrimSpace(text), "#") {
			continue
		}
		col := 0
		for _, f := range strings.Fields(text) {
			col++
			toks = append(toks, token{f, line, col})
		}
	}
	if err := sc.Err(); err != nil {
		return nil, &ParseError{File: name, Line: line + 1, Msg: "cannot read: " + err.Error(), Err: err}
	}
	if len(toks) == 0 {
		return nil, &ParseError{File: name, Line: 1, Field: "node count", Msg: "file is empty; want the number of nodes on the first line"}
	}
	n64, err := strconv.ParseInt(toks[0].text, 10, 64)
	if err != nil || n64 < 1 {
		return nil, &ParseError{File: name, Line: toks[0].line, Column: toks[0].col, Field: "node count",
			Msg: fmt.Sprintf("%q is not a whole number of nodes of 1 or more", toks[0].text)}
	}
	if n64 > MaxNodes {
		return nil, &ParseError{File: name, Line: toks[0].line, Column: toks[0].col, Field: "node count",
			Msg: fmt.Sprintf("%d nodes is more than the %d this reader accepts", n64, MaxNodes)}
	}
	n := int(n64)
	want := 1 + n*n + 2*n
	// The matrix rows must each hold n numbers: check the row layout so that
	// a non-square matrix is reported where it goes wrong, not as a count.
	first := 1
	if len(toks) > 1 {
		// Rows of the matrix: lines following the count line.
		idx := 1
		for row := 0; row < n && idx < len(toks); row++ {
			ln := toks[idx].line
			cnt := 0
			for idx < len(toks) && toks[idx].line == ln {
				cnt++
				idx++
			}
			if cnt != n && !(cnt == 0) {
				return nil, &ParseError{File: name, Line: ln, Field: "travel matrix",
					Msg: fmt.Sprintf("row %d has %d numbers, want %d (the matrix must be %d×%d)", row+1, cnt, n, n, n)}
			}
		}
		_ = first
	}
	if len(toks) < want {
		last := toks[len(toks)-1]
		what := "travel matrix"
		if len(toks) >= 1+n*n {
			what = "time window"
		}
		return nil, &ParseError{File: name, Line: last.line + 1, Field: what,
			Msg: fmt.Sprintf("file ends early: %d numbers after the node count, want %d (n×n travel times then n windows)", len(toks)-1, want-1)}
	}
	if len(toks) > want {
		x := toks[want]
		return nil, &ParseError{File: name, Line: x.line, Column: x.col, Field: "end of data",
			Msg: fmt.Sprintf("unexpected %q after the %d windows; want nothing more", x.text, n)}
	}
	// Decimals decide the scale.
	dec := 0
	for _, t := range toks[1:] {
		if i := strings.IndexByte(t.text, '.'); i >= 0 {
			d := len(t.text) - i - 1
			if e := strings.IndexAny(t.text, "eE"); e >= 0 {
				d = MaxDecimals
			}
			if d > dec {
				dec = d
			}
		}
	}
	if dec > MaxDecimals {
		dec = MaxDecimals
	}
	scale := int64(1)
	for i := 0; i < dec; i++ {
		scale *= 10
	}
	in := &solver.Instance{Name: name, N: n, Scale: scale, Shape: solver.Closed,
		Travel: make([]int64, n*n), Service: make([]int64, n), Early: make([]int64, n), Late: make([]int64, n)}
	num := func(t token, field string) (int64, error) {
		v, err := parseFixed(t.text, dec)
		if err != nil {
			return 0, &ParseError{File: name, Line: t.line, Column: t.col, Field: field, Msg: fmt.Sprintf("%q %s", t.text, err.Error())}
		}
		return v, nil
	}
	for k := 0; k < n*n; k++ {
		t := toks[1+k]
		v, err := num(t, fmt.Sprintf("travel time row %d column %d", k/n+1, k%n+1))
		if err != nil {
			return nil, err
		}
		if v < 0 {
			return nil, &ParseError{File: name, Line: t.line, Column: t.col, Field: fmt.Sprintf("travel time row %d column %d", k/n+1, k%n+1),
				Msg: fmt.Sprintf("%q is negative; travel times must be 0 or more", t.text)}
		}
		in.Travel[k] = v
	}
	for i := 0; i < n; i++ {
		a, b := toks[1+n*n+2*i], toks[2+n*n+2*i]
		if a.line != b.line {
			return nil, &ParseError{File: name, Line: a.line, Field: fmt.Sprintf("time window of node %d", i),
				Msg: "want two numbers, earliest and latest, on one line"}
		}
		e, err := num(a, fmt.Sprintf("earliest of node %d", i))
		if err != nil {
			return nil, err
		}
		l, err := num(b, fmt.Sprintf("latest of node %d", i))
		if err != nil {
			return nil, err
		}
		if l < e {
			return nil, &ParseError{File: name, Line: b.line, Column: b.col, Field: fmt.Sprintf("latest of node %d", i),
				Msg: fmt.Sprintf("%s is before the earliest %s; want latest ≥ earliest", b.text, a.text)}
		}
		in.Early[i], in.Late[i] = e, l
	}
	if err := in.Validate(); err != nil {
		return nil, &ParseError{File: name, Msg: err.Error(), Err: err}
	}
	return in, nil
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
			return 0, fmt.Errorf("is not a number")
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
