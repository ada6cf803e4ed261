package jsonlite

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"math/rand"
	"reflect"
	"strings"
	"testing"
	"unicode/utf8"
)

// Strings are written as encoding/json writes them, with and without the
// HTML escapes, on every byte, every control character, invalid UTF-8,
// U+2028/U+2029 and random text.
func TestAppendStringAsEncodingJSON(t *testing.T) {
	cases := []string{"", "plain", `quote " and \ backslash`, "<a href='x'>&amp;</a>", "tab\tnew\nline\rcr\bbs\ffeed",
		"\x00\x01\x1f\x7f", "é ß 東京 🚚", "\u2028\u2029", "bad \xff\xfe utf8 \xc3", "\xed\xa0\x80 surrogate bytes", "=1+1", "'quoted'"}
	for c := 0; c < 256; c++ {
		cases = append(cases, string([]byte{byte(c)}), "a"+string([]byte{byte(c)})+"b")
	}
	rng := rand.New(rand.NewSource(1))
	for k := 0; k < 2000; k++ {
		b := make([]byte, rng.Intn(12))
		for i := range b {
			b[i] = byte(rng.Intn(256))
		}
		cases = append(cases, string(b))
		var rs []rune
		for i := rng.Intn(6); i >= 0; i-- {
			rs = append(rs, rune(rng.Intn(0x2100)))
		}
		cases = append(cases, string(rs))
	}
	for _, s := range cases {
		for _, html := range []bool{false, true} {
			var want bytes.Buffer
			enc := json.NewEncoder(&want)
			enc.SetEscapeHTML(html)
			if err := enc.Encode(s); err != nil {
				t.Fatal(err)
			}
			got := AppendString(nil, s, html)
			if string(got) != strings.TrimSuffix(want.String(), "\n") {
				t.Fatalf("%q (html %v): got %s, encoding/json %s", s, html, got, want.String())
			}
			if gb := AppendString(nil, []byte(s), html); !bytes.Equal(gb, got) {
				t.Fatalf("%q: []byte and string differ", s)
			}
		}
	}
}

// Numbers are written as encoding/json writes a float64, at the edges of
// the 'e' form (1e-6, 1e21), with exponents of one and more digits, and on
// random values of every magnitude; NaN and the infinities are its error.
func TestAppendFloatAsEncodingJSON(t *testing.T) {
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 0.1, 0.2, 0.3, 1.0 / 3, 2.0 / 3, 100, 1e6, 1e20, 1e21, 9.999999999999999e20, 1e-6, 9.99e-7,
		1e-7, 1.5e-9, 1e-10, 1e-100, 1e100, 1.7976931348623157e308, 5e-324, -5e-324, 123456789012345678, 812.5, 1234.56, -0.000001, 0.0000015,
		math.MaxInt64, math.MinInt64, 1 << 53, 1<<53 + 1, 4.35, 0.01, 99.995}
	rng := rand.New(rand.NewSource(2))
	for k := 0; k < 20000; k++ {
		vals = append(vals, math.Float64frombits(rng.Uint64()))
		vals = append(vals, (rng.Float64()-0.5)*math.Pow(10, float64(rng.Intn(60)-30)))
		vals = append(vals, math.Round(rng.Float64()*1e6)/100)
	}
	for _, v := range vals {
		want, werr := json.Marshal(v)
		got, gerr := AppendFloat(nil, v)
		if werr != nil {
			if gerr == nil || gerr.Error() != werr.Error() {
				t.Fatalf("%v: got error %v, encoding/json %v", v, gerr, werr)
			}
			continue
		}
		if gerr != nil || string(got) != string(want) {
			t.Fatalf("%v (bits %x): got %s (%v), encoding/json %s", v, math.Float64bits(v), got, gerr, want)
		}
	}
	for _, v := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		_, werr := json.Marshal(v)
		_, gerr := AppendFloat(nil, v)
		if werr == nil || gerr == nil || werr.Error() != gerr.Error() {
			t.Fatalf("%v: got %v, encoding/json %v", v, gerr, werr)
		}
	}
}

type sample struct {
	S   string             `json:"s"`
	B   bool               `json:"b"`
	I   int                `json:"i"`
	I64 int64              `json:"i64"`
	F   float64            `json:"f"`
	SS  []string           `json:"ss"`
	IS  []int              `json:"is"`
	M   map[string]float64 `json:"m"`
	O   part               `json:"o"`
	L   []part             `json:"l"`
}

type part struct {
	V string `json:"v"`
	N []int  `json:"n"`
}

