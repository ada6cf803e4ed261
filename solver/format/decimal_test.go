package format

import (
	"math/big"
	"math/rand"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestParseDecimalForms(t *testing.T) {
	cases := []struct {
		text  string
		comma bool
		want  decimal
	}{
		{"0", false, decimal{}},
		{"-0.000", false, decimal{neg: true, frac: 3}},
		{"007.50", false, decimal{digits: "750", frac: 2}},
		{"+7", false, decimal{digits: "7"}},
		{"-12.5", false, decimal{neg: true, digits: "125", frac: 1}},
		{"5.", false, decimal{digits: "5"}},
		{".5", false, decimal{digits: "5", frac: 1}},
		{"0.0005", false, decimal{digits: "5", frac: 4}},
		{"12,5", true, decimal{digits: "125", frac: 1}},
		{"12.5", true, decimal{digits: "125", frac: 1}},
	}
	for _, c := range cases {
		d, ok := parseDecimal(c.text, c.comma)
		require.True(t, ok, c.text)
		assert.Equal(t, c.want, d, c.text)
	}
	assert.Equal(t, 0, decimal{neg: true, frac: 3}.Sign(), "-0.000 is zero")
	for _, bad := range []struct {
		text  string
		comma bool
	}{{"12,5", false}, {"1,2,3", true}, {"1,000.5", true}, {"+", false}, {"-.", false}, {"1e3", false},
		{"1E-3", false}, {"--1", false}, {"1-", false}, {strings.Repeat("1", 41), false}} {
		_, ok := parseDecimal(bad.text, bad.comma)
		assert.False(t, ok, bad.text)
	}
	_, ok := parseDecimal(strings.Repeat("1", 40), false)
	assert.True(t, ok, "40 characters is the most")
}

// Hand-worked conversions; each float64 reading of the same text would
// get the ones marked "exact" wrong.
func TestRatUnitsHandWorked(t *testing.T) {
	cases := []struct {
		text string
		per  int64
		want int64
		ok   bool
	}{
		{"2.5", 1, 3, true},
		{"-2.5", 1, -3, true},  // half away from zero
		{"-2.49", 1, -2, true}, // below half
		{"-0", 6000, 0, true},
		{"0.005", 100, 1, true},                                    // 0.5 rounds up
		{"0.00499999", 100, 0, true},                               // 0.499999 rounds down
		{"2.4999999999999999999999999999999999", 1, 2, true},       // exact: a float reads 2.5
		{"0.000083333333333333333333333333333", 6000, 0, true},     // exact: 0.49999…98
		{"0.000083333333333333333333333333334", 6000, 1, true},     // exact: 0.50000…04
		{"0.0000000000000000000000000000000000001", 6000, 0, true}, // 37 decimals
		{"1125899906842623", 1, 1125899906842623, true},            // 2^50 − 1, the largest below the horizon
		{"1125899906842623.4999", 1, 1125899906842623, true},       // still below
		{"1125899906842623.5", 1, 0, false},                        // rounds to 2^50
		{"1125899906842624", 1, 0, false},                          // 2^50
		{"187649984473771", 6, 0, false},                           // 6 × that ≥ 2^50
		{"99999999999999999999999999999999999999", 1000, 0, false}, // 38 digits: overflow refused
		{"-99999999999999999999999999999999999999", 1000, 0, false},
		{"18446744073709551621", 1, 0, false}, // 2^64 + 5: would wrap to 5 in uint64
		{"12.3456", 6000, 74074, true},        // 74073.6
	}
	for _, c := range cases {
		d, ok := parseDecimal(c.text, false)
		require.True(t, ok, c.text)
		v, ok := ratUnits(d, c.per)
		assert.Equal(t, c.ok, ok, c.text)
		assert.Equal(t, c.want, v, c.text)
	}
}

// refUnits is the conversion worked with math/big rationals, as the
// reader did before: round(r × per) half away from zero, refused at the
// horizon.
func refUnits(s string, per int64) (int64, bool) {
	r, ok := new(big.Rat).SetString(s)
	if !ok {
		panic(s)
	}
	v := new(big.Rat).Mul(r, new(big.Rat).SetInt64(per))
	num, den := new(big.Int).Set(v.Num()), v.Denom()
	neg := num.Sign() < 0
	num.Abs(num)
	num.Mul(num, big.NewInt(2)).Add(num, den)
	q := new(big.Int).Quo(num, new(big.Int).Mul(den, big.NewInt(2)))
	if !q.IsInt64() || q.Int64() >= horizon {
		return 0, false
	}
	if neg {
		return -q.Int64(), true
	}
	return q.Int64(), true
}

func randDecimal(rng *rand.Rand, maxInt, maxFrac int) string {
	var b strings.Builder
	if rng.Intn(3) == 0 {
		b.WriteByte('-')
	}
	for i, n := 0, 1+rng.Intn(maxInt); i < n; i++ {
		b.WriteByte(byte('0' + rng.Intn(10)))
	}
	if f := rng.Intn(maxFrac + 1); f > 0 {
		b.WriteByte('.')
		for i := 0; i < f; i++ {
			d := rng.Intn(10)
			if rng.Intn(4) == 0 {
				d = []int{0, 4, 5, 9}[rng.Intn(4)] // near the rounding edges
			}
			b.WriteByte(byte('0' + d))
		}
	}
	return b.String()
}

func TestRatUnitsAgreesWithRationals(t *testing.T) {
	rng := rand.New(rand.NewSource(3))
	for i := 0; i < 4000; i++ {
		s := randDecimal(rng, 18, 20)
		d, ok := parseDecimal(s, false)
		require.True(t, ok, s)
		for _, per := range []int64{1, 6, perSecond, LoadScale, SitesScale} {
			want, wok := refUnits(s, per)
			got, gok := ratUnits(d, per)
			require.Equal(t, wok, gok, "%s per %d", s, per)
			require.Equal(t, want, got, "%s per %d", s, per)
		}
		want, _ := new(big.Rat).SetString(s)
		wf, _ := want.Float64()
		require.Equal(t, wf, d.Float64(), s)
		require.Equal(t, want.Sign(), d.Sign(), s)
	}
}

func TestSqrtUp128(t *testing.T) {
	cases := []struct {
		hi, lo, want uint64
	}{
		{0, 0, 0}, {0, 1, 1}, {0, 2, 2}, {0, 4, 2}, {0, 5, 3}, {0, 99, 10}, {0, 100, 10}, {0, 101, 11},
		{0, 1e18, 1e9}, {0, 1e18 + 1, 1e9 + 1},
		{0, 1<<64 - 1, 1 << 32},         // (2^32)² = 2^64 is the first square at or above 2^64 − 1
		{1, 0, 1 << 32},                 // 2^64
		{1 << 60, 0, 1 << 62},           // 2^124
		{1 << 60, 1, 1<<62 + 1},         // 2^124 + 1
		{1<<60 - 1, 1<<64 - 1, 1 << 62}, // 2^124 − 1
	}
	for _, c := range cases {
		assert.Equal(t, c.want, sqrtUp128(c.hi, c.lo), "%d:%d", c.hi, c.lo)
	}
	// 10^30 = (10^15)²: hi:lo of 10^30 from 10^15 × 10^15.
	h, l := mul64(1e15, 1e15)
	assert.Equal(t, uint64(1e15), sqrtUp128(h, l))
	assert.Equal(t, uint64(1e15+1), sqrtUp128(h, l+1))
	// Large roots, where the float64 first guess is off by hundreds: r² − 1,
	// r² and r² + 1 have smallest roots r, r and r + 1.
	rng := rand.New(rand.NewSource(9))
	for i := 0; i < 2000; i++ {
		r := 1<<61 + uint64(rng.Int63n(1<<61))
		h, l := mul64(r, r)
		require.Equal(t, r, sqrtUp128(h, l), "%d²", r)
		l1, b := l+1, uint64(0)
		if l1 == 0 {
			b = 1
		}
		require.Equal(t, r+1, sqrtUp128(h+b, l1), "%d² + 1", r)
		if l == 0 {
			h, l = h-1, 1<<64-1
		} else {
			l--
		}
		require.Equal(t, r, sqrtUp128(h, l), "%d² − 1", r)
	}
	for q := uint64(0); q < 200000; q++ {
		r := sqrtUp128(0, q)
		require.True(t, r*r >= q && (r == 0 || (r-1)*(r-1) < q), "%d → %d", q, r)
	}
}

func mul64(a, b uint64) (uint64, uint64) {
	x := new(big.Int).Mul(new(big.Int).SetUint64(a), new(big.Int).SetUint64(b))
	lo := new(big.Int).And(x, new(big.Int).SetUint64(1<<64-1)).Uint64()
	return new(big.Int).Rsh(x, 64).Uint64(), lo
}

// refEuclid is ceil(SolomonScale × distance) worked with math/big.
func refEuclid(x1, y1, x2, y2 string) int64 {
	r := func(s string) *big.Rat { v, _ := new(big.Rat).SetString(s); return v }
	dx := new(big.Rat).Sub(r(x1), r(x2))
	dy := new(big.Rat).Sub(r(y1), r(y2))
	sq := new(big.Rat).Add(new(big.Rat).Mul(dx, dx), new(big.Rat).Mul(dy, dy))
	sq.Mul(sq, new(big.Rat).SetInt64(SolomonScale*SolomonScale))
	q := new(big.Int).Quo(sq.Num(), sq.Denom())
	if new(big.Int).Mul(q, sq.Denom()).Cmp(sq.Num()) != 0 {
		q.Add(q, big.NewInt(1))
	}
	s := new(big.Int).Sqrt(q)
	if new(big.Int).Mul(s, s).Cmp(q) < 0 {
		s.Add(s, big.NewInt(1))
	}
	return s.Int64()
}

func mustCoord(t *testing.T, s string) coord {
	d, ok := parseDecimal(s, false)
	require.True(t, ok, s)
	c, ok := coordOf(d)
	require.True(t, ok, s)
	return c
}

func TestEuclidUp(t *testing.T) {
	cases := []struct {
		x1, y1, x2, y2 string
		want           int64
	}{
		{"0", "0", "3", "4", 5_000_000},   // 3-4-5 triangle
		{"0", "0", "1", "1", 1_414_214},   // √2 = 1.41421356…
		{"0.5", "0", "0", "0", 500_000},   // exact
		{"0.000000001", "0", "0", "0", 1}, // 0.001 rounds up to 1
		{"-1000000000", "-1000000000", "1000000000", "1000000000", 2_828_427_124_746_191}, // ceil(2√2·10^15 = 2828427124746190.097…)
		{"1.5", "2.25", "1.5", "2.25", 0},
		{"0.3", "0", "0", "0.4", 500_000}, // 0.3-0.4-0.5
	}
	for _, c := range cases {
		got := euclidUp(mustCoord(t, c.x1), mustCoord(t, c.y1), mustCoord(t, c.x2), mustCoord(t, c.y2))
		assert.Equal(t, c.want, got, "%v", c)
		assert.Equal(t, refEuclid(c.x1, c.y1, c.x2, c.y2), got, "%v", c)
	}
	rng := rand.New(rand.NewSource(5))
	for i := 0; i < 3000; i++ {
		p := make([]string, 4)
		for k := range p {
			p[k] = randDecimal(rng, 1+rng.Intn(9), 9)
		}
		got := euclidUp(mustCoord(t, p[0]), mustCoord(t, p[1]), mustCoord(t, p[2]), mustCoord(t, p[3]))
		require.Equal(t, refEuclid(p[0], p[1], p[2], p[3]), got, "%v", p)
	}
}

func TestSolomonCoordinateDecimals(t *testing.T) {
	src := strings.Replace(tinySolomon, "    1       3          4", "    1       3.50000000000000          4", 1)
	p, err := ReadSolomon(strings.NewReader(src), "t.txt")
	require.NoError(t, err, "trailing zeros do not count")
	assert.Equal(t, euclidUp(0, 0, mustCoord(t, "3.5"), mustCoord(t, "4")), p.Travel[1])

	src = strings.Replace(tinySolomon, "    1       3          4", "    1       3.1234567891          4", 1)
	_, err = ReadSolomon(strings.NewReader(src), "t.txt")
	assert.EqualError(t, err, `t.txt:11:2: x: "3.1234567891" has more than 9 decimals; want at most 9 (distances are worked exactly at that precision)`)
}
