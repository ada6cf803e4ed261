package format

import (
	"strings"
	"testing"
	"unicode/utf16"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

const min = SitesScale // internal units per minute, for readable expectations

func readSitesText(t *testing.T, src string) *Sites {
	t.Helper()
	s, err := ReadSites(strings.NewReader(src), "s.csv")
	require.NoError(t, err)
	return s
}

func TestReadSitesDelimiters(t *testing.T) {
	cases := []struct {
		name, src string
		comma     rune
	}{
		{"comma", "id,name,earliest,latest\nA,Alpha,10,20\nB,Beta,30,40\n", ','},
		{"semicolon", "id;name;earliest;latest\nA;Alpha;10;20\nB;Beta;30;40\n", ';'},
		{"tab", "id\tname\tearliest\tlatest\nA\tAlpha\t10\t20\nB\tBeta\t30\t40\n", '\t'},
		{"crlf", "id,name,earliest,latest\r\nA,Alpha,10,20\r\nB,Beta,30,40\r\n", ','},
		{"bom", "\ufeffid,name,earliest,latest\nA,Alpha,10,20\nB,Beta,30,40\n", ','},
		{"comments and blank lines", "# made by hand\nid,name,earliest,latest\n\nA,Alpha,10,20\n,,,\nB,Beta,30,40\n", ','},
		{"sep line", "sep=;\nid;name;earliest;latest\nA;Alpha;10;20\nB;Beta;30;40\n", ';'},
		{"no final newline", "id,name,earliest,latest\nA,Alpha,10,20\nB,Beta,30,40", ','},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := readSitesText(t, c.src)
			assert.Equal(t, c.comma, s.Comma)
			require.Len(t, s.Sites, 2)
			assert.Equal(t, "B", s.Sites[1].ID)
			assert.Equal(t, "Beta", s.Sites[1].Name)
			assert.Equal(t, 30*min, s.Sites[1].Earliest)
			assert.Equal(t, 40*min, s.Sites[1].Latest)
		})
	}
}

func TestReadSitesSepLineKeepsLineNumbers(t *testing.T) {
	_, err := ReadSites(strings.NewReader("sep=,\nid\nA\nA\n"), "s.csv")
	assert.EqualError(t, err, `s.csv:4:1: id: "A" is used twice (first on line 3); ids must be unique`)
}

func TestReadSitesUTF16(t *testing.T) {
	text := "id\tname\nA\tCafé Nord\n"
	u := utf16.Encode([]rune(text))
	le := []byte{0xFF, 0xFE}
	be := []byte{0xFE, 0xFF}
	for _, c := range u {
		le = append(le, byte(c), byte(c>>8))
		be = append(be, byte(c>>8), byte(c))
	}
	for name, data := range map[string][]byte{"little endian": le, "big endian": be} {
		t.Run(name, func(t *testing.T) {
			s, err := ReadSites(strings.NewReader(string(data)), "u.txt")
			require.NoError(t, err)
			assert.Equal(t, "Café Nord", s.Sites[0].Name)
		})
	}
}

func TestReadSitesQuotedFields(t *testing.T) {
	s := readSitesText(t, "id,name\nA,\"Café \"\"Le Coin\"\", Rue 4\"\nB,\"two\nlines\"\nC,plain\n")
	assert.Equal(t, `Café "Le Coin", Rue 4`, s.Sites[0].Name)
	assert.Equal(t, "two\nlines", s.Sites[1].Name)
	// A quoted field over two lines: the next row starts on line 5.
	assert.Equal(t, 5, s.Sites[2].Line)
}

