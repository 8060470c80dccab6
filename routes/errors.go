package routes

import (
	"math"
	"strconv"

	"github.com/paulmach/orb"
)

// InputError reports an input that New or ValidateLatLon refuses: the field that holds it, the value
// as written, and why it is refused. Its message reads `field = value: reason`, for example
// `points[3].lat = 91: out of range [-90, 90]`.
type InputError struct {
	Field  string // path of the offending field, e.g. "points[3].lat", "speed_mps[2]", "points"
	Value  string // the offending value, e.g. "91", "NaN", "+Inf", "3 entries"
	Reason string // why it is refused, e.g. "out of range [-90, 90]"
}

func (e *InputError) Error() string {
	if e.Value == "" {
		return e.Field + ": " + e.Reason
	}
	return e.Field + " = " + e.Value + ": " + e.Reason
}

// formatValue writes v with the fewest digits that round-trip ("NaN", "+Inf" and "-Inf" for the
// non-finite values).
func formatValue(v float64) string {
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// ValidateLatLon checks that p ([lon, lat] degrees) is a usable WGS84 position: both coordinates
// finite, latitude in [-90, 90] and longitude in [-180, 180]. It returns nil or an *InputError
// naming field+".lat" or field+".lon" and the value, e.g. `markers[2].lat = 91: out of range [-90, 90]`.
// Latitude is checked before longitude.
func ValidateLatLon(field string, p orb.Point) error {
	if err := checkCoord(field+".lat", p[1], 90); err != nil {
		return err
	}
	return checkCoord(field+".lon", p[0], 180)
}

func checkCoord(field string, v, limit float64) error {
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return &InputError{Field: field, Value: formatValue(v), Reason: "not a finite number"}
	case v < -limit || v > limit:
		return &InputError{Field: field, Value: formatValue(v),
			Reason: "out of range [-" + formatValue(limit) + ", " + formatValue(limit) + "]"}
	}
	return nil
}
