package gate_test

import (
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/gate"
)

// Drive-like and other files, as a drives folder may hold them.
const (
	driveGeoJSON    = `{"type":"Feature","properties":{"name":"fast","speed_mps":30},"geometry":{"type":"LineString","coordinates":[[-31.17,44.90],[-31.17,44.95]]}}`
	driveCollection = `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"speed_mps":[20]},"geometry":{"type":"LineString","coordinates":[[-31.17,44.90],[-31.17,44.91]]}},{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[-31.17,44.9]}}]}`
	pointsGeoJSON   = `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a","name":"Café Roma"},"geometry":{"type":"Point","coordinates":[-31.17,44.905]}},{"type":"Feature","properties":{"id":7,"name":"Bakery"},"geometry":{"type":"Point","coordinates":[-31.17,44.915]}}]}`
	streetsGeoJSON  = `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":"Main"},"geometry":{"type":"LineString","coordinates":[[-31.17,44.90],[-31.17,44.95]]}},{"type":"Feature","properties":{"name":"Ring"},"geometry":{"type":"LineString","coordinates":[[-31.16,44.90],[-31.16,44.95]]}},{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[-31.17,44.9],[-31.16,44.9],[-31.16,44.91],[-31.17,44.9]]]}}]}`
	timedGPX        = `<?xml version="1.0"?>
<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1"><trk><trkseg>
<trkpt lat="44.90" lon="-31.17"><time>2026-01-01T00:00:00Z</time></trkpt>
<trkpt lat="44.91" lon="-31.17"><time>2026-01-01T00:01:00Z</time></trkpt>
</trkseg></trk></gpx>`
	untimedGPX    = `<gpx version="1.1"><trk><trkseg><trkpt lat="44.90" lon="-31.17"/><trkpt lat="44.91" lon="-31.17"/></trkseg></trk></gpx>`
	waypointsGPX  = `<gpx version="1.1"><wpt lat="44.90" lon="-31.17"><name>shop</name></wpt></gpx>`
	reportJSON    = `{"drives": [], "total": {}}`
	bareLine      = `{"type":"LineString","coordinates":[[-31.17,44.90],[-31.17,44.95]]}`
	unspeededLine = `{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[-31.17,44.90],[-31.17,44.95]]}}`
)

