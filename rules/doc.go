// Package rules is the speed-driven zoom and pitch of a heading-up navigation map (SPEC §3): rule sets,
// their loader and linter, and their evaluation over time.
//
// # What a rule set is
//
// A rule set ([Set]) says how the map's zoom and camera pitch follow the vehicle: a list of speed bands,
// each with a target zoom and pitch; a hysteresis that keeps the band from flickering when the speed
// hovers at an edge; rate limits so that zoom and pitch glide rather than jump; a turn override that
// zooms in near the next turn; bounds on the zoom; and the rotation rate of the heading-up map. People
// write rule sets as YAML files (see fixtures/rules/ for two); the wire carries the same structure as a
// JSON object (SPEC §6). The published JSON Schema ([Schema], $id [SchemaID]) describes both.
//
// # Units and conventions
//
//   - Speeds in rule files are km/h, always with the _kmh suffix (below_kmh, hysteresis_kmh); speeds in
//     samples are m/s (speed_mps). The conversion is km/h = m/s × 3.6, one multiplication, so that every
//     implementation puts a speed at a band edge in the same band.
//   - Zoom is the fractional zoom level of the Web Mercator map (the world is tile_px·2^zoom pixels
//     wide), in [0, 30]. Rates are zoom levels per second.
//   - Pitch is the camera tilt in degrees from looking straight down, in [0, 90); headings are degrees
//     clockwise from true north, in [0, 360). Rates are degrees per second.
//   - Times are seconds, distances metres (along the route for turn distances).
//   - Band i holds the speeds in [below_kmh[i−1], below_kmh[i]): the lower edge belongs to the band, the
//     upper edge to the next. The first band starts at 0 km/h; the last band has no below_kmh.
//   - Field paths in messages use the document's own names: bands[1].zoom, turn.within_m, samples[3].t_s.
//
// # Evaluation
//
// [Set.Evaluate] runs a set over a list of [Sample]s; [Set.Start] and [State.Step] do the same one
// sample at a time without allocating, for the drive timeline. Both follow SPEC §3 literally (the band
// loop with hysteresis, the turn override, the clamp, the rate limit); the one reading this package
// adds is that a zoom or pitch within reach of its target lands on it exactly (see approach in eval.go).
// [TurnHeadingDeg] is the heading-up rotation limit the timeline applies with max_turn_rate_deg_per_s.
//
// # Errors and findings
//
// [Parse] and [Lint] never panic on any input. Every problem names the file, line and column of the
// offending YAML node and the field path, and an invalid value is never turned into a number: errors are
// [Problem]s (gathered in [Errors]), lint results are [Finding]s with a [Severity] and a [ProblemKind].
//
// # Out of scope
//
// Finding turns on a route (turn.min_angle_deg is read here but applied by the route code), moving along
// the route, the camera and what it sees (package viewport), and the wire's request and response framing
// (package fixtures). Rule sets do not depend on the device: a phone and an in-car screen get different
// rule files, not different code.
package rules
