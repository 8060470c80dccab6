package demo

import (
	"math"

	"github.com/paulmach/orb"
)

// The town is laid out in metres on a flat local frame and only then turned into WGS84 degrees.

// Origin is the origin of the town's local frame, [lon, lat] WGS84 degrees: the point of Lantern
// Avenue, Port Wren's main avenue, where the project's default camera stands (44.9312° N,
// 31.1704° W, open ocean in the real world).
var Origin = orb.Point{-31.1704, 44.9312}

// AvenueBearingDeg is the bearing of Port Wren's avenues, degrees clockwise from north: the default
// camera's heading, so that it looks straight up Lantern Avenue. The cross streets run at
// AvenueBearingDeg + 90°.
const AvenueBearingDeg = 30.0

// WGS84 (NIMA TR8350.2, table 3.1), as in routes: semi-major axis in metres and flattening.
const (
	wgs84AM = 6378137.0
	wgs84F  = 1 / 298.257223563
)

// stepsPerDeg is the resolution every generated coordinate is rounded to: 1e-7° (at most 1.1 cm on
// the ground), so that files carry 7 decimals and read back to the very same float64.
const stepsPerDeg = 1e7

// vec is a point or a direction in the local frame: metres east and north of Origin.
type vec struct{ e, n float64 }

func (a vec) add(b vec) vec             { return vec{a.e + b.e, a.n + b.n} }
func (a vec) sub(b vec) vec             { return vec{a.e - b.e, a.n - b.n} }
func (a vec) mul(k float64) vec         { return vec{a.e * k, a.n * k} }
func (a vec) len() float64              { return math.Hypot(a.e, a.n) }
func (a vec) lerp(b vec, t float64) vec { return a.add(b.sub(a).mul(t)) }

// unit returns the unit vector of a direction a (a ≠ 0).
func (a vec) unit() vec { return a.mul(1 / a.len()) }

// left returns a turned 90° anticlockwise (to the left of travel along a).
func (a vec) left() vec { return vec{-a.n, a.e} }

// bearingDeg returns the bearing of direction a in degrees clockwise from north, in [0, 360).
func (a vec) bearingDeg() float64 {
	d := math.Atan2(a.e, a.n) * 180 / math.Pi
	if d < 0 {
		d += 360
	}
	return d
}

// dir returns the unit vector of bearing bearingDeg (degrees clockwise from north).
func dir(bearingDeg float64) vec {
	s, c := math.Sincos(bearingDeg * math.Pi / 180)
	return vec{s, c}
}

// Metres per degree at Origin's latitude: the meridional radius of curvature M and the prime
// vertical radius N of the WGS84 ellipsoid (M = a(1−e²)/W³, N = a/W, W = √(1 − e² sin²φ)).
var mPerDegLat, mPerDegLon = func() (float64, float64) {
	e2 := wgs84F * (2 - wgs84F)
	s, c := math.Sincos(Origin[1] * math.Pi / 180)
	w := math.Sqrt(1 - e2*s*s)
	return wgs84AM * (1 - e2) / (w * w * w) * math.Pi / 180, wgs84AM / w * c * math.Pi / 180
}()

// localFrameMaxErr bounds the relative error of lengths in the local frame against WGS84 geodesics
// anywhere in Port Wren (within 10 km of Origin): holding M and N at Origin's latitude errs by about
// tan φ·Δφ ≈ 0.16 % at 10 km north or south, and the frame's own flatness by far less. The tests
// check it on the generated roads.
const localFrameMaxErr = 0.002

// lonLat returns the WGS84 [lon, lat] degrees of local point p, rounded to 1e-7°. The frame
// is an equirectangular projection at Origin's latitude (see localFrameMaxErr for what it costs).
func lonLat(p vec) orb.Point {
	return orb.Point{
		roundDeg(Origin[0] + p.e/mPerDegLon),
		roundDeg(Origin[1] + p.n/mPerDegLat),
	}
}

// local returns the local point of WGS84 [lon, lat] degrees q, the inverse of lonLat up to rounding.
func local(q orb.Point) vec {
	return vec{(q[0] - Origin[0]) * mPerDegLon, (q[1] - Origin[1]) * mPerDegLat}
}

// roundDeg rounds degrees to 1e-7°: a whole number of steps divided by 1e7 (both exact in float64)
// is the float64 nearest to a 7-decimal number, so it prints as that number and parses back to itself.
func roundDeg(d float64) float64 { return math.Round(d*stepsPerDeg) / stepsPerDeg }
