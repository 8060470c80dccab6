package timeline_test

import (
	"math"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// northDrive is a straight drive north along the prime meridian at 20 m/s,
// zoom 16, pitch 0, with a marker on the route 2 km ahead: the footprint
// reaches 955 Mercator metres ahead of the user (TestTimelineStraightDriveWorked),
// so the marker is first shown some 50 s in, at a tick.
func northDrive(t *testing.T) (timeline.Drive, []timeline.Marker) {
	t.Helper()
	r, err := routes.New([]orb.Point{{0, 0}, {0, 0.2}}, []float64{20})
	if err != nil {
		t.Fatal(err)
	}
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), oneBand(16, 0))
	return d, []timeline.Marker{{ID: "m", Point: orb.Point{0, 0.018}}}
}

// A marker first shown exactly on a bucket edge belongs to the bucket the
// edge opens (SPEC §5: early in [0, e1), mid in [e1, e2), late in [e2,
// horizon]), with a bucket margin of 0; the margin is the nearest of the
// edges and the horizon. The first-shown time t0 comes from a run with the
// default edges; the edges (or the horizon) are then put on or near t0.
func TestTimelineFirstShownOnBucketEdge(t *testing.T) {
	d, ms := northDrive(t)
	got, err := timeline.Compute(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	t0 := got[0].FirstShownS
	if !got[0].Shown || t0 < 10 || t0 > d.HorizonS-10 {
		t.Fatalf("marker 2 km ahead: %+v, want first shown between 10 s and %v s", got[0], d.HorizonS-10)
	}
	for _, c := range []struct {
		desc     string
		edges    [2]float64
		horizonS float64
		want     timeline.Bucket
	}{
		{"t0 on the first edge", [2]float64{t0, t0 + 5}, 120, timeline.Mid},
		{"t0 on the second edge", [2]float64{t0 - 5, t0}, 120, timeline.Late},
		{"t0 a tick before the first edge", [2]float64{t0 + d.TickS, t0 + 5}, 120, timeline.Early},
		{"t0 a tick before the second edge", [2]float64{t0 - 5, t0 + d.TickS}, 120, timeline.Mid},
		{"t0 a second before the horizon", [2]float64{1, 2}, t0 + 1, timeline.Late},
		{"t0 on the horizon", [2]float64{1, 2}, t0, timeline.Late},
	} {
		d, ms := northDrive(t)
		d.BucketEdgesS, d.HorizonS = c.edges, c.horizonS
		got, err := timeline.Compute(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		o := got[0]
		if o.FirstShownS != t0 || o.Bucket != c.want {
			t.Errorf("%s: Compute(edges %v) = first shown %v in %v, want %v in %v", c.desc, c.edges, o.FirstShownS, o.Bucket, t0, c.want)
		}
		wantMargin := min(math.Abs(t0-c.edges[0]), math.Abs(t0-c.edges[1]), d.HorizonS-t0)
		if o.BucketMarginS != wantMargin {
			t.Errorf("%s: bucket_margin_s = %v, want %v (off by %g, tolerance 0)", c.desc, o.BucketMarginS, wantMargin, o.BucketMarginS-wantMargin)
		}
	}
}

// The heading-up map turns toward the new segment's bearing by at most
// max_turn_rate_deg_per_s × tick_s per tick (SPEC §3, §5). Hand-computed: a
// right-angle turn from east (90°) to north (0°) on a grid with a limit of
// 10°/s and 0.25 s ticks turns 2.5° a tick, so the heading reads 87.5°,
// 85°, … and reaches 0° 36 ticks after the corner, never faster.
func TestTimelineHeadingStepPerTick(t *testing.T) {
	r, err := routes.New([]orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.05}}, []float64{20})
	if err != nil {
		t.Fatal(err)
	}
	rs := oneBand(16, 0)
	rs.MaxTurnRateDegPerS = 10
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), rs)
	var heads []float64
	d.OnTick = func(_ int, v *viewport.View, _ []int) { heads = append(heads, v.Camera().HeadingDeg) }
	if _, err := timeline.Compute(&d, nil); err != nil {
		t.Fatal(err)
	}
	const step, tol = 2.5, 1e-9 // degrees a tick; a few roundings of values below 360
	corner := -1
	for k, h := range heads {
		if h != 90 {
			corner = k
			break
		}
	}
	if corner < 1 || corner+36 >= len(heads) {
		t.Fatalf("headings %v: want 90° and then the turn north well inside the horizon", heads)
	}
	for j := 0; j <= 36; j++ {
		want := 90 - step*float64(j+1)
		if j == 36 {
			want = 0 // held at the target
		}
		if got := heads[corner+j]; math.Abs(got-max(want, 0)) > tol {
			t.Errorf("heading %d ticks after the corner (t = %v s) = %v, want %v (off by %.3g°, tolerance %g°)",
				j, float64(corner+j)*d.TickS, got, max(want, 0), got-max(want, 0), tol)
		}
	}
}

// A drive due north from longitude +0 to −0 has a segment heading of −0
// (atan2(−0, Δy)). SPEC §3 turns the map with TurnHeadingDeg at every tick
// after the first, which gives +0 for it; a tick already at the segment's
// heading skips the turn rules only where they would give the heading back
// to the bit, so from the second tick on the camera's heading is +0.
func TestTimelineHeadingMinusZeroTurnsToPlusZero(t *testing.T) {
	r, err := routes.New([]orb.Point{{0, 0}, {math.Copysign(0, -1), 0.05}}, []float64{20})
	if err != nil {
		t.Fatal(err)
	}
	if h := r.Segment(0).HeadingDeg; h != 0 || !math.Signbit(h) {
		t.Fatalf("segment heading %v (sign bit %v): want −0 for this route", h, math.Signbit(h))
	}
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), oneBand(16, 0))
	d.HorizonS, d.BucketEdgesS = 2, [2]float64{0.5, 1}
	var heads []float64
	d.OnTick = func(_ int, v *viewport.View, _ []int) { heads = append(heads, v.Camera().HeadingDeg) }
	if _, err := timeline.Compute(&d, nil); err != nil {
		t.Fatal(err)
	}
	for k, h := range heads {
		if want := rules.TurnHeadingDeg(r.Segment(0).HeadingDeg, r.Segment(0).HeadingDeg, 1); k > 0 && (h != want || math.Signbit(h) != math.Signbit(want)) {
			t.Fatalf("tick %d: heading %v (sign bit %v), want %v (sign bit %v) as TurnHeadingDeg gives", k, h, math.Signbit(h), want, math.Signbit(want))
		}
	}
	if len(heads) < 2 {
		t.Fatalf("%d ticks: want several", len(heads))
	}
}
