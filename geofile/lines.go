package geofile

import (
	"encoding/json"
	"fmt"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// NamedLine is a line on the ground read from a file, such as a street: its
// name (properties.name; may be empty) and its vertices, [lon, lat] degrees.
type NamedLine struct {
	Name   string
	Points []orb.Point
}

// ReadLines reads the LineStrings and MultiLineStrings of a GeoJSON
// FeatureCollection (a street file), each part a NamedLine named by its
// feature's properties.name; features of other geometries are skipped. A
// vertex out of range is an error naming the feature.
func ReadLines(name string, data []byte) ([]NamedLine, error) {
	data, err := textOf(name, data)
	if err != nil {
		return nil, err
	}
	fc, err := geojson.UnmarshalFeatureCollection(data)
	if err != nil {
		return nil, &FileError{File: name, Feature: -1, Msg: "not a GeoJSON FeatureCollection: " + err.Error()}
	}
	var out []NamedLine
	for i, f := range fc.Features {
		n, _ := f.Properties["name"].(string)
		var parts []orb.LineString
		switch g := f.Geometry.(type) {
		case orb.LineString:
			parts = []orb.LineString{g}
		case orb.MultiLineString:
			parts = g
		default:
			continue
		}
		for _, ls := range parts {
			for j, p := range ls {
				if !(p[1] >= -90 && p[1] <= 90 && p[0] >= -180 && p[0] <= 180) {
					return nil, &FileError{File: name, Feature: i, Field: fmt.Sprintf("coordinates[%d]", j),
						Value: fmt.Sprintf("[%g, %g]", p[0], p[1]), Msg: "out of range (lon in [-180, 180], lat in [-90, 90])"}
				}
			}
			out = append(out, NamedLine{Name: n, Points: []orb.Point(ls)})
		}
	}
	return out, nil
}

// MarkerNames returns the names (properties.name) of the markers of a
// GeoJSON marker file by id (properties.id, a string or a whole number, as
// ReadMarkers reads it); empty for a CSV file or markers without names.
func MarkerNames(data []byte) map[string]string {
	out := map[string]string{}
	var fc struct {
		Features []struct {
			Properties struct {
				ID   json.RawMessage `json:"id"`
				Name string          `json:"name"`
			} `json:"properties"`
		} `json:"features"`
	}
	if json.Unmarshal(textOrEmpty(data), &fc) != nil {
		return out
	}
	for _, f := range fc.Features {
		if f.Properties.Name == "" {
			continue
		}
		var s string
		if json.Unmarshal(f.Properties.ID, &s) != nil {
			var n json.Number
			if json.Unmarshal(f.Properties.ID, &n) != nil {
				continue
			}
			s = n.String()
		}
		out[s] = f.Properties.Name
	}
	return out
}

// textOrEmpty returns data without a byte order mark, or nothing when it is
// not text ReadMarkers would read.
func textOrEmpty(data []byte) []byte {
	d, err := textOf("", data)
	if err != nil {
		return nil
	}
	return d
}
