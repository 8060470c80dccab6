package geofile_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/geofile"
)

// errorCase is a bad file and the whole message it must give: the file,
// the line (or the feature), the field and what was wrong.
type errorCase struct {
	desc, name, data, want string
}

// checkErrors reads each case with read (named fn in messages) and wants
// a *geofile.FileError with exactly the case's message.
func checkErrors(t *testing.T, fn string, read func(name string, data []byte) error, cases []errorCase) {
	t.Helper()
	for _, c := range cases {
		err := read(c.name, []byte(c.data))
		var fe *geofile.FileError
		switch {
		case err == nil:
			t.Errorf("%s: %s(%s, %q) = nil, want %q", c.desc, fn, c.name, c.data, c.want)
		case !errors.As(err, &fe):
			t.Errorf("%s: %s(%s, %q) = %v (%T), want a *geofile.FileError", c.desc, fn, c.name, c.data, err, err)
		case err.Error() != c.want:
			t.Errorf("%s: %s(%s, %q) = %q, want %q", c.desc, fn, c.name, c.data, err.Error(), c.want)
		}
	}
}

func readRoute(name string, data []byte) error {
	_, err := geofile.ReadRoute(name, data)
	return err
}

func readMarkers(name string, data []byte) error {
	_, err := geofile.ReadMarkers(name, data)
	return err
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

func TestReadRouteGeoJSON(t *testing.T) {
	cases := []struct {
		desc, data string
		points     int
		speeds     []float64
	}{
		{"linestring", `{"type":"LineString","coordinates":[[-31.17,44.93],[-31.16,44.94]]}`, 2, nil},
		{"feature one speed", `{"type":"Feature","properties":{"speed_mps":13.9},"geometry":{"type":"LineString","coordinates":[[-31.17,44.93],[-31.16,44.94],[-31.15,44.94]]}}`, 3, []float64{13.9}},
		{"collection per segment", `{"type":"FeatureCollection","features":[
			{"type":"Feature","properties":{"name":"start"},"geometry":{"type":"Point","coordinates":[-31.17,44.93]}},
			{"type":"Feature","properties":{"speed_mps":[10,20]},"geometry":{"type":"LineString","coordinates":[[-31.17,44.93],[-31.16,44.94],[-31.15,44.94]]}}]}`, 3, []float64{10, 20}},
		{"altitude and a further element are read and not used (RFC 7946 §3.1.1)", `{"type":"LineString","coordinates":[[1,2,100],[3,4,100,7]]}`, 2, nil},
		{"null speed and null properties mean no speeds", `{"type":"Feature","properties":{"speed_mps":null},"geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]}}`, 2, nil},
		{"an unlocated feature beside the route", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":null,"geometry":null},{"type":"Feature","properties":null,"geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]}}]}`, 2, nil},
		{"a number too small for a double is 0", `{"type":"LineString","coordinates":[[1e-400,0],[1,1]]}`, 2, nil},
	}
	for _, c := range cases {
		rf, err := geofile.ReadRoute("r.geojson", []byte(c.data))
		if err != nil {
			t.Errorf("%s: ReadRoute = %v, want no error", c.desc, err)
			continue
		}
		if len(rf.Points) != c.points || len(rf.SpeedsMps) != len(c.speeds) {
			t.Errorf("%s: ReadRoute = %d points, speeds %v; want %d, %v", c.desc, len(rf.Points), rf.SpeedsMps, c.points, c.speeds)
		}
	}
}

// GPX 1.1 (the Topografix schema, an open standard): trkpt lat/lon attributes
// and RFC 3339 times; speeds follow from the times.
func TestReadRouteGPX(t *testing.T) {
	data := `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="viewspec test" xmlns="http://www.topografix.com/GPX/1/1">
  <rte><rtept lat="1" lon="1"/><rtept lat="2" lon="2"/></rte>
  <trk><name>drive</name>
    <trkseg>
      <trkpt lat="0" lon="0"><time>2026-01-01T00:00:00Z</time></trkpt>
      <trkpt lat="0" lon="0.001"><time>2026-01-01T00:00:10Z</time></trkpt>
    </trkseg>
    <trkseg>
      <trkpt lat="0" lon="0.002"><time>2026-01-01T00:00:30Z</time></trkpt>
    </trkseg>
  </trk>
