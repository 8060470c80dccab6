package routes

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r3"
	"github.com/golang/geo/s2"
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
// mean radius: p's unit vector turned by the angle toward the bearing's direction in the tangent
// plane (north and east at p), the latitude then by atan2, accurate at every latitude. (The
// spherical direct formula by the arcsine of sin φ₂ loses the latitude to ~10 cm within a metre
// of a pole, where sin φ₂ is within 1e-16 of ±1: a "1 mm" nudge there moved a point 1 cm.)
func offsetPoint(p orb.Point, bearingDeg, distM float64) orb.Point {
	d := distM / meanRadiusM
	sb, cb := math.Sincos(bearingDeg * degRad)
	sp, cp := math.Sincos(p[1] * degRad)
	sl, cl := math.Sincos(p[0] * degRad)
	if math.Abs(p[1]) == 90 {
		sp, cp = math.Copysign(1, p[1]), 0
	}
	u := r3.Vector{X: cp * cl, Y: cp * sl, Z: sp}
	north := r3.Vector{X: -sp * cl, Y: -sp * sl, Z: cp}
	east := r3.Vector{X: -sl, Y: cl, Z: 0}
	sd, cd := math.Sincos(d)
	q := u.Mul(cd).Add(north.Mul(cb * sd).Add(east.Mul(sb * sd)))
	return orb.Point{math.Atan2(q.Y, q.X) * radDeg, math.Atan2(q.Z, math.Hypot(q.X, q.Y)) * radDeg}
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

// TestOffsetPointDistance: the helper's points lie the distance asked from
// the start (golang/geo's s2 angle × the mean radius), to 1e-8 m (the
// rounding of degrees is ~1e-9 m), at the
// equator, at 60° and 0.2 m from the south pole, where the helper once
// put a "1 mm" nudge 1 cm away and a property of the choice margin failed
// for it (a route from [1, −89.9999981837743]).
func TestOffsetPointDistance(t *testing.T) {
	for _, p := range []orb.Point{{0, 0}, {13.4, 60}, {1, -89.9999981837743}, {-170, 89.99999}} {
		for _, br := range []float64{0, 1, 90, 181, 300} {
			for _, dist := range []float64{1e-3, 1, 1000} {
				q := offsetPoint(p, br, dist)
				got := float64(s2.PointFromLatLng(s2.LatLngFromDegrees(p[1], p[0])).Distance(s2.PointFromLatLng(s2.LatLngFromDegrees(q[1], q[0])))) * meanRadiusM
				if math.Abs(got-dist) > 1e-8*max(1, dist) {
					t.Errorf("offsetPoint(%v, %g°, %g m) = %v, %.12g m away", p, br, dist, q, got)
				}
			}
		}
	}
}

// centre returns the entry's centre along axis.
func (e *buildEntry) centre(axis int) float64 { return orderedFloat(e.key[axis]) }

// mercatorHeadingDeg is mercatorHeadingDegY with the ends' Mercator y found here.
func mercatorHeadingDeg(a, b orb.Point) float64 {
	return mercatorHeadingDegY(a, b, mercatorY(a[1]), mercatorY(b[1]))
}
