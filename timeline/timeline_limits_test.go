package timeline_test

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// speedBands is a rule set whose zoom tells the speed the rules were fed:
// zoom 18 below 10 km/h (stopped), 15 above, with no hysteresis and a zoom
// rate that never binds, so the zoom at a tick is its band's.
func speedBands() *rules.Set {
	rs := oneBand(15, 0)
	rs.Bands = []rules.Band{{BelowKmh: rules.Edge(10), Zoom: 18}, {Zoom: 15}}
	rs.MaxZoomRatePerS = 1000
	return rs
}

// The user stands still (speed 0) from the route's end on and during a
// stop, for t ∈ [at_s, at_s + for_s) (SPEC §5). Hand-computed: 20 m/s along
// a 2 km road north (about 100 s), a stop at 10 s for 5 s: ticks 10 s to
// 14.75 s are stopped, 9.75 s and 15 s move, and so does every tick up to
// the end at about 105 s; from the end the zoom is the stopped band's.
func TestTimelineStoppedAtEndAndStops(t *testing.T) {
	r, err := routes.New([]orb.Point{{0, 0}, {0, 0.018}}, []float64{20})
	if err != nil {
		t.Fatal(err)
	}
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), speedBands())
	d.Stops = []timeline.Stop{{AtS: 10, ForS: 5}}
	var zoom []float64
	d.OnTick = func(_ int, v *viewport.View, _ []int) { zoom = append(zoom, v.Camera().Zoom) }
	if _, err := timeline.Compute(&d, nil); err != nil {
		t.Fatal(err)
	}
	endS := 5 + r.LengthM()/20 // the stop's 5 s, then the road at 20 m/s
	for k, z := range zoom {
		ts := float64(k) * d.TickS
		stopped := (ts >= 10 && ts < 15) || ts >= endS
		want := 15.0
		if stopped {
			want = 18
		}
		if z != want {
			t.Errorf("zoom at t = %v s = %v, want %v (stopped %v; the road ends at %.3f s)", ts, z, want, stopped, endS)
		}
	}
}

// The turn margin (SPEC §3): on an out-and-back along a meridian the legs'
// bearings are 0° and 180° exactly (Δx = 0), so the first limited tick of
// the U-turn has |d| = 180° and a margin of |180° − (180° − 1e-6°)| =
// 1e-6°; later ticks are a step (45°/s × 0.25 s) nearer the target and
// farther from the band. Every marker reports the smallest, 1e-6°: one never
// shown, and one first shown during the turn.
func TestTimelineTurnMarginAtUTurn(t *testing.T) {
	r, err := routes.New([]orb.Point{{0, 0}, {0, 0.005}, {0, 0}}, []float64{20})
	if err != nil {
		t.Fatal(err)
	}
	rs := oneBand(16, 0)
	rs.MaxTurnRateDegPerS = 45
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), rs)
	// A marker 700 m east of the turning point: beyond the half width
	// (200 px × 2.39 m) while the map heads north, in the half length
	// (400 px) once it has turned through east.
	ms := []timeline.Marker{{ID: "never", Point: orb.Point{10, 10}}, {ID: "east", Point: orb.Point{700 / 111320.0, 0.005}}}
	got, err := timeline.Compute(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	const want, tol = 1e-6, 1e-12 // degrees; 180 − 1e-6 rounds by ~3e-14
	for i, o := range got {
		if math.Abs(o.TurnMarginDeg-want) > tol {
			t.Errorf("%s: turn_margin_deg = %v, want %v (off by %.3g°, tolerance %g°)", ms[i].ID, o.TurnMarginDeg, want, o.TurnMarginDeg-want, tol)
		}
	}
	if !got[1].Shown || got[1].FirstShownS < 20 {
		t.Errorf("marker east of the turning point: %+v, want shown during the U-turn", got[1])
	}
}

