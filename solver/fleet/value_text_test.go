package fleet

import (
	"fmt"
	"testing"
)

// Value's text in the engine's internal errors is fmt's %+v of it.
func TestValueTextAsFmt(t *testing.T) {
	for _, v := range []Value{{}, {Unserved: 3, Vehicles: 2, Cost: 123456}, {Unserved: -1, Vehicles: 50, Cost: 1 << 60}} {
		if got, want := v.text(), fmt.Sprintf("%+v", v); got != want {
			t.Fatalf("got %q, fmt %q", got, want)
		}
	}
}
