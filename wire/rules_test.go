package wire_test

import (
	"encoding/json"
	"errors"
	"fmt"
	"reflect"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// rulesWorked is SPEC §3's worked rule set on the wire, and workedSet the
// same set built in code.
const rulesWorked = `{"bands": [{"below_kmh": 36, "zoom": 17, "pitch_deg": 40}, {"below_kmh": 72, "zoom": 16, "pitch_deg": 50},
 {"zoom": 15, "pitch_deg": 60}], "hysteresis_kmh": 9, "max_zoom_rate_per_s": 0.5, "max_pitch_rate_deg_per_s": 10,
 "turn": {"within_m": 200, "min_angle_deg": 30, "zoom": 16.5}, "min_zoom": 14, "max_zoom": 18, "max_turn_rate_deg_per_s": 90}`

func workedSet() *rules.Set {
	return &rules.Set{
		Bands: []rules.Band{
			{BelowKmh: rules.Edge(36), Zoom: 17, PitchDeg: 40},
			{BelowKmh: rules.Edge(72), Zoom: 16, PitchDeg: 50},
			{Zoom: 15, PitchDeg: 60},
		},
		HysteresisKmh: 9, MaxZoomRatePerS: 0.5, MaxPitchRateDegPerS: 10,
		Turn:    rules.Turn{WithinM: 200, MinAngleDeg: 30, Zoom: 16.5},
		MinZoom: 14, MaxZoom: 18, MaxTurnRateDegPerS: 90,
	}
}

// setText renders a rule set for failure messages: its JSON (encoding/json on rules.Set, not the
// wire's encoder), so that band edges show as numbers.
func setText(s *rules.Set) string {
	if s == nil {
		return "<nil>"
	}
	b, err := json.Marshal(s)
	if err != nil {
		return fmt.Sprintf("%+v (%v)", *s, err)
	}
	return string(b)
}

// zoomRules decodes a zoom request carrying rules and returns its rule set.
func zoomRules(t *testing.T, rulesJSON string) (*rules.Set, error) {
	t.Helper()
	var req wire.Request
	if err := wire.DecodeRequest([]byte(`{"op":"zoom","samples":[],"rules":`+rulesJSON+`}`), &req); err != nil {
		return nil, err
	}
	return req.Rules.Value("rules")
}

func TestRulesDecode(t *testing.T) {
	s, err := zoomRules(t, rulesWorked)
	if err != nil {
		t.Fatalf("zoomRules(rulesWorked): %v", err)
	}
	if !reflect.DeepEqual(s, workedSet()) {
		t.Fatalf("zoomRules(rulesWorked) = %s, want %s", setText(s), setText(workedSet()))
	}
}

func TestRulesRoundTrip(t *testing.T) {
	data, err := json.Marshal(wire.RulesOf(workedSet()))
	if err != nil {
		t.Fatalf("json.Marshal(RulesOf(workedSet())): %v", err)
	}
	if strings.Contains(string(data), `"below_kmh":null`) {
		t.Fatalf("json.Marshal(RulesOf(workedSet())) = %s, want the last band's edge absent, not null", data)
	}
	back, err := zoomRules(t, string(data))
	if err != nil {
		t.Fatalf("zoomRules(%s): %v", data, err)
	}
	if !reflect.DeepEqual(back, workedSet()) {
		t.Fatalf("zoomRules(%s) = %s, want %s", data, setText(back), setText(workedSet()))
	}
	// The same text is a rule file: Parse reads JSON as YAML.
	parsed, err := rules.Parse(data, "wire.json")
	if err != nil {
		t.Fatalf("rules.Parse(%s): %v", data, err)
	}
	if !reflect.DeepEqual(parsed, workedSet()) {
		t.Fatalf("rules.Parse(%s) = %s, want %s", data, setText(parsed), setText(workedSet()))
	}
}

func TestRulesIgnoreUnknownFields(t *testing.T) {
	// SPEC §6: readers ignore fields they do not know.
	s, err := zoomRules(t, `{"margin_px": 3, `+rulesWorked[1:])
	if err != nil {
		t.Fatalf("zoomRules(rulesWorked with margin_px): %v", err)
	}
	if !reflect.DeepEqual(s, workedSet()) {
		t.Fatalf("zoomRules(rulesWorked with margin_px) = %s, want %s", setText(s), setText(workedSet()))
	}
}

// SPEC §6: keys are matched exactly, inside rules as at the top level. A
// rule set whose "bands" is spelled "BANDS" has no bands (the breach: the
// old decoder matched rule keys case-insensitively).
func TestRulesKeysMatchedExactly(t *testing.T) {
	_, err := zoomRules(t, strings.Replace(rulesWorked, `"bands"`, `"BANDS"`, 1))
	var fe *spec.FieldError
	if !errors.As(err, &fe) {
		t.Fatalf(`zoomRules(rulesWorked with "BANDS") = %v, want a *spec.FieldError`, err)
	}
	if fe.Kind != spec.Missing {
		t.Fatalf(`zoomRules(rulesWorked with "BANDS"): FieldError.Kind = %v, want %v (error %v)`, fe.Kind, spec.Missing, err)
	}
	if want := "rules.bands"; fe.Field != want {
		t.Fatalf(`zoomRules(rulesWorked with "BANDS"): FieldError.Field = %q, want %q`, fe.Field, want)
	}

	_, err = zoomRules(t, strings.Replace(rulesWorked, `"zoom": 16.5`, `"Zoom": 16.5`, 1))
	if !errors.As(err, &fe) {
		t.Fatalf(`zoomRules(rulesWorked with turn "Zoom") = %v, want a *spec.FieldError`, err)
	}
	if want := "rules.turn.zoom"; fe.Field != want {
		t.Fatalf(`zoomRules(rulesWorked with turn "Zoom"): FieldError.Field = %q, want %q`, fe.Field, want)
	}
}

func TestRulesMissingFields(t *testing.T) {
	_, err := zoomRules(t, `{"bands": [{"below_kmh": 30, "zoom": 17}, {"pitch_deg": 50}], "hysteresis_kmh": null,
		"turn": {"zoom": 16}, "max_zoom": 18}`)
	if want := "rules.bands[0].pitch_deg: missing (required)"; err == nil || err.Error() != want {
		t.Fatalf("zoomRules(several fields missing) = %v, want error %q (the first missing field, in field order)", err, want)
	}
	var fe *spec.FieldError
	if !errors.As(err, &fe) {
		t.Fatalf("zoomRules(several fields missing): error %v is not a *spec.FieldError", err)
	}
	if fe.Kind != spec.Missing {
		t.Fatalf("zoomRules(several fields missing): FieldError.Kind = %v, want %v (error %v)", fe.Kind, spec.Missing, err)
	}

	_, err = zoomRules(t, `{}`)
	if want := "rules.bands: missing (required)"; err == nil || err.Error() != want {
		t.Fatalf("zoomRules({}) = %v, want error %q", err, want)
	}
}

func TestRulesTypeError(t *testing.T) {
	for _, c := range []struct{ rules, msg string }{
		{`{"bands": [{"zoom": "17", "pitch_deg": 40}]}`, "rules.bands[0].zoom: expected a number, got a string"},
		{`{"bands": {"zoom": 17}}`, "rules.bands: expected an array, got an object"},
	} {
		_, err := zoomRules(t, c.rules)
		code, msg := wire.DecodeError(err)
		if code != wire.CodeBadType {
			t.Fatalf("DecodeError(zoomRules(%s)) code = %q (message %q), want %q", c.rules, code, msg, wire.CodeBadType)
		}
		if msg != c.msg {
			t.Fatalf("DecodeError(zoomRules(%s)) message = %q, want %q", c.rules, msg, c.msg)
		}
	}
}

func TestRulesInvalid(t *testing.T) {
	_, err := zoomRules(t, strings.Replace(rulesWorked, `"max_zoom": 18`, `"max_zoom": 31`, 1))
	var fe *spec.FieldError
	if !errors.As(err, &fe) {
		t.Fatalf("zoomRules(max_zoom 31) = %v, want a *spec.FieldError", err)
	}
	if fe.Kind != spec.Invalid {
		t.Fatalf("zoomRules(max_zoom 31): FieldError.Kind = %v, want %v (error %v)", fe.Kind, spec.Invalid, err)
	}
	if want := "rules.max_zoom"; fe.Field != want {
		t.Fatalf("zoomRules(max_zoom 31): FieldError.Field = %q, want %q", fe.Field, want)
	}
}
