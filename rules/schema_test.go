package rules

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"
	"testing"

	"github.com/santhosh-tekuri/jsonschema/v6"
	"go.yaml.in/yaml/v3"
	"pgregory.net/rapid"
)

func TestSchemaCompiles(t *testing.T) {
	sch, err := compiledSchema()
	if err != nil {
		t.Fatalf("compiledSchema: %v", err)
	}
	if sch == nil {
		t.Fatalf("compiledSchema() = nil, nil; want a schema")
	}
	var doc map[string]any
	if err := json.Unmarshal(Schema(), &doc); err != nil {
		t.Fatalf("Schema() is not a JSON object: %v", err)
	}
	if got := doc["$id"]; got != SchemaID {
		t.Fatalf("schema $id = %#v, want %q (SchemaID)", got, SchemaID)
	}
	if got, want := doc["$schema"], "https://json-schema.org/draft/2020-12/schema"; got != want {
		t.Fatalf("schema $schema = %#v, want %q", got, want)
	}
	if got := doc["additionalProperties"]; got != false {
		t.Fatalf("schema additionalProperties = %#v, want false", got)
	}
	c := Schema()
	c[0] = 'x'
	if got := Schema()[0]; got != '{' {
		t.Fatalf("Schema()[0] = %q after writing to an earlier result, want '{' (Schema returns a copy)", got)
	}
}

// sameStrings reports whether list, a decoded JSON array, holds exactly the strings want in some
// order, each as many times.
func sameStrings(list any, want ...string) bool {
	items, ok := list.([]any)
	if !ok || len(items) != len(want) {
		return false
	}
	got := make([]string, len(items))
	for i, v := range items {
		if got[i], ok = v.(string); !ok {
			return false
		}
	}
	return slices.Equal(slices.Sorted(slices.Values(got)), slices.Sorted(slices.Values(want)))
}

// schemaField finds the schema of a property, following a $ref into $defs.
func schemaField(t *testing.T, root map[string]any, props map[string]any, name string) map[string]any {
	t.Helper()
	f, ok := props[name].(map[string]any)
	if !ok {
		t.Fatalf("schema has no property %s", name)
	}
	if ref, ok := f["$ref"].(string); ok {
		const prefix = "#/$defs/"
		if got := ref[:len(prefix)]; got != prefix {
			t.Fatalf("property %s: $ref %q, want one starting %q", name, ref, prefix)
		}
		f = root["$defs"].(map[string]any)[ref[len(prefix):]].(map[string]any)
	}
	return f
}

func TestSchemaRangesMatchValidate(t *testing.T) {
	// The schema's bounds and fieldRanges (which Validate uses) must be the same intervals.
	var root map[string]any
	if err := json.Unmarshal(schemaJSON, &root); err != nil {
		t.Fatalf("schemaJSON is not a JSON object: %v", err)
	}
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
			if !ok {
				t.Fatalf("%s.%s has no entry in fieldRanges", obj, name)
			}
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
			if got != want {
				t.Fatalf("%s.%s: schema %v, fieldRanges %v", obj, name, got, want)
			}
			checked++
		}
	}
	if want := len(fieldRanges) + 1; checked != want {
		t.Fatalf("checked %d numeric fields, want %d (every numeric field; zoom twice: bands and turn)", checked, want)
	}

	for _, c := range []struct {
		obj  string
		list any
		want []string
	}{
		{"the root", root["required"], []string{"bands", "hysteresis_kmh", "max_zoom_rate_per_s", "max_pitch_rate_deg_per_s", "turn",
			"min_zoom", "max_zoom", "max_turn_rate_deg_per_s"}},
		{"turn", turn["required"], []string{"within_m", "min_angle_deg", "zoom"}},
		{"band", band["required"], []string{"zoom", "pitch_deg"}}, // below_kmh is not required of a band
	} {
		if !sameStrings(c.list, c.want...) {
			t.Fatalf("schema: %s requires %v, want %q in any order", c.obj, c.list, c.want)
		}
	}
}

func schemaAccepts(t rapid.TB, v any) bool {
	t.Helper()
	data, err := json.Marshal(v)
	if err != nil {
		t.Fatalf("json.Marshal(%+v): %v", v, err)
	}
	inst, err := jsonschema.UnmarshalJSON(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("jsonschema.UnmarshalJSON(%s): %v", data, err)
	}
	sch, err := compiledSchema()
	if err != nil {
		t.Fatalf("compiledSchema: %v", err)
	}
	return sch.Validate(inst) == nil
}

func TestSchemaAcceptsRuleFiles(t *testing.T) {
	for _, name := range []string{"phone.yaml", "incar.yaml"} {
		var v any
		if err := yaml.Unmarshal(mustReadRuleFile(t, name), &v); err != nil {
			t.Fatalf("yaml.Unmarshal(%s): %v", name, err)
		}
		if !schemaAccepts(t, v) {
			t.Fatalf("the schema refuses %s", name)
		}
	}
	if !schemaAccepts(t, worked()) {
		t.Fatalf("the schema refuses worked()")
	}
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
		if got := schemaAccepts(t, c.set); got != c.schema {
			t.Fatalf("%s: schema accepts = %v, want %v", c.name, got, c.schema)
		}
		if err := c.set.Validate(); (err == nil) != c.full {
			t.Fatalf("%s: Validate() = %v, want accepted %v", c.name, err, c.full)
		}
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
			if !errors.As(err, &errs) {
				t.Fatalf("Validate() = %v (%T), want Errors", err, err)
			}
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
