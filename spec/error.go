package spec

import (
	"math"
	"strconv"
)

// Kind says how an input value is wrong, which is what the wire's error
// code reports.
type Kind int8

const (
	// Invalid: the value is there and of the right type, but out of its
	// range (wire code invalid_value).
	Invalid Kind = iota
	// Missing: a required value is absent or null (missing_field).
	Missing
	// BadType: the value has the wrong JSON type (bad_type).
	BadType
)

// FieldError is the one shape of an invalid input value in viewspec: the
// field's path, the value as written ("91", "NaN", "3 entries"; empty when
// there is none, as for a missing field) and the reason. Its message reads
// `field = value: reason`, or `field: reason` without a value.
type FieldError struct {
	Kind   Kind
	Field  string
	Value  string
	Reason string
}

func (e *FieldError) Error() string {
	if e.Value == "" {
		return e.Field + ": " + e.Reason
	}
	return e.Field + " = " + e.Value + ": " + e.Reason
}

// Under returns a copy of e with prefix put before its field path:
// Under("camera.") of "zoom" is "camera.zoom".
func (e *FieldError) Under(prefix string) *FieldError {
	c := *e
	c.Field = prefix + c.Field
	return &c
}

// Out returns the error of value v out of its range for field.
func Out(field string, v float64, reason string) *FieldError {
	return &FieldError{Kind: Invalid, Field: field, Value: FormatNumber(v), Reason: reason}
}

// Absent returns the error of a required field that is missing.
func Absent(field string) *FieldError {
	return &FieldError{Kind: Missing, Field: field, Reason: "missing (required)"}
}

// FormatNumber prints v as messages and the wire show numbers: the fewest
// digits that read back to the same double, and NaN, +Inf, -Inf by name.
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

// Index returns the path of element i of the array at field: "points[3]".
// Paths are built only when an error is reported, never on the way.
func Index(field string, i int) string { return field + "[" + strconv.Itoa(i) + "]" }

// Excerpt returns b as text for a message, cut to its first n bytes with
// an ellipsis when longer, so that a report never quotes a huge input.
func Excerpt(b []byte, n int) string {
	if len(b) > n {
		return string(b[:n]) + "…"
	}
	return string(b)
}
