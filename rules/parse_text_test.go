package rules

import (
	"strconv"
	"strings"
	"testing"
	"unicode/utf16"
)

// textYAML is a valid rule set for the text tests, kept here so that they depend on no other test file.
const textYAML = `# a valid rule set
bands:
  - below_kmh: 36
    zoom: 17
    pitch_deg: 40
  - zoom: 15
    pitch_deg: 60
hysteresis_kmh: 9
max_zoom_rate_per_s: 0.5
max_pitch_rate_deg_per_s: 10
turn: {within_m: 200, min_angle_deg: 30, zoom: 16.5}
min_zoom: 14
max_zoom: 18
max_turn_rate_deg_per_s: 90
`

// The YAML parser refuses invalid UTF-8 and control characters without saying where they are (its
// reader put every one of them on line 1); Parse and Lint scan the text first and name the line and
// column of the first such byte. Positions are hand-placed: lines end at LF, CR LF or a lone CR, and
// columns count characters from 1, an invalid byte counting as one.
func TestBadTextPlace(t *testing.T) {
	cases := []struct {
		desc, in  string
		line, col int
		msg       string // a part of the message
	}{
		{"not UTF-8 at the start of line 2", "a: 1\n\xff\xfe: 2\n", 2, 1, "byte 0xff is not UTF-8"},
		{"not UTF-8 inside a value", "# comment\nx: ab\xc3(\n", 2, 6, "byte 0xc3 is not UTF-8"},
		{"a bell in a value", "hysteresis_kmh: 5\nmin_zoom: 1\a0\n", 2, 12, "control character U+0007"},
		{"NUL at the very start", "\x00", 1, 1, "control character U+0000"},
		{"after CR LF line ends", "a: 1\r\nb: 2\r\nc: \x01\r\n", 3, 4, "control character U+0001"},
		{"after a lone CR", "a: 1\rb: \x1b\n", 2, 4, "control character U+001B"},
		{"columns count characters, not bytes", "name: é€😀\x7f\n", 1, 10, "control character U+007F"},
		{"a tab before it counts one", "a:\t\x0c\n", 1, 4, "control character U+000C"},
		{"a C1 control (NEL)", "a: 1\nb: \u0085\n", 2, 4, "control character U+0085"},
		{"a noncharacter", "a: 1\n\nb: \uffff\n", 3, 4, "U+FFFF is not a character"},
		{"a UTF-16 surrogate written as UTF-8", "a: \xed\xa0\x80\n", 1, 4, "byte 0xed is not UTF-8"},
		{"after a UTF-8 byte order mark", "\ufeffa: \x02\n", 1, 4, "control character U+0002"},
		{"the first of several is named, the rest counted", "a: \x01\nb: \xff\nc: \x02\n", 1, 4, "(and 2 more after it)"},
	}
	for _, c := range cases {
		_, err := Parse([]byte(c.in), "s.yaml")
		if err == nil {
			t.Errorf("%s: Parse(%q) = nil error, want a syntax error at s.yaml:%d:%d", c.desc, c.in, c.line, c.col)
			continue
		}
		errs, ok := err.(Errors)
		if !ok || len(errs) != 1 {
			t.Errorf("%s: Parse(%q) = %v, want one problem", c.desc, c.in, err)
			continue
		}
		p := errs[0]
		if p.Kind != KindSyntax || p.Line != c.line || p.Col != c.col || !strings.Contains(p.Msg, c.msg) {
			t.Errorf("%s: Parse(%q) = %v (kind %v, line %d, column %d), want a %v problem at %d:%d containing %q",
				c.desc, c.in, p, p.Kind, p.Line, p.Col, KindSyntax, c.line, c.col, c.msg)
		}
		if want := "s.yaml:" + strconv.Itoa(c.line) + ":" + strconv.Itoa(c.col) + ": "; !strings.HasPrefix(err.Error(), want) {
			t.Errorf("%s: Parse(%q) = %q, want it to start with %q", c.desc, c.in, err.Error(), want)
		}
		fs := Lint([]byte(c.in), "s.yaml")
		if len(fs) != 1 || fs[0].Line != c.line || fs[0].Col != c.col || fs[0].Kind != KindSyntax {
			t.Errorf("%s: Lint(%q) = %v, want the one syntax finding at %d:%d", c.desc, c.in, fs, c.line, c.col)
		}
	}
}

