package timeline_test

import (
	"fmt"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// A 10 m/s drive north along a meridian, a phone at zoom 17 looking 45°
// down: a marker 300 m ahead on the road is in view from the start and
// shown at once (early); one 5 km east never is.
func ExampleCompute() {
	r, _ := routes.New([]orb.Point{{0, 0}, {0, 0.02}}, []float64{10})
	rs := &rules.Set{
		Bands:           []rules.Band{{Zoom: 17, PitchDeg: 45}},
		MaxZoomRatePerS: 1, MaxPitchRateDegPerS: 10, MaxTurnRateDegPerS: 90,
		Turn:    rules.Turn{WithinM: 100, MinAngleDeg: 30, Zoom: 17},
		MinZoom: 10, MaxZoom: 20,
	}
	d := timeline.NewDrive(r, 0, viewport.NewDevice(390, 844, 45), rs)
	got, err := timeline.Compute(&d, []timeline.Marker{
		{ID: "ahead", Point: orb.Point{0, 0.0027}},
		{ID: "far-east", Point: orb.Point{0.045, 0.001}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, g := range got {
		fmt.Println([]string{"ahead", "far-east"}[i], g.Bucket, g.FirstShownS)
	}
	// Output:
	// ahead early 0
	// far-east never 0
}
