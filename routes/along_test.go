package routes

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"

	"github.com/paulmach/orb"
	"pgregory.net/rapid"
)

// equatorRoute lays segments of the given lengths eastwards along the equator from lon 0. Along the
// equator the geodesic is the equator itself, of radius a, so a segment of Δλ radians is a·Δλ
// metres (exactly, up to rounding).
func equatorRoute(t *testing.T, lengthsM, speeds []float64) *Route {
	t.Helper()
	pts := []orb.Point{{0, 0}}
	lon := 0.0
	for _, l := range lengthsM {
		lon += l / wgs84A * radDeg
		pts = append(pts, orb.Point{lon, 0})
	}
	r, err := New(pts, speeds)
	if err != nil {
		t.Fatalf("New(%v, %v): %v", pts, speeds, err)
	}
	return r
}

func TestSegmentAtVertexAndEndRules(t *testing.T) {
	r := equatorRoute(t, []float64{100, 200, 50}, []float64{10, 20, 5})
	s1, s2 := r.Segment(1).StartM, r.Segment(2).StartM
	cases := []struct {
		along float64
		want  int
	}{
		{-5, 0}, {0, 0}, {50, 0},
		{math.Nextafter(s1, 0), 0}, {s1, 1}, // at an interior vertex: the segment that starts there
		{s2, 2}, {r.LengthM(), 2}, {r.LengthM() + 1, 2}, // at and past the end: the last one
		{math.NaN(), 0}, {math.Inf(1), 2}, {math.Inf(-1), 0},
	}
	for _, c := range cases {
		if got := r.SegmentAt(c.along); got != c.want {
			t.Errorf("SegmentAt(%v) = %d, want %d", c.along, got, c.want)
		}
	}
	if got := r.SpeedMpsAt(s1); got != 20 {
		t.Errorf("SpeedMpsAt(%v) = %v, want 20", s1, got)
	}
	if got := r.SpeedMpsAt(r.LengthM()); got != 5 {
		t.Errorf("SpeedMpsAt(LengthM() %v) = %v, want 5", r.LengthM(), got)
	}
	if got := r.HeadingDegAt(s1); got != 90 {
		t.Errorf("HeadingDegAt(%v) = %v, want 90", s1, got)
	}
}

// TestPointAtIsSlerpByAngle: the point at along-route position p lies at the fraction
// (p − start)/length of the arc by angle (SPEC §4), not by geodesic distance. On a meridian the
// two differ: the arc's angle is linear in latitude, the geodesic length is not.
func TestPointAtIsSlerpByAngle(t *testing.T) {
	r, err := New([]orb.Point{{5, 0}, {5, 60}}, []float64{10})
	if err != nil {
		t.Fatalf("New(meridian 0° to 60°): %v", err)
	}
	L := r.LengthM()
	for _, f := range []float64{0, 0.1, 0.25, 0.5, 0.9, 1} {
		got := r.PointAt(f * L)
		near(t, fmt.Sprintf("PointAt(%v·L) latitude", f), got[1], 60*f, 1e-12)
		near(t, fmt.Sprintf("PointAt(%v·L) longitude", f), got[0], 5, 1e-12)
	}
	// By geodesic distance, half the length would be 0.14° further south (the meridian's radius
	// of curvature grows with latitude): this is what the by-angle rule is not.
	half := r.PointAt(L / 2)
	if d := math.Abs(GeodesicDistM(orb.Point{5, 0}, half) - L/2); !(d > 1000) {
		t.Errorf("GeodesicDistM(start, PointAt(L/2) = %v) differs from L/2 by %v m, want > 1000 m", half, d)
	}

	// Vertices come back exactly as given; positions are clamped.
	pts := []orb.Point{{179.9, -10}, {-179.95, -10.05}, {-179.8, -10.2}}
	r, err = New(pts, []float64{10})
	if err != nil {
		t.Fatalf("New(%v): %v", pts, err)
	}
	if got := r.PointAt(r.Segment(1).StartM); got != pts[1] {
		t.Errorf("PointAt(Segment(1).StartM) = %v, want vertex %v exactly", got, pts[1])
	}
	if got := r.PointAt(r.LengthM() + 100); got != pts[2] {
		t.Errorf("PointAt(LengthM()+100) = %v, want the last vertex %v exactly", got, pts[2])
	}
	if got := r.PointAt(math.NaN()); got != pts[0] {
		t.Errorf("PointAt(NaN) = %v, want the first vertex %v exactly", got, pts[0])
	}
	// Across the antimeridian the interpolated longitude stays in [-180, 180].
	mid := r.PointAt(r.Segment(0).LengthM * 0.3)
	if !(mid[0] > 179.9 || mid[0] < -179.95) {
		t.Errorf("PointAt across the antimeridian = %v, want longitude in (179.9, 180] or [-180, -179.95)", mid)
	}
}

