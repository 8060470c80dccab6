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

// The screen's scale at the user's row: looking straight down at zoom 16
// at 60° N, a Mercator metre is 256·2¹⁶/(2π·6378137) = 0.41865 px and a
// ground metre twice that (sec 60° = 2). Tilted back 60° with the user a
// quarter of the screen below its centre, the user's row is nearer the
// camera than the centre's (SPEC §2, hand-computed: f = 400/tan 30° =
// 692.8 px, v = −266.7 px, depth f + v·sin θ = 461.9 px), so the scale is
// f/depth = 1.5 times as large.
func ExampleScreenScalePxPerM() {
	for _, pitch := range []float64{0, 60} {
		c := viewport.Camera{LatDeg: 60, LonDeg: 5, PitchDeg: pitch, Zoom: 16, Device: viewport.NewDevice(400, 800, 60)}
		c.Device.AnchorY = 0.75
		v, err := viewport.Prepare(c)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("pitch %g°: %.4f px per ground metre\n", pitch, render.ScreenScalePxPerM(&v))
	}
	// Output:
	// pitch 0°: 0.8373 px per ground metre
	// pitch 60°: 1.2559 px per ground metre
}
