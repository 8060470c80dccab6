package geofile

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"reflect"
	"strconv"
	"strings"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
)

// FileError is a bad input file: the file's name, where in it (a line, a
// feature index or both) and what was wrong with which field: the value
// as written, when there is one, and why.
type FileError struct {
	File    string
	Line    int // 1-based; 0 when unknown
	Feature int // feature index in a GeoJSON collection; −1 when not applicable
	Field   string
	Value   string // the offending value as written; empty when there is none
	Msg     string
}

func (e *FileError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Feature >= 0 {
		fmt.Fprintf(&b, ": feature %d", e.Feature)
	}
	if e.Field != "" {
		b.WriteString(": " + e.Field)
	}
	if e.Value != "" {
		b.WriteString(" = " + e.Value)
	}
	if e.Msg != "" {
		b.WriteString(": " + e.Msg)
	}
	return b.String()
}

// RouteFile is a route read from a file: its vertices ([lon, lat] degrees)
// and either one speed for every segment or one per segment as given, in
// m/s. Speeds are nil when the file carries none.
type RouteFile struct {
	Points    []orb.Point
	SpeedsMps []float64
}

// ReadRoute reads a route from data: a GeoJSON LineString, a Feature with a
// LineString geometry, or a FeatureCollection holding one such feature
// (speeds in properties.speed_mps, a number or one per segment); or a GPX
// 1.1 track or route, whose speeds come from the points' times when every
// point has one. The format is told from the content.
func ReadRoute(name string, data []byte) (*RouteFile, error) {
	trimmed := bytes.TrimSpace(data)
	if len(trimmed) == 0 {
		return nil, &FileError{File: name, Feature: -1, Msg: "empty file"}
	}
	if trimmed[0] == '<' {
		return readGPX(name, data)
	}
	return readGeoJSONRoute(name, data)
}

// lineOf returns the 1-based line of byte offset off in data.
func lineOf(data []byte, off int64) int {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	if off < 0 {
		off = 0
	}
	return bytes.Count(data[:off], []byte{'\n'}) + 1
}

func jsonFileError(name string, data []byte, err error) error {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	fe := &FileError{File: name, Feature: -1, Msg: err.Error()}
	switch {
	case errors.As(err, &se):
		fe.Line, fe.Msg = lineOf(data, se.Offset), "malformed JSON: "+se.Error()
	case errors.As(err, &te):
		fe.Line, fe.Field = lineOf(data, te.Offset), te.Field
		fe.Msg = "expected " + jsonKind(te.Type.Kind()) + ", got " + te.Value
	}
	return fe
}

func readGeoJSONRoute(name string, data []byte) (*RouteFile, error) {
	var probe struct {
		Type string `json:"type"`
	}
	if err := json.Unmarshal(data, &probe); err != nil {
		return nil, jsonFileError(name, data, err)
	}
	var feat *geojson.Feature
	index := -1
	switch probe.Type {
	case "LineString":
		g, err := geojson.UnmarshalGeometry(data)
		if err != nil {
			return nil, &FileError{File: name, Feature: -1, Msg: err.Error()}
		}
		feat = &geojson.Feature{Geometry: g.Geometry(), Properties: geojson.Properties{}}
	case "Feature":
		f, err := geojson.UnmarshalFeature(data)
		if err != nil {
			return nil, &FileError{File: name, Feature: -1, Msg: err.Error()}
		}
		feat = f
	case "FeatureCollection":
		fc, err := geojson.UnmarshalFeatureCollection(data)
		if err != nil {
			return nil, &FileError{File: name, Feature: -1, Msg: err.Error()}
		}
		for i, f := range fc.Features {
			if _, ok := f.Geometry.(orb.LineString); ok {
				if feat != nil {
					return nil, &FileError{File: name, Feature: i, Field: "geometry", Msg: "a second LineString; a route file holds one"}
				}
				feat, index = f, i
			}
		}
		if feat == nil {
			return nil, &FileError{File: name, Feature: -1, Msg: "no LineString feature"}
		}
	default:
		return nil, &FileError{File: name, Feature: -1, Field: "type", Msg: fmt.Sprintf("%q: want LineString, Feature or FeatureCollection", probe.Type)}
	}
	ls, ok := feat.Geometry.(orb.LineString)
	if !ok {
		return nil, &FileError{File: name, Feature: index, Field: "geometry.type", Msg: "want LineString"}
	}
	rf := &RouteFile{Points: []orb.Point(ls)}
	for i, p := range rf.Points {
		if err := checkLonLat(p); err != "" {
			return nil, &FileError{File: name, Feature: index, Field: fmt.Sprintf("geometry.coordinates[%d]", i), Msg: err}
		}
	}
	if v, ok := feat.Properties["speed_mps"]; ok {
		speeds, err := speedsOf(v)
		if err != nil {
			err.File, err.Feature = name, index
			return nil, err
		}
		rf.SpeedsMps = speeds
	}
	return rf, nil
}

