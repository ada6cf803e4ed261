package format

import (
	"bytes"
	"encoding/json"
	"errors"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// Tests of hostile and careless input: short rows, every error listed,
// header names, marks that are true by definition, messages that stay
// short and say what is meant.

func loadText(t *testing.T, sites string, opt Options) (*Dataset, error) {
	t.Helper()
	if opt.SitesName == "" {
		opt.SitesName = "s.csv"
	}
	return Load(strings.NewReader(sites), nil, opt)
}

func TestShortRow(t *testing.T) {
	const header = "id,name,x,y,earliest,latest,service,notes\n"
	cases := []struct {
		name, rows string
		want       string // "" accepted
	}{
		// The row of the report: five fields under a seven-column header
		// read as an open latest and no service.
		{"missing latest and service", "D,Depot,0,0,08:00,18:00,0,\nA,Alpha,10,0,08:00\n",
			"s.csv:3:6: row: 5 fields but the header names 8 columns; missing latest (column 6), service (column 7)"},
		{"missing one read column", "D,Depot,0,0,08:00,18:00,0,\nA,Alpha,10,0,08:00,09:00\n",
			"s.csv:3:7: row: 6 fields but the header names 8 columns; missing service (column 7)"},
		// Leaving off a column Visitline does not read changes nothing.
		{"missing notes only", "D,Depot,0,0,08:00,18:00,0,\nA,Alpha,10,0,08:00,09:00,5\n", ""},
		{"full rows", "D,Depot,0,0,08:00,18:00,0,\nA,Alpha,10,0,08:00,09:00,5,ring twice\n", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadSites(strings.NewReader(header+c.rows), "s.csv")
			if c.want == "" {
				require.NoError(t, err)
				return
			}
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

func TestEveryDataErrorListed(t *testing.T) {
	src := "id,earliest,latest,service\n" +
		"D,0,600,0\n" +
		"A,10,x,5\n" + // line 3: latest not a number
		"B,20,30,-4\n" + // line 4: negative service
		"A,1,2,3\n" + // line 5: duplicate id
		"C,50,40,1\n" // line 6: latest before earliest
	_, err := ReadSites(strings.NewReader(src), "s.csv")
	require.Error(t, err)
	var list ErrorList
	require.True(t, errors.As(err, &list), "want an ErrorList, got %T: %v", err, err)
	var lines []int
	for _, pe := range list {
		lines = append(lines, pe.Line)
		assert.Equal(t, "s.csv", pe.File)
		assert.NotZero(t, pe.Column, pe.Error())
		assert.NotEmpty(t, pe.Field, pe.Error())
	}
	assert.Equal(t, []int{3, 4, 5, 6}, lines, err.Error())
	// The first one is still reachable as a *ParseError.
	var pe *ParseError
	require.True(t, errors.As(err, &pe))
	assert.Equal(t, 3, pe.Line)
	// Load hands the whole list on.
	_, err = loadText(t, src+"", Options{})
	require.True(t, errors.As(err, &list))
	assert.Len(t, list, 4)
}

func TestEveryMissingCoordinateListed(t *testing.T) {
	_, err := loadText(t, "id,x,y\nD,0,0\nA,,\nB,1,1\nC,,\n", Options{})
	var list ErrorList
	require.True(t, errors.As(err, &list), "%v", err)
	require.Len(t, list, 2)
	assert.Equal(t, 3, list[0].Line)
	assert.Equal(t, 5, list[1].Line)
}

func TestErrorListIsBounded(t *testing.T) {
	var b strings.Builder
	b.WriteString("id,service\nD,0\n")
	for i := 0; i < 1000; i++ {
		b.WriteString("S" + strconv.Itoa(i) + ",bad\n")
	}
	_, err := ReadSites(strings.NewReader(b.String()), "s.csv")
	var list ErrorList
	require.True(t, errors.As(err, &list))
	assert.LessOrEqual(t, len(list), maxErrors+1)
	assert.Contains(t, list[len(list)-1].Msg, "more errors")
}

func TestTradeHeaderNames(t *testing.T) {
	cases := []struct{ header, field string }{
		{"Customer", "id"},
		{"Client", "id"},
		{"Stop", "id"},
		{"Customer ID", "id"},
		{"Earliest arrival", "earliest"},
		{"Latest arrival", "latest"},
		{"Time window start", "earliest"},
		{"Time window end", "latest"},
		{"TW start", "earliest"},
		{"TW end", "latest"},
		{"Open from", "earliest"},
		{"Open until", "latest"},
		{"Service time (min)", "service"},
	}
	for _, c := range cases {
		t.Run(c.header, func(t *testing.T) {
			assert.Equal(t, c.field, fieldOf(c.header))
		})
	}
}

func TestWindowLikeColumnsRefused(t *testing.T) {
	cases := []struct {
		name, header string
		refused      string // the column named in the error; "" loads
	}{
		{"window start unknown", "id,Window opens at,Window closes at,service", "Window opens at"},
		{"delivery from", "id,Delivery from,latest", "Delivery from"},
		{"service hours", "id,earliest,latest,Service hours", "Service hours"},
		{"deadline", "id,Deadline", "Deadline"},
		// Columns that only look alike in letters are not refused.
		{"vendor", "id,earliest,latest,Vendor", ""},
		{"quiet notes", "id,earliest,latest,notes", ""},
		{"known names", "id,Time window start,Time window end", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cols := strings.Count(c.header, ",") + 1
			row := "A" + strings.Repeat(",1", cols-1)
			_, err := ReadSites(strings.NewReader(c.header+"\n"+row+"\n"), "s.csv")
			if c.refused == "" {
				require.NoError(t, err)
				return
			}
			require.Error(t, err)
			msg := err.Error()
			assert.Contains(t, msg, `"`+c.refused+`"`)
			assert.Contains(t, msg, "s.csv:1:")
			assert.Contains(t, msg, "earliest", "names the accepted columns")
			assert.Contains(t, msg, "time window start", "lists accepted names")
		})
	}
}

func TestRedundantMarksAccepted(t *testing.T) {
	const src = "id,x,y,position\nD,0,0,%s\nA,1,0,\nB,2,0,\nE,3,0,%s\n"
	cases := []struct {
		name, startMark, endMark string
		opt                      Options
		wantErr                  string
	}{
		{"start marked first", "first", "", Options{}, ""},
		{"fixed end marked last", "", "last", Options{End: "E"}, ""},
		{"both", "first", "last", Options{End: "E"}, ""},
		{"start marked last is refused", "last", "", Options{}, "D is the start of the route"},
		{"start pinned to a number is refused", "2", "", Options{}, "D is the start of the route"},
		{"end marked first is refused", "", "first", Options{End: "E"}, "E is the fixed end"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := strings.Replace(strings.Replace(src, "%s", c.startMark, 1), "%s", c.endMark, 1)
			d, err := loadText(t, text, c.opt)
			if c.wantErr != "" {
				require.Error(t, err)
				assert.Contains(t, err.Error(), c.wantErr)
				return
			}
			require.NoError(t, err)
			assert.Nil(t, d.Instance.Position, "a mark true by definition pins nothing")
		})
	}
}

// An absent bound is JSON null: never a large number a reader must
// recognise by a threshold.
func TestOpenBoundIsNull(t *testing.T) {
	d, err := loadText(t, "id,x,y,earliest,latest,service\nD,0,0,08:00,,0\nA,1,0,09:00,10:00,5\nB,2,0,,,5\n", Options{Speed: 60})
	require.NoError(t, err)
	in := d.Instance
	route := []int{0, 1, 2}
	s := solver.Evaluate(in, route)
	p := solver.Plan{Route: route, Schedule: s, Cost: s.Travel, Feasible: s.Feasible}
	var buf bytes.Buffer
	require.NoError(t, WriteJSON(&buf, d.PlanReport(solver.TravelTime, p, nil)))
	var j struct {
		Schedule []map[string]any `json:"schedule"`
		Return   map[string]any   `json:"return"`
	}
	require.NoError(t, json.Unmarshal(buf.Bytes(), &j))
	require.Len(t, j.Schedule, 3)
	cases := []struct {
		name   string
		visit  map[string]any
		latest any
	}{
		{"start with no closing time", j.Schedule[0], nil},
		{"A closes at 10:00", j.Schedule[1], float64(600)},
		{"B with no window", j.Schedule[2], nil},
		{"return with no closing time", j.Return, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			require.Contains(t, c.visit, "latest", "the key is there, null when open")
			assert.Equal(t, c.latest, c.visit["latest"])
			if c.latest == nil {
				assert.Nil(t, c.visit["slack"], "slack to an open bound is null too")
				assert.NotContains(t, c.visit, "latest_clock")
			} else {
				assert.NotNil(t, c.visit["slack"])
			}
		})
	}
	// No sentinel anywhere in the output.
	for _, f := range strings.FieldsFunc(buf.String(), func(r rune) bool { return !(r >= '0' && r <= '9' || r == '.' || r == 'e') }) {
		assert.Less(t, len(f), 10, "a number of ten digits or more in the JSON: %s", f)
	}
	// The CSV and the table write the open bound as "open".
	var csvOut, table bytes.Buffer
	require.NoError(t, WriteCSV(&csvOut, in, d.PlanReport(solver.TravelTime, p, nil)))
	assert.Contains(t, csvOut.String(), "2,B,,09:06,09:06,0,09:11,00:00,open,open,0")
	require.NoError(t, WriteTable(&table, d.PlanReport(solver.TravelTime, p, nil)))
	assert.Contains(t, table.String(), "[00:00, open]")
}

func TestHugeServiceIsNotOpen(t *testing.T) {
	cases := []struct {
		v    int64
		want string
	}{
		{99999999999 * SitesScale, "99999999999"},
		{0, "0"},
		{90 * SitesScale / 4, "22.5"},
	}
	for _, c := range cases {
		assert.Equal(t, c.want, FormatMinutes(c.v))
	}
	d, err := loadText(t, "id,x,y,latest,service\nD,0,0,600,0\nA,1,0,700,99999999999\n", Options{Speed: 60})
	require.NoError(t, err)
	s := solver.Evaluate(d.Instance, []int{0, 1})
	p := solver.Plan{Route: []int{0, 1}, Schedule: s, Cost: s.Travel, Feasible: s.Feasible}
	var table bytes.Buffer
	require.NoError(t, WriteTable(&table, d.PlanReport(solver.TravelTime, p, nil)))
	assert.NotContains(t, table.String(), "LATE by open")
	assert.Contains(t, table.String(), "LATE by 99999999401")
}

func TestMessages(t *testing.T) {
	long := strings.Repeat("x", 5<<20)
	cases := []struct {
		name, sites string
		want        []string
		notWant     []string
	}{
		{"8h is not plain minutes", "id,earliest,latest\nD,08:00,18:00\nA,8h,10:00\n",
			[]string{`"8h" is not a time`, "08:00"}, []string{"plain minutes"}},
		{"8h alone", "id,earliest\nD,0\nA,8h\n",
			[]string{`"8h" is not a time`}, []string{"plain minutes"}},
		{"one long line is echoed short", long + "\n",
			[]string{"…"}, nil},
		{"replacement character from a wrong decoding", "id,name\nD,B\ufffdckerei\n",
			[]string{"s.csv:2", "UTF-8"}, nil},
		{"Windows-1252 byte", "id,name\nD,B\xe4ckerei\n",
			[]string{"s.csv:2", "byte 0xE4", "Windows-1252", "ä", "UTF-8"}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := loadText(t, c.sites, Options{})
			require.Error(t, err)
			msg := err.Error()
			assert.Less(t, len(msg), 600, "message of %d bytes", len(msg))
			for _, w := range c.want {
				assert.Contains(t, msg, w)
			}
			for _, w := range c.notWant {
				assert.NotContains(t, msg, w)
			}
		})
	}
}

