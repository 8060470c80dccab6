package rules

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// baseYAML is worked() as a rule file; the line numbers in the tables below count from its first line.
const baseYAML = `# base rule set for the lint tests
bands:
  - below_kmh: 36
    zoom: 17
    pitch_deg: 40
  - below_kmh: 72
    zoom: 16
    pitch_deg: 50
  - zoom: 15
    pitch_deg: 60
hysteresis_kmh: 9
max_zoom_rate_per_s: 0.5
max_pitch_rate_deg_per_s: 10
turn:
  within_m: 200
  min_angle_deg: 30
  zoom: 16.5
min_zoom: 14
max_zoom: 18
max_turn_rate_deg_per_s: 90
`

// edit replaces line n (1-based) of baseYAML with text, which may hold several lines or none.
func edit(n int, text string) []byte {
	lines := strings.Split(baseYAML, "\n")
	out := append([]string{}, lines[:n-1]...)
	if text != "" || n == 0 {
		out = append(out, text)
	}
	out = append(out, lines[n:]...)
	return []byte(strings.Join(out, "\n"))
}

// brief renders a finding as "line:col severity kind field" for the tables.
func brief(f Finding) string {
	return fmt.Sprintf("%d:%d %s %s %s", f.Line, f.Col, f.Severity, f.Kind, f.Field)
}

func briefs(fs []Finding) []string {
	out := []string{}
	for _, f := range fs {
		out = append(out, brief(f))
	}
	return out
}

// setText renders a Set for failure messages: its JSON, so that band edges show as numbers.
func setText(s *Set) string {
	b, err := json.Marshal(s)
	if err != nil {
		return fmt.Sprintf("%+v (%v)", *s, err)
	}
	return string(b)
}

func TestLintBaseIsClean(t *testing.T) {
	if fs := Lint([]byte(baseYAML), "base.yaml"); len(fs) != 0 {
		t.Fatalf("Lint(baseYAML) found:\n%s", findingsText(fs))
	}
	s, err := Parse([]byte(baseYAML), "base.yaml")
	if err != nil {
		t.Fatalf("Parse(baseYAML): %v", err)
	}
	if !reflect.DeepEqual(*s, *worked()) {
		t.Fatalf("Parse(baseYAML) = %s, want %s (worked())", setText(s), setText(worked()))
	}
}

