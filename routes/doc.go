// Package routes is viewspec's route geometry (SPEC §4 and the motion rules of §5): WGS84 geodesic
// lengths, the closest point of a route to a user or a marker, along-route position, time to reach,
// side of the road, turn detection, and exact-time motion along a route.
//
// # Points
//
// Every point in the API is an orb.Point, [lon, lat]: longitude first, then latitude, both in
// WGS84 degrees. Latitude lies in [-90, 90] and longitude in [-180, 180]; −180 and 180 are the same
// meridian.
//
// # Frames: which model measures what
//
//   - Lengths and distances are WGS84 ellipsoid geodesics (a = 6378137 m, f = 1/298.257223563):
//     segment lengths, along-route positions, user_dist_m, route_dist_m, cross-track distance.
//     See GeodesicDistM for the method and its error bound.
//   - Closest points and arcs live on the unit sphere, treating geodetic latitude as spherical
//     latitude: a segment is the great-circle arc between its ends, a point at along-route position
//     p on segment i lies at the fraction (p − start_i)/length_i of that arc by angle, and closest
//     points are chosen by spherical distance, then measured on the ellipsoid.
//   - Headings are bearings in the Web Mercator plane (x = Rλ, y = R ln tan(π/4 + φ/2), latitude
//     clamped to ±85.0511287798066°), atan2(Δx, Δy) with Δx taken the short way across the
//     antimeridian.
//
// # Units and conventions
//
// Metres, seconds and m/s; degrees on the API, radians inside. Headings and azimuths are degrees
// clockwise from true north in [0, 360). Along-route positions are metres from the route's start.
// At an interior vertex the current segment is the one that starts there; at the route's end it is
// the last one. Ties between closest points within 1e-6 m go to the smallest along-route position.
// Side is left or right of the direction of travel.
//
// # Errors
//
// New refuses bad input with a *spec.FieldError naming the field, its index and the value (for example
// `points[3].lat = 91: latitude must be finite and within [-90, 90]`); ValidateLatLon gives callers the same check for
// their own points. The query methods (Snap, Metrics, PointAt, …) take positions that have passed
// ValidateLatLon; along-route positions and times are clamped, never refused.
//
// # Cost
//
// A Route is prepared once (O(n log n)); Snap and Metrics then search a k-d tree of boxes over
// the segments (in 3-D unit-sphere coordinates, so seamless at the antimeridian and the poles) and
// touch few of them, and, like the along-route helpers, do not allocate. On a 2-core VM, Metrics
// for 200 markers takes about 0.2 ms on a 500-vertex route and 0.25 ms on a 20,000-vertex one.
// The along-route helpers search for their segment in O(log n); a Walker, for loops over the ticks
// of a drive, remembers where it was and steps in O(1), with the same answers.
//
// # Out of scope
//
// Heights (everything is on the ellipsoid's surface); geodesic segments (a segment is a great-
// circle arc, only its length is geodesic); segments whose ends are within 6 m of antipodal;
// routing, map matching or snapping to a road network; time-dependent speeds (one speed per
// segment); the camera and what is in view (package viewport).
package routes