// checkLonLat names what is wrong with a [lon, lat] point, or returns "".
func checkLonLat(p orb.Point) string {
	if err := spec.CheckLatLon("", p[1], p[0]); err != nil {
		return err.Error()
	}
	return ""
}

// speedsOf reads properties.speed_mps: one number, or an array of numbers.
// Values are checked by the route itself (> 0, finite).
func speedsOf(v any) ([]float64, *FileError) {
	switch s := v.(type) {
	case float64:
		return []float64{s}, nil
	case []any:
		out := make([]float64, len(s))
		for i, e := range s {
			f, ok := e.(float64)
			if !ok {
				return nil, &FileError{Field: fmt.Sprintf("properties.speed_mps[%d]", i), Msg: fmt.Sprintf("expected a number, got %T", e)}
			}
			out[i] = f
		}
		return out, nil
	}
	return nil, &FileError{Field: "properties.speed_mps", Msg: fmt.Sprintf("expected a number or an array of numbers, got %T", v)}
}

// readGPX reads the points of the first track (all its segments in order)
// or, when there is no track, of the first route of a GPX 1.1 document.
func readGPX(name string, data []byte) (*RouteFile, error) {
	dec := xml.NewDecoder(bytes.NewReader(data))
	type collected struct {
		pts   []orb.Point
		times []time.Time
		done  bool
	}
	var trk, rte collected
	var cur *collected // the track or route being read, if it is the first
	var inPoint, inTime, seenRoot bool
	var timeText strings.Builder
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			line, _ := dec.InputPos()
			return nil, &FileError{File: name, Line: line, Feature: -1, Msg: "malformed XML: " + err.Error()}
		}
		switch t := tok.(type) {
		case xml.StartElement:
			line, _ := dec.InputPos()
			switch t.Name.Local {
			case "gpx":
				seenRoot = true
			case "trk":
				if !trk.done {
					cur = &trk
				}
			case "rte":
				if !rte.done {
					cur = &rte
				}
			case "trkpt", "rtept":
				if cur == nil {
					break
				}
				inPoint = true
				p, ferr := gpxPoint(name, line, t)
				if ferr != nil {
					return nil, ferr
				}
				cur.pts = append(cur.pts, p)
				cur.times = append(cur.times, time.Time{})
			case "time":
				if inPoint {
					inTime = true
					timeText.Reset()
				}
			}
		case xml.CharData:
			if inTime {
				timeText.Write(t)
			}
		case xml.EndElement:
			switch t.Name.Local {
			case "time":
				if inTime {
					inTime = false
					ts, perr := time.Parse(time.RFC3339Nano, strings.TrimSpace(timeText.String()))
					if perr != nil {
						line, _ := dec.InputPos()
						return nil, &FileError{File: name, Line: line, Feature: -1, Field: "time", Msg: fmt.Sprintf("%q is not an RFC 3339 time", timeText.String())}
					}
					cur.times[len(cur.times)-1] = ts
				}
			case "trkpt", "rtept":
				inPoint = false
			case "trk", "rte":
				if cur != nil && len(cur.pts) > 0 {
					cur.done = true
				}
				cur = nil
			}
		}
	}
	if !seenRoot {
		return nil, &FileError{File: name, Feature: -1, Msg: "not a GPX document (no <gpx> element)"}
	}
	got := trk
	if len(got.pts) == 0 {
		got = rte
	}
	if len(got.pts) == 0 {
		return nil, &FileError{File: name, Feature: -1, Msg: "no track or route points"}
	}
	return &RouteFile{Points: got.pts, SpeedsMps: gpxSpeeds(got.pts, got.times)}, nil
}

