package render_test

import (
	"fmt"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/viewport"
)

// Scale bars take the largest of 1, 2 or 5 × 10ⁿ metres that fits.
func ExampleRoundLengthM() {
	for _, m := range []float64{0.75, 7, 180, 4321} {
		fmt.Println(m, "→", render.RoundLengthM(m))
	}
	// Output:
	// 0.75 → 0.5
	// 7 → 5
	// 180 → 100
	// 4321 → 2000
}

// A camera picture's frame: the user at its origin, and one picture unit
// per so many ground metres. A point 100 Mercator metres north of the
// user is drawn 100 × UnitsPerM units above it (y grows down).
func ExampleCameraFrame() {
	c := viewport.Camera{LatDeg: 60, LonDeg: 5, HeadingDeg: 0, PitchDeg: 0, Zoom: 16,
		Device: viewport.NewDevice(400, 800, 60)}
	v, err := viewport.Prepare(c)
	if err != nil {
		fmt.Println(err)
		return
	}
	f, err := render.CameraFrame(&v, render.WithSpanM(1000))
	if err != nil {
		fmt.Println(err)
		return
	}
	u := v.UserMercator()
	x, y := f.Point(viewport.Mercator{X: u.X, Y: u.Y + 100})
	fmt.Printf("user at (%g, %g); %.4g units per ground metre\n", f.OriginX, f.OriginY, f.UnitsPerGroundM())
	fmt.Printf("100 Mercator metres north: (%.2f, %.2f)\n", x, y)
	// Output:
	// user at (320, 320); 0.64 units per ground metre
	// 100 Mercator metres north: (320.00, 288.00)
}
