package gate_test

import (
	"fmt"
	"math"
	"slices"
	"strings"
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

// Every measure is its definition (SPEC §8) over the drive's markers,
// recounted here from the two outcomes: the moves matrix, moved, into and
// out of never, out of and into early, the shown seconds and their gains
// and losses. Both directions of a zoom change (15 ↔ 17) are compared on a
// 20 s horizon, so that each count is non-zero in one of them.
func TestMeasuresRecounted(t *testing.T) {
	seen := map[string]int{}
	dr, ms := fastDrive(t)
	opt := gate.Setup{Device: phone(), Markers: ms, Configure: func(d *timeline.Drive) {
		d.Cap, d.HorizonS, d.BucketEdgesS = len(ms), 20, [2]float64{5, 15}
	}}
	for _, zz := range [][2]float64{{15, 17}, {17, 15}} {
		rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(zz[0]), threeBands(zz[1]), opt)
		if err != nil {
			t.Fatal(err)
		}
		dd := rep.Drives[0]
		var want gate.Measures
		var moves [4][4]int
		idx := func(b timeline.Bucket) int { return slices.Index(gate.Buckets, b) }
		for i, b := range dd.Base.Markers {
			n := dd.New.Markers[i]
			moves[idx(b.Bucket)][idx(n.Bucket)]++
			want.ShownSBase += b.ShownS
			want.ShownSNew += n.ShownS
			want.GainedShownS += max(0, n.ShownS-b.ShownS)
			want.LostShownS += max(0, b.ShownS-n.ShownS)
			if b.Bucket != n.Bucket {
				want.Moved++
			}
			if b.Bucket != timeline.Never && n.Bucket == timeline.Never {
				want.NeverAdded++
			}
			if b.Bucket == timeline.Never && n.Bucket != timeline.Never {
				want.NeverRemoved++
			}
			if b.Bucket == timeline.Early && n.Bucket != timeline.Early {
				want.EarlyLost++
			}
			if b.Bucket != timeline.Early && n.Bucket == timeline.Early {
				want.EarlyAdded++
			}
		}
		m := rep.Total.Measures
		if rep.Total.Moves != moves || dd.Moves != moves {
			t.Errorf("zoom %v → %v: moves %v (drive %v), want %v", zz[0], zz[1], rep.Total.Moves, dd.Moves, moves)
		}
		for _, c := range []struct {
			name      string
			got, want float64
		}{
			{"moved", float64(m.Moved), float64(want.Moved)},
			{"never_added", float64(m.NeverAdded), float64(want.NeverAdded)},
			{"never_removed", float64(m.NeverRemoved), float64(want.NeverRemoved)},
			{"early_lost", float64(m.EarlyLost), float64(want.EarlyLost)},
			{"early_added", float64(m.EarlyAdded), float64(want.EarlyAdded)},
			{"shown_s_base", m.ShownSBase, want.ShownSBase},
			{"shown_s_new", m.ShownSNew, want.ShownSNew},
			{"gained_shown_s", m.GainedShownS, want.GainedShownS},
			{"lost_shown_s", m.LostShownS, want.LostShownS},
		} {
			if c.got != c.want {
				t.Errorf("zoom %v → %v: %s = %v, want %v (off by %g, tolerance 0)", zz[0], zz[1], c.name, c.got, c.want, c.got-c.want)
			}
			seen[c.name] += int(c.want)
		}
	}
	for _, name := range []string{"never_added", "never_removed", "early_lost", "early_added"} {
		if seen[name] == 0 {
			t.Errorf("%s is 0 both ways: the drive does not exercise it", name)
		}
	}
}

// The trace and the area-seconds of a drive: a tick every tick_s from 0
// (SPEC §5: tick k at k·tick_s), and area_s the footprint's area summed
// over ticks × tick_s (SPEC §8). On the fast drive north the camera keeps
// zoom 15 and pitch 55° (the top band from the first sample, no turn), so
// the area changes only with cos² of the latitude: 44.90° → 44.93° over
// the 3.6 km driven moves it by 2·tan φ·Δφ ≈ 0.11 %. Hand-computed bound:
// area_s within 0.2 % of 481 ticks × 0.25 s × the area at the start.
func TestAreaSecondsAndTrace(t *testing.T) {
	rep, _ := lostShownCase(t, 15, 17)
	b := rep.Drives[0].Base
	if len(b.Trace.TimesS) != 481 {
		t.Fatalf("trace of %d ticks, want 481 (120 s / 0.25 s + 1)", len(b.Trace.TimesS))
	}
	for k, ts := range b.Trace.TimesS {
		if want := float64(k) * 0.25; ts != want {
			t.Fatalf("trace time %d = %v, want %v (off by %g, tolerance 0)", k, ts, want, ts-want)
		}
	}
	dr, _ := fastDrive(t)
	p := dr.Route.PointAt(0)
	v, err := viewport.Prepare(viewport.Camera{LatDeg: p[1], LonDeg: p[0], HeadingDeg: dr.Route.HeadingDegAt(0),
		PitchDeg: 55, Zoom: 15, Device: phone()})
	if err != nil {
		t.Fatal(err)
	}
	want := 481 * 0.25 * v.Footprint().AreaM2
	if d := math.Abs(b.AreaS-want) / want; d > 0.002 {
		t.Errorf("area_s = %.6g m²·s, want %.6g (off by %.3g %%, tolerance 0.2 %%)", b.AreaS, want, 100*d)
	}
	if rep.Total.AreaSBase != b.AreaS {
		t.Errorf("area_s_base = %v, want the drive's %v", rep.Total.AreaSBase, b.AreaS)
	}
}

