package routes

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"
)

// Helpers shared by the tests and benchmarks: a spherical "destination point" to lay out routes
// and markers (generation only; nothing is checked with it), and near, the one check that is not
// written out where it is used.

// near reports (t.Errorf: the test goes on) a got further than tol from want, or NaN, as
// "what = got, want want (off by d, tolerance tol)".
func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if d := math.Abs(got - want); !(d <= tol) {
		t.Errorf("%s = %v, want %v (off by %.3g, tolerance %.3g)", what, got, want, d, tol)
	}
}

// offsetPoint returns the point distM metres from p on bearing bearingDeg, on the sphere of the
// mean radius.
func offsetPoint(p orb.Point, bearingDeg, distM float64) orb.Point {
	d := distM / meanRadiusM
	br := bearingDeg * degRad
	lat1, lon1 := p[1]*degRad, p[0]*degRad
	lat2 := math.Asin(math.Sin(lat1)*math.Cos(d) + math.Cos(lat1)*math.Sin(d)*math.Cos(br))
	lon2 := lon1 + math.Atan2(math.Sin(br)*math.Sin(d)*math.Cos(lat1), math.Cos(d)-math.Sin(lat1)*math.Sin(lat2))
	return orb.Point{math.Remainder(lon2*radDeg, 360), lat2 * radDeg}
}

// cityRoute lays out an n-vertex drive from start: segments of 30–400 m (log-uniform), turning by up
// to ±maxTurnDeg at each vertex.
func cityRoute(rng *rand.Rand, start orb.Point, n int, maxTurnDeg float64) []orb.Point {
	pts := []orb.Point{start}
	h := rng.Float64() * 360
	for len(pts) < n {
		step := math.Exp(math.Log(30) + rng.Float64()*(math.Log(400)-math.Log(30)))
		pts = append(pts, offsetPoint(pts[len(pts)-1], h, step))
		h += (2*rng.Float64() - 1) * maxTurnDeg
	}
	return pts
}

// markersNear places n markers beside the route: at a random vertex, offset by 1 m to 3 km
// (log-uniform) on a random bearing.
func markersNear(rng *rand.Rand, pts []orb.Point, n int) []orb.Point {
	out := make([]orb.Point, n)
	for i := range out {
		v := pts[rng.IntN(len(pts))]
		out[i] = offsetPoint(v, rng.Float64()*360, math.Exp(rng.Float64()*math.Log(3000)))
	}
	return out
}
