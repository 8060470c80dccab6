// Package fixtures is viewspec's wire: the request and answer types of SPEC
// §6, the reference evaluator that answers them with the viewport and routes
// packages, and the JSON Lines loop that speaks them on a stream.
//
// On the wire angles are degrees, distances metres, times seconds, speeds
// m/s, screen positions logical pixels (origin top-left, y down); every field
// name carries its unit. Numbers are written with the fewest digits that
// round-trip (at most 17 significant). Readers ignore fields they do not
// know, so the reference can add its decision margins (margin_px) beside the
// answers.
package wire
