package format

import (
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

type failingReader struct{}

func (failingReader) Read([]byte) (int, error) { return 0, errors.New("disk on fire") }

func TestReadTextErrors(t *testing.T) {
	_, err := ReadSites(failingReader{}, "s.csv")
	assert.EqualError(t, err, "s.csv: cannot read: disk on fire")

	old := maxInput
	maxInput = 10
	defer func() { maxInput = old }()
	_, err = ReadSites(strings.NewReader("id,name\nA,abcdefgh\n"), "s.csv")
	assert.EqualError(t, err, "s.csv: input is larger than 256 MiB, the most a sites file or travel matrix may be (see Size limits in the README)")
}

func TestReadTextUTF16Errors(t *testing.T) {
	_, err := ReadSites(strings.NewReader("\xff\xfei\x00d\x00\n"), "u.txt")
	assert.ErrorContains(t, err, "u.txt: text encoding: UTF-16 text with an odd number of bytes; save the file as UTF-8")
	_, err = ReadSites(strings.NewReader("\xff\xfei\x00\x00\x00"), "u.txt")
	assert.ErrorContains(t, err, "u.txt: text encoding: holds NUL characters")
}

func TestRatUnitsRounding(t *testing.T) {
	cases := []struct {
		text string
		per  int64
		want int64
	}{
		{"1", 6000, 6000},
		{"0.0001", 6000, 1},   // 0.6 rounds up
		{"0.00008", 6000, 0},  // 0.48 rounds down
		{"-0.0001", 6000, -1}, // half away from zero
		{"2.5", 1, 3},         // half up
		{"12,5", 100, 1250},   // decimal comma
		{"+7", 1, 7},
	}
	for _, c := range cases {
		r, ok := parseDecimal(c.text, true)
		require.True(t, ok, c.text)
		v, ok := ratUnits(r, c.per)
		require.True(t, ok)
		assert.Equal(t, c.want, v, c.text)
	}
	for _, bad := range []string{"", "-", ".", "1.2.3", "1e5", "0x10", "1/2", "NaN", "Inf", "1,000.5", " 1"} {
		_, ok := parseDecimal(bad, true)
		assert.False(t, ok, bad)
	}
}
