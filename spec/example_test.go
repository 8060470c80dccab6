package spec_test

import (
	"fmt"

	"github.com/viewspec/viewspec/spec"
)

// Every invalid input in viewspec is one shape: the field's path, the
// value as written and the reason.
func ExampleCheckLatLon() {
	err := spec.CheckLatLon("points[3]", 91, 10)
	fmt.Println(err)
	// Output:
	// points[3].lat = 91: latitude must be finite and within [-90, 90]
}