func TestWideHeaderIsBounded(t *testing.T) {
	// A header of a million unknown columns: a bounded number of warnings
	// and a short message, not one warning per column.
	var b strings.Builder
	b.WriteString("id")
	for i := 0; i < 1000000; i++ {
		b.WriteString(",c")
		b.WriteString(strconv.Itoa(i))
	}
	b.WriteString("\nA\n")
	_, err := ReadSites(strings.NewReader(b.String()), "s.csv")
	require.Error(t, err)
	assert.Less(t, len(err.Error()), 400)
	assert.Contains(t, err.Error(), "columns")
}

func TestCROnlyLineEndings(t *testing.T) {
	sites := "id,name,earliest,latest,service\rD,Depot,08:00,18:00,0\rA,Alpha,09:00,10:00,5\rB,Beta,09:30,11:00,5\r"
	matrix := ",D,A,B\rD,0,10,12\rA,10,0,5\rB,12,5,0\r"
	d, err := Load(strings.NewReader(sites), strings.NewReader(matrix), Options{SitesName: "s.csv", MatrixName: "m.csv"})
	require.NoError(t, err)
	require.Equal(t, 3, d.Instance.N)
	assert.Equal(t, []int{2, 3, 4}, d.Lines)
	assert.Equal(t, 5*SitesScale, d.Instance.T(1, 2))

	// A benchmark file with CR line ends, through Load as the page and
	// the command line read it.
	b, err := Load(strings.NewReader("# two nodes\r2\r0 5\r7 0\r0 100\r0 90\r"), nil, Options{SitesName: "b.txt"})
	require.NoError(t, err)
	assert.Equal(t, "benchmark", b.Travel)
	assert.Equal(t, int64(7), b.Instance.T(1, 0))
	assert.Equal(t, int64(90), b.Instance.Late[1])
}