func TestReadSitesHeaderSynonyms(t *testing.T) {
	for _, col := range siteColumns {
		for _, syn := range col.synonyms {
			assert.Equal(t, col.field, fieldOf(syn), syn)
			assert.Equal(t, col.field, fieldOf(strings.ToUpper(syn)), syn)
		}
	}
	for header, field := range map[string]string{
		"Window start": "earliest", "window_end": "latest", "Service (min)": "service", "Duration [h:mm]": "service",
		"Site-ID": "id", "LONGITUDE": "lon", "Lng": "lon", " Open ": "earliest", "Due": "latest", "Slot start": "earliest",
	} {
		assert.Equal(t, field, fieldOf(header), header)
	}
	assert.Equal(t, "", fieldOf("earlest"))
}

func TestReadSitesNameAsID(t *testing.T) {
	s := readSitesText(t, "name,service\nBakery,0\nCafé,5\n")
	assert.Equal(t, "Café", s.Sites[1].ID)
	assert.Equal(t, 5*min, s.Sites[1].Service)
}

func TestReadSitesTimes(t *testing.T) {
	cases := []struct {
		name, earliest, latest string
		comma                  string
		mode                   TimeMode
		e, l                   int64
	}{
		{"minutes", "90", "612.5", ",", Minutes, 90 * min, 612*min + min/2},
		{"minutes exact to a thousandth", "0.001", "12.125", ",", Minutes, 6, 12*min + min/8},
		{"decimal comma", "7,5", "12,25", ";", Minutes, 7*min + min/2, 12*min + min/4},
		{"clock", "8:30", "09:05", ",", Clock, (8*60 + 30) * min, (9*60 + 5) * min},
		{"clock with seconds", "08:30:15", "23:59:59", ",", Clock, (8*3600 + 30*60 + 15) * perSecond, (86400 - 1) * perSecond},
		{"end of day", "00:00", "24:00", ",", Clock, 0, 1440 * min},
		{"dated space", "2026-12-01 08:30", "2026-12-01 17:00", ",", Dated, (8*60 + 30) * min, 17 * 60 * min},
		{"dated T", "2026-12-01T08:30", "2026-12-02T01:00:30", ",", Dated, (8*60 + 30) * min, (25*3600 + 30) * perSecond},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := strings.Join([]string{"id", "earliest", "latest\nA", c.earliest, c.latest + "\n"}, c.comma)
			s := readSitesText(t, src)
			assert.Equal(t, c.mode, s.Time.Mode)
			assert.Equal(t, c.e, s.Sites[0].Earliest)
			assert.Equal(t, c.l, s.Sites[0].Latest)
		})
	}
}

func TestReadSitesDatedOrigin(t *testing.T) {
	s := readSitesText(t, "id,earliest,latest\nA,2026-12-02 08:00,2026-12-02 09:00\nB,2026-12-01 22:00,2026-12-02 02:00\n")
	assert.Equal(t, "2026-12-01", s.Time.Origin.Format("2006-01-02"))
	assert.Equal(t, (24+8)*60*min, s.Sites[0].Earliest)
	assert.Equal(t, 22*60*min, s.Sites[1].Earliest)
	assert.Equal(t, "2026-12-02 08:00", s.Time.Format(s.Sites[0].Earliest))
}

func TestReadSitesOpenWindows(t *testing.T) {
	s := readSitesText(t, "id,earliest,latest\nA,,\nB,10,-\nC,,20\n")
	assert.Equal(t, int64(0), s.Sites[0].Earliest)
	assert.Equal(t, horizon, s.Sites[0].Latest)
	assert.Equal(t, horizon, s.Sites[1].Latest)
	assert.Equal(t, 20*min, s.Sites[2].Latest)
	s = readSitesText(t, "id,name\nA,x\n")
	assert.Equal(t, horizon, s.Sites[0].Latest)
}

func TestReadSitesDurations(t *testing.T) {
	cases := map[string]int64{"15": 15 * min, "7.5": 7*min + min/2, "1:30": 90 * min, "0:45:30": 45*min + min/2, "0": 0, "": 0, "2:00": 120 * min}
	for text, want := range cases {
		s := readSitesText(t, "id,service\nA,"+text+"\n")
		assert.Equal(t, want, s.Sites[0].Service, text)
	}
	s := readSitesText(t, "id;service\nA;2,5\n")
	assert.Equal(t, 2*min+min/2, s.Sites[0].Service)
}

