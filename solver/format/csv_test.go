package format

import (
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"math/rand"
	"reflect"
	"strconv"
	"strings"
	"testing"
)

type csvRead struct {
	line   int
	fields []string
}

// stdCSV reads text with encoding/csv set as the readers here were.
func stdCSV(text string, comma rune, trim bool) ([]csvRead, *csv.ParseError, error) {
	cr := csv.NewReader(strings.NewReader(text))
	cr.Comma, cr.Comment, cr.FieldsPerRecord, cr.TrimLeadingSpace = comma, '#', -1, trim
	var out []csvRead
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return out, nil, nil
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return out, pe, nil
			}
			return out, nil, err
		}
		line, _ := cr.FieldPos(0)
		out = append(out, csvRead{line, append([]string(nil), rec...)})
	}
}

func ownCSV(text string, comma rune, trim bool) ([]csvRead, *csvError) {
	cr := &csvReader{text: text, comma: comma, comment: '#', trim: trim}
	var out []csvRead
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return out, err.(*csvError)
		}
		out = append(out, csvRead{cr.Line(), append([]string(nil), rec...)})
	}
}

func compareCSV(t *testing.T, text string, comma rune, trim bool) {
	t.Helper()
	want, wpe, werr := stdCSV(text, comma, trim)
	if werr != nil {
		t.Fatalf("%q: encoding/csv: %v", text, werr)
	}
	got, gpe := ownCSV(text, comma, trim)
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("%q (comma %q, trim %v):\ngot  %v\nwant %v", text, comma, trim, got, want)
	}
	switch {
	case wpe == nil && gpe == nil:
	case wpe == nil || gpe == nil:
		t.Fatalf("%q (comma %q, trim %v): got error %v, encoding/csv %v", text, comma, trim, gpe, wpe)
	default:
		wantKind := map[error]error{csv.ErrBareQuote: errBareQuote, csv.ErrQuote: errQuote}[wpe.Err]
		if gpe.StartLine != wpe.StartLine || gpe.Line != wpe.Line || gpe.Column != wpe.Column || gpe.Err != wantKind {
			t.Fatalf("%q (comma %q, trim %v): got %+v, encoding/csv %+v", text, comma, trim, *gpe, *wpe)
		}
	}
}

// The reader gives encoding/csv's records, record lines and quoting
// errors (line, column, kind) on hand-made texts and on many random ones
// built from the characters that matter (quotes, delimiters, \r, \n,
// spaces, tabs, '#', non-ASCII), for each delimiter the sites reader
// picks, with and without trimming leading space.
func TestCSVReaderAsEncodingCSV(t *testing.T) {
	texts := []string{"", "\n", "\r\n", "\r", "a", "a\n", "a,b\nc,d", "a,b\r\nc,d\r\n", "a,b\r", "# comment\na,b", " # not a comment\n",
		"\n\n\na\n\n", `"quoted, with comma",b`, `"with ""quotes"""`, "\"multi\nline\",x\ny", "\"multi\r\nline\"\r\n", `a"b,c`, `"a"b,c`,
		`"unclosed`, "\"unclosed\nmore\n", "\"unclosed\nmore", "a,\"b\nc", `"a" ,b`, `  "lead",x`, "  a,  b,\t c", "\t\t\n", "a,,b,", ",,\n,",
		"Café;Zürich;東京\n", "a;\"b;c\";d", "x\ty\t\tz", "x\t\"y\tz\"\tw", "a,b\n\"", "\"\"", "\"\"\"", "a\r\rb\r\n", "é\"x", "\"x\"\"", "#\n#x,y\nz",
		"\u00a0lead nbsp,b", "a,\u0085b", "\xff,\"\xfe\""}
	rng := rand.New(rand.NewSource(11))
	pieces := []string{"a", "bc", "\"", ",", ";", "\t", "|", " ", "\n", "\r\n", "\r", "#", "é", "\"\"", "x y"}
	for k := 0; k < 6000; k++ {
		var b strings.Builder
		for i := rng.Intn(14); i > 0; i-- {
			b.WriteString(pieces[rng.Intn(len(pieces))])
		}
		texts = append(texts, b.String())
	}
	for _, text := range texts {
		for _, comma := range []rune{',', ';', '\t', '|'} {
			compareCSV(t, text, comma, comma != '\t')
			compareCSV(t, text, comma, false)
		}
	}
}

// The writer writes encoding/csv's bytes: quoting where it quotes, quotes
// doubled, \r and \n kept, for fields of the same characters.
func TestCSVWriterAsEncodingCSV(t *testing.T) {
	rng := rand.New(rand.NewSource(12))
	pieces := []string{"", "a", "b c", "\"", ",", ";", "\t", " ", "\n", "\r\n", "\r", "#", "é", "\u00a0", "\\.", "-5", "=1+1", "'"}
	for k := 0; k < 5000; k++ {
		var rows [][]string
		for r := rng.Intn(4); r >= 0; r-- {
			row := make([]string, 1+rng.Intn(5))
			for i := range row {
				var b strings.Builder
				for j := rng.Intn(4); j > 0; j-- {
					b.WriteString(pieces[rng.Intn(len(pieces))])
				}
				row[i] = b.String()
			}
			rows = append(rows, row)
		}
		rows = append(rows, []string{`\.`}, []string{""}, []string{" lead"})
		var want, got bytes.Buffer
		sw := csv.NewWriter(&want)
		ow := newCSVWriter(&got)
		for _, row := range rows {
			if err := sw.Write(row); err != nil {
				t.Fatal(err)
			}
			if err := ow.Write(row); err != nil {
				t.Fatal(err)
			}
		}
		sw.Flush()
		ow.Flush()
		if ow.Error() != nil || got.String() != want.String() {
			t.Fatalf("%q:\ngot  %q\nwant %q (%v)", rows, got.String(), want.String(), ow.Error())
		}
	}
}

// matrixText is a 1,000 × 1,000 travel matrix as CSV (about 5.8 MB), for the
// readers' benchmarks.
func matrixText() string {
	var b strings.Builder
	rng := rand.New(rand.NewSource(13))
	for i := 0; i < 1000; i++ {
		for j := 0; j < 1000; j++ {
			if j > 0 {
				b.WriteByte(',')
			}
			b.WriteString(strings.TrimRight(strings.TrimRight(strconv.FormatFloat(rng.Float64()*90, 'f', 2, 64), "0"), "."))
		}
		b.WriteByte('\n')
	}
	return b.String()
}

// The reader against encoding/csv on a large matrix: `go test -run '^$'
// -bench CSVRead -benchtime 5x ./solver/format`.
func BenchmarkCSVReadOwn(b *testing.B) {
	text := matrixText()
	b.SetBytes(int64(len(text)))
	for b.Loop() {
		cr := &csvReader{text: text, comma: ',', comment: '#', trim: true}
		for {
			if _, err := cr.Read(); err != nil {
				break
			}
		}
	}
}

func BenchmarkCSVReadEncodingCSV(b *testing.B) {
	text := matrixText()
	b.SetBytes(int64(len(text)))
	for b.Loop() {
		cr := csv.NewReader(strings.NewReader(text))
		cr.Comment, cr.FieldsPerRecord, cr.TrimLeadingSpace, cr.ReuseRecord = '#', -1, true, true
		for {
			if _, err := cr.Read(); err != nil {
				break
			}
		}
	}
}
