package timeline_test

import (
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/timeline"
)

// Fixes 0.001° apart along the equator, where the WGS84 geodesic of Δλ is
// a·Δλ (a = 6,378,137 m): 111.32 m per fix. A repeated position is a stop,
// the time before the first fix is a stop, and each move's speed is its
// length over its time.
func TestReplayFixes(t *testing.T) {
	fixes := []timeline.Fix{
		{TS: 2, Point: orb.Point{0, 0}},
		{TS: 4, Point: orb.Point{0.001, 0}},
		{TS: 9, Point: orb.Point{0.001, 0}}, // stands 5 s
		{TS: 10, Point: orb.Point{0.001, 0}},
		{TS: 14, Point: orb.Point{0.002, 0}},
	}
	r, stops, err := timeline.Replay(fixes, "trace")
	if err != nil {
		t.Fatal(err)
	}
	wantStops := []timeline.Stop{{AtS: 0, ForS: 2}, {AtS: 4, ForS: 6}}
	if len(stops) != len(wantStops) || stops[0] != wantStops[0] || stops[1] != wantStops[1] {
		t.Errorf("stops = %v, want %v", stops, wantStops)
	}
	stepM := 6378137 * 0.001 * math.Pi / 180
	if r.NumSegments() != 2 {
		t.Fatalf("%d segments, want 2", r.NumSegments())
	}
	for i, want := range []float64{stepM / 2, stepM / 4} {
		if got := r.Segment(i).SpeedMps; math.Abs(got-want) > 1e-9 {
			t.Errorf("segment %d speed = %g m/s, want %g", i, got, want)
		}
	}
	for _, c := range []struct {
		fixes []timeline.Fix
		want  string
	}{
		{fixes[:1], "trace: want at least 2 fixes"},
		{[]timeline.Fix{{TS: -1, Point: orb.Point{0, 0}}, {TS: 1, Point: orb.Point{1, 0}}}, "trace[0].t_s = -1"},
		{[]timeline.Fix{{TS: 3, Point: orb.Point{0, 0}}, {TS: 2, Point: orb.Point{1, 0}}}, "trace[1].t_s = 2: fix times must not decrease"},
		{[]timeline.Fix{{TS: 3, Point: orb.Point{0, 0}}, {TS: 3, Point: orb.Point{0.001, 0}}}, "trace[1].t_s = 3: the position moves 111.3"},
		{[]timeline.Fix{{TS: 0, Point: orb.Point{0, 0}}, {TS: 3, Point: orb.Point{0, 0}}}, "never move"},
		{[]timeline.Fix{{TS: 0, Point: orb.Point{0, 0}}, {TS: 3, Point: orb.Point{0, 91}}}, "trace[1].lat = 91"},
	} {
		if _, _, err := timeline.Replay(c.fixes, "trace"); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Replay(%v) = %v, want an error containing %q", c.fixes, err, c.want)
		}
	}
}
