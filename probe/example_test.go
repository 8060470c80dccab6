package probe_test

import (
	"fmt"

	"github.com/viewspec/viewspec/probe"
)

// Probing the reference against itself finds nothing: every drawn case is
// answered the same through the wire.
func ExampleFind() {
	f, err := probe.Find(probe.Reference{}, probe.Options{Ops: []string{"project", "zoom"}, Checks: 50, Seed: 7})
	fmt.Println(f == nil, err)
	// Output:
	// true <nil>
}