</gpx>`
	rf, err := geofile.ReadRoute("drive.gpx", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	if len(rf.Points) != 3 || rf.Points[2][0] != 0.002 {
		t.Fatalf("ReadRoute(drive.gpx) points = %v, want the track's 3 points", rf.Points)
	}
	// 0.001° of longitude on the WGS84 equator is a·π/180·0.001 = 111.319491 m
	// (a = 6 378 137 m, WGS84): 11.13 m/s over 10 s, 5.57 m/s over 20 s.
	if len(rf.SpeedsMps) != 2 || abs(rf.SpeedsMps[0]-11.1319491) > 1e-6 || abs(rf.SpeedsMps[1]-5.56597455) > 1e-6 {
		t.Fatalf("ReadRoute(drive.gpx) speeds = %v, want [11.1319491 5.56597455]", rf.SpeedsMps)
	}
	// Without times a GPX route has no speeds; the route points are used when
	// there is no track.
	rf, err = geofile.ReadRoute("r.gpx", []byte(`<gpx><rte><rtept lat="1" lon="1"/><rtept lat="2" lon="2"/></rte></gpx>`))
	if err != nil || len(rf.Points) != 2 || rf.SpeedsMps != nil {
		t.Fatalf("ReadRoute(r.gpx) = %v, %v; want 2 points and no speeds", rf, err)
	}
}

// Bad files fail with the file, the line or feature index, and the field.
func TestReadRouteErrors(t *testing.T) {
	checkErrors(t, "ReadRoute", readRoute, []errorCase{
		{"malformed JSON on line 2", "a.geojson", "{\"type\":\"LineString\",\n\"coordinates\":[[0,0],[0,]]}", "a.geojson:2: malformed JSON: invalid character ']' looking for beginning of value"},
		{"not a route type", "b.geojson", `{"type":"Polygon","coordinates":[]}`, `b.geojson:1: type = "Polygon": want LineString, Feature or FeatureCollection`},
		{"latitude out of range", "c.geojson", `{"type":"LineString","coordinates":[[0,0],[0,95]]}`, "c.geojson:1: coordinates[1][1] = 95: latitude must be finite and within [-90, 90]"},
		{"a speed that is a string", "d.geojson", `{"type":"Feature","properties":{"speed_mps":[1,"x"]},"geometry":{"type":"LineString","coordinates":[[0,0],[0,1],[0,2]]}}`, `d.geojson:1: properties.speed_mps[1] = "x": expected a number, got a string`},
		{"no LineString", "e.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, "e.geojson: no LineString feature"},
		{"two LineStrings", "e2.geojson", "{\"type\":\"FeatureCollection\",\"features\":[\n{\"type\":\"Feature\",\"geometry\":{\"type\":\"LineString\",\"coordinates\":[[0,0],[1,1]]}},\n{\"type\":\"Feature\",\"geometry\":{\"type\":\"LineString\",\"coordinates\":[[0,0],[1,1]]}}]}", "e2.geojson:3: feature 1: geometry: a second LineString (the first is feature 0); a route file holds one"},
		{"a feature that is a Point", "e3.geojson", `{"type":"Feature","geometry":{"type":"Point","coordinates":[0,0]}}`, `e3.geojson:1: geometry.type = "Point": want LineString`},
		{"lat not a number", "f.gpx", "<gpx>\n<trk><trkseg>\n<trkpt lat=\"x\" lon=\"0\"/></trkseg></trk></gpx>", `f.gpx:3: trkpt.lat = "x": not a number`},
		{"lon missing", "g.gpx", "<gpx>\n<trk><trkseg>\n<trkpt lat=\"1\"/></trkseg></trk></gpx>", "g.gpx:3: trkpt.lon: missing (required)"},
		{"a time that is not RFC 3339", "h.gpx", "<gpx><trk><trkseg><trkpt lat=\"1\" lon=\"1\"><time>yesterday</time></trkpt></trkseg></trk></gpx>", `h.gpx:1: trkpt.time = "yesterday": not an RFC 3339 time (2026-03-01T08:00:00Z)`},
		{"XML cut short", "i.gpx", "<gpx><trk>\n<trkseg><trkpt", "i.gpx:2: malformed XML: XML syntax error on line 2: unexpected EOF"},
		{"another root", "j.gpx", "<kml></kml>", "j.gpx:1: not a GPX document (the root element is <kml>, not <gpx>)"},
		{"white space only", "k.geojson", "  ", "k.geojson: empty file"},
		{"a byte order mark only", "l.geojson", "\ufeff\n", "l.geojson: empty file"},
	})
}

func TestReadMarkers(t *testing.T) {
	csv := "id,lat,lon,priority\n# shops\nbakery,44.93,-31.17,2\n17,44.94,-31.16\n"
	ms, err := geofile.ReadMarkers("m.csv", []byte(csv))
	if err != nil {
		t.Fatal(err)
	}
	if len(ms) != 2 || ms[0].ID != "bakery" || ms[0].Priority != 2 || ms[1].ID != "17" || ms[1].Priority != 0 || ms[1].Point[1] != 44.94 {
		t.Fatalf("ReadMarkers(m.csv) = %+v, want bakery (priority 2) and 17 (priority 0) at lat 44.94", ms)
	}
	gj := `{"type":"FeatureCollection","features":[
{"type":"Feature","properties":{"id":"a","priority":1},"geometry":{"type":"Point","coordinates":[-31.17,44.93]}},
{"type":"Feature","properties":{"id":7},"geometry":{"type":"Point","coordinates":[-31.16,44.94]}}]}`
	ms, err = geofile.ReadMarkers("m.geojson", []byte(gj))
	if err != nil || len(ms) != 2 || ms[1].ID != "7" || ms[0].Priority != 1 {
		t.Fatalf("ReadMarkers(m.geojson) = %+v, %v; want a (priority 1) and 7", ms, err)
	}
}

func TestReadMarkersErrors(t *testing.T) {
	checkErrors(t, "ReadMarkers", readMarkers, []errorCase{
		{"a short line", "a.csv", "a,1,2\nb,1\n", "a.csv:2: 2 fields: want id,lat,lon[,priority]"},
		{"a duplicate id (message quoted by cmd/viewspec metrics.txtar)", "b.csv", "a,1,2\na,3,4\n", `b.csv:2: id: duplicate id "a" (first on line 1)`},
		{"latitude out of range", "c.csv", "a,95,2\n", "c.csv:1: lat = 95: latitude must be finite and within [-90, 90]"},
		{"NaN", "d.csv", "a,NaN,2\n", `d.csv:1: lat = "NaN": not a finite number`},
		{"a header only", "e.csv", "id,lat,lon\n", "e.csv: no markers"},
		{"no id", "f.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, "f.geojson:1: feature 0: properties.id: missing (required)"},
		{"a duplicate id", "g.geojson", "{\"type\":\"FeatureCollection\",\"features\":[\n{\"type\":\"Feature\",\"properties\":{\"id\":\"x\"},\"geometry\":{\"type\":\"Point\",\"coordinates\":[0,0]}},\n{\"type\":\"Feature\",\"properties\":{\"id\":\"x\"},\"geometry\":{\"type\":\"Point\",\"coordinates\":[0,1]}}]}", `g.geojson:3: feature 1: properties.id: duplicate id "x" (first at feature 0)`},
		{"a fractional id", "h.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":1.5},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, "h.geojson:1: feature 0: properties.id = 1.5: a numeric id must be a whole number within ±2^53"},
		{"an empty id", "i.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":""},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, "i.geojson:1: feature 0: properties.id: empty"},
		{"a priority that is a string", "j.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a","priority":"high"},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, `j.geojson:1: feature 0: properties.priority = "high": expected a number, got a string`},
		{"a LineString among markers", "k.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a"},"geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]}}]}`, `k.geojson:1: feature 0: geometry.type = "LineString": want Point`},
	})
}

