package gate_test

import (
	"fmt"

	"github.com/viewspec/viewspec/gate"
)

// A gate condition names a measure of the total, a comparison and a
// number; it holds (the gate fails) when the comparison is true.
func ExampleParseCondition() {
	c, err := gate.ParseCondition("lost_shown_pct > 5")
	fmt.Println(c, err)
	holds, v := c.Holds(&gate.Measures{ShownSBase: 200, LostShownS: 20, LostShownPct: 10})
	fmt.Println(holds, v)
	// Output:
	// lost_shown_pct > 5 <nil>
	// true 10
}
