package props_test

import (
	"fmt"

	"github.com/viewspec/viewspec/props"
)

// Probing the reference against itself finds nothing: every drawn case is
// answered the same through the wire.
func ExampleProbe() {
	f, err := props.Probe(props.Reference{}, props.ProbeOptions{Ops: []string{"project", "zoom"}, Checks: 50, Seed: 7})
	fmt.Println(f == nil, err)
	// Output:
	// true <nil>
}

// A request generator draws labelled wire requests; the same seed draws the
// same request.
func ExampleProbeRequest() {
	a := props.ProbeRequest("footprint").Example(3)
	b := props.ProbeRequest("footprint").Example(3)
	fmt.Println(a.Request.Op, *a.Request.Camera.Zoom == *b.Request.Camera.Zoom, a.Family == b.Family)
	// Output:
	// footprint true true
}
