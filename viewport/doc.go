// Package viewport is the camera of a heading-up, tilted navigation map: the
// Web Mercator plane, projection of ground points to screen pixels and back,
// the in-view test with its decision margin, the footprint (the ground
// region the screen shows), and the in-view tracking of a view that moves a
// little at a time (View.Place, Tracker), which the drive timeline uses.
//
// Conventions, everywhere in this package:
//
//   - Geographic points are orb.Point values, [longitude, latitude] in WGS84
//     degrees. Latitude is clamped to ±MaxLatDeg before it enters the plane.
//   - The map plane is Web Mercator (EPSG:3857) in metres: X east, Y north,
//     R = EarthRadiusM. Differences in X are taken the short way across the
//     antimeridian.
//   - Headings are degrees clockwise from true north in [0, 360); pitch is
//     degrees from straight down (0 = looking straight down) in [0, 90).
//   - Screen pixels have their origin at the top-left corner of the screen,
//     x to the right, y down, in logical (device-independent) pixels.
//   - Ground metres are Mercator metres scaled by cos φ of the user's
//     latitude (see GroundScale for the error bound of that approximation).
//
// Everything here is a pure function of small value types (a Tracker is
// the one piece of state); there is no I/O. The package imports only spec:
// routes, zoom rule sets and the drive timeline live in their own packages.
package viewport
