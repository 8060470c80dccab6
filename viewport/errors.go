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
	return fmt.Sprintf("%s = %s: %s", e.Field, FormatNumber(e.Value), e.Reason)
}

// FormatNumber prints v as error messages and the wire show numbers: the
// fewest digits that read back to the same double, and NaN, +Inf, -Inf by
// name.
func FormatNumber(v float64) string {
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
