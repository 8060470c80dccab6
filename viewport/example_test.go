package viewport_test

import (
	"fmt"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/viewport"
)

// A phone looking straight down at the equator at zoom 16: the user sits at
// the screen centre and the footprint is the screen's size in ground metres,
// 400 × 800 px of 2.388657 m (156 543.03 m/px / 2^16, the slippy-map table's
// zoom-16 row): 1 825 819 m².
func ExamplePrepare() {
	c := viewport.Camera{LatDeg: 0, LonDeg: 0, HeadingDeg: 0, PitchDeg: 0, Zoom: 16,
		Device: viewport.NewDevice(400, 800, 60)}
	v, err := viewport.Prepare(c)
	if err != nil {
		fmt.Println(err)
		return
	}
	sp := v.Project(orb.Point{0, 0})
	fmt.Printf("user at (%.1f, %.1f) px, in view %v\n", sp.X, sp.Y, sp.InView())
	fp := v.Footprint()
	fmt.Printf("footprint %.0f m²\n", fp.AreaM2)
	// Output:
	// user at (200.0, 400.0) px, in view true
	// footprint 1825819 m²
}

// Tilting the camera makes the footprint a trapezoid, wider at the far edge.
func ExampleView_Footprint() {
	c := viewport.Camera{LatDeg: 44.9312, LonDeg: -31.1704, HeadingDeg: 0, PitchDeg: 60, Zoom: 17,
		Device: viewport.NewDevice(390, 844, 45)}
	v, _ := viewport.Prepare(c)
	fp := v.Footprint()
	g := viewport.GroundScale(c.LatDeg)
	m := fp.Mercator
	fmt.Printf("near edge %.0f m, far edge %.0f m\n", (m[1].X-m[0].X)*g, (m[2].X-m[3].X)*g)
	// Output:
	// near edge 192 m, far edge 1167 m
}

// Invalid cameras get an error naming the field and the value.
func ExampleCamera_Validate() {
	c := viewport.Camera{LatDeg: 44.9, LonDeg: -31.2, PitchDeg: 95, Zoom: 16, Device: viewport.NewDevice(390, 844, 45)}
	fmt.Println(c.Validate())
	// Output:
	// pitch_deg = 95: pitch must be within [0, 90)
}