func decodeSample(data []byte) (sample, error) {
	var s sample
	d := NewDecoder(data)
	d.Object([]string{"s", "b", "i", "i64", "f", "ss", "is", "m", "o", "l"}, func(name string) {
		switch name {
		case "s":
			d.String(&s.S)
		case "b":
			d.Bool(&s.B)
		case "i":
			d.IntInt(&s.I)
		case "i64":
			d.Int(&s.I64)
		case "f":
			d.Float(&s.F)
		case "ss":
			d.Strings(&s.SS)
		case "is":
			d.Ints(&s.IS)
		case "m":
			d.FloatMap(&s.M)
		case "o":
			decodePart(d, &s.O)
		case "l":
			old := s.L
			out := old[:0]
			read, isNull := d.Array(func() {
				var p part
				if i := len(out); i < len(old) {
					p = old[i]
				}
				decodePart(d, &p)
				out = append(out, p)
			})
			if isNull {
				s.L = nil
			} else if read {
				if out == nil {
					out = []part{}
				}
				s.L = out
			}
		}
	})
	return s, d.Err()
}

func decodePart(d *Decoder, p *part) {
	d.Object([]string{"v", "n"}, func(name string) {
		if name == "v" {
			d.String(&p.V)
		} else {
			d.Ints(&p.N)
		}
	})
}

// wantOf is the words for what a Go type wants, as format.JSONError says.
func wantOf(t reflect.Type) string {
	switch t.Kind() {
	case reflect.String:
		return WantText
	case reflect.Bool:
		return WantBool
	case reflect.Int, reflect.Int64:
		return WantInt
	case reflect.Float64:
		return WantNumber
	case reflect.Slice:
		return WantList
	case reflect.Map, reflect.Struct:
		return WantObject
	}
	return "?"
}

// compareDecode decodes data with both and reports a difference.
func compareDecode(t *testing.T, data []byte) {
	t.Helper()
	var want sample
	werr := json.Unmarshal(data, &want)
	got, gerr := decodeSample(data)
	var wse *json.SyntaxError
	var wte *json.UnmarshalTypeError
	var gse *SyntaxError
	var gte *TypeError
	switch {
	case werr == nil:
		if gerr != nil {
			t.Fatalf("%q: got error %v, encoding/json none", data, gerr)
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("%q: got %+v, encoding/json %+v", data, got, want)
		}
	case errors.As(werr, &wse):
		if !errors.As(gerr, &gse) || gse.Msg != wse.Error() || gse.Offset != wse.Offset {
			t.Fatalf("%q: got %#v, encoding/json syntax error %q at %d", data, gerr, wse.Error(), wse.Offset)
		}
	case errors.As(werr, &wte):
		if !errors.As(gerr, &gte) || gte.Value != wte.Value || gte.Field != wte.Field || gte.Want != wantOf(wte.Type) {
			t.Fatalf("%q: got %#v, encoding/json type error %q %q %v", data, gerr, wte.Value, wte.Field, wte.Type)
		}
	default:
		t.Fatalf("%q: encoding/json error of another kind: %v", data, werr)
	}
}

var validDocs = []string{
	`{}`, ` { } `, `null`, `{"s":"x"}`, `{"S":"upper case key","B":true}`, `{"s":"a\"b\\c\/d\b\f\n\r\t\u00e9\u2028\ud83d\ude9a\ud800x\udc00"}`,
	`{"s":"raw é 東京", "s":"later wins"}`, `{"s":null,"b":null,"i":null,"f":null,"ss":null,"is":null,"m":null,"o":null,"l":null}`,
	`{"b":false,"i":-0,"i64":-9223372036854775808,"f":-1.5e-7,"ss":[],"is":[],"m":{},"l":[]}`,
	`{"i":9223372036854775807,"f":1E400}`, `{"i":1.5}`, `{"i":1e3}`, `{"i":"7"}`, `{"f":"7"}`, `{"s":7}`, `{"s":true}`, `{"b":1}`, `{"b":"yes"}`,
	`{"ss":"a"}`, `{"ss":{"a":1}}`, `{"ss":[1,"a",null,true]}`, `{"is":[1,2.5,"3",4]}`, `{"is":[1,2],"is":[null,3,4]}`, `{"m":{"a":1,"b":"x","c":null}}`,
	`{"m":{"a":1},"m":{"b":2}}`, `{"m":[1]}`, `{"o":{"v":"x","n":[1,2],"extra":{"deep":[1,{"a":null}]}}}`, `{"o":"text"}`, `{"o":[]}`, `{"o":5}`,
	`{"l":[{"v":"a"},{"v":1},{"n":["x"]}]}`, `{"l":{"v":"a"}}`, `{"unknown":[1,2,{"x":"y"}],"s":"after"}`, `{"ſ":"long s","K":"kelvin"}`,
	`[1,2]`, `"text"`, `5`, `true`, `{"i":01}`, `{"s":"x"} `, "\t\n\r {\"s\" : \"spaced\" , \"i\" : 3 }\n", `{"s":"\u0000"}`,
	`{"f":-0.0,"i64":1e2}`, `{"f":123456789012345678901234567890}`, `{"i":-}`, `{"s":"x",}`, `{"s" "x"}`, `{s:"x"}`, `{"s":'x'}`,
}