// fuzzSeeds start FuzzReadFiles at the shapes the readers take apart:
// each format's good file, and GPX with its structural elements nested,
// misplaced, empty or without attributes, where a reader that does not
// track the element stack goes wrong.
var fuzzSeeds = []string{
	`{"type":"LineString","coordinates":[[0,0],[1,1]]}`,
	`{"type":"Feature","properties":{"speed_mps":[1,2]},"geometry":{"type":"LineString","coordinates":[[0,0],[1,1],[2,2]]}}`,
	`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a","priority":2},"geometry":{"type":"Point","coordinates":[0,0]}},{"type":"Feature","properties":{"speed_mps":3},"geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]}}]}`,
	`{"type":"LineString","coordinates":[[0,0],null,[1],[],["1",2],[1e400,0]]}`,
	"\ufeff{\"type\":\"LineString\",\"coordinates\":[[0,0],[1,1]]}",
	"id,lat,lon\na,1,2\n",
	"\ufeffid,lon,lat,priority\na,2,1,3\nb,3,4\n",
	"a,1,2,5\n# comment\nb,\"3\",4\n",
	`<gpx><trk><trkseg><trkpt lat="1" lon="1"><time>2026-01-01T00:00:00Z</time></trkpt><trkpt lat="1" lon="1.001"><time>2026-01-01T00:00:10Z</time></trkpt></trkseg></trk></gpx>`,
	`<gpx><trk><trkpt lat="1" lon="1"><rte><time>2020-01-01T00:00:00Z</time></rte></trkpt></trk></gpx>`,
	`<gpx><trk><trkpt lat="1" lon="1"/></trk></gpx>`,
	`<gpx><trk><time>2020-01-01T00:00:00Z</time><trkseg><trkpt lat="1" lon="1"/></trkseg></trk></gpx>`,
	`<gpx><wpt lat="1" lon="1"><time>2020-01-01T00:00:00Z</time></wpt><rte><rtept lat="1" lon="1"><time>2020-01-01T00:00:00Z</time></rtept></rte></gpx>`,
	`<gpx><trk><trk><trkseg><trkpt lat="1" lon="1"/></trkseg></trk></trk></gpx>`,
	`<gpx><trk/><rte/><trk><trkseg/><trkseg><trkpt/></trkseg></trk></gpx>`,
	`<gpx><trk><trkseg><trkpt lat="1"><time></time></trkpt><trkpt lon="1"/></trkseg></trk></gpx>`,
	`<gpx><trk><trkseg><trkpt lat="1" lon="1"><time>2020-01-01T00:00:00Z</time><time>2020-01-01T00:00:01Z</time></trkpt></trkseg></trk></gpx>`,
	`<gpx xmlns="http://www.topografix.com/GPX/1/1" xmlns:x="urn:x"><trk><trkseg><trkpt lat="1" lon="1"><extensions><trkpt/><rte/></extensions><x:rte/></trkpt></trkseg></trk></gpx>`,
	`<gpx><rte><rtept lat="1" lon="1"><time>2020-01-01T00:00:01Z</time></rtept><rtept lat="1" lon="2"><time>2020-01-01T00:00:00Z</time></rtept></rte></gpx>`,
	`<gpx></gpx><gpx/>`,
}