func TestLintFindings(t *testing.T) {
	// Each row breaks baseYAML in one way; want lists every finding as "line:col severity kind field",
	// the position counted by hand in the edited text (columns are 1-based, 0 when YAML gives none).
	cases := []struct {
		name string
		data []byte
		want []string
	}{
		{"syntax", edit(12, "max_zoom_rate_per_s: 0.5: 3"), []string{"12:0 error syntax "}},
		{"type", edit(12, "max_zoom_rate_per_s: fast"), []string{"12:22 error type max_zoom_rate_per_s"}},
		{"type: an object for a number", edit(19, "max_zoom: {a: 1}"), []string{"19:11 error type max_zoom"}},
		{"missing field: at the enclosing object", edit(16, ""), []string{"15:3 error missing turn.min_angle_deg"}},
		{"a field with no value", edit(16, "  min_angle_deg:"), []string{"16:17 error missing turn.min_angle_deg"}},
		{"unknown field: at its key", edit(16, "  min_angel_deg: 30"), []string{
			"15:3 error missing turn.min_angle_deg",
			"16:3 error unknown-field turn.min_angel_deg",
		}},
		{"duplicate field: at the second key", edit(19, "min_zoom: 15"), []string{
			"2:1 error missing max_zoom", // the root object starts at its first key, after the comment
			"19:1 error duplicate-field min_zoom",
		}},
		{"not finite", edit(11, "hysteresis_kmh: .nan"), []string{"11:17 error not-finite hysteresis_kmh"}},
		{"too large to be finite", edit(19, "max_zoom: 1e999"), []string{"19:11 error not-finite max_zoom"}},
		{"range", edit(7, "    zoom: 31"), []string{"7:11 error range bands[1].zoom"}},
		{"range: pitch 90", edit(10, "    pitch_deg: 90"), []string{"10:16 error range bands[2].pitch_deg"}},
		{"order", edit(6, "  - below_kmh: 30"), []string{"6:16 error order bands[1].below_kmh"}},
		{"edge on the last band", edit(10, "    pitch_deg: 60\n    below_kmh: 100"), []string{"11:16 error last-band-edge bands[2].below_kmh"}},
		{"edge missing on a middle band: at the band", edit(6, "  -"), []string{"7:5 error missing bands[1].below_kmh"}},
		{"no bands", []byte(strings.Replace(baseYAML, baseYAML[strings.Index(baseYAML, "bands:"):strings.Index(baseYAML, "hysteresis")], "bands: []\n", 1)),
			[]string{"2:8 error missing bands"}},
		{"min above max", edit(18, "min_zoom: 18.5"), []string{"18:11 error min-above-max min_zoom"}},
		// Regression (found by FuzzParse): a last band that is not an object is reported as such and
		// nothing else; it used to be reported as an edge on the last band, and before that it panicked.
		{"a null last band", []byte(strings.Replace(baseYAML, "  - zoom: 15\n    pitch_deg: 60\n", "  -\n", 1)),
			[]string{"9:4 error missing bands[2]"}},
		{"a number for the last band", []byte(strings.Replace(baseYAML, "  - zoom: 15\n    pitch_deg: 60\n", "  - 15\n", 1)),
			[]string{"9:5 error type bands[2]"}},
		{"errors from every stage, in position order", edit(11, "hysteresis_kmh: -1\nspeed_limit: 3\nturn: 4"), []string{
			"11:17 error range hysteresis_kmh",
			"12:1 error unknown-field speed_limit",
			"16:1 error duplicate-field turn", // the original turn, now on line 16, is the second

		}},
		// With a structural error the semantic pass cannot run; the schema's own range and band-layout
		// findings stand in for it, worded the same way.
		{"schema stands in: open middle band and a range", []byte(strings.NewReplacer("  - below_kmh: 72\n", "  -\n",
			"hysteresis_kmh: 9", "hysteresis_kmh: -1", "max_turn_rate_deg_per_s: 90", "max_turn_rate_deg_per_s: 90\nspeed: 1").Replace(baseYAML)), []string{
			"7:5 error missing bands[1].below_kmh",
			"11:17 error range hysteresis_kmh",
			"21:1 error unknown-field speed",
		}},
		{"schema stands in: edge on the last band", []byte(strings.Replace(baseYAML,
			"  - zoom: 15\n", "  - zoom: 15\n    below_kmh: 100\n    colour: red\n", 1)), []string{
			"10:16 error last-band-edge bands[2].below_kmh",
			"11:5 error unknown-field bands[2].colour",
		}},
		{"warning: zoom rises", edit(9, "  - zoom: 16.5"), []string{"9:11 warning zoom-rises bands[2].zoom"}},
		{"warning: wide hysteresis", edit(11, "hysteresis_kmh: 18"), []string{"6:16 warning wide-hysteresis bands[1].below_kmh"}},
		{"warning: turn inert", edit(17, "  zoom: 15"), []string{"17:9 warning turn-inert turn.zoom"}},
		{"warnings in position order", []byte(strings.NewReplacer("zoom: 15\n", "zoom: 16.5\n", "hysteresis_kmh: 9", "hysteresis_kmh: 18",
			"  zoom: 16.5", "  zoom: 14").Replace(baseYAML)), []string{
			"6:16 warning wide-hysteresis bands[1].below_kmh",
			"9:11 warning zoom-rises bands[2].zoom",
			"17:9 warning turn-inert turn.zoom",
		}},
		{"no warnings while there are errors", []byte(strings.Replace(baseYAML, "  - zoom: 15\n    pitch_deg: 60", "  - zoom: 16.5\n    pitch_deg: -1", 1)), []string{"10:16 error range bands[2].pitch_deg"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			fs := Lint(c.data, "t.yaml")
			if got := briefs(fs); !slices.Equal(got, c.want) {
				t.Fatalf("Lint = %q, want %q; findings:\n%s", got, c.want, findingsText(fs))
			}
			for _, f := range fs {
				if f.File != "t.yaml" {
					t.Fatalf("finding %v: File = %q, want %q", f, f.File, "t.yaml")
				}
				if !(f.Line >= 1) {
					t.Fatalf("finding %v: Line = %d, want ≥ 1", f, f.Line)
				}
				if f.Message == "" {
					t.Fatalf("finding %v: empty Message", f)
				}
			}
			// Parse rejects exactly when there is an error, and reports the same errors.
			_, err := Parse(c.data, "t.yaml")
			var nerr int
			for _, f := range fs {
				if f.Severity == SeverityError {
					nerr++
					want := f.String()[:strings.Index(f.String(), ": error: ")] + ": "
					if err == nil || !strings.Contains(err.Error(), want) {
						t.Fatalf("Parse error %v, want one containing %q (finding %v)", err, want, f)
					}
				}
			}
			if (err != nil) != (nerr > 0) {
				t.Fatalf("Parse error %v with %d error findings: want an error exactly when there are error findings", err, nerr)
			}
			if again := Lint(c.data, "t.yaml"); !slices.Equal(again, fs) {
				t.Fatalf("Lint again = %v, want %v (deterministic)", again, fs)
			}
		})
	}
}

