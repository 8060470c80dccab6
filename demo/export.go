package demo

import (
	"bytes"
	"encoding/json"
	"fmt"
	"path/filepath"
	"strconv"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"github.com/viewspec/viewspec/internal/atomicfile"
)

// Files are written as the rest of viewspec reads them (geofile.ReadRoute, geofile.ReadMarkers):
// RFC 7946 GeoJSON with [lon, lat] WGS84 degrees, numbers in their shortest form that reads back to
// the same float64, object keys sorted, one trailing newline.

// StreetsGeoJSON returns the streets as a GeoJSON FeatureCollection of LineStrings, each with
// properties name and kind ("avenue", "street", "ring", "expressway", "slip", "lane").
func (s *Scenario) StreetsGeoJSON() ([]byte, error) {
	fc := geojson.NewFeatureCollection()
	for _, st := range s.Streets {
		f := geojson.NewFeature(orb.LineString(st.Points))
		f.Properties["name"] = st.Name
		f.Properties["kind"] = string(st.Kind)
		fc.Append(f)
	}
	return marshalLine(fc)
}

// BusinessesGeoJSON returns the businesses as a GeoJSON FeatureCollection of Points, each with
// properties id, name, category, street and priority: a marker file as geofile.ReadMarkers reads it.
func (s *Scenario) BusinessesGeoJSON() ([]byte, error) {
	fc := geojson.NewFeatureCollection()
	for _, b := range s.Businesses {
		f := geojson.NewFeature(b.Point)
		f.Properties["id"] = b.ID
		f.Properties["name"] = b.Name
		f.Properties["category"] = b.Category
		f.Properties["street"] = b.Street
		f.Properties["priority"] = b.Priority
		fc.Append(f)
	}
	return marshalLine(fc)
}

// GeoJSON returns the drive as a GeoJSON Feature with a LineString and properties name and speed_mps
// (one speed per segment, m/s): a route file as geofile.ReadRoute reads it.
func (d Tour) GeoJSON() ([]byte, error) {
	f := geojson.NewFeature(orb.LineString(d.Points))
	f.Properties["name"] = d.Name
	f.Properties["speed_mps"] = d.SpeedsMps
	return marshalLine(f)
}

// MarkersCSV returns the businesses' markers as CSV lines id,lat,lon,priority after a header line: a
// marker file as geofile.ReadMarkers reads it. Latitude comes before longitude here, as in the CSV
// format of SPEC §4.
func (s *Scenario) MarkersCSV() []byte {
	var b bytes.Buffer
	b.WriteString("id,lat,lon,priority\n")
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	for _, m := range s.Businesses {
		fmt.Fprintf(&b, "%s,%s,%s,%s\n", m.ID, num(m.Point[1]), num(m.Point[0]), num(m.Priority))
	}
	return b.Bytes()
}

// WriteFiles writes the scenario into dir (which must exist) and returns the paths written, in this
// order: streets.geojson, businesses.geojson, markers.csv, drive-<name>.geojson for each drive, and
// the rule files (phone.yaml, incar.yaml) as embedded.
func (s *Scenario) WriteFiles(dir string) ([]string, error) {
	type file struct {
		name string
		data func() ([]byte, error)
	}
	files := []file{
		{"streets.geojson", s.StreetsGeoJSON},
		{"businesses.geojson", s.BusinessesGeoJSON},
		{"markers.csv", func() ([]byte, error) { return s.MarkersCSV(), nil }},
	}
	for _, d := range s.Drives {
		files = append(files, file{"drive-" + d.Name + ".geojson", d.GeoJSON})
	}
	for _, r := range s.RuleSets {
		files = append(files, file{r.File, func() ([]byte, error) { return r.YAML, nil }})
	}
	var out []string
	for _, f := range files {
		data, err := f.data()
		if err != nil {
			return out, fmt.Errorf("%s: %w", f.name, err)
		}
		p := filepath.Join(dir, f.name)
		if err := atomicfile.WriteBytes(p, data); err != nil {
			return out, err
		}
		out = append(out, p)
	}
	return out, nil
}

// marshalLine encodes v as JSON followed by a newline.
func marshalLine(v json.Marshaler) ([]byte, error) {
	b, err := v.MarshalJSON()
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}