func TestMatrixMissingColumn(t *testing.T) {
	sites := "id\nD\nA\nB\nC\n"
	cases := []struct {
		name, matrix string
		want         []string
	}{
		{"a column dropped from every row", ",D,A,B\nD,0,1,2\nA,1,0,3\nB,2,3,0\nC,3,4,5\n",
			[]string{"m.csv:1", "3 site columns", "want 4", "C"}},
		{"one row short", ",D,A,B,C\nD,0,1,2,3\nA,1,0,3,4\nB,2,3,0,5\nC,3,4\n",
			[]string{"m.csv:5", "row C", "2 travel times", "want 4"}},
		{"no labels, a column dropped", "0,1,2\n1,0,3\n2,3,0\n3,4,5\n",
			[]string{"m.csv:1", "3 travel times", "want 4"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Load(strings.NewReader(sites), strings.NewReader(c.matrix), Options{SitesName: "s.csv", MatrixName: "m.csv"})
			require.Error(t, err)
			for _, w := range c.want {
				assert.Contains(t, err.Error(), w)
			}
			assert.NotContains(t, err.Error(), "has 4 values … want 4 rows of 4")
		})
	}
}

func TestJSONErrorsInPlainWords(t *testing.T) {
	var target struct {
		Name  string `json:"name"`
		Route []int  `json:"route"`
	}
	cases := []struct {
		name, text string
		want       string
	}{
		{"object for a string", `{"name":{"a":1}}`, `"name": want text, not an object`},
		{"string in a list of numbers", `{"route":[0,"x"]}`, `"route": want a whole number, not text`},
		{"cut short", `{"name":"a"`, "ends early"},
		{"not JSON", `hello`, "not JSON"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := json.Unmarshal([]byte(c.text), &target)
			if err == nil {
				err = json.NewDecoder(strings.NewReader(c.text)).Decode(&target)
			}
			require.Error(t, err)
			msg := JSONError(err)
			assert.Contains(t, msg, c.want)
			assert.NotContains(t, msg, "Go struct")
			assert.NotContains(t, msg, "unmarshal")
		})
	}
}

