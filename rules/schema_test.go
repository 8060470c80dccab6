package rules

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"testing"

	"github.com/santhosh-tekuri/jsonschema/v6"
	"github.com/stretchr/testify/require"
	"go.yaml.in/yaml/v3"
	"pgregory.net/rapid"
)

func TestSchemaCompiles(t *testing.T) {
	sch, err := compiledSchema()
	require.NoError(t, err)
	require.NotNil(t, sch)
	var doc map[string]any
	require.NoError(t, json.Unmarshal(Schema(), &doc))
	require.Equal(t, SchemaID, doc["$id"])
	require.Equal(t, "https://json-schema.org/draft/2020-12/schema", doc["$schema"])
	require.Equal(t, false, doc["additionalProperties"])
	c := Schema()
	c[0] = 'x'
	require.Equal(t, byte('{'), Schema()[0], "Schema returns a copy")
}

// schemaField finds the schema of a property, following a $ref into $defs.
func schemaField(t *testing.T, root map[string]any, props map[string]any, name string) map[string]any {
	t.Helper()
	f, ok := props[name].(map[string]any)
	require.True(t, ok, "schema has no property %s", name)
	if ref, ok := f["$ref"].(string); ok {
		const prefix = "#/$defs/"
		require.Equal(t, prefix, ref[:len(prefix)])
		f = root["$defs"].(map[string]any)[ref[len(prefix):]].(map[string]any)
	}
	return f
}

func TestSchemaRangesMatchValidate(t *testing.T) {
	// The schema's bounds and fieldRanges (which Validate uses) must be the same intervals.
	var root map[string]any
	require.NoError(t, json.Unmarshal(schemaJSON, &root))
	band := root["$defs"].(map[string]any)["band"].(map[string]any)
	turn := root["properties"].(map[string]any)["turn"].(map[string]any)
	objects := map[string]map[string]any{
		"":     root["properties"].(map[string]any),
		"turn": turn["properties"].(map[string]any),
		"band": band["properties"].(map[string]any),
	}
	checked := 0
	for obj, props := range objects {
		for name := range props {
			f := schemaField(t, root, props, name)
			if f["type"] != "number" {
				continue
			}
			want, ok := fieldRanges[name]
			require.True(t, ok, "%s.%s has no entry in fieldRanges", obj, name)
			got := interval{lo: math.Inf(-1), hi: math.Inf(1), loOpen: true, hiOpen: true}
			if v, ok := f["minimum"].(float64); ok {
				got.lo, got.loOpen = v, false
			}
			if v, ok := f["exclusiveMinimum"].(float64); ok {
				got.lo, got.loOpen = v, true
			}
			if v, ok := f["maximum"].(float64); ok {
				got.hi, got.hiOpen = v, false
			}
			if v, ok := f["exclusiveMaximum"].(float64); ok {
				got.hi, got.hiOpen = v, true
			}
			require.Equal(t, want, got, "%s.%s: schema %v, fieldRanges %v", obj, name, got, want)
			checked++
		}
	}
	require.Equal(t, len(fieldRanges)+1, checked, "every numeric field checked (zoom twice: bands and turn)")

	require.ElementsMatch(t, []any{"bands", "hysteresis_kmh", "max_zoom_rate_per_s", "max_pitch_rate_deg_per_s", "turn",
		"min_zoom", "max_zoom", "max_turn_rate_deg_per_s"}, root["required"])
	require.ElementsMatch(t, []any{"within_m", "min_angle_deg", "zoom"}, turn["required"])
	require.ElementsMatch(t, []any{"zoom", "pitch_deg"}, band["required"], "below_kmh is not required of a band")
}

func schemaAccepts(t require.TestingT, v any) bool {
	data, err := json.Marshal(v)
	require.NoError(t, err)
	inst, err := jsonschema.UnmarshalJSON(bytes.NewReader(data))
	require.NoError(t, err)
	sch, err := compiledSchema()
	require.NoError(t, err)
	return sch.Validate(inst) == nil
}

