package demo_test

import (
	"bytes"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/geofile"
)

// Each drive's GeoJSON reads back with geofile.ReadRoute to the very same points and speeds: every
// coordinate is a 7-decimal number and every speed a 1-decimal one, written in their shortest form.
func TestDriveGeoJSONRoundTrip(t *testing.T) {
	for _, seed := range testSeeds {
		for _, d := range demo.New(seed).Drives {
			b, err := d.GeoJSON()
			if err != nil {
				t.Fatal(err)
			}
			rf, err := geofile.ReadRoute("drive-"+d.Name+".geojson", b)
			if err != nil {
				t.Fatalf("New(%#x) %s: ReadRoute: %v", seed, d.Name, err)
			}
			if !slices.Equal(rf.Points, d.Points) {
				t.Errorf("New(%#x) %s: points read back differ", seed, d.Name)
			}
			if !slices.Equal(rf.SpeedsMps, d.SpeedsMps) {
				t.Errorf("New(%#x) %s: speeds read back %v, want %v", seed, d.Name, rf.SpeedsMps, d.SpeedsMps)
			}
		}
	}
}

// The businesses' GeoJSON and the CSV both read back with geofile.ReadMarkers to the markers.
func TestMarkerFilesRoundTrip(t *testing.T) {
	s := demo.Default()
	gj, err := s.BusinessesGeoJSON()
	if err != nil {
		t.Fatal(err)
	}
	for name, data := range map[string][]byte{"businesses.geojson": gj, "markers.csv": s.MarkersCSV()} {
		ms, err := geofile.ReadMarkers(name, data)
		if err != nil {
			t.Fatalf("ReadMarkers(%s): %v", name, err)
		}
		if !slices.Equal(ms, s.Markers()) {
			t.Errorf("%s: markers read back differ", name)
		}
	}
	fc, err := geojson.UnmarshalFeatureCollection(gj)
	if err != nil {
		t.Fatal(err)
	}
	for i, f := range fc.Features {
		b := s.Businesses[i]
		if f.Properties["name"] != b.Name || f.Properties["category"] != b.Category || f.Properties["street"] != b.Street {
			t.Errorf("feature %d: properties %v, want %s, %s, %s", i, f.Properties, b.Name, b.Category, b.Street)
		}
	}
	if first := bytes.SplitN(s.MarkersCSV(), []byte("\n"), 3); string(first[0]) != "id,lat,lon,priority" {
		t.Errorf("CSV header %q", first[0])
	}
}

func TestStreetsGeoJSON(t *testing.T) {
	s := demo.Default()
	b, err := s.StreetsGeoJSON()
	if err != nil {
		t.Fatal(err)
	}
	fc, err := geojson.UnmarshalFeatureCollection(b)
	if err != nil {
		t.Fatal(err)
	}
	if len(fc.Features) != len(s.Streets) {
		t.Fatalf("%d features, want %d", len(fc.Features), len(s.Streets))
	}
	for i, f := range fc.Features {
		st := s.Streets[i]
		ls, ok := f.Geometry.(orb.LineString)
		if !ok || !slices.Equal([]orb.Point(ls), st.Points) {
			t.Errorf("feature %d (%s): geometry differs", i, st.Name)
		}
		if f.Properties["name"] != st.Name || f.Properties["kind"] != string(st.Kind) {
			t.Errorf("feature %d: properties %v, want name %q, kind %q", i, f.Properties, st.Name, st.Kind)
		}
	}
}

func TestWriteFiles(t *testing.T) {
	s := demo.Default()
	dir := t.TempDir()
	paths, err := s.WriteFiles(dir)
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"streets.geojson", "businesses.geojson", "markers.csv",
		"drive-town.geojson", "drive-ring.geojson", "drive-expressway.geojson", "phone.yaml", "incar.yaml"}
	var got []string
	for _, p := range paths {
		got = append(got, filepath.Base(p))
	}
	if !slices.Equal(got, want) {
		t.Fatalf("WriteFiles wrote %v, want %v", got, want)
	}
	streets, _ := s.StreetsGeoJSON()
	town, _ := s.Drives[0].GeoJSON()
	for name, data := range map[string][]byte{"streets.geojson": streets, "markers.csv": s.MarkersCSV(),
		"drive-town.geojson": town, "incar.yaml": s.RuleSets[1].YAML} {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(b, data) {
			t.Errorf("%s on disk differs from its export", name)
		}
	}
	if _, err := s.WriteFiles(filepath.Join(dir, "missing")); err == nil {
		t.Error("WriteFiles into a missing folder: no error")
	}
}