func TestCSVCellsCannotRun(t *testing.T) {
	// OWASP, "CSV Injection": cells that begin with = + - @ tab or CR are
	// prefixed with an apostrophe so that a spreadsheet shows them as text.
	cases := []struct{ name, want string }{
		{`=HYPERLINK("http://x.invalid","click")`, `"'=HYPERLINK(""http://x.invalid"",""click"")"`},
		{"+1 Sum", "'+1 Sum"},
		{"-2+3", "'-2+3"},
		{"@cmd", "'@cmd"},
		{"\tTab", "'\tTab"},
		{"\rCR", "\"'\rCR\""},
		{"Plain Café", "Plain Café"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			j := PlanReport{Unit: "min", Schedule: []PlanVisit{{ID: "A", Name: c.name, Slack: fptr(-5), Lateness: 5}}}
			var b bytes.Buffer
			require.NoError(t, WriteCSV(&b, nil, j))
			row := strings.Split(b.String(), "\n")[1]
			assert.Contains(t, row, ","+c.want+",")
			assert.Contains(t, row, ",-5,5", "our own negative numbers stay numbers")
		})
	}
	// ids too.
	var b bytes.Buffer
	require.NoError(t, WriteCSV(&b, nil, PlanReport{Schedule: []PlanVisit{{ID: "=1+1"}}}))
	assert.Contains(t, b.String(), "\n0,'=1+1,")
}