// FuzzReadFiles: the route and marker readers never panic; every error is
// a *FileError naming the file; a file that reads has only finite
// positions within range, finite speeds (GPX speeds also > 0) and finite
// priorities.
func FuzzReadFiles(f *testing.F) {
	for _, s := range fuzzSeeds {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, data string) {
		rf, err := geofile.ReadRoute("fuzz", []byte(data))
		checkFuzzError(t, "ReadRoute", err)
		if err == nil {
			for i, p := range rf.Points {
				if !(p[1] >= -90 && p[1] <= 90 && p[0] >= -180 && p[0] <= 180) {
					t.Fatalf("ReadRoute(%q) point %d = %v, want [lon, lat] within range", data, i, p)
				}
			}
			gpx := strings.HasPrefix(strings.TrimSpace(strings.TrimPrefix(data, "\ufeff")), "<") // as ReadRoute tells GPX
			for i, s := range rf.SpeedsMps {
				if math.IsNaN(s) || math.IsInf(s, 0) || (gpx && !(s > 0)) {
					t.Fatalf("ReadRoute(%q) speed %d = %v, want a finite speed (> 0 from GPX times)", data, i, s)
				}
			}
		}
		ms, err := geofile.ReadMarkers("fuzz", []byte(data))
		checkFuzzError(t, "ReadMarkers", err)
		for i, m := range ms {
			if !(m.Point[1] >= -90 && m.Point[1] <= 90 && m.Point[0] >= -180 && m.Point[0] <= 180) || math.IsNaN(m.Priority) || math.IsInf(m.Priority, 0) || m.ID == "" {
				t.Fatalf("ReadMarkers(%q) marker %d = %+v, want a position within range, a finite priority and an id", data, i, m)
			}
		}
	})
}

func checkFuzzError(t *testing.T, fn string, err error) {
	t.Helper()
	if err == nil {
		return
	}
	var fe *geofile.FileError
	if !errors.As(err, &fe) || fe.File != "fuzz" || !strings.HasPrefix(err.Error(), "fuzz") {
		t.Fatalf("%s error = %v (%T), want a *FileError naming the file", fn, err, err)
	}
}
