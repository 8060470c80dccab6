package timeline_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// windingRoad is a road of n vertices about 30 m apart, turning a little at
// each (up to ±0.15 rad), at 25 m/s, drawn from rng.
func windingRoad(b testing.TB, rng *rand.Rand, n int) *routes.Route {
	return turningRoad(b, rng, n, 0.3)
}

// turningRoad is windingRoad with turns of up to ±turnRad/2 at each vertex.
func turningRoad(b testing.TB, rng *rand.Rand, n int, turnRad float64) *routes.Route {
	pts := make([]orb.Point, n)
	lat, lon, dir := 44.93, -31.17, 0.5
	for i := range pts {
		pts[i] = orb.Point{lon, lat}
		dir += (rng.Float64() - 0.5) * turnRad
		lat += 0.00027 * math.Cos(dir)
		lon += 0.00027 * math.Sin(dir) / math.Cos(lat*math.Pi/180)
	}
	r, err := routes.New(pts, []float64{25})
	if err != nil {
		b.Fatal(err)
	}
	return r
}

// pointNear returns a point within about 300 m of r, beside a place drawn
// from rng within alongM of its start.
func pointNear(rng *rand.Rand, r *routes.Route, alongM float64) orb.Point {
	p := r.PointAt(rng.Float64() * alongM)
	return orb.Point{p[0] + (rng.Float64()-0.5)*0.008, p[1] + (rng.Float64()-0.5)*0.006}
}

// benchDrive is a winding 500-vertex road of about 15 km with 200 markers
// within 300 m of it, and a three-band rule set.
func benchDrive(b testing.TB) (timeline.Drive, []timeline.Marker) {
	rng := rand.New(rand.NewPCG(3, 5))
	r := windingRoad(b, rng, 500)
	ms := make([]timeline.Marker, 200)
	for i := range ms {
		ms[i] = timeline.Marker{ID: fmt.Sprintf("shop-%03d", i),
			Point: pointNear(rng, r, r.LengthM()), Priority: float64(rng.IntN(4))}
	}
	rs := &rules.Set{
		Bands: []rules.Band{
			{BelowKmh: rules.Edge(40), Zoom: 17.5, PitchDeg: 45},
			{BelowKmh: rules.Edge(80), Zoom: 16.5, PitchDeg: 55},
			{Zoom: 15.5, PitchDeg: 60},
		},
		HysteresisKmh: 5, MaxZoomRatePerS: 0.5, MaxPitchRateDegPerS: 10,
		Turn:    rules.Turn{WithinM: 150, MinAngleDeg: 30, Zoom: 17},
		MinZoom: 10, MaxZoom: 19, MaxTurnRateDegPerS: 45,
	}
	d := timeline.NewDrive(r, 0, viewport.NewDevice(390, 844, 45), rs)
	d.Device.AnchorY = 0.75
	return d, ms
}

// A timeline for 200 markers on a 500-vertex route, 120 s at 0.25 s ticks.
func BenchmarkTimeline(b *testing.B) {
	d, ms := benchDrive(b)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := timeline.Compute(&d, ms); err != nil {
			b.Fatal(err)
		}
	}
}

// The naive baseline: every marker projected from latitude and longitude
// with a freshly prepared camera at every tick.
func BenchmarkTimelineNaive(b *testing.B) {
	d, ms := benchDrive(b)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := timeline.ComputeNaive(&d, ms); err != nil {
			b.Fatal(err)
		}
	}
}
