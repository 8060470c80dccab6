package spec

// Version names the version of the geometry viewspec answers for, as the
// wire's hello reports it.
const Version = "viewspec/1"

// WGS84 ellipsoid (NIMA TR8350.2, table 3.1): the semi-major axis in metres
// and the flattening. Geodesics on it are SPEC §4's distances.
const (
	WGS84SemiMajorM = 6378137.0
	WGS84Flattening = 1 / 298.257223563
)

// MeanEarthRadiusM is the IUGG mean Earth radius R₁ = (2a + b)/3 of WGS84,
// metres (Moritz, Geodetic Reference System 1980), used where a sphere
// turns an angle into ground metres.
const MeanEarthRadiusM = 6371008.8

// MercatorMaxLatDeg is the latitude, in degrees, at which the Web Mercator
// square ends: the world is as tall as it is wide, y = ±πR (EPSG:3857).
const MercatorMaxLatDeg = 85.0511287798066