func findingsText(fs []Finding) string {
	var b strings.Builder
	for _, f := range fs {
		b.WriteString(f.String())
		b.WriteByte('\n')
	}
	return b.String()
}

func TestLintMessages(t *testing.T) {
	// The whole line a user reads, for one finding of each stage.
	cases := []struct {
		data []byte
		want string
	}{
		{edit(12, "max_zoom_rate_per_s: 0.5: 3"), "t.yaml:12: error: YAML: mapping values are not allowed in this context"},
		{edit(12, "max_zoom_rate_per_s: fast"), `t.yaml:12:22: error: max_zoom_rate_per_s: got string "fast", want a number`},
		{edit(16, "  min_angel_deg: 30"), "t.yaml:16:3: error: turn.min_angel_deg: unknown field (the fields here are within_m, min_angle_deg, zoom)"},
		{edit(19, "min_zoom: 15"), "t.yaml:19:1: error: min_zoom: given twice in one object (first on line 18)"},
		{edit(16, ""), "t.yaml:15:3: error: turn.min_angle_deg: missing"},
		{edit(6, "  - below_kmh: 30"), "t.yaml:6:16: error: bands[1].below_kmh: 30 is not above bands[0].below_kmh 36: band edges must increase strictly"},
		{edit(11, "hysteresis_kmh: -.inf"), "t.yaml:11:17: error: hysteresis_kmh: -Inf is not a finite number"},
		{edit(9, "  - zoom: 16.5"), "t.yaml:9:11: warning: bands[2].zoom: zoom 16.5 is above zoom 16 of the slower bands[1]: the map would zoom in as the speed rises"},
	}
	for _, c := range cases {
		fs := Lint(c.data, "t.yaml")
		if len(fs) == 0 {
			t.Fatalf("Lint(%q) found nothing, want %q", c.data, c.want)
		}
		if got := fs[len(fs)-1].String(); got != c.want {
			t.Fatalf("Lint(%q): last finding %q, want %q", c.data, got, c.want)
		}
	}
}

func TestParseErrorFormat(t *testing.T) {
	// The format promised in the package documentation, column 14 counted by hand: "    zoom:    " is 13
	// characters.
	_, err := Parse(edit(7, "    zoom:    31"), "phone.yaml")
	if want := "phone.yaml:7:14: bands[1].zoom: 31 is outside [0, 30]"; err == nil || err.Error() != want {
		t.Fatalf("Parse(zoom 31, \"phone.yaml\") = %v, want error %q", err, want)
	}
	var errs Errors
	if !errors.As(err, &errs) {
		t.Fatalf("Parse(zoom 31, \"phone.yaml\"): error %v (%T) is not an Errors", err, err)
	}
	if want := (Problem{Kind: KindRange, Field: "bands[1].zoom", Msg: "31 is outside [0, 30]", File: "phone.yaml", Line: 7, Col: 14}); *errs[0] != want {
		t.Fatalf("Parse(zoom 31, \"phone.yaml\"): first problem %+v, want %+v", *errs[0], want)
	}

	_, err = Parse(edit(7, "    zoom:    31"), "")
	if want := "input:7:14: bands[1].zoom: 31 is outside [0, 30]"; err == nil || err.Error() != want {
		t.Fatalf("Parse(zoom 31, \"\") = %v, want error %q (an empty name is called input)", err, want)
	}
}

