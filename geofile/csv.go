package geofile

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/timeline"
)

// The columns of a marker CSV file, in the order a file without a header
// line gives them: id,lat,lon[,priority]. Latitude comes before longitude,
// as people write a position, unlike GeoJSON's [lon, lat].
const (
	colID = iota
	colLat
	colLon
	colPriority
	nCols
)

var csvColumnNames = [nCols]string{"id", "lat", "lon", "priority"}

// csvLayout says where each column is in a record.
type csvLayout struct {
	at         [nCols]int // the field index of each column; −1 when the header has none
	width      int        // the header's number of columns; 0 without a header
	headerLine int
}

// positional is the layout of a file without a header line.
var positional = csvLayout{at: [nCols]int{0, 1, 2, 3}}

// isCSVHeader reports whether rec, the first record of the file, is a
// header line: one of its fields is a column name (case aside). A data
// line has numbers in its lat and lon fields, so only a marker whose id is
// itself "id", "lat", "lon" or "priority" could be taken for one, and its
// line is then refused as a header with unknown columns, not misread.
func isCSVHeader(rec []string) bool {
	for _, f := range rec {
		for _, c := range csvColumnNames {
			if strings.EqualFold(strings.TrimSpace(f), c) {
				return true
			}
		}
	}
	return false
}

// headerLayout reads the header line rec on line: the columns id, lat,
// lon and optionally priority, each once, in any order, names compared
// without regard to case. Any other column is refused rather than
// ignored, so that a misspelt "prority" is not a priority of 0 on every
// line.
func headerLayout(name string, line int, rec []string) (*csvLayout, error) {
	lay := &csvLayout{at: [nCols]int{-1, -1, -1, -1}, width: len(rec), headerLine: line}
	for k, f := range rec {
		field := fmt.Sprintf("header column %d", k+1)
		c := -1
		for j, n := range csvColumnNames {
			if strings.EqualFold(strings.TrimSpace(f), n) {
				c = j
			}
		}
		switch {
		case c < 0:
			return nil, &FileError{File: name, Line: line, Feature: -1, Field: field, Value: fmt.Sprintf("%q", f), Msg: "unknown column: the columns are id, lat, lon and optionally priority, in any order"}
		case lay.at[c] >= 0:
			return nil, &FileError{File: name, Line: line, Feature: -1, Field: field, Value: fmt.Sprintf("%q", f), Msg: fmt.Sprintf("given twice (first as column %d)", lay.at[c]+1)}
		}
		lay.at[c] = k
	}
	var missing []string
	for c := colID; c <= colLon; c++ {
		if lay.at[c] < 0 {
			missing = append(missing, csvColumnNames[c])
		}
	}
	if len(missing) > 0 {
		return nil, &FileError{File: name, Line: line, Feature: -1, Field: "header", Msg: fmt.Sprintf("no %s column: a header names id, lat, lon and optionally priority", strings.Join(missing, ", "))}
	}
	return lay, nil
}

// readCSVMarkers reads CSV markers. Lines starting with # are comments;
// a UTF-8 byte order mark has been dropped by the caller. With a header
// line, a record may leave out the priority column when it comes last.
func readCSVMarkers(name string, data []byte) ([]timeline.Marker, error) {
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	r.Comment = '#'
	r.TrimLeadingSpace = true
	seen := map[string]int{}
	var ms []timeline.Marker
	var lay *csvLayout
	for {
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
		firstLine := lay == nil
		if firstLine {
			if isCSVHeader(rec) {
				line, _ := r.FieldPos(0)
				if lay, err = headerLayout(name, line, rec); err != nil {
					return nil, err
				}
				continue
			}
			lay = &positional
		}
		m, line, err := lay.marker(name, r, rec, firstLine)
		if err != nil {
			return nil, err
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

// marker reads the record rec, the one r has just read, by the layout,
// and returns it with the line it starts on. firstLine: rec is the first
// record of a file without a header, where a word in place of a number
// gets a hint about header lines.
func (lay *csvLayout) marker(name string, r *csv.Reader, rec []string, firstLine bool) (timeline.Marker, int, error) {
	var m timeline.Marker
	line, _ := r.FieldPos(0)
	fail := func(c int, value, msg string) error {
		fieldLine := line
		if k := lay.at[c]; k >= 0 && k < len(rec) {
			fieldLine, _ = r.FieldPos(k)
		}
		return &FileError{File: name, Line: fieldLine, Feature: -1, Field: csvColumnNames[c], Value: value, Msg: msg}
	}
	if lay.width == 0 {
		if len(rec) < 3 || len(rec) > 4 {
			return m, 0, &FileError{File: name, Line: line, Feature: -1, Msg: fmt.Sprintf("%d fields: want id,lat,lon[,priority]", len(rec))}
		}
	} else {
		if len(rec) > lay.width {
			return m, 0, &FileError{File: name, Line: line, Feature: -1, Msg: fmt.Sprintf("%d fields: the header (line %d) names %d columns", len(rec), lay.headerLine, lay.width)}
		}
		for c := colID; c <= colLon; c++ {
			if lay.at[c] >= len(rec) {
				return m, 0, fail(c, "", fmt.Sprintf("missing (required; the line has %d fields)", len(rec)))
			}
		}
	}
	text := func(c int) string {
		if k := lay.at[c]; k >= 0 && k < len(rec) {
			return strings.TrimSpace(rec[k])
		}
		return ""
	}
	num := func(c int) (float64, error) {
		v, why := parseFinite(text(c))
		if why != "" {
			if firstLine && why == "not a number" {
				why += " (a header line would name the columns: id, lat, lon[, priority])"
			}
			return 0, fail(c, fmt.Sprintf("%q", text(c)), why)
		}
		return v, nil
	}
	if m.ID = text(colID); m.ID == "" {
		return m, 0, fail(colID, "", "empty")
	}
	lat, err := num(colLat)
	if err != nil {
		return m, 0, err
	}
	lon, err := num(colLon)
	if err != nil {
		return m, 0, err
	}
	m.Point = orb.Point{lon, lat}
	if fe := checkLonLat(m.Point); fe != nil {
		c := colLon
		if fe.Field == "lat" {
			c = colLat
		}
		return m, 0, fail(c, text(c), fe.Reason)
	}
	if text(colPriority) != "" {
		if m.Priority, err = num(colPriority); err != nil {
			return m, 0, err
		}
	}
	return m, line, nil
}
