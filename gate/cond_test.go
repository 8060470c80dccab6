package gate_test

import (
	"encoding/json"
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/gate"
	"github.com/viewspec/viewspec/timeline"
)

// Every comparison at equality, just below and just above, as written:
// an integer measure (never_added = 1 against 1, 2 and 0) and a
// percentage (lost_shown_pct = 5 against 5 and its float64 neighbours).
func TestConditionAtEquality(t *testing.T) {
	m := &gate.Measures{NeverAdded: 1, LostShownS: 10, ShownSBase: 200, LostShownPct: 5}
	below, above := math.Nextafter(5, 6), math.Nextafter(5, 4) // thresholds that put 5 just below and just above
	type side struct {
		desc      string
		threshold float64
	}
	sides := map[string][3]side{
		"never_added":    {{"1 just below 2", 2}, {"1 at 1", 1}, {"1 just above 0", 0}},
		"lost_shown_pct": {{"5 just below the next float64", below}, {"5 at 5", 5}, {"5 just above the float64 before", above}},
	}
	// want[op] holds for (below, at, above).
	want := map[string][3]bool{
		">":  {false, false, true},
		">=": {false, true, true},
		"<":  {true, false, false},
		"<=": {true, true, false},
		"==": {false, true, false},
		"!=": {true, false, true},
	}
	for measure, ss := range sides {
		for op, w := range want {
			for i, s := range ss {
				expr := measure + " " + op + " " + strconv.FormatFloat(s.threshold, 'g', -1, 64)
				c, err := gate.ParseCondition(expr)
				if err != nil {
					t.Fatalf("ParseCondition(%q) = %v", expr, err)
				}
				if c.Op != op || c.Value != s.threshold {
					t.Fatalf("ParseCondition(%q) = %+v, want op %s and %v", expr, c, op, s.threshold)
				}
				if got, v := c.Holds(m); got != w[i] {
					t.Errorf("%q on %s (value %v): holds %v, want %v", expr, s.desc, v, got, w[i])
				}
			}
		}
	}
}

// never_added >= 1 fails the gate when exactly one marker is lost to
// never, and never_added > 1 does not: a drive of 20 s on which one marker,
// shown under zoom 15 near the end, is never in view under zoom 17.
func TestNeverAddedExactlyOne(t *testing.T) {
	dr, ms := fastDrive(t)
	opt := gate.Setup{Device: phone(), Markers: ms, Configure: func(d *timeline.Drive) {
		d.Cap, d.HorizonS, d.BucketEdgesS = len(ms), 20, [2]float64{5, 15}
	}}
	rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(17), opt)
	if err != nil {
		t.Fatal(err)
	}
	var lost []timeline.Marker
	for _, mv := range rep.MovedMarkers {
		if mv.To == "never" {
			for _, m := range ms {
				if m.ID == mv.ID {
					lost = append(lost, m)
				}
			}
		}
	}
	if len(lost) == 0 || rep.Total.NeverAdded != len(lost) {
		t.Fatalf("no marker lost to never on the 20 s drive (never_added %d, moves %v)", rep.Total.NeverAdded, rep.Total.Moves)
	}
	opt.Markers = lost[:1]
	rep, err = gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(17), opt)
	if err != nil {
		t.Fatal(err)
	}
	if rep.Total.NeverAdded != 1 {
		t.Fatalf("marker %s alone: never_added = %d, want 1", lost[0].ID, rep.Total.NeverAdded)
	}
	for expr, want := range map[string]bool{"never_added >= 1": true, "never_added == 1": true, "never_added <= 1": true,
		"never_added > 1": false, "never_added != 1": false, "never_added < 1": false, "never_added > 0": true} {
		c, err := gate.ParseCondition(expr)
		if err != nil {
			t.Fatal(err)
		}
		if got := rep.Check([]gate.Condition{c})[0]; got.Holds != want || got.Value != 1 {
			t.Errorf("%s with one marker lost: %+v, want holds %v on the value 1", expr, got, want)
		}
	}
}

// A threshold that is not a finite number is refused: NaN would never
// compare true, so `x > NaN` would never fail a gate.
func TestParseConditionNotFinite(t *testing.T) {
	for _, c := range []struct{ expr, want string }{
		{"lost_shown_pct > NaN", `"lost_shown_pct > NaN": the threshold NaN is not a number: no comparison with NaN is true, so this gate could never fail`},
		{"never_added >= nan", "the threshold nan is not a number"},
		{"lost_shown_pct < +Inf", "the threshold +Inf is not finite"},
		{"area_change_pct > -inf", "the threshold -inf is not finite"},
		{"area_change_pct != Infinity", "the threshold Infinity is not finite"},
		{"lost_shown_s > 1e400", "the threshold 1e400 is not finite"},
		{"lost_shown_s > 5 s", `"5 s" is not a number`},
	} {
		_, err := gate.ParseCondition(c.expr)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ParseCondition(%q) = %v, want an error containing %q", c.expr, err, c.want)
		}
	}
}

