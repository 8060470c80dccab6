package geofile_test

import (
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/geofile"
	"github.com/viewspec/viewspec/timeline"
)

// A header line names the columns, in any order and any case; without
// one the order is id,lat,lon[,priority].
func TestReadCSVColumns(t *testing.T) {
	want := []timeline.Marker{{ID: "a", Point: orb.Point{13.4, 52.5}, Priority: 2}, {ID: "b", Point: orb.Point{-31.16, 44.94}}}
	for _, c := range []struct{ desc, data string }{
		// Used to read by position: lat 13.4, lon 52.5.
		{"header id,lon,lat", "id,lon,lat,priority\na,13.4,52.5,2\nb,-31.16,44.94\n"},
		{"header in another order and case", "Priority, LAT ,Lon,ID\n2,52.5,13.4,a\n,44.94,-31.16,b\n"},
		{"header id,lat,lon,priority", "id,lat,lon,priority\na,52.5,13.4,2\nb,44.94,-31.16\n"},
		{"no header", "a,52.5,13.4,2\nb,44.94,-31.16\n"},
		{"comments and blank lines", "# markers\nid,lon,lat,priority\n\n# shops\na,13.4,52.5,2\nb,-31.16,44.94,\n"},
		// Used to give "1: lat: \"lat\" is not a finite number" or read the
		// header as a marker.
		{"a byte order mark before the header", "\ufeffid,lon,lat,priority\na,13.4,52.5,2\nb,-31.16,44.94\n"},
		{"a byte order mark and no header", "\ufeffa,52.5,13.4,2\r\nb,44.94,-31.16\r\n"},
	} {
		ms, err := geofile.ReadMarkers("m.csv", []byte(c.data))
		if err != nil {
			t.Errorf("%s: ReadMarkers(%q) = %v, want no error", c.desc, c.data, err)
			continue
		}
		if len(ms) != len(want) || ms[0] != want[0] || ms[1] != want[1] {
			t.Errorf("%s: ReadMarkers(%q) = %+v, want %+v", c.desc, c.data, ms, want)
		}
	}
}

func TestReadCSVErrors(t *testing.T) {
	checkErrors(t, "ReadMarkers", readMarkers, []errorCase{
		{"a header without lat", "a.csv", "id,lon,priority\na,1,2\n", "a.csv:1: header: no lat column: a header names id, lat, lon and optionally priority"},
		{"a header without lat or lon", "b.csv", "\ufeffid,latitude\n", `b.csv:1: header column 2 = "latitude": unknown column: the columns are id, lat, lon and optionally priority, in any order`},
		{"an unknown column", "c.csv", "# shops\nid,lat,lon,name\na,1,2,bakery\n", `c.csv:2: header column 4 = "name": unknown column: the columns are id, lat, lon and optionally priority, in any order`},
		{"a column given twice", "d.csv", "id,lat,lon,LAT\n", `d.csv:1: header column 4 = "LAT": given twice (first as column 2)`},
		{"a header without id", "e.csv", "lat,lon\n1,2\n", "e.csv:1: header: no id column: a header names id, lat, lon and optionally priority"},
		{"a line longer than the header", "f.csv", "id,lat,lon\na,1,2,3\n", "f.csv:2: 4 fields: the header (line 1) names 3 columns"},
		{"a line without its lon", "g.csv", "lat,id,lon\n1,a\n", "g.csv:2: lon: missing (required; the line has 2 fields)"},
		{"a latitude out of range under a header", "h.csv", "id,lon,lat\na,10,95\n", "h.csv:2: lat = 95: latitude must be finite and within [-90, 90]"},
		{"a word for a number on the first line, no header", "i.csv", "name,latitude,longitude\na,1,2\n", `i.csv:1: lat = "latitude": not a number (a header line would name the columns: id, lat, lon[, priority])`},
		{"a number beyond the double range", "j.csv", "a,1e400,2\n", `j.csv:1: lat = "1e400": not a finite number`},
		{"an empty id", "k.csv", "id,lat,lon\n,1,2\n", "k.csv:2: id: empty"},
		{"a bad priority", "l.csv", "id,priority,lat,lon\na,high,1,2\n", `l.csv:2: priority = "high": not a number`},
		{"the line of a field after a quoted line break", "m.csv", "id,lat,lon\n\"a\nb\",1,x\n", `m.csv:3: lon = "x": not a number`},
		{"a bare quote", "n.csv", "id,lat,lon\na\"b,1,2\n", `n.csv:2: malformed CSV: parse error on line 2, column 2: bare " in non-quoted-field`},
	})
}
