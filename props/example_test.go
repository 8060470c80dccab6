package props_test

import (
	"fmt"

	"github.com/viewspec/viewspec/props"
)

// A request generator draws labelled wire requests; the same seed draws the
// same request.
func ExampleProbeRequest() {
	a := props.ProbeRequest("footprint").Example(3)
	b := props.ProbeRequest("footprint").Example(3)
	fmt.Println(a.Request.Op, *a.Request.Camera.Zoom == *b.Request.Camera.Zoom, a.Family == b.Family)
	// Output:
	// footprint true true
}