// A condition that cannot be decided holds, so that a gate never passes
// by failing to compare: an unknown measure or comparison, a NaN threshold
// made without ParseCondition.
func TestConditionUndecidedHolds(t *testing.T) {
	m := &gate.Measures{NeverAdded: 3}
	for _, c := range []gate.Condition{
		{Measure: "no_such_measure", Op: ">", Value: 0},
		{Measure: "never_added", Op: "=>", Value: 100},
		{Measure: "never_added", Op: ">", Value: math.NaN()},
	} {
		if holds, _ := c.Holds(m); !holds {
			t.Errorf("%+v.Holds = false, want true (undecidable conditions fail the gate)", c)
		}
	}
}

// The measures a condition may name are the JSON names of Measures, and
// each reads its own field.
func TestMeasureNames(t *testing.T) {
	b, err := json.Marshal(gate.Measures{})
	if err != nil {
		t.Fatal(err)
	}
	var fields map[string]any
	if err := json.Unmarshal(b, &fields); err != nil {
		t.Fatal(err)
	}
	var want []string
	for k := range fields {
		want = append(want, k)
	}
	slices.Sort(want)
	if got := gate.MeasureNames(); !slices.Equal(got, want) {
		t.Fatalf("MeasureNames() = %v, want %v", got, want)
	}
	// Set every field to a distinct value through JSON and read it back by name.
	vals := map[string]float64{}
	for i, k := range want {
		vals[k] = float64(i + 1)
	}
	b, _ = json.Marshal(vals)
	var m gate.Measures
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for k, v := range vals {
		c, err := gate.ParseCondition(k + " == " + strconv.FormatFloat(v, 'g', -1, 64))
		if err != nil {
			t.Fatal(err)
		}
		if holds, got := c.Holds(&m); !holds || got != v {
			t.Errorf("%s: read %v, want %v", k, got, v)
		}
	}
}

// area_change_pct is positive when the new rules show more ground: a
// lower top-band zoom on a fast drive widens the view (zoom 17 → 15: each
// zoom level less doubles the width, so the area grows), and the raise
// back narrows it.
func TestAreaChangeSign(t *testing.T) {
	dr, ms := fastDrive(t)
	widen, err := gate.CompareRules([]gate.Trip{dr}, threeBands(17), threeBands(15), gate.Setup{Device: phone(), Markers: ms})
	if err != nil {
		t.Fatal(err)
	}
	narrow, err := gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(17), gate.Setup{Device: phone(), Markers: ms})
	if err != nil {
		t.Fatal(err)
	}
	w, n := widen.Total.Measures, narrow.Total.Measures
	if !(w.AreaSNew > w.AreaSBase) || !(w.AreaChangePct > 0) {
		t.Errorf("zoom 17 → 15: area-seconds %v → %v, area_change_pct %v, want a larger area and a positive change", w.AreaSBase, w.AreaSNew, w.AreaChangePct)
	}
	if !(n.AreaChangePct < 0) {
		t.Errorf("zoom 15 → 17: area_change_pct %v, want negative", n.AreaChangePct)
	}
	// The change is (new − base)/base: hand-computed from the two sums.
	if want := 100 * (w.AreaSNew - w.AreaSBase) / w.AreaSBase; w.AreaChangePct != want {
		t.Errorf("area_change_pct = %v, want 100·(new − base)/base = %v", w.AreaChangePct, want)
	}
	c, _ := gate.ParseCondition("area_change_pct > 0")
	if !widen.Check([]gate.Condition{c})[0].Holds || narrow.Check([]gate.Condition{c})[0].Holds {
		t.Errorf("area_change_pct > 0: want it to hold when the view widens and not when it narrows")
	}
}

// Each measure is read on its own: a measure that is not finite (an
// area-seconds of +Inf, say) does not hide the others. (Measures used to
// be read through JSON, which refuses ±Inf and NaN, so every measure then
// read 0 and `never_added >= 1` passed with one marker lost.)
func TestMeasuresReadAlone(t *testing.T) {
	m := &gate.Measures{NeverAdded: 1, AreaSNew: math.Inf(1), AreaChangePct: math.NaN()}
	c, err := gate.ParseCondition("never_added >= 1")
	if err != nil {
		t.Fatal(err)
	}
	if holds, v := c.Holds(m); !holds || v != 1 {
		t.Errorf("never_added >= 1 beside an infinite area: holds %v on %v, want true on 1", holds, v)
	}
	// A NaN measure cannot be compared: the condition on it holds.
	c, _ = gate.ParseCondition("area_change_pct > 5")
	if holds, _ := c.Holds(m); !holds {
		t.Errorf("area_change_pct > 5 on NaN: holds false, want true (undecidable conditions fail the gate)")
	}
}