// gpxPoint reads the lat and lon attributes of a trkpt or rtept.
func gpxPoint(name string, line int, t xml.StartElement) (orb.Point, error) {
	var lat, lon float64
	var haveLat, haveLon bool
	for _, a := range t.Attr {
		if a.Name.Local != "lat" && a.Name.Local != "lon" {
			continue
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(a.Value), 64)
		if err != nil {
			return orb.Point{}, &FileError{File: name, Line: line, Feature: -1, Field: t.Name.Local + "." + a.Name.Local, Msg: fmt.Sprintf("%q is not a number", a.Value)}
		}
		if a.Name.Local == "lat" {
			lat, haveLat = v, true
		} else {
			lon, haveLon = v, true
		}
	}
	if !haveLat {
		return orb.Point{}, &FileError{File: name, Line: line, Feature: -1, Field: t.Name.Local + ".lat", Msg: "missing (required)"}
	}
	if !haveLon {
		return orb.Point{}, &FileError{File: name, Line: line, Feature: -1, Field: t.Name.Local + ".lon", Msg: "missing (required)"}
	}
	p := orb.Point{lon, lat}
	if msg := checkLonLat(p); msg != "" {
		return orb.Point{}, &FileError{File: name, Line: line, Feature: -1, Field: t.Name.Local, Msg: msg}
	}
	return p, nil
}

// gpxSpeeds returns per-segment speeds from the points' times when every
// point has one, or nil. A segment's speed is its WGS84 length over its
// time; a segment of zero length gets 1 m/s, which the route ignores (it
// skips zero-length segments and their speeds).
func gpxSpeeds(pts []orb.Point, times []time.Time) []float64 {
	for _, t := range times {
		if t.IsZero() {
			return nil
		}
	}
	speeds := make([]float64, len(pts)-1)
	for i := range speeds {
		dt := times[i+1].Sub(times[i]).Seconds()
		d := routes.GeodesicDistM(pts[i], pts[i+1])
		switch {
		case d == 0:
			speeds[i] = 1 // ignored: a zero-length segment
		case dt > 0:
			speeds[i] = d / dt
		default:
			speeds[i] = math.NaN() // reported by the route as a speed ≤ 0 or non-finite
		}
	}
	return speeds
}

// ReadMarkers reads markers from a GeoJSON FeatureCollection of Points
// (properties.id, a string or a whole number, and properties.priority) or
// from CSV lines "id,lat,lon[,priority]" with an optional header line. Ids
// must be unique.
func ReadMarkers(name string, data []byte) ([]timeline.Marker, error) {
	trimmed := bytes.TrimSpace(data)
	var ms []timeline.Marker
	var err error
	if len(trimmed) > 0 && trimmed[0] == '{' {
		ms, err = readGeoJSONMarkers(name, data)
	} else {
		ms, err = readCSVMarkers(name, data)
	}
	if err != nil {
		return nil, err
	}
	return ms, nil
}