func TestReadSitesCoordinates(t *testing.T) {
	s := readSitesText(t, "id,x,y\nA,1.5,-2\nB,,\n")
	assert.True(t, s.Sites[0].HasXY)
	assert.Equal(t, 1.5, s.Sites[0].X)
	assert.Equal(t, -2.0, s.Sites[0].Y)
	assert.False(t, s.Sites[1].HasXY)
	s = readSitesText(t, "id;latitude;longitude\nA;45,5;-3,25\n")
	assert.True(t, s.Sites[0].HasLatLon)
	assert.Equal(t, 45.5, s.Sites[0].Lat)
	assert.Equal(t, -3.25, s.Sites[0].Lon)
}

func TestReadSitesPins(t *testing.T) {
	s := readSitesText(t, "id,position\nD,\nA,first\nB,LAST\nC,3\n")
	assert.Equal(t, Pin{}, s.Sites[0].Pin)
	assert.Equal(t, Pin{Kind: "first"}, s.Sites[1].Pin)
	assert.Equal(t, Pin{Kind: "last"}, s.Sites[2].Pin)
	assert.Equal(t, Pin{Kind: "number", N: 3}, s.Sites[3].Pin)
}

func TestReadSitesWarnings(t *testing.T) {
	cases := []struct{ name, src, want string }{
		{"unknown column", "id,earlest\nA,5\n", `s.csv:1:2: header: column "earlest" is not one Visitline reads`},
		{"both coordinate kinds", "id,x,y,lat,lon\nA,1,2,45,3\n", "s.csv:1:2: header: both x,y and lat,lon are given"},
		{"minutes that look like hours", "id,earliest,latest\nA,8,9\nB,13,17.5\n", "s.csv:2:2: earliest: times are read as minutes"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := readSitesText(t, c.src)
			require.NotEmpty(t, s.Warnings)
			assert.Contains(t, s.Warnings[0].String(), c.want)
		})
	}
	s := readSitesText(t, "id,notes,address\nA,ring twice,1 Main St\n")
	assert.Empty(t, s.Warnings, "notes and address columns are skipped quietly")
}

