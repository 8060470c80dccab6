package geofile_test

import (
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/geofile"
)

// A position is [lon, lat] with nothing filled in: a null, a short array
// or an element that is not a finite number is an error naming the line,
// the feature in a collection and the coordinate's index.
func TestReadGeoJSONCoordinatesErrors(t *testing.T) {
	checkErrors(t, "ReadRoute", readRoute, []errorCase{
		// Used to read as (0, 0): orb's decoder fills what is missing with zeros.
		{"a null vertex", "a.geojson", `{"type":"LineString","coordinates":[[0,0],null,[1,1]]}`, "a.geojson:1: coordinates[1]: expected a position [lon, lat], got null"},
		// Used to get latitude 0.
		{"a vertex of one number", "b.geojson", `{"type":"LineString","coordinates":[[0,0],[5]]}`, "b.geojson:1: coordinates[1] = [5]: 1 number: want [lon, lat] or [lon, lat, altitude]"},
		{"an empty vertex", "c.geojson", "{\"type\":\"Feature\",\"geometry\":{\"type\":\"LineString\",\n\"coordinates\":[[0,0],\n[]]}}", "c.geojson:3: geometry.coordinates[1] = []: 0 numbers: want [lon, lat] or [lon, lat, altitude]"},
		{"a null number", "d.geojson", `{"type":"LineString","coordinates":[[0,0],[1,null]]}`, "d.geojson:1: coordinates[1][1]: expected a number, got null"},
		// Used to say `json: cannot unmarshal string into Go struct field
		// ...` with no feature or field.
		{"a string coordinate in a collection", "e.geojson", "{\"type\":\"FeatureCollection\",\"features\":[\n{\"type\":\"Feature\",\"geometry\":{\"type\":\"Point\",\"coordinates\":[0,0]}},\n{\"type\":\"Feature\",\"geometry\":{\"type\":\"LineString\",\"coordinates\":[[0,0],\n[\"1\",2]]}}]}",
			`e.geojson:4: feature 1: geometry.coordinates[1][0] = "1": expected a number, got a string`},
		{"a number beyond the double range", "f.geojson", "{\"type\":\"FeatureCollection\",\"features\":[\n{\"type\":\"Feature\",\"geometry\":{\"type\":\"LineString\",\"coordinates\":[[0,0],[1e400,2]]}}]}",
			"f.geojson:2: feature 0: geometry.coordinates[1][0] = 1e400: not a finite number"},
		{"an altitude beyond the double range", "g.geojson", `{"type":"LineString","coordinates":[[0,0,-1e999],[1,1]]}`, "g.geojson:1: coordinates[0][2] = -1e999: not a finite number"},
		{"a speed beyond the double range", "h.geojson", `{"type":"Feature","properties":{"speed_mps":1e309},"geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]}}`, "h.geojson:1: properties.speed_mps = 1e309: not a finite number"},
		{"one position", "i.geojson", `{"type":"LineString","coordinates":[[0,0]]}`, "i.geojson:1: coordinates = [[0,0]]: 1 position: a LineString has two or more"},
		{"coordinates null", "j.geojson", `{"type":"LineString","coordinates":null}`, "j.geojson:1: coordinates: null (required)"},
		{"coordinates missing", "k.geojson", `{"type":"Feature","geometry":{"type":"LineString"}}`, "k.geojson:1: geometry.coordinates: missing (required)"},
		{"coordinates an object", "l.geojson", `{"type":"LineString","coordinates":{"x":1}}`, `l.geojson:1: coordinates = {"x":1}: expected an array of positions, got an object`},
		{"a key given twice", "m.geojson", "{\"type\":\"LineString\",\"coordinates\":[[0,0],[1,1]],\n\"coordinates\":[[2,2],[3,3]]}", "m.geojson:2: coordinates: given twice (first on line 1)"},
		{"data after the value", "n.geojson", "{\"type\":\"LineString\",\"coordinates\":[[0,0],[1,1]]}\n{}", "n.geojson:2: malformed JSON: invalid character '{' after top-level value"},
		{"an array at the top", "o.geojson", `[1,2]`, "o.geojson:1: expected an object, got an array"},
		{"no type", "p.geojson", `{"coordinates":[]}`, "p.geojson:1: type: missing (required)"},
		{"nesting without end", "q.geojson", `{"type":"Feature","properties":{"x":` + strings.Repeat("[", 300) + strings.Repeat("]", 300) + `}}`, "q.geojson:1: malformed JSON: nested deeper than 256 arrays and objects"},
		{"cut short", "r.geojson", "{\"type\":\"LineString\",\n\"coordinates\":[[0,0]", "r.geojson:2: malformed JSON: unexpected end of JSON input"},
		{"a feature of the wrong type", "s.geojson", `{"type":"FeatureCollection","features":[{"type":"Point","coordinates":[0,0]}]}`, `s.geojson:1: feature 0: type = "Point": want "Feature"`},
	})
	checkErrors(t, "ReadMarkers", readMarkers, []errorCase{
		// Used to be accepted as markers at (0, 0) and (x, 0).
		{"a Point with coordinates []", "a.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a"},"geometry":{"type":"Point","coordinates":[]}}]}`, "a.geojson:1: feature 0: geometry.coordinates = []: 0 numbers: want [lon, lat] or [lon, lat, altitude]"},
		{"a Point with coordinates [x]", "b.geojson", "{\"type\":\"FeatureCollection\",\"features\":[\n{\"type\":\"Feature\",\"properties\":{\"id\":\"a\"},\"geometry\":{\"type\":\"Point\",\"coordinates\":[0,0]}},\n{\"type\":\"Feature\",\"properties\":{\"id\":\"b\"},\"geometry\":{\"type\":\"Point\",\"coordinates\":[7]}}]}", "b.geojson:3: feature 1: geometry.coordinates = [7]: 1 number: want [lon, lat] or [lon, lat, altitude]"},
		{"a Point with coordinates null", "c.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a"},"geometry":{"type":"Point","coordinates":null}}]}`, "c.geojson:1: feature 0: geometry.coordinates: null (required)"},
		{"a null geometry", "d.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a"},"geometry":null}]}`, "d.geojson:1: feature 0: geometry: null: a marker needs a Point"},
		{"a priority beyond the double range", "e.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a","priority":-1e400},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, "e.geojson:1: feature 0: properties.priority = -1e400: not a finite number"},
		{"a string latitude", "f.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a"},"geometry":{"type":"Point","coordinates":[0,"north"]}}]}`, `f.geojson:1: feature 0: geometry.coordinates[1] = "north": expected a number, got a string`},
		{"not a collection", "g.geojson", `{"type":"Feature","properties":{"id":"a"},"geometry":{"type":"Point","coordinates":[0,0]}}`, `g.geojson:1: type = "Feature": want FeatureCollection`},
	})
}

// A UTF-8 byte order mark before the JSON is not content: the file reads
// as without it. Regression: it used to give "malformed JSON" (routes)
// and be read as CSV (markers).
func TestReadGeoJSONByteOrderMark(t *testing.T) {
	const bom = "\ufeff"
	rf, err := geofile.ReadRoute("r.geojson", []byte(bom+`{"type":"LineString","coordinates":[[1,2],[3,4]]}`))
	if err != nil || len(rf.Points) != 2 || rf.Points[1] != (orb.Point{3, 4}) {
		t.Errorf("ReadRoute(BOM + LineString) = %v, %v; want [[1 2] [3 4]]", rf, err)
	}
	ms, err := geofile.ReadMarkers("m.geojson", []byte(bom+`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a"},"geometry":{"type":"Point","coordinates":[1,2]}}]}`))
	if err != nil || len(ms) != 1 || ms[0].Point != (orb.Point{1, 2}) {
		t.Errorf("ReadMarkers(BOM + FeatureCollection) = %+v, %v; want a at [1 2]", ms, err)
	}
}
