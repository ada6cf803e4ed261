package fmtlite

import (
	"errors"
	"fmt"
	"io/fs"
	"math"
	"math/rand"
	"strings"
	"testing"
)

type named string

func (n named) String() string { return "named:" + string(n) }

type oops struct{}

func (oops) Error() string { return "oops <error>" }

// Every verb, flag and width the engine's packages use (see
// TestCallersUseWhatIsSupported), on many values, gives fmt's text.
func TestAsFmt(t *testing.T) {
	strs := []string{"", "a", "plain text", "quote \" back \\ slash", "tab\tnl\n", "\x00\x1b\x7f", "é ß 東京 🚚", "bad \xff utf8", "\u2028", "%d %s",
		strings.Repeat("x", 20), "-12", "0"}
	ints := []int{0, 1, -1, 7, 9, 10, 59, 60, 99, 100, 12345, -12345, math.MaxInt64, math.MinInt64}
	rng := rand.New(rand.NewSource(1))
	for k := 0; k < 300; k++ {
		ints = append(ints, rng.Intn(2000000)-1000000)
	}
	floats := []float64{0, math.Copysign(0, -1), 1, -1, 0.5, 1.0 / 3, 2.0 / 3, 0.005, 0.015, 0.125, 1.005, 2.675, 99.995, 100, 1e6, 1e20, 1e21, 1e22, 123456789,
		1e-4, 1e-5, 1.5e-7, 1e-300, 5e-324, 1.7976931348623157e308, math.Inf(1), math.Inf(-1), math.NaN(), 40, 1.3, 0.00001234, 12.5, -3.25, 51.477928, -0.000001}
	for k := 0; k < 3000; k++ {
		floats = append(floats, (rng.Float64()-0.5)*math.Pow(10, float64(rng.Intn(40)-20)), math.Float64frombits(rng.Uint64()),
			math.Round(rng.Float64()*1e5)/100)
	}
	check := func(format string, a ...any) {
		t.Helper()
		want := fmt.Sprintf(format, a...)
		if got := Sprintf(format, a...); got != want {
			t.Fatalf("Sprintf(%q, %#v): got %q, fmt %q", format, a, got, want)
		}
		if got, want := Errorf(format, a...).Error(), fmt.Errorf(format, a...).Error(); got != want {
			t.Fatalf("Errorf(%q, %#v): got %q, fmt %q", format, a, got, want)
		}
	}
	for _, s := range strs {
		for _, f := range []string{"%s", "%v", "%q", "%+q", "%5s", "%8s", "%-12s", "%12s", "[%s]", "%s%%", "%.3s"} {
			check(f, s)
		}
		for _, w := range []int{0, 1, 5, 10, 24, -6} {
			check("%*s|", w, s)
		}
		check("%q", []byte(s))
		check("%s", []byte(s))
		check("%s and %v", named(s), named(s))
		check("%q", named(s))
	}
	for _, v := range ints {
		for _, f := range []string{"%d", "%v", "%02d", "%5d", "%-5d", "%+d", "%x", "%X", "%08x"} {
			check(f, v)
			check(f, int64(v))
		}
		check("%d:%02d", int64(v)/3600, int64(v)/60%60)
		check("%02X", uint8(v))
		check("%016x", uint64(v))
		check("%016x", uint64(v)*0x9E3779B97F4A7C15)
		check(`\x%02x`, rune(v&0x7f))
		check(`\u%04x`, rune(v&0x10ffff))
	}
	for _, v := range floats {
		for _, f := range []string{"%g", "%v", "%.2f", "%.1f", "%.6f", "%.6f;%.6f", "%f", "%.0f", "%.2f%%", "%8.2f", "%+g", "%.3g"} {
			if strings.Count(f, "%.6f") == 2 {
				check(f, v, -v)
				continue
			}
			check(f, v)
		}
	}
	for _, b := range []bool{true, false} {
		check("%v", b)
	}
	for _, l := range [][]string{nil, {}, {"a"}, {"a b", "c"}, {"", "x", "y"}} {
		check("%v", l)
		check("breaks %v", l)
	}
	check("%v and %s", oops{}, oops{})
	check("%v", nil)
	nilFormat, missing := "%s", "%d %s"
	check(nilFormat, nil)
	check(missing, 1)
	check("100%%")
	check("%5s  %-12s %*s %*s %8s %*s %*s %8s", "order", "site", 10, "arrival", 10, "start", "wait", 10, "departure", 24, "window", "slack")
	for _, args := range [][]any{{1.5}, {3}, {-2}, {"a", "b"}, {1, 2}, {"a", 1, 2, "b"}, {0.1}} {
		if got, want := Sprint(args...), fmt.Sprint(args...); got != want {
			t.Fatalf("Sprint(%v): got %q, fmt %q", args, got, want)
		}
		var g, w strings.Builder
		Fprintln(&g, args...)
		fmt.Fprintln(&w, args...)
		if g.String() != w.String() {
			t.Fatalf("Fprintln(%v): got %q, fmt %q", args, g.String(), w.String())
		}
		g.Reset()
		w.Reset()
		Fprint(&g, args...)
		fmt.Fprint(&w, args...)
		if g.String() != w.String() {
			t.Fatalf("Fprint(%v): got %q, fmt %q", args, g.String(), w.String())
		}
	}
}

// %w wraps: errors.Is and errors.As find the operand, and the text is
// fmt's.
func TestErrorfWraps(t *testing.T) {
	base := &fs.PathError{Op: "open", Path: "x.csv", Err: fs.ErrNotExist}
	err := Errorf("reading %s: %w", "sites", base)
	if want := fmt.Errorf("reading %s: %w", "sites", base).Error(); err.Error() != want {
		t.Fatalf("got %q, want %q", err, want)
	}
	if !errors.Is(err, fs.ErrNotExist) {
		t.Fatal("errors.Is does not see the wrapped error")
	}
	var pe *fs.PathError
	if !errors.As(err, &pe) || pe != base {
		t.Fatal("errors.As does not find the wrapped error")
	}
	if errors.Unwrap(Errorf("no wrap %v", base)) != nil {
		t.Fatal("Errorf wraps an operand that is not given with w")
	}
	if got, want := Errorf("x %w", nil).Error(), fmt.Errorf("x %w", nil).Error(); got != want {
		t.Fatalf("nil %%w: got %q, fmt %q", got, want)
	}
}