func TestTimeBetween(t *testing.T) {
	r := equatorRoute(t, []float64{100, 200, 50}, []float64{10, 20, 5})
	near(t, "DurationS()", r.DurationS(), 10+10+10, 1e-9)
	near(t, "TimeBetweenS(50, 200)", r.TimeBetweenS(50, 200), 5+5, 1e-9) // 50 m at 10 m/s, then 100 m at 20 m/s
	near(t, "TimeBetweenS(200, 50)", r.TimeBetweenS(200, 50), -(5 + 5), 1e-9)
	near(t, "TimeBetweenS(-10, 1e9)", r.TimeBetweenS(-10, 1e9), 30, 1e-9) // clamped to the route
}

// TestAlongAfterCrossesSegmentsExactly: motion at each segment's own speed, the time left over at a
// segment end spent on the next (SPEC §5), stopping at the route's end.
func TestAlongAfterCrossesSegmentsExactly(t *testing.T) {
	// 100 m at 10 m/s (10 s), 200 m at 20 m/s (10 s), 50 m at 5 m/s (10 s).
	r := equatorRoute(t, []float64{100, 200, 50}, []float64{10, 20, 5})
	cases := []struct {
		start, t, want float64
	}{
		{0, 0, 0},
		{0, 5, 50},
		{0, 10, 100}, // exactly at the first vertex
		{0, 12, 140}, // 10 s to the vertex, then 2 s at 20 m/s
		{0, 20, 300},
		{0, 25, 325},
		{0, 30, 350},    // the end
		{0, 1000, 350},  // stopped there
		{90, 1.5, 110},  // 1 s to the vertex, 0.5 s at 20 m/s
		{290, 3, 312.5}, // 0.5 s to the vertex at 300, then 2.5 s at 5 m/s
		{120, -1.5, 95}, // back 1 s at 20 m/s to the vertex, 0.5 s at 10 m/s
		{50, -100, 0},   // backwards in time stops at the start
		{350, 5, 350},
	}
	for _, c := range cases {
		got := r.AlongAfterS(c.start, c.t)
		near(t, fmt.Sprintf("AlongAfterS(%v, %v)", c.start, c.t), got, c.want, 1e-9)
	}
	// A tick loop accumulates no error: position k·tick is the same as one jump of k·tick.
	pos := 0.0
	for k := 1; k <= 120; k++ {
		pos = r.AlongAfterS(0, float64(k)*0.25)
		if k*25 <= 1000 { // first segment: 10 m/s
			near(t, fmt.Sprintf("AlongAfterS(0, %v)", float64(k)*0.25), pos, float64(k)*2.5, 1e-9)
		}
	}
	near(t, "AlongAfterS(0, 30)", pos, 350, 1e-9)
	if got := r.AlongAfterS(0, math.NaN()); got != 0 {
		t.Errorf("AlongAfterS(0, NaN) = %v, want 0", got)
	}
}