func TestReadSitesErrors(t *testing.T) {
	cases := []struct{ name, src, want string }{
		{"empty", "", "s.csv:1: header: no data"},
		{"only comments", "# nothing\n", "s.csv:1: header: no data"},
		{"no known column", "foo,bar\n1,2\n", `s.csv:1: header: the first row "foo,bar" names no known column`},
		{"no id", "earliest,latest\n1,2\n", "s.csv:1: header: no id column"},
		{"duplicate column", "id,open,earliest\nA,1,2\n", `s.csv:1:3: header: columns "open" and "earliest" both give the earliest`},
		{"x without y", "id,x\nA,1\n", "s.csv:1:2: header: a x column needs a y column"},
		{"lat without lon", "id,lat\nA,1\n", "s.csv:1:2: header: a lat column needs a lon column"},
		{"no rows", "id,name\n", "s.csv:2: sites: the header has no sites below it"},
		{"too many fields", "id,name\nA,Café, Rue 4\n", `s.csv:2:3: row: 3 fields but the header names 2 columns; quote fields that hold the delimiter ","`},
		{"missing id", "id,name\n,Nameless\n", "s.csv:2:1: id: missing"},
		{"duplicate id", "id\nA\nB\nA\n", `s.csv:4:1: id: "A" is used twice (first on line 2)`},
		{"mixed clock and minutes", "id,earliest,latest\nA,08:00,09:00\nB,600,700\n", `s.csv:3:2: earliest: "600" is written as plain minutes, but line 2 has "08:00" (clock times without a date)`},
		{"mixed dated and undated", "id,earliest,latest\nA,2026-12-01 08:00,09:00\n", `s.csv:2:3: latest: "09:00" is written as clock times without a date, but line 2 has "2026-12-01 08:00" (dates with clock times)`},
		{"hour out of range", "id,earliest\nA,25:00\n", `s.csv:2:2: earliest: "25:00" is not a time of day`},
		{"minute out of range", "id,earliest\nA,8:75\n", `s.csv:2:2: earliest: "8:75" is not a time of day`},
		{"not a clock time", "id,earliest\nA,8:3\n", `s.csv:2:2: earliest: "8:3" is not a clock time; want HH:MM`},
		{"am pm", "id,earliest\nA,2:30 pm\n", `s.csv:2:2: earliest: "2:30 pm": write times on the 24-hour clock`},
		{"zone", "id,earliest\nA,2026-12-01T08:30Z\n", `"2026-12-01T08:30Z": write local time without a zone`},
		{"offset", "id,earliest\nA,08:30+01:00\n", `"08:30+01:00": write local time without a zone`},
		{"other date order", "id,earliest\nA,01/12/2026 08:30\n", `"01/12/2026 08:30": write dates as YYYY-MM-DD`},
		{"bad date", "id,earliest\nA,2026-02-30 08:30\n", `"2026-02-30 08:30" has no valid date`},
		{"date without time", "id,earliest\nA,2026-12-01:\n", `want a space or T between the date and the time`},
		{"not minutes", "id,earliest\nA,soon\n", `s.csv:2:2: earliest: "soon" is not a time; want a clock time`},
		{"negative minutes", "id,earliest\nA,-5\n", `s.csv:2:2: earliest: "-5" is negative`},
		{"exponent", "id,earliest\nA,1e3\n", `"1e3" is not a time`},
		{"latest before earliest", "id,open,close\nA,09:00,08:00\n", "s.csv:2:3: latest (column \"close\"): 08:00 is before the earliest 09:00; want latest at or after earliest; a window past midnight needs dates"},
		{"bad duration", "id,service\nA,ten\n", `s.csv:2:2: service: "ten" is not a duration`},
		{"negative duration", "id,service\nA,-5\n", `s.csv:2:2: service: "-5" is negative`},
		{"bad duration minutes", "id,service\nA,1:75\n", `"1:75" is not a duration`},
		{"latitude out of range", "id,lat,lon\nA,91,3\n", `s.csv:2:2: lat: "91" is out of range; want -90 to 90`},
		{"longitude out of range", "id,lat,lon\nA,45,-181\n", `s.csv:2:3: lon: "-181" is out of range; want -180 to 180`},
		{"half a pair", "id,x,y\nA,1,\n", "s.csv:2:3: y: missing while x is given"},
		{"coordinate not a number", "id,x,y\nA,1,NaN\n", `s.csv:2:3: y: "NaN" is not a number`},
		{"half a pair, other side", "id,lat,lon\nA,,3\n", "s.csv:2:2: lat: missing while lon is given"},
		{"huge coordinate", "id,x,y\nA,1e3,1\n", `s.csv:2:2: x: "1e3" is not a number`},
		{"coordinate too large", "id,x,y\nA,12345678901,1\n", `s.csv:2:2: x: "12345678901" is too large for a coordinate`},
		{"minutes too large", "id,earliest\nA,99999999999999999\n", `s.csv:2:2: earliest: "99999999999999999" minutes is too large`},
		{"dates far apart are fine", "id,earliest,latest\nA,0001-01-01 08:00,9999-12-31 08:00\nB,08:00,09:00\n", `s.csv:3:2: earliest: "08:00" is written as clock times without a date`},
		{"date alone", "id,earliest\nA,2026-12-01\n", `"2026-12-01" is a date without a time`},
		{"date alone in a dated file", "id,earliest,latest\nA,2026-12-01 08:00,2026-12-01\n", `s.csv:2:3: latest: "2026-12-01" is a date without a time`},
		{"huge position", "id,position\nA,999999\n", `s.csv:2:2: position: "999999" is larger than any route can be`},
		{"bad position", "id,position\nA,middle\n", `s.csv:2:2: position: "middle": want first, last, or the visit number`},
		{"zero position", "id,position\nA,0\n", `s.csv:2:2: position: "0": want first, last`},
		{"bare quote", "id,name\nA,Café \"Le Coin\"\n", `s.csv:2: quoting: a double quote inside a field that does not start with one`},
		{"unclosed quote", "id,name\nA,\"Café\n", "quoting: a quoted field that starts on line 2 is not closed"},
		{"not utf-8", "id,name\nA,Caf\xe9\n", "s.csv:2: text encoding: byte 0xE9 is not UTF-8"},
		{"nul", "id,name\nA,\x00\n", "text encoding: holds NUL bytes"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadSites(strings.NewReader(c.src), "s.csv")
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
			var pe *ParseError
			assert.ErrorAs(t, err, &pe)
		})
	}
}