// The limits are inclusive, as SPEC §5 and §6 write them: 1e7 ticks, 1e8
// marker-ticks, 1e6 traced marker-ticks. One past each is refused naming
// the field. At each limit the drive is accepted, which shows as the next
// check's error: a marker priority that is not finite.
func TestTimelineLimitsInclusive(t *testing.T) {
	r, err := routes.New([]orb.Point{{0, 0}, {0, 0.01}}, []float64{20})
	if err != nil {
		t.Fatal(err)
	}
	drive := func(ticks int) timeline.Drive {
		d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), oneBand(16, 0))
		d.HorizonS = float64(ticks) * d.TickS
		return d
	}
	markers := func(n int) []timeline.Marker {
		ms := make([]timeline.Marker, n)
		for i := range ms {
			ms[i] = timeline.Marker{ID: fmt.Sprint(i), Point: orb.Point{1, 1}}
		}
		ms[n-1].Priority = math.NaN()
		return ms
	}
	field := func(err error) string {
		var fe *spec.FieldError
		if errors.As(err, &fe) {
			return fe.Field
		}
		return fmt.Sprint(err)
	}
	d := drive(1e7)
	if err := d.Validate(); err != nil {
		t.Errorf("Validate(1e7 ticks) = %v, want nil", err)
	}
	// The tick divides the horizon within 1e-9 inclusive: 1e-9 s / 1 s is
	// 1e-9 from 0 ticks (hand-computed; the quotient and its distance from
	// 0 are exact).
	d = drive(1)
	d.HorizonS, d.TickS, d.BucketEdgesS = 1e-9, 1, [2]float64{0, 1e-9}
	if err := d.Validate(); err != nil {
		t.Errorf("Validate(horizon 1e-9 s, tick 1 s) = %v, want nil", err)
	}
	d = drive(1e7 + 1)
	if err := d.Validate(); field(err) != "tick_s" {
		t.Errorf("Validate(1e7 + 1 ticks) = %v, want an error naming tick_s", err)
	}
	for _, c := range []struct {
		desc           string
		ticks, markers int
		traced         bool
		want           string // the field the error names
	}{
		{"1e8 marker-ticks", 1e4 - 1, 1e4, false, "markers[9999].priority"},
		{"1e8 + 1e4 marker-ticks", 1e4, 1e4, false, "markers"},
		{"1e6 traced marker-ticks", 999, 1000, true, "markers[999].priority"},
		{"1e6 + 1000 traced marker-ticks", 1000, 1000, true, "trace"},
	} {
		d := drive(c.ticks)
		ms := markers(c.markers)
		var err error
		if c.traced {
			_, _, err = timeline.ComputeTraced(&d, ms)
		} else {
			_, err = timeline.Compute(&d, ms)
		}
		if field(err) != c.want {
			t.Errorf("%s: %v, want an error naming %s", c.desc, err, c.want)
		}
	}
}

// A drive with invalid rules is refused naming the rules' field.
func TestTimelineInvalidRules(t *testing.T) {
	r, err := routes.New([]orb.Point{{0, 0}, {0, 0.01}}, []float64{20})
	if err != nil {
		t.Fatal(err)
	}
	rs := oneBand(16, 0)
	rs.MaxTurnRateDegPerS = 0
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), rs)
	if err := d.Validate(); err == nil || !strings.Contains(err.Error(), "max_turn_rate_deg_per_s") {
		t.Errorf("Validate(max_turn_rate_deg_per_s 0) = %v, want an error naming it", err)
	}
}

// Replay's edges: two fixes that move are a route with no stop; a move in
// no time names the 0 s; fix times up to 1e9 s are taken (the first fix's
// and a later one's); fixes at 1e9 s that never move are refused for that,
// not for their time.
func TestReplayEdges(t *testing.T) {
	a, b := orb.Point{0, 0}, orb.Point{0, 0.01}
	r, stops, err := timeline.Replay([]timeline.Fix{{TS: 0, Point: a}, {TS: 10, Point: b}}, "fixes")
	if err != nil || len(stops) != 0 || r.NumSegments() != 1 {
		t.Errorf("Replay(two moving fixes) = %v, stops %v, %v; want one segment and no stop", r, stops, err)
	}
	_, _, err = timeline.Replay([]timeline.Fix{{TS: 0, Point: a}, {TS: 5, Point: a}, {TS: 5, Point: b}}, "fixes")
	if err == nil || !strings.Contains(err.Error(), " m in 0 s") {
		t.Errorf("Replay(a move in 0 s) = %v, want it to say the move took 0 s", err)
	}
	if _, _, err := timeline.Replay([]timeline.Fix{{TS: 0, Point: a}, {TS: 1e9, Point: b}}, "fixes"); err != nil {
		t.Errorf("Replay(a fix at 1e9 s) = %v, want nil", err)
	}
	_, _, err = timeline.Replay([]timeline.Fix{{TS: 1e9, Point: a}, {TS: 1e9, Point: a}}, "fixes")
	if err == nil || !strings.Contains(err.Error(), "never move") {
		t.Errorf("Replay(fixes at 1e9 s standing still) = %v, want the fixes never move", err)
	}
}