// TestTurnsWrapAtNorth: turn sizes are measured the short way round, across 0/360.
func TestTurnsWrapAtNorth(t *testing.T) {
	p0 := orb.Point{10, 50}
	p1 := offsetPoint(p0, 350, 500) // heading ~350
	p2 := offsetPoint(p1, 10, 500)  // ~10: a 20° turn across north
	p3 := offsetPoint(p2, 100, 500) // ~100: a 90° turn
	p4 := offsetPoint(p3, 280, 300) // ~280: a U-turn (180°)
	p5 := offsetPoint(p4, 275, 300) // ~5° more
	pts := []orb.Point{p0, p1, p2, p3, p4, p5}
	r, err := New(pts, []float64{10})
	if err != nil {
		t.Fatalf("New(%v): %v", pts, err)
	}
	h := func(i int) float64 { return r.Segment(i).HeadingDeg }
	for i, want := range []float64{20, 90, 180} {
		near(t, fmt.Sprintf("HeadingChangeDeg(%v, %v) at vertex %d", h(i), h(i+1), i+1), HeadingChangeDeg(h(i), h(i+1)), want, 0.5)
	}

	v := func(i int) float64 { return r.Segment(i).StartM }
	for _, c := range []struct {
		minDeg float64
		want   []float64
	}{
		{0, []float64{v(1), v(2), v(3), v(4)}},
		{15, []float64{v(1), v(2), v(3)}},
		{30, []float64{v(2), v(3)}},
		{170, []float64{v(3)}},
	} {
		if got := r.Turns(c.minDeg); !slices.Equal(got, c.want) {
			t.Errorf("Turns(%v) = %v, want %v", c.minDeg, got, c.want)
		}
	}
	for _, minDeg := range []float64{181, math.NaN()} {
		if got := r.Turns(minDeg); len(got) != 0 {
			t.Errorf("Turns(%v) = %v, want none", minDeg, got)
		}
	}

	cases := []struct {
		name   string
		heads  [2]float64
		change float64
	}{
		{"across north", [2]float64{350, 10}, 20},
		{"across north backwards", [2]float64{10, 350}, 20},
		{"none", [2]float64{0, 0}, 0},
		{"0 and 360 are one heading", [2]float64{0, 359.9999999}, 1e-7},
		{"U-turn", [2]float64{90, 270}, 180},
		{"just under a U-turn", [2]float64{0, 180.5}, 179.5},
	}
	for _, c := range cases {
		near(t, fmt.Sprintf("%s: HeadingChangeDeg(%v, %v)", c.name, c.heads[0], c.heads[1]),
			HeadingChangeDeg(c.heads[0], c.heads[1]), c.change, 1e-9)
	}
}

func TestNextTurnIsStrictlyAhead(t *testing.T) {
	turns := []float64{100, 250, 400}
	cases := []struct {
		along float64
		dist  float64
		ok    bool
	}{
		{0, 100, true},
		{100, 150, true}, // at a turn: the next one
		{99.5, 0.5, true},
		{399, 1, true},
		{400, 0, false},
		{1e6, 0, false},
		{math.NaN(), 0, false},
	}
	for _, c := range cases {
		d, ok := NextTurnDistM(turns, c.along)
		if ok != c.ok {
			t.Errorf("NextTurnDistM(%v, %v) ok = %v, want %v", turns, c.along, ok, c.ok)
		}
		near(t, fmt.Sprintf("NextTurnDistM(%v, %v) distance", turns, c.along), d, c.dist, 1e-12)
	}
	if d, ok := NextTurnDistM(nil, 0); ok {
		t.Errorf("NextTurnDistM(nil, 0) = %v, true; want ok false", d)
	}
}

func TestAlongHelpersDoNotAllocate(t *testing.T) {
	r := equatorRoute(t, []float64{100, 200, 50}, []float64{10, 20, 5})
	turns := []float64{100, 300}
	n := testing.AllocsPerRun(100, func() {
		_ = r.AlongAfterS(10, 7)
		_ = r.PointAt(120)
		_ = r.SegmentAt(120)
		_ = r.HeadingDegAt(120)
		_ = r.TimeBetweenS(0, 120)
		_, _ = NextTurnDistM(turns, 120)
		_ = r.PlaceAt(120)
	})
	if n != 0 {
		t.Errorf("the along-route helpers allocate %v times a run, want 0", n)
	}
}

// TestTurnsAtThreshold: a turn of exactly the threshold counts (SPEC §3: "at least"). On a grid of
// parallels and meridians the Mercator headings are exact (hand-computed: Δy = 0 along a parallel
// gives atan2(Δx, 0) = 90° or 270°, Δx = 0 along a meridian gives 0° or 180°), so a right-angle turn
// is exactly 90° and a turn back the way one came exactly 180°.
func TestTurnsAtThreshold(t *testing.T) {
	pts := []orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.01}, {0.02, 0.01}, {0, 0.01}}
	r, err := New(pts, []float64{10})
	if err != nil {
		t.Fatalf("New(%v): %v", pts, err)
	}
	v := func(i int) float64 { return r.Segment(i).StartM }
	for i, want := range []float64{90, 90, 180} {
		a, b := r.Segment(i).HeadingDeg, r.Segment(i+1).HeadingDeg
		if got := HeadingChangeDeg(a, b); got != want {
			t.Fatalf("HeadingChangeDeg(%v, %v) at vertex %d = %v, want %v exactly (off by %g, tolerance 0)", a, b, i+1, got, want, got-want)
		}
	}
	for _, c := range []struct {
		minDeg float64
		want   []float64
	}{
		{90, []float64{v(1), v(2), v(3)}},
		{math.Nextafter(90, 180), []float64{v(3)}},
		{180, []float64{v(3)}},
	} {
		if got := r.Turns(c.minDeg); !slices.Equal(got, c.want) {
			t.Errorf("Turns(%v) = %v, want %v (a turn of exactly the threshold counts)", c.minDeg, got, c.want)
		}
	}
}