func TestSchemaAcceptsRuleFiles(t *testing.T) {
	for _, name := range []string{"phone.yaml", "incar.yaml"} {
		var v any
		require.NoError(t, yaml.Unmarshal(mustReadRuleFile(t, name), &v))
		require.True(t, schemaAccepts(t, v), name)
	}
	require.True(t, schemaAccepts(t, worked()))
}

func TestSchemaBandLayout(t *testing.T) {
	// The schema says exactly one band has no below_kmh; that it is the last is the loader's check.
	mk := func(edges ...*float64) *Set {
		s := worked()
		s.Bands = nil
		for i, e := range edges {
			s.Bands = append(s.Bands, Band{BelowKmh: e, Zoom: 17 - float64(i), PitchDeg: 40})
		}
		return s
	}
	cases := []struct {
		name         string
		set          *Set
		schema, full bool
	}{
		{"edge, open", mk(Edge(30), nil), true, true},
		{"open", mk(nil), true, true},
		{"open, open", mk(nil, nil), false, false},
		{"edge, edge", mk(Edge(30), Edge(60)), false, false},
		{"open, edge: schema cannot tell", mk(nil, Edge(60)), true, false},
		{"no bands", mk(), false, false},
	}
	for _, c := range cases {
		require.Equal(t, c.schema, schemaAccepts(t, c.set), c.name)
		require.Equal(t, c.full, c.set.Validate() == nil, c.name)
	}
}

// drawField draws a value for a field with interval r: often a bound or the float beside one, sometimes
// anything in a wide range, so that both verdicts are common.
func drawField(t *rapid.T, r interval, label string) float64 {
	hi := r.hi
	if math.IsInf(hi, 1) {
		hi = 1e6
	}
	edges := []float64{r.lo, hi, math.Nextafter(r.lo, -1), math.Nextafter(r.lo, 1e9), math.Nextafter(hi, -1), math.Nextafter(hi, 1e9), -1, 0, 1e300}
	if rapid.Bool().Draw(t, label+" at an edge") {
		return rapid.SampledFrom(edges).Draw(t, label)
	}
	return rapid.Float64Range(-100, 200).Draw(t, label)
}

func TestSchemaAgreesWithValidate(t *testing.T) {
	// For any values (finite, bands laid out as the format wants), the schema accepts exactly when
	// Validate finds no value out of its interval.
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 4).Draw(t, "bands")
		s := &Set{}
		for i := 0; i < n; i++ {
			b := Band{Zoom: drawField(t, zoomLevels, fmt.Sprintf("bands[%d].zoom", i)), PitchDeg: drawField(t, pitchDegs, fmt.Sprintf("bands[%d].pitch_deg", i))}
			if i < n-1 {
				b.BelowKmh = Edge(drawField(t, positive, fmt.Sprintf("bands[%d].below_kmh", i)))
			}
			s.Bands = append(s.Bands, b)
		}
		s.HysteresisKmh = drawField(t, nonNegative, "hysteresis_kmh")
		s.MaxZoomRatePerS = drawField(t, positive, "max_zoom_rate_per_s")
		s.MaxPitchRateDegPerS = drawField(t, positive, "max_pitch_rate_deg_per_s")
		s.Turn = Turn{WithinM: drawField(t, nonNegative, "turn.within_m"), MinAngleDeg: drawField(t, turnAngles, "turn.min_angle_deg"),
			Zoom: drawField(t, zoomLevels, "turn.zoom")}
		s.MinZoom = drawField(t, zoomLevels, "min_zoom")
		s.MaxZoom = drawField(t, zoomLevels, "max_zoom")
		s.MaxTurnRateDegPerS = drawField(t, positive, "max_turn_rate_deg_per_s")

		rangeOK := true
		var errs Errors
		if err := s.Validate(); err != nil {
			require.True(t, errors.As(err, &errs))
		}
		for _, e := range errs {
			switch e.Kind {
			case KindRange:
				rangeOK = false
			case KindOrder, KindMinAboveMax: // beyond a schema
			default:
				t.Fatalf("unexpected problem %v", e)
			}
		}
		if got := schemaAccepts(t, s); got != rangeOK {
			t.Fatalf("schema accepts = %v, Validate range check = %v (errors %v)", got, rangeOK, errs)
		}
	})
}