func TestTableEscapesControlCharacters(t *testing.T) {
	cases := []struct{ name, text, want string }{
		{"ESC sequence", "Evil\x1b[2JCo", `Evil\x1b[2JCo`},
		{"OSC title with BEL", "\x1b]0;owned\x07Shop", `\x1b]0;owned\x07Shop`},
		{"C1 CSI", "A\u009bB", `A\u009bB`},
		{"newline", "Two\nLines", `Two\nLines`},
		{"plain", "Café Lantern", "Café Lantern"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			j := PlanReport{Instance: c.text, Unit: "min", Schedule: []PlanVisit{{ID: c.text, Name: c.text}}}
			var b bytes.Buffer
			require.NoError(t, WriteTable(&b, j))
			out := b.String()
			assert.Contains(t, out, c.want)
			for _, r := range out {
				if r == '\n' {
					continue
				}
				assert.False(t, r < 0x20 || r == 0x7f || r >= 0x80 && r < 0xa0, "raw control character %U in the table", r)
			}
		})
	}
}

func fptr(v float64) *float64 { return &v }

// The quick reader of plain decimals agrees with the exact one.
func TestFastUnitsAgreesWithExact(t *testing.T) {
	cases := []string{"0", "7", "12.5", "0.0005", "0.00025", "1.0000001", "99999999999", "123456789012345", "5.", ".5", "3,25", "1e3", "-4", "", "1.2.3", "1234567890123456"}
	for _, s := range cases {
		for _, per := range []int64{SitesScale, perSecond} {
			for _, cd := range []bool{false, true} {
				v, ok := fastUnits(s, per, cd)
				if !ok {
					continue
				}
				r, rok := parseDecimal(s, cd)
				require.True(t, rok, s)
				want, wok := ratUnits(r, per)
				require.True(t, wok, s)
				assert.Equal(t, want, v, "%q per %d", s, per)
			}
		}
	}
	_, ok := fastUnits("-4", SitesScale, false)
	assert.False(t, ok, "signs go to the exact reader")
}