// The decoder reads what encoding/json's Unmarshal reads, and fails where
// it fails, with the same message and offset (syntax) or the same value,
// field and kind (types): on documents of every kind, cut short at every
// byte and with every byte replaced by each of a set of troublemakers.
func TestDecoderAsEncodingJSON(t *testing.T) {
	bad := []byte{'x', '"', '}', ']', '{', '[', ',', ':', '1', '0', ' ', '\\', 0x01, 0xff, '.', 'e', 'E', '-', '+', 'n', 't', 'u'}
	n := 0
	for _, doc := range validDocs {
		data := []byte(doc)
		compareDecode(t, data)
		for i := 0; i <= len(data); i++ {
			compareDecode(t, data[:i])
			n++
			if i == len(data) {
				break
			}
			for _, c := range bad {
				m := append([]byte(nil), data...)
				m[i] = c
				compareDecode(t, m)
				ins := append(append(append([]byte(nil), data[:i]...), c), data[i:]...)
				compareDecode(t, ins)
				n += 2
			}
		}
	}
	deep := strings.Repeat("[", 10001) + strings.Repeat("]", 10001)
	compareDecode(t, []byte(`{"l":`+deep+`}`))
	compareDecode(t, []byte(`{"x":`+deep+`}`))
	ok := strings.Repeat("[", 9990) + strings.Repeat("]", 9990)
	compareDecode(t, []byte(`{"x":`+ok+`}`))
	if n < 10000 {
		t.Fatalf("only %d documents compared", n)
	}
	if !utf8.ValidString(validDocs[5]) {
		t.Fatal("sample text is not UTF-8")
	}
}

// Random documents built from JSON's tokens, valid and not.
func TestDecoderRandomTokens(t *testing.T) {
	toks := []string{"{", "}", "[", "]", ",", ":", `"s"`, `"i"`, `"f"`, `"ss"`, `"is"`, `"m"`, `"o"`, `"l"`, `"v"`, `"n"`, `"x"`, "1", "-2.5", "1e3", "null", "true", "false", " ", `"a\n"`}
	rng := rand.New(rand.NewSource(3))
	for k := 0; k < 30000; k++ {
		var b strings.Builder
		b.WriteString("{")
		for i := rng.Intn(12); i > 0; i-- {
			b.WriteString(toks[rng.Intn(len(toks))])
		}
		if rng.Intn(2) == 0 {
			b.WriteString("}")
		}
		compareDecode(t, []byte(b.String()))
	}
}

// The writer lays out objects and arrays as encoding/json's Encoder does,
// compact and with SetIndent("", "  "), empty containers included.
func TestWriterLayoutAsEncodingJSON(t *testing.T) {
	type doc struct {
		A string             `json:"a"`
		B []int              `json:"b"`
		C []string           `json:"c"`
		D map[string]float64 `json:"d"`
		E []part             `json:"e"`
		F *float64           `json:"f"`
		G bool               `json:"g"`
	}
	one := 1.5
	docs := []doc{{}, {A: "<x>", B: []int{}, C: []string{}, D: map[string]float64{}, E: []part{}},
		{A: "y", B: []int{1, 2}, C: []string{"p", "q"}, D: map[string]float64{"z": 1, "a": 2.5, "m": 0}, E: []part{{V: "v", N: []int{3}}, {}}, F: &one, G: true}}
	for _, d := range docs {
		for _, indent := range []bool{false, true} {
			for _, html := range []bool{false, true} {
				var want bytes.Buffer
				enc := json.NewEncoder(&want)
				enc.SetEscapeHTML(html)
				if indent {
					enc.SetIndent("", "  ")
				}
				if err := enc.Encode(d); err != nil {
					t.Fatal(err)
				}
				w := NewWriter(indent, html)
				w.BeginObject()
				w.StringField("a", d.A)
				w.IntsField("b", d.B)
				w.StringsField("c", d.C)
				w.Key("d")
				w.FloatMap(d.D)
				w.Key("e")
				if d.E == nil {
					w.Null()
				} else {
					w.BeginArray()
					for _, p := range d.E {
						w.BeginObject()
						w.StringField("v", p.V)
						w.IntsField("n", p.N)
						w.EndObject()
					}
					w.EndArray()
				}
				w.FloatPtrField("f", d.F)
				w.BoolField("g", d.G)
				w.EndObject()
				var got bytes.Buffer
				if err := w.Encode(&got); err != nil {
					t.Fatal(err)
				}
				if got.String() != want.String() {
					t.Fatalf("indent %v html %v:\ngot  %s\nwant %s", indent, html, got.String(), want.String())
				}
				c := Compact(nil, want.Bytes())
				var wc bytes.Buffer
				if err := json.Compact(&wc, want.Bytes()); err != nil {
					t.Fatal(err)
				}
				if string(c) != wc.String() {
					t.Fatalf("Compact: got %s, json.Compact %s", c, wc.String())
				}
			}
		}
	}
	w := NewWriter(false, false)
	w.BeginArray()
	w.Float(math.NaN())
	w.EndArray()
	var out bytes.Buffer
	if err := w.Encode(&out); err == nil || out.Len() != 0 || err.Error() != "json: unsupported value: NaN" {
		t.Fatalf("NaN: got %v, wrote %q", err, out.String())
	}
}
