package viewport

import (
	"math"

	"github.com/viewspec/viewspec/spec"
)

// FormatNumber prints v as error messages and the wire show numbers (see
// spec.FormatNumber).
func FormatNumber(v float64) string { return spec.FormatNumber(v) }

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
