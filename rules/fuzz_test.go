package rules

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// wireWorked is a rule set as JSON, which is also YAML.
const wireWorked = `{"bands": [{"below_kmh": 36, "zoom": 17, "pitch_deg": 40}, {"below_kmh": 72, "zoom": 16, "pitch_deg": 50},
 {"zoom": 15, "pitch_deg": 60}], "hysteresis_kmh": 9, "max_zoom_rate_per_s": 0.5, "max_pitch_rate_deg_per_s": 10,
 "turn": {"within_m": 200, "min_angle_deg": 30, "zoom": 16.5}, "min_zoom": 14, "max_zoom": 18, "max_turn_rate_deg_per_s": 90}`

var errorLine = regexp.MustCompile(`^f\.yaml:[1-9][0-9]*(:[0-9]+)?: `)

func FuzzParse(f *testing.F) {
	f.Add([]byte(baseYAML))
	f.Add([]byte(wireWorked))
	for _, name := range []string{"phone.yaml", "incar.yaml"} {
		if data, err := os.ReadFile(filepath.Join("..", "fixtures", "rules", name)); err == nil {
			f.Add(data)
		}
	}
	for _, s := range []string{
		"", "{}", "[]", "null", "~", "42", "bands: []", "bands: [{}]", "bands: [{zoom: .nan, pitch_deg: -.inf}]",
		"a: &a [*a]", "x: *nope", "a: 1\n---\nb: 2", "a: 1\n  b: 2", "bands:\n\t- 1", "? [a]\n: 1",
		"bands: !!binary aGVsbG8=", "min_zoom: 1e400", "turn: {zoom: 0x1F, within_m: 1_000}", "\xff\xfe",
		"bands:\n  - below_kmh: 30\n    zoom: 17\n    pitch_deg: 45\n  - zoom: 16\n    pitch_deg: 50\n",
		"<<: {bands: []}", `{"bands": [{"below_kmh": 1e308, "zoom": 30, "pitch_deg": 89.99999999999999}]}`,
	} {
		f.Add([]byte(s))
	}
	f.Add(edit(7, "    zoom: 31"))
	f.Add(edit(6, "  - below_kmh: 30"))
	f.Add(edit(11, "hysteresis_kmh: 18"))

	f.Fuzz(func(t *testing.T, data []byte) {
		fs := Lint(data, "f.yaml")
		hasErr := false
		for _, fd := range fs {
			if fd.Line < 1 || fd.Col < 0 || fd.File != "f.yaml" || fd.Message == "" {
				t.Fatalf("finding without a place or a message: %+v", fd)
			}
			if fd.Severity != SeverityError && fd.Severity != SeverityWarning {
				t.Fatalf("finding with severity %v", fd.Severity)
			}
			if strings.HasPrefix(fd.Message, "the YAML parser failed") {
				t.Fatalf("a panic was caught: %v", fd)
			}
			hasErr = hasErr || fd.Severity == SeverityError
		}
		s, err := Parse(data, "f.yaml")
		if (err != nil) != hasErr || (s == nil) != (err != nil) {
			t.Fatalf("Parse = %v, %v; Lint found an error: %v", s, err, hasErr)
		}
		if err != nil {
			for _, line := range strings.Split(err.Error(), "\n") {
				if !errorLine.MatchString(line) {
					t.Fatalf("error line %q does not name f.yaml and a line", line)
				}
			}
			return
		}
		if verr := s.Validate(); verr != nil {
			t.Fatalf("Parse accepted a set that Validate rejects: %v", verr)
		}
		z, p, err := s.Evaluate([]Sample{{TS: 0, SpeedMps: 0}, {TS: 0.5, SpeedMps: 30, TurnDistM: ptr(10)}, {TS: 100, SpeedMps: 70}})
		if err != nil {
			t.Fatal(err)
		}
		for i := range z {
			if math.IsNaN(z[i]) || math.IsNaN(p[i]) || z[i] < s.MinZoom || z[i] > s.MaxZoom {
				t.Fatalf("sample %d: zoom %v pitch %v", i, z[i], p[i])
			}
		}
		// What was read writes back as JSON and reads again to the same set.
		out, err := json.Marshal(s)
		if err != nil {
			t.Fatal(err)
		}
		back, err := Parse(out, "f.yaml")
		if err != nil {
			t.Fatalf("re-reading %s: %v", out, err)
		}
		if again, _ := json.Marshal(back); string(again) != string(out) {
			t.Fatalf("round trip changed the set: %s → %s", out, again)
		}
	})
}