// TestTurnsKeptForTheLastThreshold: a route keeps the turns of the last
// threshold asked for, so that a timeline after the first on one route
// does not walk its vertices again; goroutines asking for two thresholds
// at once (the kept list changing under them) each get their own
// threshold's turns.
func TestTurnsKeptForTheLastThreshold(t *testing.T) {
	pts := []orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.01}, {0.02, 0.01}, {0, 0.01}}
	r, err := New(pts, []float64{10})
	if err != nil {
		t.Fatalf("New(%v): %v", pts, err)
	}
	if a, b := r.Turns(90), r.Turns(90); &a[0] != &b[0] {
		t.Errorf("Turns(90) twice: two lists, want the kept one")
	}
	v := func(i int) float64 { return r.Segment(i).StartM }
	want := map[float64][]float64{90: {v(1), v(2), v(3)}, 180: {v(3)}}
	var wg sync.WaitGroup
	errs := make(chan string, 8)
	for g := range 8 {
		wg.Go(func() {
			for k := range 500 {
				th := []float64{90, 180}[(g+k)%2]
				if got := r.Turns(th); !slices.Equal(got, want[th]) {
					errs <- fmt.Sprintf("Turns(%v) = %v, want %v", th, got, want[th])
					return
				}
			}
		})
	}
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Error(e)
	}
}

// TestRouteEndsExactly: the travel time to the route's end is its
// duration, and the position reached after the whole duration is its
// length, to the bit, whatever the segments' lengths and speeds (the sums
// over the last segment could round a hair short otherwise, and a drive
// that starts at the end would move).
func TestRouteEndsExactly(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		seed := rapid.Uint64().Draw(t, "seed")
		n := rapid.IntRange(2, 40).Draw(t, "vertices")
		rng := rand.New(rand.NewPCG(seed, 7))
		pts := cityRoute(rng, orb.Point{rapid.Float64Range(-170, 170).Draw(t, "lon"), rapid.Float64Range(-60, 60).Draw(t, "lat")}, n, 60)
		speeds := make([]float64, len(pts)-1)
		for i := range speeds {
			speeds[i] = rapid.Float64Range(0.5, 40).Draw(t, "speed_mps")
		}
		r, err := New(pts, speeds)
		if err != nil {
			t.Skip(err.Error())
		}
		if got := r.TimeBetweenS(0, r.LengthM()); got != r.DurationS() {
			t.Fatalf("TimeBetweenS(0, LengthM()) = %v, want DurationS() %v (off by %g, tolerance 0)", got, r.DurationS(), got-r.DurationS())
		}
		if got := r.AlongAfterS(0, r.DurationS()); got != r.LengthM() {
			t.Fatalf("AlongAfterS(0, DurationS()) = %v, want LengthM() %v (off by %g, tolerance 0)", got, r.LengthM(), got-r.LengthM())
		}
	})
}

// TestSegmentClampsItsIndex: Segment takes any index, clamped into the
// route's segments, as its doc says.
func TestSegmentClampsItsIndex(t *testing.T) {
	r, err := New([]orb.Point{{10, 50}, {10.001, 50}, {10.002, 50.001}}, []float64{10, 20})
	if err != nil {
		t.Fatal(err)
	}
	last := r.NumSegments() - 1
	if got, want := r.Segment(last+5), r.Segment(last); got != want {
		t.Errorf("Segment(%d) = %+v, want Segment(%d) %+v", last+5, got, last, want)
	}
	if got, want := r.Segment(-3), r.Segment(0); got != want {
		t.Errorf("Segment(-3) = %+v, want Segment(0) %+v", got, want)
	}
}

// TestVertexAtThePoles: latitudes ±90 and longitudes ±180 are valid
// vertices (SPEC §1's ranges are closed).
func TestVertexAtThePoles(t *testing.T) {
	for _, pts := range [][]orb.Point{
		{{0, -90}, {0, -89.99}}, {{0, 90}, {0, 89.99}}, {{-180, 10}, {-179.99, 10}}, {{180, 10}, {179.99, 10}},
	} {
		if r, err := New(pts, []float64{10}); err != nil || r == nil || r.NumSegments() != 1 {
			t.Errorf("New(%v) = %v, %v; want a route of one segment", pts, r, err)
		}
	}
}