// band_changes counts the ticks at which the speed band differs from the
// tick before. Hand-computed: 200 m at 5 m/s (18 km/h, band 0) for 40 s,
// 1,500 m at 30 m/s (108 km/h: past 40 + 5 and 80 + 5 km/h, band 2) for
// 50 s, then 5 m/s again (below 80 − 5 and 40 − 5: band 0): two changes in
// the 120 s horizon.
func TestBandChanges(t *testing.T) {
	p0 := orb.Point{-31.17, 44.90}
	r, err := routes.New([]orb.Point{p0, {-31.17, 44.90 + 200/111132.0}, {-31.17, 44.90 + 1700/111132.0}, {-31.17, 44.95}}, []float64{5, 30, 5})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := gate.CompareRules([]gate.Trip{{Name: "slow-fast-slow", Route: r}}, threeBands(15), threeBands(17), gate.Setup{Device: phone()})
	if err != nil {
		t.Fatal(err)
	}
	if m := rep.Total.Measures; m.BandChangesBase != 2 || m.BandChangesNew != 2 {
		t.Errorf("band_changes = %d → %d, want 2 → 2 (18 → 108 → 18 km/h)", m.BandChangesBase, m.BandChangesNew)
	}
}

// When the base rules show nothing, a percentage of the base's shown
// seconds is 100 for a positive part and 0 for none (gate.Measures): a
// marker 400 m beside the road is never in view at zoom 19 and is at zoom
// 15.
func TestPctOfNothingShown(t *testing.T) {
	dr, _ := fastDrive(t)
	p := dr.Route.PointAt(1000)
	ms := []timeline.Marker{{ID: "beside", Point: orb.Point{p[0] + 400/(111320*math.Cos(p[1]*math.Pi/180)), p[1]}}}
	rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(19), threeBands(15), gate.Setup{Device: phone(), Markers: ms})
	if err != nil {
		t.Fatal(err)
	}
	m := rep.Total.Measures
	if m.ShownSBase != 0 || !(m.ShownSNew > 0) {
		t.Fatalf("shown %v → %v s, want nothing under zoom 19 and something under zoom 15", m.ShownSBase, m.ShownSNew)
	}
	if m.GainedShownPct != 100 || m.LostShownPct != 0 || m.NeverRemoved != 1 {
		t.Errorf("gained_shown_pct %v, lost_shown_pct %v, never_removed %d, want 100, 0, 1", m.GainedShownPct, m.LostShownPct, m.NeverRemoved)
	}
}

// A condition reads back as written: its number with every digit it needs
// (the verdict names the condition, so 1.25 must not print as 1).
func TestConditionString(t *testing.T) {
	for _, s := range []string{"lost_shown_pct > 1.25", "area_change_pct <= -12.5", "never_added >= 1", "moved != 0.001"} {
		c, err := gate.ParseCondition(s)
		if err != nil {
			t.Fatal(err)
		}
		if got := c.String(); got != s {
			t.Errorf("ParseCondition(%q).String() = %q, want %q", s, got, s)
		}
	}
	// An operator with nothing before it names the missing measure.
	if _, err := gate.ParseCondition(">= 5"); err == nil || !strings.Contains(err.Error(), `unknown measure ""`) {
		t.Errorf(`ParseCondition(">= 5") = %v, want unknown measure ""`, err)
	}
}

// A tick far longer than the horizon still divides it within 1e-9 (SPEC
// §5: 1 s / 2e9 s rounds to 0 ticks), so the drive has the one tick at
// t = 0, and its trace one entry.
func TestTickLongerThanHorizon(t *testing.T) {
	dr, ms := fastDrive(t)
	opt := gate.Setup{Device: phone(), Markers: ms, Configure: func(d *timeline.Drive) {
		d.HorizonS, d.TickS, d.BucketEdgesS = 1, 2e9, [2]float64{0.25, 0.5}
	}}
	rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(17), opt)
	if err != nil {
		t.Fatal(err)
	}
	if tr := rep.Drives[0].Base.Trace; len(tr.TimesS) != 1 || tr.TimesS[0] != 0 {
		t.Errorf("trace times %v, want [0]", tr.TimesS)
	}
}
