package format

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/require"
)

// appendFields splits as strings.Fields does (the standard library is the
// reference), and reuses its slice.
func TestAppendFieldsIsStringsFields(t *testing.T) {
	cases := []string{"", " ", "a", " a ", "1 2  3\t4", "\t\t x\u00a0y\u2003z ", "héllo wörld", "a\vb\fc\rd\ne", "\u0085a\u0085", "x\u200by", "\xff \xfe"}
	var buf []string
	for _, c := range cases {
		buf = appendFields(buf, c)
		want := strings.Fields(c)
		if len(want) == 0 {
			require.Empty(t, buf, "%q", c)
		} else {
			require.Equal(t, want, buf, "%q", c)
		}
	}
	buf = appendFields(buf[:0], "p q r s t u")
	p := &buf[0]
	buf = appendFields(buf, "v w")
	require.Same(t, p, &buf[0], "the slice is reused")
}