func TestSyntaxErrorLines(t *testing.T) {
	// Hand-placed: the line where each problem is, whether the YAML scanner or its parser finds it
	// (the parser counts from 0 and is put right).
	cases := []struct {
		in       string
		wantLine int
		wantCol  int
	}{
		{"", 1, 0},
		{"# only a comment\n", 1, 0},
		{"a: 1\n  b: 2\n", 2, 0},                    // scanner: mapping values not allowed
		{"a: 1\nb:\n\t- 2\n", 3, 0},                 // scanner: a tab
		{"a: 1\nb: [1, 2\nc: 3\n", 2, 0},            // parser: the flow list opened on line 2
		{"bands: [1, 2\nx: 1\n", 2, 0},              // parser: found x where , or ] belongs
		{"- a\nb: 1\n", 2, 0},                       // parser: a key where a list item belongs
		{"a: \"x\n", 2, 0},                          // scanner: the string runs to the end
		{"a: 1\n---\nb: 2\n", 2, 1},                 // a second document
		{"bands: 1\nx: *nope\n", 2, 4},              // an alias to no anchor
		{"x: 1\ny: 2\nz: &a [*a, *a]\n", 3, 0},      // alias cycle: reported with its node
		{"\x00", 1, 1},                              // control character, at its column
		{"a: 1\n\xff\xfe: 2\n", 2, 1},               // not UTF-8: the line and column of the bad byte
		{"%YAML 1.1\n%YAML 1.1\n---\na: 1\n", 2, 0}, // parser: a duplicate directive
	}
	for _, c := range cases {
		fs := Lint([]byte(c.in), "s.yaml")
		if len(fs) == 0 {
			t.Fatalf("Lint(%q) found nothing, want a syntax error", c.in)
		}
		var f *Finding
		for i := range fs {
			if fs[i].Kind == KindSyntax {
				f = &fs[i]
				break
			}
		}
		if f == nil {
			t.Fatalf("Lint(%q): no syntax finding in %v", c.in, fs)
		}
		if f.Line != c.wantLine {
			t.Fatalf("Lint(%q): %v: line %d, want %d", c.in, f, f.Line, c.wantLine)
		}
		if c.wantCol != 0 && f.Col != c.wantCol {
			t.Fatalf("Lint(%q): %v: column %d, want %d", c.in, f, f.Col, c.wantCol)
		}
	}
}

func TestParseJSONRuleFile(t *testing.T) {
	// JSON is YAML: a JSON rule file, indented with tabs, reads the same, and positions are still lines
	// and columns of the JSON text.
	data := "{\n\t\"bands\": [\n\t\t{\"below_kmh\": 36, \"zoom\": 17, \"pitch_deg\": 40},\n\t\t{\"below_kmh\": 72, \"zoom\": 16, \"pitch_deg\": 50},\n" +
		"\t\t{\"zoom\": 15, \"pitch_deg\": 60}\n\t],\n\t\"hysteresis_kmh\": 9, \"max_zoom_rate_per_s\": 0.5, \"max_pitch_rate_deg_per_s\": 10,\n" +
		"\t\"turn\": {\"within_m\": 200, \"min_angle_deg\": 30, \"zoom\": 16.5},\n\t\"min_zoom\": 14, \"max_zoom\": 18, \"max_turn_rate_deg_per_s\": 90\n}\n"
	s, err := Parse([]byte(data), "rules.json")
	if err != nil {
		t.Fatalf("Parse(rules.json): %v", err)
	}
	if !reflect.DeepEqual(*s, *worked()) {
		t.Fatalf("Parse(rules.json) = %s, want %s (worked())", setText(s), setText(worked()))
	}
	_, err = Parse([]byte(strings.Replace(data, `"zoom": 16,`, `"zoom": 160,`, 1)), "rules.json")
	// Line 4 is "\t\t{"below_kmh": 72, "zoom": 160, ...": two tabs and 26 characters come before 160.
	if want := "rules.json:4:29: bands[1].zoom: 160 is outside [0, 30]"; err == nil || err.Error() != want {
		t.Fatalf("Parse(rules.json with zoom 160) = %v, want error %q", err, want)
	}
}

