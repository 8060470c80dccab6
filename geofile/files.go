package geofile

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/paulmach/orb"

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
// point has one. The format is told from the content; a UTF-8 byte order
// mark at the start is skipped.
func ReadRoute(name string, data []byte) (*RouteFile, error) {
	data, err := textOf(name, data)
	if err != nil {
		return nil, err
	}
	if bytes.TrimSpace(data)[0] == '<' {
		return readGPX(name, data)
	}
	return readGeoJSONRoute(name, data)
}

// ReadMarkers reads markers from a GeoJSON FeatureCollection of Points
// (properties.id, a string or a whole number, and properties.priority) or
// from CSV: lines "id,lat,lon[,priority]", or any order of those columns
// named by a header line. Ids must be unique. A UTF-8 byte order mark at
// the start is skipped.
func ReadMarkers(name string, data []byte) ([]timeline.Marker, error) {
	data, err := textOf(name, data)
	if err != nil {
		return nil, err
	}
	if bytes.TrimSpace(data)[0] == '{' {
		return readGeoJSONMarkers(name, data)
	}
	return readCSVMarkers(name, data)
}

// utf8BOM is the byte order mark some editors (Notepad, Excel's "CSV UTF-8")
// put before UTF-8 text; it is not part of the content.
var utf8BOM = []byte("\xef\xbb\xbf")

// textOf returns data without a leading UTF-8 byte order mark, or an
// error when nothing but white space is left or the text is UTF-16, which
// none of the formats read here is written in.
func textOf(name string, data []byte) ([]byte, error) {
	data = bytes.TrimPrefix(data, utf8BOM)
	if bytes.HasPrefix(data, []byte("\xff\xfe")) || bytes.HasPrefix(data, []byte("\xfe\xff")) {
		return nil, &FileError{File: name, Line: 1, Feature: -1, Msg: "UTF-16 text (byte order mark): save the file as UTF-8"}
	}
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, &FileError{File: name, Feature: -1, Msg: "empty file"}
	}
	return data, nil
}

// lineOf returns the 1-based line of byte offset off in data.
func lineOf(data []byte, off int64) int {
	off = min(max(off, 0), int64(len(data)))
	return bytes.Count(data[:off], []byte{'\n'}) + 1
}

// parseFinite reads a number written as text (JSON, XML attribute, CSV
// field) and returns it, or the reason it is not a usable one: not a
// number at all, or one beyond the double range or written as NaN or Inf.
// A number too small for a double reads as 0, as a double rounds it.
func parseFinite(text string) (float64, string) {
	v, err := strconv.ParseFloat(text, 64)
	switch {
	case err != nil && !errors.Is(err, strconv.ErrRange):
		return 0, "not a number"
	case math.IsNaN(v) || math.IsInf(v, 0):
		return 0, "not a finite number"
	}
	return v, ""
}

// checkLonLat returns nil when p is a usable [lon, lat] position, or the
// *spec.FieldError naming lat or lon and the value.
func checkLonLat(p orb.Point) *spec.FieldError {
	if err := spec.CheckLatLon("", p[1], p[0]); err != nil {
		var fe *spec.FieldError
		if errors.As(err, &fe) {
			return fe
		}
		return &spec.FieldError{Kind: spec.Invalid, Field: "lat", Reason: err.Error()}
	}
	return nil
}
