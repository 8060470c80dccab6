package gate_test

import (
	"fmt"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/gate"
	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// threeBands is a rule set whose top band (≥ 80 km/h) shows zoom topZoom.
func threeBands(topZoom float64) *rules.Set {
	return &rules.Set{
		Bands: []rules.Band{
			{BelowKmh: rules.Edge(40), Zoom: 17.5, PitchDeg: 45},
			{BelowKmh: rules.Edge(80), Zoom: 16.5, PitchDeg: 50},
			{Zoom: topZoom, PitchDeg: 55},
		},
		HysteresisKmh: 5, MaxZoomRatePerS: 0.5, MaxPitchRateDegPerS: 10,
		Turn:    rules.Turn{WithinM: 150, MinAngleDeg: 30, Zoom: 17},
		MinZoom: 10, MaxZoom: 19, MaxTurnRateDegPerS: 45,
	}
}

// A fast drive: 30 m/s (108 km/h) north for 5 km, with markers on the road
// every 150 m from 100 m to 4.6 km ahead.
func fastDrive(t *testing.T) (gate.Trip, []timeline.Marker) {
	r, err := routes.New([]orb.Point{{-31.17, 44.90}, {-31.17, 44.95}}, []float64{30})
	if err != nil {
		t.Fatal(err)
	}
	var ms []timeline.Marker
	for i, d := 0, 100.0; d < 4600; i, d = i+1, d+150 {
		ms = append(ms, timeline.Marker{ID: fmt.Sprintf("m%02d", i), Point: r.PointAt(d)})
	}
	return gate.Trip{Name: "fast", Route: r}, ms
}

func phone() viewport.Device {
	d := viewport.NewDevice(390, 844, 45)
	d.AnchorY = 0.75
	return d
}

// A rule set against itself changes nothing.
func TestDiffAgainstItself(t *testing.T) {
	dr, ms := fastDrive(t)
	rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(15), gate.Setup{Device: phone(), Markers: ms})
	if err != nil {
		t.Fatal(err)
	}
	m := rep.Total.Measures
	if m.Moved != 0 || m.GainedShownS != 0 || m.LostShownS != 0 || m.AreaSBase != m.AreaSNew || m.BandChangesBase != m.BandChangesNew {
		t.Fatalf("self-diff: %+v", m)
	}
	for i := range 4 {
		for j := range 4 {
			if i != j && rep.Total.Moves[i][j] != 0 {
				t.Fatalf("self-diff moves %v", rep.Total.Moves)
			}
		}
	}
}

// Raising the top band's zoom on a fast drive narrows the view: far markers
// come into view later, so markers move toward later buckets (mid to late
// or never), none earlier, and shown time is lost. The cap is lifted so that
// only visibility decides (with 4 slots, a narrower view can show a marker
// sooner by freeing a slot).
func TestDiffRaisingTopZoom(t *testing.T) {
	dr, ms := fastDrive(t)
	opt := gate.Setup{Device: phone(), Markers: ms, Configure: func(d *timeline.Drive) { d.Cap = len(ms) }}
	rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(17), opt)
	if err != nil {
		t.Fatal(err)
	}
	mv := rep.Total.Moves
	for i := range 4 {
		for j := range i {
			if mv[i][j] != 0 {
				t.Errorf("%d markers moved from %v to the earlier %v", mv[i][j], gate.Buckets[i], gate.Buckets[j])
			}
		}
	}
	m := rep.Total.Measures
	if m.Moved == 0 || mv[1][2]+mv[1][3]+mv[0][1]+mv[0][2]+mv[0][3]+mv[2][3] == 0 {
		t.Fatalf("nothing moved later: moves %v", mv)
	}
	if !(m.LostShownS > 0) || !(m.AreaSNew < m.AreaSBase) {
		t.Fatalf("measures %+v: want shown time lost and a smaller area", m)
	}
	// 108 km/h is in the top band from the first sample, on a straight
	// road with no turn: the zoom is the band's all the way.
	if m.ZoomMinNew != 17 || m.ZoomMaxNew != 17 || m.ZoomMinBase != 15 || m.ZoomMaxBase != 15 {
		t.Errorf("zoom ranges %v–%v → %v–%v, want 15–15 → 17–17", m.ZoomMinBase, m.ZoomMaxBase, m.ZoomMinNew, m.ZoomMaxNew)
	}
	t.Logf("moves %v, lost %.1f s (%.1f %%)", mv, m.LostShownS, m.LostShownPct)

	// The gate: conditions on the total.
	c1, _ := gate.ParseCondition("lost_shown_pct > 5")
	c2, _ := gate.ParseCondition("never_added >= 1000")
	res := rep.Check([]gate.Condition{c1, c2})
	if res[0].Holds != (m.LostShownPct > 5) || res[1].Holds {
		t.Fatalf("gates %+v for lost %.2f %%", res, m.LostShownPct)
	}
}

func TestParseCondition(t *testing.T) {
	for _, bad := range []string{"lost_shown", "lost_shownpct > 5", "never_added > many", "> 5"} {
		if _, err := gate.ParseCondition(bad); err == nil {
			t.Errorf("ParseCondition(%q) accepted", bad)
		}
	}
	c, err := gate.ParseCondition(" never_added>=2 ")
	if err != nil || c.Measure != "never_added" || c.Op != ">=" || c.Value != 2 {
		t.Fatalf("%+v, %v", c, err)
	}
}