func TestParseYAMLFeatures(t *testing.T) {
	// Anchors and aliases, hex and underscores, flow style: all plain YAML, all accepted.
	data := `
band: &b {zoom: 0x10, pitch_deg: 5_0}
bands: [{below_kmh: 36, zoom: 17, pitch_deg: 40}, {below_kmh: 72, zoom: 16, pitch_deg: 50}, {zoom: 15, pitch_deg: 60}]
`
	fs := Lint([]byte(data), "a.yaml")
	if want := "2:1 error unknown-field band"; !slices.Contains(briefs(fs), want) {
		t.Fatalf("Lint(anchors and flow style) = %q, want it to hold %q; findings:\n%s", briefs(fs), want, findingsText(fs))
	}

	s, err := Parse([]byte(strings.Replace(baseYAML, "  - below_kmh: 72\n    zoom: 16\n    pitch_deg: 50\n",
		"  - &mid\n    below_kmh: 72\n    zoom: 0x10\n    pitch_deg: 5_0\n", 1)), "a.yaml")
	if err != nil {
		t.Fatalf("Parse(hex and underscores): %v", err)
	}
	if !reflect.DeepEqual(*s, *worked()) {
		t.Fatalf("Parse(hex and underscores) = %s, want %s (worked())", setText(s), setText(worked()))
	}

	// An alias used as a band: its fields are checked where they are written.
	alias := strings.Replace(baseYAML, "  - zoom: 15\n    pitch_deg: 60\n", "  - *mid\n", 1)
	alias = strings.Replace(alias, "  - below_kmh: 72", "  - &mid\n    below_kmh: 72", 1)
	fs = Lint([]byte(alias), "a.yaml")
	if got, want := briefs(fs), []string{"7:16 error last-band-edge bands[2].below_kmh"}; !slices.Equal(got, want) {
		t.Fatalf("Lint(an alias as a band) = %q, want %q; findings:\n%s", got, want, findingsText(fs))
	}
}

func TestLintLimits(t *testing.T) {
	// An alias bomb: nine levels of ten aliases would expand to 10^9 values.
	var b strings.Builder
	b.WriteString("a0: &a0 [1, 1, 1, 1, 1, 1, 1, 1, 1, 1]\n")
	for i := 1; i < 10; i++ {
		fmt.Fprintf(&b, "a%d: &a%d [", i, i)
		for j := 0; j < 10; j++ {
			if j > 0 {
				b.WriteString(", ")
			}
			fmt.Fprintf(&b, "*a%d", i-1)
		}
		b.WriteString("]\n")
	}
	fs := Lint([]byte(b.String()), "bomb.yaml")
	if len(fs) != 1 {
		t.Fatalf("Lint(alias bomb) found %d, want 1:\n%s", len(fs), findingsText(fs))
	}
	if fs[0].Kind != KindSyntax {
		t.Fatalf("Lint(alias bomb): %v: kind %v, want %v", fs[0], fs[0].Kind, KindSyntax)
	}
	if want := "more than 10000 values"; !strings.Contains(fs[0].Message, want) {
		t.Fatalf("Lint(alias bomb): message %q, want it to contain %q", fs[0].Message, want)
	}

	deep := strings.Repeat("[", 200) + strings.Repeat("]", 200)
	fs = Lint([]byte(deep), "deep.yaml")
	if len(fs) == 0 {
		t.Fatalf("Lint(200 nested lists) found nothing, want an error")
	}
	if fs[0].Severity != SeverityError {
		t.Fatalf("Lint(200 nested lists): %v: severity %v, want %v", fs[0], fs[0].Severity, SeverityError)
	}
}

func TestRuleFilesLintClean(t *testing.T) {
	// The two invented rule sets in fixtures/rules must have neither errors nor warnings.
	files, err := filepath.Glob("../fixtures/rules/*.yaml")
	if err != nil {
		t.Fatalf("Glob(../fixtures/rules/*.yaml): %v", err)
	}
	if len(files) != 2 {
		t.Fatalf("../fixtures/rules/*.yaml = %q, want 2 files", files)
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		name := filepath.Base(f)
		if fs := Lint(data, name); len(fs) != 0 {
			t.Fatalf("Lint(%s) found:\n%s", name, findingsText(fs))
		}
		s, err := Parse(data, name)
		if err != nil {
			t.Fatalf("Parse(%s): %v", name, err)
		}
		if !(len(s.Bands) >= 4) {
			t.Fatalf("%s: %d bands, want ≥ 4 (a band per kind of road)", name, len(s.Bands))
		}
	}
}

