package routes

import (
	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/spec"
)

// formatValue writes v with the fewest digits that round-trip ("NaN", "+Inf" and "-Inf" for the
// non-finite values).
func formatValue(v float64) string { return spec.FormatNumber(v) }

// ValidateLatLon checks that p ([lon, lat] degrees) is a usable WGS84 position: both coordinates
// finite, latitude in [-90, 90] and longitude in [-180, 180]. It returns nil or a *spec.FieldError
// naming field+".lat" or field+".lon" and the value, e.g.
// `markers[2].lat = 91: latitude must be finite and within [-90, 90]`. Latitude is checked first.
func ValidateLatLon(field string, p orb.Point) error { return spec.CheckLatLon(field, p[1], p[0]) }
