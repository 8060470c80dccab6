package viewport

import (
	"fmt"
	"math"
	"strconv"
)

// FieldError is an invalid input value: the field's path (for example
// "device.width_px"), the offending value and what it should have been.
type FieldError struct {
	Field  string
	Value  float64
	Reason string
}

func (e *FieldError) Error() string {
	return fmt.Sprintf("%s = %s: %s", e.Field, formatValue(e.Value), e.Reason)
}

// formatValue prints v with as many digits as it needs to round-trip, and
// names NaN and the infinities the way a reader of JSON would expect.
func formatValue(v float64) string {
	switch {
	case math.IsNaN(v):
		return "NaN"
	case math.IsInf(v, 1):
		return "+Inf"
	case math.IsInf(v, -1):
		return "-Inf"
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