func TestRuleFilesBehave(t *testing.T) {
	// Hand-read from the files: phone at 100 km/h (27.8 m/s) is in the highway band, zoom 14.5 and pitch
	// 60°; 300 m before a turn is outside its 250 m, 200 m is inside and raises the zoom to 17. The in-car
	// set at the same speed is in its rural band (80 to 110 km/h): 14.5 and 55°; at 130 km/h motorway.
	phone := mustParseFile(t, "phone.yaml")
	z, p, err := phone.Evaluate([]Sample{{TS: 0, SpeedMps: 100 / 3.6, TurnDistM: ptr(300)}})
	if err != nil {
		t.Fatalf("phone: Evaluate(100 km/h, turn at 300 m): %v", err)
	}
	if want := []float64{14.5}; !slices.Equal(z, want) {
		t.Fatalf("phone: Evaluate(100 km/h, turn at 300 m) zoom = %v, want %v", z, want)
	}
	if want := []float64{60}; !slices.Equal(p, want) {
		t.Fatalf("phone: Evaluate(100 km/h, turn at 300 m) pitch = %v, want %v", p, want)
	}
	z, _, err = phone.Evaluate([]Sample{{TS: 0, SpeedMps: 100 / 3.6, TurnDistM: ptr(200)}})
	if err != nil {
		t.Fatalf("phone: Evaluate(100 km/h, turn at 200 m): %v", err)
	}
	if want := []float64{17}; !slices.Equal(z, want) {
		t.Fatalf("phone: Evaluate(100 km/h, turn at 200 m) zoom = %v, want %v", z, want)
	}

	incar := mustParseFile(t, "incar.yaml")
	z, p, err = incar.Evaluate([]Sample{{TS: 0, SpeedMps: 100 / 3.6}, {TS: 60, SpeedMps: 130 / 3.6}})
	if err != nil {
		t.Fatalf("incar: Evaluate(100 km/h, then 130 km/h): %v", err)
	}
	if want := []float64{14.5, 13.75}; !slices.Equal(z, want) {
		t.Fatalf("incar: Evaluate(100 km/h, then 130 km/h) zoom = %v, want %v", z, want)
	}
	if want := []float64{55, 62}; !slices.Equal(p, want) {
		t.Fatalf("incar: Evaluate(100 km/h, then 130 km/h) pitch = %v, want %v", p, want)
	}
}

func mustParseFile(t testing.TB, name string) *Set {
	t.Helper()
	s, err := Parse(mustReadRuleFile(t, name), name)
	if err != nil {
		t.Fatalf("Parse(%s): %v", name, err)
	}
	return s
}

func TestFindingText(t *testing.T) {
	f := Finding{Severity: SeverityWarning, Kind: KindTurnInert, File: "a.yaml", Line: 3, Col: 9, Field: "turn.zoom", Message: "m"}
	if got, want := f.String(), "a.yaml:3:9: warning: turn.zoom: m"; got != want {
		t.Fatalf("Finding{Col: 9}.String() = %q, want %q", got, want)
	}
	f.Col = 0
	if got, want := f.String(), "a.yaml:3: warning: turn.zoom: m"; got != want {
		t.Fatalf("Finding{Col: 0}.String() = %q, want %q", got, want)
	}
	b, err := Severity(SeverityError).MarshalText()
	if err != nil {
		t.Fatalf("SeverityError.MarshalText(): %v", err)
	}
	if got, want := string(b), "error"; got != want {
		t.Fatalf("SeverityError.MarshalText() = %q, want %q", got, want)
	}
	b, err = KindWideHysteresis.MarshalText()
	if err != nil {
		t.Fatalf("KindWideHysteresis.MarshalText(): %v", err)
	}
	if got, want := string(b), "wide-hysteresis"; got != want {
		t.Fatalf("KindWideHysteresis.MarshalText() = %q, want %q", got, want)
	}
	if got, want := ProblemKind(99).String(), "kind(99)"; got != want {
		t.Fatalf("ProblemKind(99).String() = %q, want %q", got, want)
	}
	if got, want := Severity(0).String(), "severity(0)"; got != want {
		t.Fatalf("Severity(0).String() = %q, want %q", got, want)
	}
	if got, want := (&Problem{Field: "x", Msg: "m"}).Error(), "x: m"; got != want {
		t.Fatalf("(&Problem{Field: \"x\", Msg: \"m\"}).Error() = %q, want %q", got, want)
	}
	if got, want := (&Problem{Msg: "m"}).Error(), "m"; got != want {
		t.Fatalf("(&Problem{Msg: \"m\"}).Error() = %q, want %q", got, want)
	}
}

