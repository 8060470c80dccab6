// Package demo is the scenario `viewspec demo` runs on: Port Wren, an invented town on an invented
// island in the open mid-Atlantic around 44.93° N, 31.17° W, where in the real world there is only
// ocean. Its streets, businesses, drives, devices and rule sets are made up for viewspec's examples
// and tests; every name is invented, and none is meant to be, or to resemble, a real business, brand,
// product or place.
//
// # What is in it
//
//   - Streets ([Street]): a grid of avenues (named after shore birds, Lantern Avenue the main one,
//     running at [AvenueBearingDeg] = 30°) and cross streets (named after trees, Tidemark Street the
//     main one) 105–150 m apart; the Gorse Ring, a ring road 300–400 m outside the grid that the two
//     main roads run out to; the Tarrow Expressway from the ring out towards the headland, and its
//     sharp exit (a turn of 64–76°) onto the Tarrow Slip, which leads to a lane and a hamlet.
//   - Businesses ([Business]): 92–143 of them, each a timeline.Marker (id pw-001…, priority a whole
//     number 0–10) with a name, a category (bakery, café, pharmacy, fuel, …) and its street; in the
//     centre 12–26 m to either side of a street's centre line, by the ring and expressway 25–45 m,
//     by the lane 15–25 m, never within 25 m (along the street) of a junction.
//   - Drives ([Tour]): "town" (20–50 km/h on the grid, turning at junctions), "ring" (50–70 km/h,
//     three quarters of the way round) and "expressway" (100–120 km/h out of town, ending with the
//     sharp exit, after which the speed drops to 34 km/h), each with one speed per segment.
//   - Devices ([DeviceProfile]): a phone in portrait (390 × 844 px) and landscape (844 × 390 px) with the
//     phone rules, and a wide in-car screen (1280 × 480 px, a panel on the left and controls at the
//     bottom) with the in-car rules.
//   - Rule sets ([RuleSet]): fixtures/rules/phone.yaml and incar.yaml, copied byte for byte into
//     demo/rules/ and embedded.
//
// # Frames and units
//
// Every point in the API and the files is an orb.Point, [lon, lat] in WGS84 degrees, rounded to 1e-7°
// (about 1 cm) so that it survives text unchanged; the CSV marker file alone writes lat before lon, as
// SPEC §4 has it. Speeds are m/s (SpeedsMps, speed_mps) and stated ranges km/h (…Kmh); lengths are
// metres, WGS84 geodesics once a drive is a routes.Route; headings and bearings are degrees clockwise
// from true north; screens are logical pixels with y down.
//
// The town is drawn in metres on a local frame, x east and y north of [Origin] (the default camera's
// spot on Lantern Avenue), turned into degrees with the WGS84 radii of curvature at Origin's latitude.
// That flat frame is only the drawing board: over the island's 10 km it puts lengths within 0.2 % of
// the geodesic (see localFrameMaxErr), so a business drawn 12 m from its street is 12 ± 0.03 m from it
// on the ellipsoid.
//
// # Determinism
//
// [New] makes the same town from the same seed, byte for byte in every export. Every choice (counts,
// names, categories, priorities, speeds, which block a business or a drive takes) is made with
// integers from SplitMix64, written out in this package rather than taken from math/rand, and each
// part of the town draws from its own stream of it. The geometry is float64 arithmetic rounded to
// 1e-7°; a CPU that fuses multiply-adds could move a coordinate by one step of 1e-7° only where it lies
// within about 1e-15° of a rounding midpoint. [Default] is New([DefaultSeed]); a test pins a SHA-256 of
// its exports.
//
// # Out of scope
//
// Traffic, lanes, one-way streets, buildings and coastline: a street is its centre line, a business
// its marker point. Drives are scripted speed profiles, not simulated vehicles; a speed is constant
// along a segment and changes only at vertices, as SPEC §5's motion has it.
package demo
