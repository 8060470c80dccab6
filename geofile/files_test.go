package geofile_test

import (
	"errors"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/geofile"
)

func TestReadRouteGeoJSON(t *testing.T) {
	cases := []struct {
		name, data string
		points     int
		speeds     []float64
	}{
		{"linestring", `{"type":"LineString","coordinates":[[-31.17,44.93],[-31.16,44.94]]}`, 2, nil},
		{"feature one speed", `{"type":"Feature","properties":{"speed_mps":13.9},"geometry":{"type":"LineString","coordinates":[[-31.17,44.93],[-31.16,44.94],[-31.15,44.94]]}}`, 3, []float64{13.9}},
		{"collection per segment", `{"type":"FeatureCollection","features":[
			{"type":"Feature","properties":{"name":"start"},"geometry":{"type":"Point","coordinates":[-31.17,44.93]}},
			{"type":"Feature","properties":{"speed_mps":[10,20]},"geometry":{"type":"LineString","coordinates":[[-31.17,44.93],[-31.16,44.94],[-31.15,44.94]]}}]}`, 3, []float64{10, 20}},
	}
	for _, c := range cases {
		rf, err := geofile.ReadRoute(c.name, []byte(c.data))
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if len(rf.Points) != c.points || len(rf.SpeedsMps) != len(c.speeds) {
			t.Errorf("%s: %d points, speeds %v; want %d, %v", c.name, len(rf.Points), rf.SpeedsMps, c.points, c.speeds)
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
		t.Fatalf("points %v, want the track's 3 points", rf.Points)
	}
	// 0.001° of longitude on the WGS84 equator is a·π/180·0.001 = 111.319491 m
	// (a = 6 378 137 m, WGS84): 11.13 m/s over 10 s, 5.57 m/s over 20 s.
	if len(rf.SpeedsMps) != 2 || abs(rf.SpeedsMps[0]-11.1319491) > 1e-6 || abs(rf.SpeedsMps[1]-5.56597455) > 1e-6 {
		t.Fatalf("speeds %v, want [11.1319491 5.56597455]", rf.SpeedsMps)
	}
	// Without times a GPX route has no speeds; the route points are used when
	// there is no track.
	rf, err = geofile.ReadRoute("r.gpx", []byte(`<gpx><rte><rtept lat="1" lon="1"/><rtept lat="2" lon="2"/></rte></gpx>`))
	if err != nil || len(rf.Points) != 2 || rf.SpeedsMps != nil {
		t.Fatalf("route-only GPX: %v, %v", rf, err)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// Bad files fail with the file, the line or feature index, and the field.
func TestReadRouteErrors(t *testing.T) {
	cases := []struct{ name, data, want string }{
		{"a.geojson", "{\"type\":\"LineString\",\n\"coordinates\":[[0,0],[0,]]}", "a.geojson:2: malformed JSON"},
		{"b.geojson", `{"type":"Polygon","coordinates":[]}`, `b.geojson: type: "Polygon": want LineString, Feature or FeatureCollection`},
		{"c.geojson", `{"type":"LineString","coordinates":[[0,0],[0,95]]}`, "c.geojson: geometry.coordinates[1]: lat = 95: latitude must be finite and within [-90, 90]"},
		{"d.geojson", `{"type":"Feature","properties":{"speed_mps":[1,"x"]},"geometry":{"type":"LineString","coordinates":[[0,0],[0,1],[0,2]]}}`, "d.geojson: properties.speed_mps[1]: expected a number"},
		{"e.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, "e.geojson: no LineString feature"},
		{"f.gpx", "<gpx>\n<trk><trkseg>\n<trkpt lat=\"x\" lon=\"0\"/></trkseg></trk></gpx>", `f.gpx:3: trkpt.lat: "x" is not a number`},
		{"g.gpx", "<gpx>\n<trk><trkseg>\n<trkpt lat=\"1\"/></trkseg></trk></gpx>", "g.gpx:3: trkpt.lon: missing"},
		{"h.gpx", "<gpx><trk><trkseg><trkpt lat=\"1\" lon=\"1\"><time>yesterday</time></trkpt></trkseg></trk></gpx>", `h.gpx:1: time: "yesterday" is not an RFC 3339 time`},
		{"i.gpx", "<gpx><trk>\n<trkseg><trkpt", "i.gpx:2: malformed XML"},
		{"j.gpx", "<kml></kml>", "j.gpx: not a GPX document"},
		{"k.geojson", "  ", "k.geojson: empty file"},
	}
	for _, c := range cases {
		_, err := geofile.ReadRoute(c.name, []byte(c.data))
		var fe *geofile.FileError
		if !errors.As(err, &fe) || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("ReadRoute(%s) = %v, want an error starting %q", c.name, err, c.want)
		}
	}
}

func TestReadMarkers(t *testing.T) {
	csv := "id,lat,lon,priority\n# shops\nbakery,44.93,-31.17,2\n17,44.94,-31.16\n"
	ms, err := geofile.ReadMarkers("m.csv", []byte(csv))
	if err != nil {
		t.Fatal(err)
	}
	if len(ms) != 2 || ms[0].ID != "bakery" || ms[0].Priority != 2 || ms[1].ID != "17" || ms[1].Priority != 0 || ms[1].Point[1] != 44.94 {
		t.Fatalf("markers %+v", ms)
	}
	gj := `{"type":"FeatureCollection","features":[
{"type":"Feature","properties":{"id":"a","priority":1},"geometry":{"type":"Point","coordinates":[-31.17,44.93]}},
{"type":"Feature","properties":{"id":7},"geometry":{"type":"Point","coordinates":[-31.16,44.94]}}]}`
	ms, err = geofile.ReadMarkers("m.geojson", []byte(gj))
	if err != nil || len(ms) != 2 || ms[1].ID != "7" || ms[0].Priority != 1 {
		t.Fatalf("markers %+v, %v", ms, err)
	}
}

func TestReadMarkersErrors(t *testing.T) {
	cases := []struct{ name, data, want string }{
		{"a.csv", "a,1,2\nb,1\n", "a.csv:2: 2 fields"},
		{"b.csv", "a,1,2\na,3,4\n", `b.csv:2: id: duplicate id "a" (first on line 1)`},
		{"c.csv", "a,95,2\n", "c.csv:1: lat,lon: lat = 95: latitude must be"},
		{"d.csv", "a,NaN,2\n", `d.csv:1: lat: "NaN" is not a finite number`},
		{"e.csv", "id,lat,lon\n", "e.csv: no markers"},
		{"f.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, "f.geojson: feature 0: properties.id: missing"},
		{"g.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"x"},"geometry":{"type":"Point","coordinates":[0,0]}},{"type":"Feature","properties":{"id":"x"},"geometry":{"type":"Point","coordinates":[0,1]}}]}`, `g.geojson: feature 1: properties.id: duplicate id "x" (first at feature 0)`},
		{"h.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":1.5},"geometry":{"type":"Point","coordinates":[0,0]}}]}`, "h.geojson: feature 0: properties.id = 1.5: a numeric id must be a whole number"},
	}
	for _, c := range cases {
		_, err := geofile.ReadMarkers(c.name, []byte(c.data))
		if err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("ReadMarkers(%s) = %v, want an error starting %q", c.name, err, c.want)
		}
	}
}

// FuzzReadFiles: the route and marker readers never panic, and every error
// is a *FileError naming the file.
func FuzzReadFiles(f *testing.F) {
	f.Add(`{"type":"LineString","coordinates":[[0,0],[1,1]]}`)
	f.Add(`{"type":"Feature","properties":{"speed_mps":[1,2]},"geometry":{"type":"LineString","coordinates":[[0,0],[1,1],[2,2]]}}`)
	f.Add(`<gpx><trk><trkseg><trkpt lat="1" lon="1"><time>2026-01-01T00:00:00Z</time></trkpt></trkseg></trk></gpx>`)
	f.Add("id,lat,lon\na,1,2\n")
	f.Add(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a"},"geometry":{"type":"Point","coordinates":[0,0]}}]}`)
	f.Fuzz(func(t *testing.T, data string) {
		for _, read := range []func() error{
			func() error { _, err := geofile.ReadRoute("fuzz", []byte(data)); return err },
			func() error { _, err := geofile.ReadMarkers("fuzz", []byte(data)); return err },
		} {
			if err := read(); err != nil {
				var fe *geofile.FileError
				if !errors.As(err, &fe) || !strings.HasPrefix(err.Error(), "fuzz") {
					t.Fatalf("error %v (%T) is not a FileError naming the file", err, err)
				}
			}
		}
	})
}
