package gate

import (
	"encoding/json"
	"fmt"
	"slices"
	"strconv"
	"strings"
)

// Condition is a gate condition: a measure, a comparison and a number, as
// in `lost_shown_pct > 5` or `never_added > 0`. It holds (the gate fails)
// when the total measure compares true.
type Condition struct {
	Measure string
	Op      string
	Value   float64
}

func (c Condition) String() string {
	return c.Measure + " " + c.Op + " " + strconv.FormatFloat(c.Value, 'g', -1, 64)
}

var compareOps = []string{">=", "<=", "==", "!=", ">", "<"}

// MeasureNames lists the measures a condition may name.
func MeasureNames() []string {
	var m Measures
	b, _ := json.Marshal(m)
	var fields map[string]any
	json.Unmarshal(b, &fields)
	names := make([]string, 0, len(fields))
	for k := range fields {
		names = append(names, k)
	}
	slices.Sort(names)
	return names
}

// ParseCondition reads `MEASURE OP NUMBER`.
func ParseCondition(s string) (Condition, error) {
	for _, op := range compareOps {
		i := strings.Index(s, op)
		if i < 0 {
			continue
		}
		name := strings.TrimSpace(s[:i])
		num := strings.TrimSpace(s[i+len(op):])
		if !slices.Contains(MeasureNames(), name) {
			return Condition{}, fmt.Errorf("%q: unknown measure %q (known: %s)", s, name, strings.Join(MeasureNames(), ", "))
		}
		v, err := strconv.ParseFloat(num, 64)
		if err != nil {
			return Condition{}, fmt.Errorf("%q: %q is not a number", s, num)
		}
		return Condition{Measure: name, Op: op, Value: v}, nil
	}
	return Condition{}, fmt.Errorf("%q: want MEASURE OP NUMBER with OP one of > >= < <= == !=", s)
}

// value returns a measure by its name.
func (m *Measures) value(name string) float64 {
	b, _ := json.Marshal(m)
	var fields map[string]float64
	json.Unmarshal(b, &fields)
	return fields[name]
}

// Holds reports whether the condition holds on m, and the measure's value.
func (c Condition) Holds(m *Measures) (bool, float64) {
	v := m.value(c.Measure)
	switch c.Op {
	case ">":
		return v > c.Value, v
	case ">=":
		return v >= c.Value, v
	case "<":
		return v < c.Value, v
	case "<=":
		return v <= c.Value, v
	case "==":
		return v == c.Value, v
	}
	return v != c.Value, v
}