// writeFolder writes files (name → content) into a new folder and returns
// its path.
func writeFolder(t *testing.T, files map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, data := range files {
		p := filepath.Join(dir, name)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func tripNames(trips []gate.Trip) []string {
	var out []string
	for _, t := range trips {
		out = append(out, t.Name)
	}
	return out
}

// The README's command points --drives at the demo's folder, which holds
// the drives beside the streets, the businesses (a marker file) and the
// footprints. Folder mode takes the three drives, in name order, named by
// their file names, and says of every other file why it is not a drive.
// (It used to fail: "businesses.geojson: no LineString feature".)
func TestReadTripsDemoFolder(t *testing.T) {
	dir := t.TempDir()
	town := demo.Default()
	if _, err := town.WriteFiles(dir); err != nil {
		t.Fatal(err)
	}
	extra := map[string]string{
		"footprints.geojson": `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"drive":"town"},"geometry":{"type":"Polygon","coordinates":[[[-31.17,44.9],[-31.16,44.9],[-31.16,44.91],[-31.17,44.9]]]}}]}`,
		"report.json":        reportJSON,
		"probe-finding.jsonl": `{"op":"hello"}
`,
	}
	for name, data := range extra {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	trips, skipped, err := gate.ReadTrips([]string{dir})
	if err != nil {
		t.Fatalf("ReadTrips(demo folder) = %v, want the three drives", err)
	}
	if got, want := tripNames(trips), []string{"drive-expressway", "drive-ring", "drive-town"}; !slices.Equal(got, want) {
		t.Errorf("ReadTrips(demo folder) drives = %v, want %v", got, want)
	}
	for _, tr := range trips {
		if want := filepath.Join(dir, tr.Name+".geojson"); tr.File != want {
			t.Errorf("drive %s: File = %q, want %q", tr.Name, tr.File, want)
		}
	}
	want := []gate.Skipped{
		{filepath.Join(dir, "businesses.geojson"), fmt.Sprintf("no LineString feature with properties.speed_mps (%d Points)", len(town.Businesses))},
		{filepath.Join(dir, "footprints.geojson"), "no LineString feature with properties.speed_mps (1 Polygon)"},
		{filepath.Join(dir, "report.json"), `JSON without a GeoJSON "type"`},
		{filepath.Join(dir, "streets.geojson"), "no LineString feature with properties.speed_mps ("},
	}
	if len(skipped) != len(want) {
		t.Fatalf("ReadTrips(demo folder) skipped %v, want %d files", skipped, len(want))
	}
	for i, w := range want {
		got := skipped[i]
		if got.File != w.File || (!strings.HasPrefix(got.Reason, w.Reason) && got.Reason != w.Reason) {
			t.Errorf("skipped[%d] = %+v, want %+v", i, got, w)
		}
	}
	if r := skipped[3].Reason; !strings.Contains(r, "LineStrings without properties.speed_mps") {
		t.Errorf("streets.geojson skipped because %q, want its LineStrings without speeds named", r)
	}
}

// Every kind of file a folder may hold: drives (a Feature, a collection
// holding one speeded LineString, a GPX track with times) are read, the
// rest skipped with the reason.
func TestReadTripsFolderKinds(t *testing.T) {
	dir := writeFolder(t, map[string]string{
		"a-feature.geojson":    driveGeoJSON,
		"b-collection.json":    driveCollection,
		"c-timed.gpx":          timedGPX,
		"d-untimed.gpx":        untimedGPX,
		"e-waypoints.gpx":      waypointsGPX,
		"f-points.geojson":     pointsGeoJSON,
		"g-streets.geojson":    streetsGeoJSON,
		"h-bare-line.geojson":  bareLine,
		"i-no-speed.geojson":   unspeededLine,
		"j-empty.json":         "  \n",
		"k-array.json":         `[1, 2]`,
		"notes.txt":            "not looked at",
		"sub/inner.geojson":    driveGeoJSON, // folders are not entered
		"l-polygon.geojson":    `{"type":"Polygon","coordinates":[]}`,
		"m-no-features.json":   `{"type":"FeatureCollection","features":[]}`,
		"n-point-feature.json": `{"type":"Feature","properties":{"speed_mps":3},"geometry":{"type":"Point","coordinates":[0,0]}}`,
		"o-odd-types.json":     `{"type":"FeatureCollection","features":[{"geometry":5,"properties":"x"},{"geometry":{"type":7}}]}`,
	})
	trips, skipped, err := gate.ReadTrips([]string{dir})
	if err != nil {
		t.Fatalf("ReadTrips = %v", err)
	}
	if got, want := tripNames(trips), []string{"a-feature", "b-collection", "c-timed"}; !slices.Equal(got, want) {
		t.Errorf("drives = %v, want %v", got, want)
	}
	want := map[string]string{
		"d-untimed.gpx":        "a GPX track without a time on every point, so without speeds",
		"e-waypoints.gpx":      "a GPX file without track or route points",
		"f-points.geojson":     "no LineString feature with properties.speed_mps (2 Points)",
		"g-streets.geojson":    "no LineString feature with properties.speed_mps (1 Polygon, 2 LineStrings without properties.speed_mps)",
		"h-bare-line.geojson":  "a bare LineString geometry: no properties.speed_mps",
		"i-no-speed.geojson":   "a LineString feature without properties.speed_mps",
		"j-empty.json":         "an empty file",
		"k-array.json":         "JSON, but not an object, so not GeoJSON",
		"l-polygon.geojson":    `GeoJSON of type "Polygon", not a route`,
		"m-no-features.json":   "a FeatureCollection without features",
		"n-point-feature.json": "a Point feature, not a LineString",
		"o-odd-types.json":     "no LineString feature with properties.speed_mps (2 features without geometry)",
	}
	if len(skipped) != len(want) {
		t.Errorf("skipped %d files, want %d: %v", len(skipped), len(want), skipped)
	}
	for _, s := range skipped {
		w, ok := want[filepath.Base(s.File)]
		if !ok || !strings.HasPrefix(s.Reason, w) {
			t.Errorf("skipped %s because %q, want %q", s.File, s.Reason, w)
		}
	}
}

// A folder without any drive is an error naming the folder and saying
// why each file is not a drive; so is one without any file of a drive's
// kind.
func TestReadTripsFolderWithoutDrives(t *testing.T) {
	dir := writeFolder(t, map[string]string{"shops.geojson": pointsGeoJSON, "untimed.gpx": untimedGPX})
	_, _, err := gate.ReadTrips([]string{dir})
	if err == nil {
		t.Fatal("ReadTrips(folder of markers) = nil error, want one")
	}
	for _, want := range []string{dir + ": no drive file", "shops.geojson: no LineString feature with properties.speed_mps (2 Points)", "untimed.gpx: a GPX track without a time"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("ReadTrips(folder of markers) = %q, want it to say %q", err, want)
		}
	}
	empty := writeFolder(t, map[string]string{"notes.txt": "x"})
	_, _, err = gate.ReadTrips([]string{empty})
	if err == nil || !strings.HasPrefix(err.Error(), empty+": no drive file") || !strings.Contains(err.Error(), "no *.geojson, *.json or *.gpx file") {
		t.Errorf("ReadTrips(folder without drive files) = %v, want the folder named and its lack of files said", err)
	}
}

// Files named explicitly must be drives; a file that cannot be read is an
// error in a folder too, not a file to skip.
func TestReadTripsErrors(t *testing.T) {
	dir := writeFolder(t, map[string]string{
		"shops.geojson": pointsGeoJSON, "untimed.gpx": untimedGPX, "streets.geojson": streetsGeoJSON,
		"two.geojson": strings.Replace(streetsGeoJSON, `"properties":{"name":"Ring"}`, `"properties":{"name":"Ring","speed_mps":3}`, 1),
	})
	for _, c := range []struct{ file, want string }{
		{"shops.geojson", "no LineString feature"},
		{"streets.geojson", "a second LineString"},
		{"untimed.gpx", "a drive needs speeds"},
	} {
		_, _, err := gate.ReadTrips([]string{filepath.Join(dir, c.file)})
		if err == nil || !strings.HasPrefix(err.Error(), filepath.Join(dir, c.file)) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ReadTrips(%s) = %v, want an error containing %q", c.file, err, c.want)
		}
	}
	// In a folder: a drive-like file (a speeded LineString) with a second
	// LineString, malformed JSON, malformed XML.
	for _, c := range []struct{ name, data, want string }{
		{"two.geojson", "", "a second LineString"},
		{"bad.geojson", "{\n\"type\": \"Feature\",\n]", ":3: malformed JSON"},
		{"bad.gpx", "<gpx>\n<trk>\n</gpx>", ":3: malformed XML"},
		{"slow.geojson", strings.Replace(driveGeoJSON, `"speed_mps":30`, `"speed_mps":-1`, 1), "speed"},
	} {
		files := map[string]string{"good.geojson": driveGeoJSON, c.name: c.data}
		if c.data == "" {
			b, _ := os.ReadFile(filepath.Join(dir, c.name))
			files[c.name] = string(b)
		}
		folder := writeFolder(t, files)
		_, _, err := gate.ReadTrips([]string{folder})
		if err == nil || !strings.HasPrefix(err.Error(), filepath.Join(folder, c.name)) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ReadTrips(folder with %s) = %v, want an error containing %q", c.name, err, c.want)
		}
	}
}

