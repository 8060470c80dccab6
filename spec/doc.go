// Package spec holds what every viewspec package shares: the constants of
// SPEC §1 (the WGS84 ellipsoid, the Web Mercator sphere and its latitude
// limit), the check of a geographic position, the one shape of an invalid
// input (FieldError: the field's path, its value as written, the reason),
// and the number format that messages and the wire use.
//
// Conventions: positions are WGS84 degrees, latitude in [-90, 90] and
// longitude in [-180, 180]; field paths are written as on the wire
// ("camera.device.width_px", "points[3].lat"). The package has no I/O and
// imports nothing of viewspec.
package spec
