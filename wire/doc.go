// Package wire is the language-neutral wire of SPEC §6: the request and
// answer types, the one decoder every request goes through (keys matched
// exactly, rules included; unknown keys and fields an op does not read
// ignored), the encoders, the error codes and the one translation of an
// error into a code, and the JSON Lines loop (Serve) that answers a stream
// with any Answerer. The conversions between wire objects and the
// geometry's values (Camera.Value, CameraOf, Route.Value, …) live here
// too, so that every package reads and writes requests alike.
//
// On the wire angles are degrees, distances metres, times seconds, speeds
// m/s, screen positions logical pixels (origin top-left, y down); every
// field name carries its unit. Numbers are written with the fewest digits
// that round-trip (at most 17 significant). The reference (package
// reference) adds its decision margins beside the answers; readers ignore
// fields they do not know.
package wire