// Drives are named by their file names (SPEC §8), once each: two files of
// the same name in different folders are named by their paths, and a file
// named twice (a folder and a file in it) is read once.
func TestReadTripsNames(t *testing.T) {
	root := writeFolder(t, map[string]string{"a/x.geojson": driveGeoJSON, "b/x.geojson": driveGeoJSON, "b/drive-y.gpx": timedGPX})
	a, b := filepath.Join(root, "a"), filepath.Join(root, "b")
	trips, skipped, err := gate.ReadTrips([]string{filepath.Join(a, "x.geojson"), b, filepath.Join(b, "drive-y.gpx")})
	if err != nil {
		t.Fatal(err)
	}
	want := []string{filepath.ToSlash(filepath.Join(a, "x")), "drive-y", filepath.ToSlash(filepath.Join(b, "x"))}
	if got := tripNames(trips); !slices.Equal(got, want) {
		t.Errorf("names = %v, want %v", got, want)
	}
	if len(skipped) != 1 || skipped[0].File != filepath.Join(b, "drive-y.gpx") || skipped[0].Reason != "named twice: read once" {
		t.Errorf("skipped = %v, want drive-y.gpx named twice", skipped)
	}
}

// Marker names come from a GeoJSON marker file's properties.name, by id
// as geofile reads ids; a CSV marker file has none.
func TestReadMarkerNames(t *testing.T) {
	got := gate.ReadMarkerNames([]byte(pointsGeoJSON))
	if len(got) != 2 || got["a"] != "Café Roma" || got["7"] != "Bakery" {
		t.Errorf("ReadMarkerNames(GeoJSON) = %v, want a: Café Roma, 7: Bakery", got)
	}
	if got := gate.ReadMarkerNames([]byte("id,lat,lon\na,44.9,-31.17\n")); len(got) != 0 {
		t.Errorf("ReadMarkerNames(CSV) = %v, want none", got)
	}
}

// A whole-number id is a name's key up to 2^53 inclusive, as geofile
// reads ids (geofile/geojson.go accepts |id| ≤ 2^53): 9007199254740992 is
// named, 9007199254740994 (the next double) and 1.5 are not.
func TestReadMarkerNamesLargestId(t *testing.T) {
	pt := func(id, name string) string {
		return `{"type":"Feature","properties":{"id":` + id + `,"name":"` + name + `"},"geometry":{"type":"Point","coordinates":[0,0]}}`
	}
	got := gate.ReadMarkerNames([]byte(`{"type":"FeatureCollection","features":[` + pt("9007199254740992", "edge") + `,` +
		pt("-9007199254740992", "minus") + `,` + pt("9007199254740994", "beyond") + `,` + pt("1.5", "half") + `]}`))
	want := map[string]string{"9007199254740992": "edge", "-9007199254740992": "minus"}
	if len(got) != len(want) || got["9007199254740992"] != "edge" || got["-9007199254740992"] != "minus" {
		t.Errorf("ReadMarkerNames = %v, want %v", got, want)
	}
}