func TestReadSitesTooMany(t *testing.T) {
	var b strings.Builder
	b.WriteString("id\n")
	for i := 0; i <= MaxSites; i++ {
		b.WriteString("s")
		b.WriteString(strings.Repeat("x", i%3))
		b.WriteString(string(rune('a' + i%26)))
		b.WriteString("\n")
	}
	_, err := ReadSites(strings.NewReader(b.String()), "big.csv")
	require.Error(t, err)
	assert.Contains(t, err.Error(), "more than 5000 sites")
}

func TestReadSitesPastedTextName(t *testing.T) {
	_, err := ReadSites(strings.NewReader("id\nA\nA\n"), "")
	require.Error(t, err)
	assert.Equal(t, `pasted text:3:1: id: "A" is used twice (first on line 2); ids must be unique`, err.Error())
}

func TestTimeBaseParseAndFormat(t *testing.T) {
	clock := TimeBase{Mode: Clock}
	v, err := clock.Parse("11:20")
	require.NoError(t, err)
	assert.Equal(t, (11*60+20)*min, v)
	assert.Equal(t, "11:20", clock.Format(v))
	assert.Equal(t, "00:30 +1d", clock.Format((24*60+30)*min))
	assert.Equal(t, "08:00:05", clock.Format(8*60*min+5*perSecond))
	assert.Equal(t, "open", clock.Format(horizon))
	_, err = clock.Parse("2026-12-01 11:20")
	assert.ErrorContains(t, err, "has a date, but the sites file's times have none")

	s := readSitesText(t, "id,earliest\nA,2026-12-01 08:00\n")
	v, err = s.Time.Parse("11:20")
	require.NoError(t, err)
	assert.Equal(t, (11*60+20)*min, v, "a clock time alone is on the origin day")
	v, err = s.Time.Parse("2026-12-02 01:00")
	require.NoError(t, err)
	assert.Equal(t, 25*60*min, v)
	_, err = s.Time.Parse("2026-11-30 23:00")
	assert.ErrorContains(t, err, "is before the first day of the sites file (2026-12-01)")

	mins := TimeBase{}
	v, err = mins.Parse("95,5")
	require.NoError(t, err)
	assert.Equal(t, 95*min+min/2, v)
	_, err = mins.Parse("08:00")
	assert.ErrorContains(t, err, "is a clock time, but the sites file gives times as minutes")
	assert.Equal(t, "12.33", FormatMinutes(740*perSecond))
}

func TestSniffComma(t *testing.T) {
	cases := []struct {
		src  string
		want rune
	}{
		{"a,b,c\n1,2,3\n", ','},
		{"a;b;c\n1,5;2;3\n", ';'},
		{"a\tb\n1,5\t2\n", '\t'},
		{"\"x, y\";b\n1;2\n", ';'},
		{"1 2 3\n4 5 6\n", 0},
		{"# comment, with; all\na;b\n", ';'},
		{"", 0},
	}
	for _, c := range cases {
		assert.Equal(t, c.want, sniffComma(c.src), c.src)
	}
}
