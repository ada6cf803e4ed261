package format

import (
	"math"
	"math/bits"
	"strconv"
)

// decimal is a plain decimal number read exactly: its sign and its digits
// with the decimal point dropped, frac of them after the point. Leading
// zeros are trimmed, so "007.50" is digits "750", frac 2. Arithmetic on it
// is exact without arbitrary-precision numbers: the readers only scale a
// decimal by a whole number and round it, or square differences of
// coordinates of bounded size (see euclidUp).
type decimal struct {
	neg    bool
	digits string // '0'-'9' only, no leading zeros ("" is zero)
	frac   int    // how many of digits lie after the point (may exceed len(digits))
}

// Sign is -1, 0 or +1; "-0" and "-0.000" are zero.
func (d decimal) Sign() int {
	switch {
	case d.digits == "":
		return 0
	case d.neg:
		return -1
	}
	return 1
}

// Float64 is the nearest float64 to d (strconv rounds exactly).
func (d decimal) Float64() float64 {
	if d.digits == "" {
		return 0
	}
	s := d.digits
	if d.frac > 0 {
		s += "e-" + strconv.Itoa(d.frac)
	}
	f, _ := strconv.ParseFloat(s, 64) // at most 40 digits: never out of range
	if d.neg {
		return -f
	}
	return f
}

// trimmed drops trailing zeros after the point: 1.2500 is 1.25.
func (d decimal) trimmed() decimal {
	for d.frac > 0 && len(d.digits) > 0 && d.digits[len(d.digits)-1] == '0' {
		d.digits = d.digits[:len(d.digits)-1]
		d.frac--
	}
	if d.digits == "" {
		d.frac = 0
	}
	return d
}

// parseDecimal reads a plain decimal number exactly: an optional sign,
// digits, and an optional fraction after '.' (or after ',' when
// commaDecimal, as in files delimited by semicolons or tabs from a
// spreadsheet set to a language that writes 12,5). Exponents, thousands
// separators, "NaN" and "Inf" are refused, as are texts over 40 characters.
func parseDecimal(s string, commaDecimal bool) (decimal, bool) {
	if len(s) == 0 || len(s) > 40 {
		return decimal{}, false
	}
	var d decimal
	t := s
	if t[0] == '-' || t[0] == '+' {
		d.neg = t[0] == '-'
		t = t[1:]
	}
	buf := make([]byte, 0, len(t))
	dot, digit := false, false
	for i := 0; i < len(t); i++ {
		c := t[i]
		switch {
		case c >= '0' && c <= '9':
			digit = true
			if dot {
				d.frac++
			}
			if c != '0' || len(buf) > 0 {
				buf = append(buf, c)
			}
		case !dot && (c == '.' || c == ',' && commaDecimal):
			dot = true
		default:
			return decimal{}, false
		}
	}
	if !digit {
		return decimal{}, false
	}
	d.digits = string(buf)
	return d, true
}

// ratUnits converts d input units to internal units (per internal units in
// one input unit, 0 < per < 2^59), rounding half away from zero. ok is
// false when the value does not fit below solver.Horizon.
//
// It multiplies the digit string by per in base ten, exactly, and rounds on
// the first digit after the point: the remainder is at least one half
// exactly when that digit is 5 or more.
func ratUnits(d decimal, per int64) (int64, bool) {
	if per <= 0 || per >= 1<<59 {
		return 0, false
	}
	if d.digits == "" {
		return 0, true
	}
	// prod holds digits × per, least significant digit first.
	prod := make([]byte, 0, len(d.digits)+20)
	var carry uint64
	for i := len(d.digits) - 1; i >= 0; i-- {
		v := uint64(d.digits[i]-'0')*uint64(per) + carry
		prod = append(prod, byte(v%10))
		carry = v / 10
	}
	for carry > 0 {
		prod = append(prod, byte(carry%10))
		carry /= 10
	}
	// Digits below prod[frac] are the fraction; prod[frac-1] is the first
	// after the point.
	up := d.frac > 0 && d.frac <= len(prod) && prod[d.frac-1] >= 5
	var q uint64
	for i := len(prod) - 1; i >= d.frac; i-- {
		if q > (math.MaxUint64-9)/10 {
			return 0, false
		}
		q = q*10 + uint64(prod[i])
	}
	if up {
		q++
	}
	if q >= uint64(horizon) {
		return 0, false
	}
	if d.neg {
		return -int64(q), true
	}
	return int64(q), true
}

// maxCoordDecimals is the most decimals (trailing zeros aside) a Solomon
// coordinate may have: with at most 9 and |coordinate| ≤ 10^9, every
// squared distance fits in 128 bits and stays exact.
const maxCoordDecimals = 9

// coord is a coordinate in units of 10^-maxCoordDecimals.
type coord int64

// coordOf converts d, which the caller has checked to lie within ±10^9, to
// a coord; ok is false when d has more than maxCoordDecimals decimals once
// trailing zeros are dropped.
func coordOf(d decimal) (coord, bool) {
	d = d.trimmed()
	if d.frac > maxCoordDecimals {
		return 0, false
	}
	const most = 1_100_000_000_000_000_000 // 1.1·10^9 at scale 10^9, < 2^61
	var v uint64
	for i := 0; i < len(d.digits); i++ {
		v = v*10 + uint64(d.digits[i]-'0')
		if v > most {
			return 0, false
		}
	}
	for i := d.frac; i < maxCoordDecimals; i++ {
		v *= 10
		if v > most {
			return 0, false
		}
	}
	if d.neg {
		return coord(-int64(v)), true
	}
	return coord(v), true
}

// euclidUp is ceil(SolomonScale × the distance between (x1,y1) and
// (x2,y2)), exactly. With coordinates at scale 10^9 the distance in
// internal units is sqrt((dx² + dy²) × 10^12 / 10^18) = sqrt((dx² + dy²) /
// 10^6); its ceiling is ceil(sqrt(q)) with q = ceil((dx² + dy²) / 10^6),
// since r² ≥ a/b ⇔ r² ≥ ceil(a/b) for whole r.
func euclidUp(x1, y1, x2, y2 coord) int64 {
	dx, dy := absDiff(x1, x2), absDiff(y1, y2)
	// dx, dy ≤ 2.2·10^18 < 2^62: the sum of their squares < 2^123.
	ah, al := bits.Mul64(dx, dx)
	bh, bl := bits.Mul64(dy, dy)
	lo, c := bits.Add64(al, bl, 0)
	hi := ah + bh + c
	// q = ceil((hi:lo) / 10^6); hi < 2^59 < 10^6·2^64 keeps Div64 in range.
	const div = 1_000_000
	qh, r1 := hi/div, hi%div
	ql, rem := bits.Div64(r1, lo, div)
	if rem != 0 {
		ql, c = bits.Add64(ql, 1, 0)
		qh += c
	}
	return int64(sqrtUp128(qh, ql))
}

func absDiff(a, b coord) uint64 {
	if a > b {
		return uint64(a) - uint64(b)
	}
	return uint64(b) - uint64(a)
}

// sqrtUp128 is the smallest r with r² ≥ hi·2^64 + lo, exactly; the
// floating-point root is only the first guess. The argument must be below
// 2^126 so that r fits in 63 bits.
func sqrtUp128(hi, lo uint64) uint64 {
	less := func(r uint64) bool { // r² < hi:lo
		h, l := bits.Mul64(r, r)
		return h < hi || h == hi && l < lo
	}
	r := uint64(math.Sqrt(float64(hi)*0x1p64 + float64(lo)))
	for r > 0 && !less(r-1) {
		r--
	}
	for less(r) {
		r++
	}
	return r
}
