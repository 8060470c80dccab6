package gate

import (
	"fmt"
	"math"
	"reflect"
	"slices"
	"strconv"
	"strings"
)

// Condition is a gate condition: a measure, a comparison and a number, as
// in `lost_shown_pct > 5` or `never_added > 0`. It holds (the gate fails)
// when the total measure compares true, exactly as written: at equality
// `>=`, `<=` and `==` hold and `>`, `<` and `!=` do not.
type Condition struct {
	Measure string
	Op      string
	Value   float64
}

func (c Condition) String() string {
	return c.Measure + " " + c.Op + " " + strconv.FormatFloat(c.Value, 'g', -1, 64)
}

// compareOps are the comparisons, the two-character ones first so that
// `>=` is not read as `>` followed by `=1`.
var compareOps = []string{">=", "<=", "==", "!=", ">", "<"}

// measureFields maps each measure's name (its JSON name) to its field
// index in Measures.
var measureFields = func() map[string]int {
	t := reflect.TypeFor[Measures]()
	m := make(map[string]int, t.NumField())
	for i := range t.NumField() {
		name, _, _ := strings.Cut(t.Field(i).Tag.Get("json"), ",")
		m[name] = i
	}
	return m
}()

// MeasureNames lists the measures a condition may name, sorted.
func MeasureNames() []string {
	names := make([]string, 0, len(measureFields))
	for k := range measureFields {
		names = append(names, k)
	}
	slices.Sort(names)
	return names
}

// ParseCondition reads `MEASURE OP NUMBER`. NUMBER must be finite: a
// comparison with NaN is never true, and one with ±Inf is always or never
// true, so such a gate could not fail, or could not pass, whatever the
// rules did.
func ParseCondition(s string) (Condition, error) { return ParseConditionAmong(s, MeasureNames()) }

// ParseConditionAmong is ParseCondition for measures of another report:
// MEASURE must be one of names.
func ParseConditionAmong(s string, names []string) (Condition, error) {
	for _, op := range compareOps {
		i := strings.Index(s, op)
		if i < 0 {
			continue
		}
		name := strings.TrimSpace(s[:i])
		num := strings.TrimSpace(s[i+len(op):])
		if !slices.Contains(names, name) {
			return Condition{}, fmt.Errorf("%q: unknown measure %q (known: %s)", s, name, strings.Join(names, ", "))
		}
		v, err := strconv.ParseFloat(num, 64)
		if err != nil && !math.IsInf(v, 0) {
			return Condition{}, fmt.Errorf("%q: %q is not a number", s, num)
		}
		switch {
		case math.IsNaN(v):
			return Condition{}, fmt.Errorf("%q: the threshold %s is not a number: no comparison with NaN is true, so this gate could never fail; give a finite number", s, num)
		case math.IsInf(v, 0):
			return Condition{}, fmt.Errorf("%q: the threshold %s is not finite: a comparison with it comes out the same whatever the rules do; give a finite number", s, num)
		}
		return Condition{Measure: name, Op: op, Value: v}, nil
	}
	return Condition{}, fmt.Errorf("%q: want MEASURE OP NUMBER with OP one of > >= < <= == !=", s)
}

// value returns a measure by its name, and whether there is one.
func (m *Measures) value(name string) (float64, bool) {
	i, ok := measureFields[name]
	if !ok {
		return 0, false
	}
	f := reflect.ValueOf(m).Elem().Field(i)
	if f.CanInt() {
		return float64(f.Int()), true
	}
	return f.Float(), true
}

// Holds reports whether the condition holds on m, and the measure's value.
// A condition that cannot be decided — an unknown measure or comparison, a
// NaN on either side (ParseCondition makes none of these) — holds, so that
// a gate never passes because it could not compare.
func (c Condition) Holds(m *Measures) (bool, float64) {
	v, ok := m.value(c.Measure)
	if !ok {
		return true, v
	}
	return c.Compare(v), v
}

// Compare reports whether the condition holds for the measure's value v;
// a NaN on either side, or an unknown comparison, holds.
func (c Condition) Compare(v float64) bool {
	if math.IsNaN(v) || math.IsNaN(c.Value) {
		return true
	}
	switch c.Op {
	case ">":
		return v > c.Value
	case ">=":
		return v >= c.Value
	case "<":
		return v < c.Value
	case "<=":
		return v <= c.Value
	case "==":
		return v == c.Value
	case "!=":
		return v != c.Value
	}
	return true
}
