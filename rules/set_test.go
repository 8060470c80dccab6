package rules

import (
	"encoding/json"
	"errors"
	"testing"

	"github.com/stretchr/testify/require"
)

const wireWorked = `{"bands": [{"below_kmh": 36, "zoom": 17, "pitch_deg": 40}, {"below_kmh": 72, "zoom": 16, "pitch_deg": 50},
 {"zoom": 15, "pitch_deg": 60}], "hysteresis_kmh": 9, "max_zoom_rate_per_s": 0.5, "max_pitch_rate_deg_per_s": 10,
 "turn": {"within_m": 200, "min_angle_deg": 30, "zoom": 16.5}, "min_zoom": 14, "max_zoom": 18, "max_turn_rate_deg_per_s": 90}`

func TestJSONWireDecode(t *testing.T) {
	var s Set
	require.NoError(t, json.Unmarshal([]byte(wireWorked), &s))
	require.Equal(t, *worked(), s)
	require.NoError(t, s.Validate())
}

func TestJSONRoundTrip(t *testing.T) {
	data, err := json.Marshal(worked())
	require.NoError(t, err)
	require.NotContains(t, string(data), `"below_kmh":null`, "the last band's edge is absent, not null")
	var back Set
	require.NoError(t, json.Unmarshal(data, &back))
	require.Equal(t, *worked(), back)
	// The same text is a rule file: Parse reads JSON as YAML.
	parsed, err := Parse(data, "wire.json")
	require.NoError(t, err)
	require.Equal(t, *worked(), *parsed)
}

func TestJSONWireIgnoresUnknownFields(t *testing.T) {
	// SPEC §6: readers ignore fields they do not know.
	var s Set
	withExtra := `{"margin_px": 3, ` + wireWorked[1:]
	require.NoError(t, json.Unmarshal([]byte(withExtra), &s))
	require.Equal(t, *worked(), s)
}

func TestJSONWireMissingFields(t *testing.T) {
	var s Set
	err := json.Unmarshal([]byte(`{"bands": [{"below_kmh": 30, "zoom": 17}, {"pitch_deg": 50}], "hysteresis_kmh": null,
		"turn": {"zoom": 16}, "max_zoom": 18}`), &s)
	var errs Errors
	require.True(t, errors.As(err, &errs), "got %v", err)
	require.EqualError(t, err, "bands[0].pitch_deg: missing\nbands[1].zoom: missing\nhysteresis_kmh: missing\n"+
		"max_zoom_rate_per_s: missing\nmax_pitch_rate_deg_per_s: missing\nturn.within_m: missing\nturn.min_angle_deg: missing\n"+
		"min_zoom: missing\nmax_turn_rate_deg_per_s: missing")
	for _, e := range errs {
		require.Equal(t, KindMissing, e.Kind)
	}
	require.Equal(t, Set{}, s, "a failed decode leaves the Set as it was")

	err = json.Unmarshal([]byte(`{}`), &s)
	require.ErrorContains(t, err, "bands: missing")
	require.ErrorContains(t, err, "turn: missing")
}

func TestJSONWireTypeError(t *testing.T) {
	var s Set
	err := json.Unmarshal([]byte(`{"bands": [{"zoom": "17", "pitch_deg": 40}]}`), &s)
	var fe *FieldError
	require.True(t, errors.As(err, &fe), "got %v", err)
	require.Equal(t, KindType, fe.Kind)
	require.Equal(t, "bands.zoom: got JSON string, want number", err.Error())

	err = json.Unmarshal([]byte(`{"bands": {"zoom": 17}}`), &s)
	require.EqualError(t, err, "bands: got JSON object, want array")
	err = json.Unmarshal([]byte(`[1]`), &s)
	require.EqualError(t, err, "(rules): got JSON array, want object")

	err = json.Unmarshal([]byte(`{"bands": [`), &s)
	require.Error(t, err, "a syntax error is encoding/json's own")
}

func TestJSONWireNull(t *testing.T) {
	// As for other types, null leaves the value alone.
	s := *worked()
	require.NoError(t, json.Unmarshal([]byte(`null`), &s))
	require.Equal(t, *worked(), s)
}
