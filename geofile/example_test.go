package geofile_test

import (
	"fmt"

	"github.com/viewspec/viewspec/geofile"
)

// Markers come from CSV with a header, or without one; a bad line is an
// error naming the file, the line and the field.
func ExampleReadMarkers() {
	ms, err := geofile.ReadMarkers("shops.csv", []byte("id,lat,lon,priority\nbakery,52.5,13.4,2\nkiosk,52.51,13.41\n"))
	fmt.Println(len(ms), ms[0].ID, ms[0].Point, ms[0].Priority, err)
	_, err = geofile.ReadMarkers("bad.csv", []byte("a,95,2\n"))
	fmt.Println(err)
	// Output:
	// 2 bakery [13.4 52.5] 2 <nil>
	// bad.csv:1: lat = 95: latitude must be finite and within [-90, 90]
}