// Tab, LF and CR are the control characters YAML allows; a byte order mark (UTF-8, or UTF-16 of either
// byte order, which the YAML parser also reads) is not part of the text. Each of these reads to the same
// rule set as the plain file, and a later problem keeps its line and column.
func TestGoodTextAccepted(t *testing.T) {
	plain, err := Parse([]byte(textYAML), "s.yaml")
	if err != nil {
		t.Fatalf("Parse(textYAML) = %v", err)
	}
	crlf := strings.ReplaceAll(textYAML, "\n", "\r\n")
	tabbed := strings.Replace(textYAML, "min_zoom: ", "min_zoom:\t", 1)
	for desc, in := range map[string][]byte{
		"CR LF line ends":         []byte(crlf),
		"a tab after a colon":     []byte(tabbed),
		"a UTF-8 byte order mark": append([]byte("\ufeff"), textYAML...),
		"UTF-16LE with its mark":  utf16Text(textYAML, false),
		"UTF-16BE with its mark":  utf16Text(textYAML, true),
	} {
		s, err := Parse(in, "s.yaml")
		if err != nil {
			t.Errorf("%s: Parse = %v, want the rule set", desc, err)
			continue
		}
		if s.MinZoom != plain.MinZoom || len(s.Bands) != len(plain.Bands) || s.Turn != plain.Turn {
			t.Errorf("%s: Parse = %+v, want %+v", desc, s, plain)
		}
	}
	// In UTF-16 a control character is placed like in UTF-8, and so is a YAML problem after the mark.
	_, err = Parse(utf16Text("a: 1\nb: \x01\n", false), "s.yaml")
	if err == nil || !strings.HasPrefix(err.Error(), "s.yaml:2:4: control character U+0001") {
		t.Errorf("Parse(UTF-16LE with U+0001 on line 2) = %v, want s.yaml:2:4: control character U+0001 …", err)
	}
	zoom31 := strings.Replace(textYAML, "    zoom: 17", "    zoom:    31", 1) // line 4, the value at column 14
	_, err = Parse(utf16Text(zoom31, true), "s.yaml")
	if want := "s.yaml:4:14: bands[0].zoom: 31 is outside [0, 30]"; err == nil || err.Error() != want {
		t.Errorf("Parse(UTF-16BE, zoom 31 on line 4) = %v, want %q", err, want)
	}
}

// A broken UTF-16 text: an odd number of bytes, or a lone surrogate.
func TestBadUTF16(t *testing.T) {
	odd := append(utf16Text("a: 1\nb: 2", false), 'x')
	lone := utf16Text("a: 1\nb: ", true)
	lone = append(lone, 0xD8, 0x00, 0x00, '\n')
	for _, c := range []struct {
		desc      string
		in        []byte
		line, col int
		msg       string
	}{
		{"odd length", odd, 2, 5, "odd number of bytes"},
		{"lone high surrogate", lone, 2, 4, "unpaired UTF-16 surrogate 0xd800"},
	} {
		_, err := Parse(c.in, "s.yaml")
		errs, ok := err.(Errors)
		if !ok || len(errs) != 1 || errs[0].Line != c.line || errs[0].Col != c.col || !strings.Contains(errs[0].Msg, c.msg) {
			t.Errorf("%s: Parse = %v, want one problem at s.yaml:%d:%d containing %q", c.desc, err, c.line, c.col, c.msg)
		}
	}
}

// utf16Text encodes s as UTF-16 with its byte order mark.
func utf16Text(s string, bigEndian bool) []byte {
	units := append([]uint16{0xFEFF}, utf16.Encode([]rune(s))...)
	out := make([]byte, 0, 2*len(units))
	for _, u := range units {
		if bigEndian {
			out = append(out, byte(u>>8), byte(u))
		} else {
			out = append(out, byte(u), byte(u>>8))
		}
	}
	return out
}
