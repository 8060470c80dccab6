package wire_test

import (
	"encoding/json"
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

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
	require.NoError(t, err)
	require.Equal(t, workedSet(), s)
}

func TestRulesRoundTrip(t *testing.T) {
	data, err := json.Marshal(wire.RulesOf(workedSet()))
	require.NoError(t, err)
	require.NotContains(t, string(data), `"below_kmh":null`, "the last band's edge is absent, not null")
	back, err := zoomRules(t, string(data))
	require.NoError(t, err)
	require.Equal(t, workedSet(), back)
	// The same text is a rule file: Parse reads JSON as YAML.
	parsed, err := rules.Parse(data, "wire.json")
	require.NoError(t, err)
	require.Equal(t, workedSet(), parsed)
}

func TestRulesIgnoreUnknownFields(t *testing.T) {
	// SPEC §6: readers ignore fields they do not know.
	s, err := zoomRules(t, `{"margin_px": 3, `+rulesWorked[1:])
	require.NoError(t, err)
	require.Equal(t, workedSet(), s)
}

// SPEC §6: keys are matched exactly, inside rules as at the top level. A
// rule set whose "bands" is spelled "BANDS" has no bands (the breach: the
// old decoder matched rule keys case-insensitively).
func TestRulesKeysMatchedExactly(t *testing.T) {
	_, err := zoomRules(t, strings.Replace(rulesWorked, `"bands"`, `"BANDS"`, 1))
	var fe *spec.FieldError
	require.True(t, errors.As(err, &fe), "got %v", err)
	require.Equal(t, spec.Missing, fe.Kind)
	require.Equal(t, "rules.bands", fe.Field)

	_, err = zoomRules(t, strings.Replace(rulesWorked, `"zoom": 16.5`, `"Zoom": 16.5`, 1))
	require.True(t, errors.As(err, &fe), "got %v", err)
	require.Equal(t, "rules.turn.zoom", fe.Field)
}

func TestRulesMissingFields(t *testing.T) {
	_, err := zoomRules(t, `{"bands": [{"below_kmh": 30, "zoom": 17}, {"pitch_deg": 50}], "hysteresis_kmh": null,
		"turn": {"zoom": 16}, "max_zoom": 18}`)
	require.EqualError(t, err, "rules.bands[0].pitch_deg: missing (required)", "the first missing field, in field order")
	var fe *spec.FieldError
	require.True(t, errors.As(err, &fe))
	require.Equal(t, spec.Missing, fe.Kind)

	_, err = zoomRules(t, `{}`)
	require.EqualError(t, err, "rules.bands: missing (required)")
}

func TestRulesTypeError(t *testing.T) {
	_, err := zoomRules(t, `{"bands": [{"zoom": "17", "pitch_deg": 40}]}`)
	code, msg := wire.DecodeError(err)
	require.Equal(t, wire.CodeBadType, code)
	require.Equal(t, "rules.bands[0].zoom: expected a number, got a string", msg)

	_, err = zoomRules(t, `{"bands": {"zoom": 17}}`)
	code, msg = wire.DecodeError(err)
	require.Equal(t, wire.CodeBadType, code)
	require.Equal(t, "rules.bands: expected an array, got an object", msg)
}

func TestRulesInvalid(t *testing.T) {
	_, err := zoomRules(t, strings.Replace(rulesWorked, `"max_zoom": 18`, `"max_zoom": 31`, 1))
	var fe *spec.FieldError
	require.True(t, errors.As(err, &fe), "got %v", err)
	require.Equal(t, spec.Invalid, fe.Kind)
	require.Equal(t, "rules.max_zoom", fe.Field)
}