func mustReadRuleFile(t testing.TB, name string) []byte {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("..", "fixtures", "rules", name))
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// Nesting is refused past 64 levels below the document's root value, and
// not before: 65 nested lists hold their innermost at depth 64, 66 at 65.
// A file with one bad character names it and counts no others.
func TestLintNestingLimitAndOneBadByte(t *testing.T) {
	nested := func(k int) string { return strings.Repeat("[", k) + strings.Repeat("]", k) }
	for _, c := range []struct {
		k    int
		deep bool
	}{{65, false}, {66, true}} {
		fs := Lint([]byte(nested(c.k)), "deep.yaml")
		found := slices.ContainsFunc(fs, func(f Finding) bool { return strings.Contains(f.Message, "nested more than 64 deep") })
		if found != c.deep {
			t.Errorf("Lint(%d nested lists): nested too deep %v, want %v:\n%s", c.k, found, c.deep, findingsText(fs))
		}
	}
	// Mappings count the same (the scalar inside k mappings is at depth k),
	// and so does an alias: *a, two levels down in b, holds a's 64 nested
	// lists from depth 3, the innermost at 66.
	for _, c := range []struct {
		desc string
		doc  string
		deep bool
	}{
		{"64 nested mappings", strings.Repeat("{a: ", 64) + "1" + strings.Repeat("}", 64), false},
		{"65 nested mappings", strings.Repeat("{a: ", 65) + "1" + strings.Repeat("}", 65), true},
		{"64 nested lists under a key", "a: " + nested(64), false},
		{"the same through an alias two levels down", "a: &a " + nested(64) + "\nb: [*a]\n", true},
	} {
		fs := Lint([]byte(c.doc), "deep.yaml")
		found := slices.ContainsFunc(fs, func(f Finding) bool { return strings.Contains(f.Message, "nested more than 64 deep") })
		if found != c.deep {
			t.Errorf("Lint(%s): nested too deep %v, want %v:\n%s", c.desc, found, c.deep, findingsText(fs))
		}
	}
	_, err := Parse([]byte("a: \x01\n"), "s.yaml")
	if err == nil || strings.Contains(err.Error(), "more after it") {
		t.Errorf("Parse(one control character) = %v, want it named and no others counted", err)
	}
}

// A value of the wrong type is described by what it holds: a string cut
// past 40 bytes (40 are kept whole), a boolean, a timestamp, an alias's target.
func TestWrongTypeDescribed(t *testing.T) {
	long := strings.Repeat("a", 45)
	for _, c := range []struct{ doc, want string }{
		{"hysteresis_kmh: " + long + "\n", `got string "` + long[:40] + `…"`},
		{"hysteresis_kmh: " + long[:40] + "\n", `got string "` + long[:40] + `", want`}, // 40 bytes: whole
		{"hysteresis_kmh: true\n", "got boolean true"},
		{"hysteresis_kmh: 2026-12-03\n", "got timestamp 2026-12-03"},
		{"x: &x yes-no\nhysteresis_kmh: *x\n", `got string "yes-no"`},
	} {
		fs := Lint([]byte(c.doc), "t.yaml")
		if !slices.ContainsFunc(fs, func(f Finding) bool { return strings.Contains(f.Message, c.want) }) {
			t.Errorf("Lint(%q): want a finding containing %q:\n%s", c.doc, c.want, findingsText(fs))
		}
	}
}
