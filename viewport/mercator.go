package viewport

import (
	"math"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/spec"
)

// EarthRadiusM is the radius of the Web Mercator sphere in metres: the WGS84
// semi-major axis, as EPSG:3857 (method 1024) prescribes.
const EarthRadiusM = spec.WGS84SemiMajorM

// MaxLatDeg is the latitude, in degrees, at which the Web Mercator square
// ends: the world is as tall as it is wide, y = ±πR.
const MaxLatDeg = spec.MercatorMaxLatDeg

// worldWidthM is the width of the Mercator world, 2πR metres.
const worldWidthM = 2 * math.Pi * EarthRadiusM

// Mercator is a point of the Web Mercator plane, in metres east (X) and north
// (Y) of the intersection of the equator and the prime meridian.
type Mercator struct {
	X, Y float64
}

// ToMercator returns the Web Mercator point of p ([lon, lat] degrees).
// Latitude is clamped to ±MaxLatDeg first, so the answer is always finite for
// finite input.
func ToMercator(p orb.Point) Mercator {
	lat := p[1]
	if lat > MaxLatDeg {
		lat = MaxLatDeg
	} else if lat < -MaxLatDeg {
		lat = -MaxLatDeg
	}
	// The formula of EPSG method 1024 as written; the tests hold it to PROJ
	// within 1 mm (tan(π/4) rounds below 1, so the equator lands 0.7 nm
	// south of 0).
	return Mercator{
		X: p[0] * (worldWidthM / 360), // R·λ, as a fraction of the world

		Y: EarthRadiusM * math.Log(math.Tan(math.Pi/4+lat*(math.Pi/360))),
	}
}

// LatLon returns the [lon, lat] degrees of m. Longitude is wrapped into
// [−180, 180); latitude follows the inverse formula for any Y.
func (m Mercator) LatLon() orb.Point {
	lon := m.X / worldWidthM * 360 // λ = X/R, as a fraction of the world
	lon = wrapLonDeg(lon)
	lat := (2*math.Atan(math.Exp(m.Y/EarthRadiusM)) - math.Pi/2) * (180 / math.Pi)
	return orb.Point{lon, lat}
}

// wrapLonDeg returns lon wrapped into [−180, 180).
func wrapLonDeg(lon float64) float64 {
	if lon >= -180 && lon < 180 {
		return lon
	}
	lon = math.Mod(lon+180, 360)
	if lon < 0 {
		lon += 360
	}
	return lon - 180
}

// ShortDXM returns the Mercator X difference dx (metres) taken the short way round
// the world, in [−πR, πR). It is exact (dx itself) when dx is already in
// that range, which the hot path checks with two comparisons.
func ShortDXM(dx float64) float64 {
	if dx >= worldWidthM/2 || dx < -worldWidthM/2 {
		return wrapDX(dx)
	}
	return dx
}

// wrapDX is ShortDXM's slow path, for differences of half a world or more.
func wrapDX(dx float64) float64 {
	dx = math.Mod(dx+worldWidthM/2, worldWidthM)
	if dx < 0 {
		dx += worldWidthM
	}
	return dx - worldWidthM/2
}

// ScalePxPerM returns the map scale in screen pixels per Mercator metre at
// fractional zoom level zoom with square tiles of tilePx pixels: the world is
// tilePx·2^zoom pixels wide.
func ScalePxPerM(zoom float64, tilePx int) float64 {
	return float64(tilePx) * math.Exp2(zoom) / worldWidthM
}

// GroundMPerPx returns the ground metres one screen pixel spans at latitude
// latDeg, zoom level zoom and tiles of tilePx pixels: cos φ / scale.
func GroundMPerPx(latDeg, zoom float64, tilePx int) float64 {
	return math.Cos(clampLatDeg(latDeg)*(math.Pi/180)) / ScalePxPerM(zoom, tilePx)
}

// GroundScale returns the factor that turns Mercator metres near latitude
// latDeg into ground metres: cos φ (φ clamped to ±MaxLatDeg).
//
// Error bound, against the WGS84 geodesic, for a distance D metres measured
// from a point at latitude φ: the spherical Mercator ignores the ellipsoid's
// flattening, which costs up to 0.67 % (north-south at the equator; east-west
// errs the other way by up to 0.34 %), and holding cos φ fixed over the
// distance adds up to tan|φ|·D/(2R) (0.22 % for 10 km at 70°). The tests
// check this bound against GeographicLib.
func GroundScale(latDeg float64) float64 {
	return math.Cos(clampLatDeg(latDeg) * (math.Pi / 180))
}

func clampLatDeg(lat float64) float64 {
	return max(-MaxLatDeg, min(MaxLatDeg, lat))
}