func readGeoJSONMarkers(name string, data []byte) ([]timeline.Marker, error) {
	var probe struct {
		Type string `json:"type"`
	}
	if err := json.Unmarshal(data, &probe); err != nil {
		return nil, jsonFileError(name, data, err)
	}
	if probe.Type != "FeatureCollection" {
		return nil, &FileError{File: name, Feature: -1, Field: "type", Msg: fmt.Sprintf("%q: want FeatureCollection", probe.Type)}
	}
	fc, err := geojson.UnmarshalFeatureCollection(data)
	if err != nil {
		return nil, &FileError{File: name, Feature: -1, Msg: err.Error()}
	}
	seen := map[string]int{}
	ms := make([]timeline.Marker, 0, len(fc.Features))
	for i, f := range fc.Features {
		p, ok := f.Geometry.(orb.Point)
		if !ok {
			return nil, &FileError{File: name, Feature: i, Field: "geometry.type", Msg: "want Point"}
		}
		if msg := checkLonLat(p); msg != "" {
			return nil, &FileError{File: name, Feature: i, Field: "geometry.coordinates", Msg: msg}
		}
		m := timeline.Marker{Point: p}
		switch id := f.Properties["id"].(type) {
		case string:
			m.ID = id
		case float64:
			if id != math.Trunc(id) || math.Abs(id) > 1<<53 {
				return nil, &FileError{File: name, Feature: i, Field: "properties.id", Value: spec.FormatNumber(id), Msg: "a numeric id must be a whole number"}
			}
			m.ID = strconv.FormatFloat(id, 'f', -1, 64)
		case nil:
			return nil, &FileError{File: name, Feature: i, Field: "properties.id", Msg: "missing (required)"}
		default:
			return nil, &FileError{File: name, Feature: i, Field: "properties.id", Msg: fmt.Sprintf("expected a string or a number, got %T", id)}
		}
		if pr, ok := f.Properties["priority"]; ok && pr != nil {
			v, ok := pr.(float64)
			if !ok {
				return nil, &FileError{File: name, Feature: i, Field: "properties.priority", Msg: fmt.Sprintf("expected a number, got %T", pr)}
			}
			m.Priority = v
		}
		if j, dup := seen[m.ID]; dup {
			return nil, &FileError{File: name, Feature: i, Field: "properties.id", Msg: fmt.Sprintf("duplicate id %q (first at feature %d)", m.ID, j)}
		}
		seen[m.ID] = i
		ms = append(ms, m)
	}
	return ms, nil
}

func readCSVMarkers(name string, data []byte) ([]timeline.Marker, error) {
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	r.Comment = '#'
	r.TrimLeadingSpace = true
	seen := map[string]int{}
	var ms []timeline.Marker
	for first := true; ; first = false {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			line := 0
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				line = pe.Line
			}
			return nil, &FileError{File: name, Line: line, Feature: -1, Msg: "malformed CSV: " + err.Error()}
		}
		line, _ := r.FieldPos(0)
		if first && len(rec) > 0 && strings.EqualFold(strings.TrimSpace(rec[0]), "id") {
			continue // the header
		}
		if len(rec) < 3 || len(rec) > 4 {
			return nil, &FileError{File: name, Line: line, Feature: -1, Msg: fmt.Sprintf("%d fields: want id,lat,lon[,priority]", len(rec))}
		}
		num := func(i int, field string) (float64, error) {
			v, err := strconv.ParseFloat(strings.TrimSpace(rec[i]), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, &FileError{File: name, Line: line, Feature: -1, Field: field, Msg: fmt.Sprintf("%q is not a finite number", rec[i])}
			}
			return v, nil
		}
		m := timeline.Marker{ID: strings.TrimSpace(rec[0])}
		if m.ID == "" {
			return nil, &FileError{File: name, Line: line, Feature: -1, Field: "id", Msg: "empty"}
		}
		lat, err := num(1, "lat")
		if err != nil {
			return nil, err
		}
		lon, err := num(2, "lon")
		if err != nil {
			return nil, err
		}
		m.Point = orb.Point{lon, lat}
		if msg := checkLonLat(m.Point); msg != "" {
			return nil, &FileError{File: name, Line: line, Feature: -1, Field: "lat,lon", Msg: msg}
		}
		if len(rec) == 4 && strings.TrimSpace(rec[3]) != "" {
			if m.Priority, err = num(3, "priority"); err != nil {
				return nil, err
			}
		}
		if j, dup := seen[m.ID]; dup {
			return nil, &FileError{File: name, Line: line, Feature: -1, Field: "id", Msg: fmt.Sprintf("duplicate id %q (first on line %d)", m.ID, j)}
		}
		seen[m.ID] = line
		ms = append(ms, m)
	}
	if len(ms) == 0 {
		return nil, &FileError{File: name, Feature: -1, Msg: "no markers"}
	}
	return ms, nil
}

// jsonKind names a Go kind the way a JSON writer thinks of it.
func jsonKind(k reflect.Kind) string {
	switch k {
	case reflect.Float64, reflect.Int, reflect.Int64:
		return "a number"
	case reflect.String:
		return "a string"
	case reflect.Slice:
		return "an array"
	case reflect.Struct, reflect.Map, reflect.Pointer:
		return "an object"
	case reflect.Bool:
		return "true or false"
	}
	return k.String()
}
