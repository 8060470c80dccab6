package routes

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"github.com/golang/geo/s2"
	"github.com/paulmach/orb"
)

// degPerM converts metres on the mean-radius sphere (the scale of the tie tolerance) to degrees of
// arc: shifting a marker by that many degrees changes its spherical distances by that many metres.
const degPerM = radDeg / meanRadiusM

// tolLocalM bounds the difference between a distance Metrics measures under 1 km (local metric)
// and GeodesicDistM (Vincenty) on the same two points: 0.1 µm (see localDistM).
const tolLocalM = 1e-7

func mustRoute(t *testing.T, pts []orb.Point, speeds ...float64) *Route {
	t.Helper()
	if len(speeds) == 0 {
		speeds = []float64{10}
	}
	r, err := New(pts, speeds)
	if err != nil {
		t.Fatalf("New(%v, %v): %v", pts, speeds, err)
	}
	return r
}

// checkAgreesWithScan asserts that Metrics and the direct scan give the same answer.
func checkAgreesWithScan(t *testing.T, r *Route, user Place, q orb.Point) Metrics {
	t.Helper()
	m := r.Metrics(user, q)
	s := r.metricsScan(user, q)
	if m.Closest.Segment != s.Closest.Segment {
		t.Errorf("Metrics(user, %v).Closest.Segment = %d, want %d (metricsScan)", q, m.Closest.Segment, s.Closest.Segment)
	}
	near(t, fmt.Sprintf("Metrics(user, %v).Closest.AlongM (vs metricsScan)", q), m.Closest.AlongM, s.Closest.AlongM, 1e-6)
	near(t, fmt.Sprintf("Metrics(user, %v).RouteDistM (vs metricsScan)", q), m.RouteDistM, s.RouteDistM, 1e-6)
	if m.Ahead != s.Ahead {
		t.Errorf("Metrics(user, %v).Ahead = %v, want %v (metricsScan)", q, m.Ahead, s.Ahead)
	}
	if m.Side != s.Side {
		t.Errorf("Metrics(user, %v).Side = %v, want %v (metricsScan)", q, m.Side, s.Side)
	}
	return m
}

// TestTieBetweenTwoStretches: a hairpin symmetric about the equator, so a marker on the equator is
// equally near its outbound and return stretches. Ties within 1e-6 m go to the smaller along-route
// position; a difference just over 1e-6 m does not tie.
func TestTieBetweenTwoStretches(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, -0.001}, {0.01, -0.001}, {0.01, 0.001}, {0, 0.001}})
	start := r.PlaceAt(0)
	cases := []struct {
		name    string
		northM  float64 // marker's shift north of the equator, metres (mean-radius sphere)
		wantSeg int
	}{
		{"exact tie: the outbound stretch", 0, 0},
		{"0.6e-6 m nearer the return: still tied", 0.3e-6, 0},
		{"1.4e-6 m nearer the return: no tie", 0.7e-6, 2},
		{"nearer the outbound", -0.7e-6, 0},
	}
	for _, c := range cases {
		q := orb.Point{0.005, c.northM * degPerM}
		if got := r.Snap(q).Segment; got != c.wantSeg {
			t.Errorf("%s: Snap(%v).Segment = %d, want %d", c.name, q, got, c.wantSeg)
		}
		if got := r.snapScan(q).Segment; got != c.wantSeg {
			t.Errorf("%s: snapScan(%v).Segment = %d, want %d", c.name, q, got, c.wantSeg)
		}
		m := checkAgreesWithScan(t, r, start, q)
		if m.Closest.Segment != c.wantSeg {
			t.Errorf("%s: Metrics(start, %v).Closest.Segment = %d, want %d", c.name, q, m.Closest.Segment, c.wantSeg)
		}
	}
}

// TestTieBetweenEndsOfOneSegment: Q beyond the far side of the globe from a segment, on its great
// circle, is equally far from both ends; the start wins unless the end is nearer by over 1e-6 m.
func TestTieBetweenEndsOfOneSegment(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {10, 0}})
	cases := []struct {
		name      string
		westM     float64
		wantAlong float64
	}{
		{"exactly equidistant", 0, 0},
		{"end nearer by 0.6e-6 m: tied, the start", 0.3e-6, 0},
		{"end nearer by 1.4e-6 m: the end", 0.7e-6, r.LengthM()},
	}
	for _, c := range cases {
		q := orb.Point{-175 - c.westM*degPerM, 0}
		p := r.Snap(q)
		if p.AlongM != c.wantAlong {
			t.Errorf("%s: Snap(%v).AlongM = %v, want %v", c.name, q, p.AlongM, c.wantAlong)
		}
		if got := r.snapScan(q).AlongM; got != c.wantAlong {
			t.Errorf("%s: snapScan(%v).AlongM = %v, want %v", c.name, q, got, c.wantAlong)
		}
	}
	// On the axis of the segment's great circle every point of it is equally far: the start.
	if got := r.Snap(orb.Point{0, 90}).AlongM; got != 0 {
		t.Errorf("Snap([0 90]).AlongM = %v, want 0", got)
	}
	if got := r.Snap(orb.Point{123, -90}).Point; got != (orb.Point{0, 0}) {
		t.Errorf("Snap([123 -90]).Point = %v, want [0 0]", got)
	}
}

// TestVertexRule: a marker outside a corner is closest to the vertex; the place belongs to the
// segment that starts there, its point is the vertex as given, and its side is judged against
// that segment.
func TestVertexRule(t *testing.T) {
	corner := orb.Point{0.01, 0}
	r := mustRoute(t, []orb.Point{{0, 0}, corner, {0.01, 0.01}})
	q := orb.Point{0.011, -0.001}
	p := r.Snap(q)
	if p.Segment != 1 {
		t.Errorf("Snap(%v).Segment = %d, want 1", q, p.Segment)
	}
	if p.Point != corner {
		t.Errorf("Snap(%v).Point = %v, want the corner %v exactly", q, p.Point, corner)
	}
	if want := r.Segment(1).StartM; p.AlongM != want {
		t.Errorf("Snap(%v).AlongM = %v, want %v (Segment(1).StartM)", q, p.AlongM, want)
	}
	near(t, fmt.Sprintf("Snap(%v).DistM", q), p.DistM, GeodesicDistM(q, corner), tolLocalM)

	m := checkAgreesWithScan(t, r, r.PlaceAt(0), q)
	if m.Closest.Segment != 1 {
		t.Errorf("Metrics(start, %v).Closest.Segment = %d, want 1", q, m.Closest.Segment)
	}
	if m.Closest.Point != corner {
		t.Errorf("Metrics(start, %v).Closest.Point = %v, want the corner %v exactly", q, m.Closest.Point, corner)
	}
	// Segment 1 runs north along lon 0.01; the marker is east of it: right, and its cross-track
	// distance is to the foot on that meridian, level with the marker.
	if m.Side != Right {
		t.Errorf("Metrics(start, %v).Side = %v, want %v", q, m.Side, Right)
	}
	near(t, fmt.Sprintf("Metrics(start, %v).CrossTrackM", q), m.CrossTrackM, -GeodesicDistM(q, orb.Point{0.01, -0.001}), 1e-6)
	near(t, fmt.Sprintf("Metrics(start, %v).SideMarginM", q), m.SideMarginM, math.Abs(m.CrossTrackM)-SideOnM, 1e-12)

	// At the route's end the last segment holds the place.
	end := r.Snap(orb.Point{0.012, 0.02})
	if end.Segment != 1 {
		t.Errorf("Snap([0.012 0.02]).Segment = %d, want 1 (the last)", end.Segment)
	}
	if end.AlongM != r.LengthM() {
		t.Errorf("Snap([0.012 0.02]).AlongM = %v, want %v (LengthM())", end.AlongM, r.LengthM())
	}
}

// TestLoop: a closed square. The start and end are one position: Snap gives along 0 (the tie
// rule); for a user near the end, a marker at the start is reached at the end, and a marker just
// past the end has no closest point ahead.
func TestLoop(t *testing.T) {
	sq := []orb.Point{{-0.01, -0.01}, {0.01, -0.01}, {0.01, 0.01}, {-0.01, 0.01}, {-0.01, -0.01}}
	r := mustRoute(t, sq)
	L := r.LengthM()
	if got := r.Snap(sq[0]).AlongM; got != 0 {
		t.Errorf("Snap(%v).AlongM = %v, want 0", sq[0], got)
	}

	user := r.PlaceAt(0.9 * L)
	m := checkAgreesWithScan(t, r, user, sq[0])
	if !m.Ahead {
		t.Errorf("Metrics(user at 0.9·L, %v).Ahead = false, want true", sq[0])
	}
	if m.Closest.AlongM != L {
		t.Errorf("Metrics(user at 0.9·L, %v).Closest.AlongM = %v, want %v (LengthM())", sq[0], m.Closest.AlongM, L)
	}
	near(t, fmt.Sprintf("Metrics(user at 0.9·L, %v).AlongM", sq[0]), m.AlongM, 0.1*L, 1e-9)
	if m.RouteDistM != 0 {
		t.Errorf("Metrics(user at 0.9·L, %v).RouteDistM = %v, want 0", sq[0], m.RouteDistM)
	}

	past := orb.Point{-0.01, -0.011} // south of the end, in the last segment's direction of travel
	m = checkAgreesWithScan(t, r, user, past)
	if m.Ahead {
		t.Errorf("Metrics(user at 0.9·L, %v).Ahead = true, want false", past)
	}
	if m.Closest.Point != sq[4] {
		t.Errorf("Metrics(user at 0.9·L, %v).Closest.Point = %v, want the end %v exactly", past, m.Closest.Point, sq[4])
	}
	near(t, fmt.Sprintf("Metrics(user at 0.9·L, %v).AlongM", past), m.AlongM, 0.1*L, 1e-9) // the stretch to the end; callers report null
	near(t, fmt.Sprintf("Metrics(user at 0.9·L, %v).RouteDistM", past), m.RouteDistM, GeodesicDistM(past, sq[4]), tolLocalM)
}

// TestUTurn: out and back along one line. Beside it, both legs are equally near: the outbound leg
// wins for a user before the turn; a user past the turn gets the return leg, on the other side.
func TestUTurn(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.01, 0}, {0, 0}})
	L := r.LengthM()
	q := orb.Point{0.005, 0.0005}
	m := checkAgreesWithScan(t, r, r.PlaceAt(0), q)
	if m.Closest.Segment != 0 {
		t.Errorf("Metrics(start, %v).Closest.Segment = %d, want 0", q, m.Closest.Segment)
	}
	if m.Side != Left { // north of an eastbound leg
		t.Errorf("Metrics(start, %v).Side = %v, want %v", q, m.Side, Left)
	}
	near(t, fmt.Sprintf("Metrics(start, %v).AlongM", q), m.AlongM, L/4, 1e-3)

	m = checkAgreesWithScan(t, r, r.PlaceAt(0.6*L), q)
	if m.Closest.Segment != 1 {
		t.Errorf("Metrics(user at 0.6·L, %v).Closest.Segment = %d, want 1", q, m.Closest.Segment)
	}
	if m.Side != Right { // north of a westbound leg
		t.Errorf("Metrics(user at 0.6·L, %v).Side = %v, want %v", q, m.Side, Right)
	}
	near(t, fmt.Sprintf("Metrics(user at 0.6·L, %v).AlongM", q), m.AlongM, 0.75*L-0.6*L, 1e-3)
	near(t, fmt.Sprintf("Metrics(user at 0.6·L, %v).EtaS", q), m.EtaS, 0.15*L/10, 1e-4)
}

// TestMarkerBehindUser: on the user's own segment only the part from the user on counts, so a
// marker behind gets the user's own place.
func TestMarkerBehindUser(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.02, 0}, {0.03, 0}})
	user := r.PlaceAt(1000)
	q := orb.Point{0.002, 0.001}
	m := checkAgreesWithScan(t, r, user, q)
	if !m.Ahead {
		t.Errorf("Metrics(user at 1000 m, %v).Ahead = false, want true", q)
	}
	if m.AlongM != 0 {
		t.Errorf("Metrics(user at 1000 m, %v).AlongM = %v, want 0", q, m.AlongM)
	}
	if m.EtaS != 0 {
		t.Errorf("Metrics(user at 1000 m, %v).EtaS = %v, want 0", q, m.EtaS)
	}
	if m.Closest.Point != user.Point {
		t.Errorf("Metrics(user at 1000 m, %v).Closest.Point = %v, want the user's %v exactly", q, m.Closest.Point, user.Point)
	}
	near(t, fmt.Sprintf("Metrics(user at 1000 m, %v).RouteDistM", q), m.RouteDistM, GeodesicDistM(q, user.Point), tolLocalM)
	if m.Side != Left {
		t.Errorf("Metrics(user at 1000 m, %v).Side = %v, want %v", q, m.Side, Left)
	}
	// The cross-track distance is to the foot on the segment's great circle, behind the user.
	near(t, fmt.Sprintf("Metrics(user at 1000 m, %v).CrossTrackM", q), m.CrossTrackM, GeodesicDistM(q, orb.Point{0.002, 0}), 1e-6)

	// Behind the user on an earlier segment: the same.
	user = r.PlaceAt(r.Segment(1).StartM + 100)
	m = checkAgreesWithScan(t, r, user, q)
	if m.AlongM != 0 {
		t.Errorf("Metrics(user 100 m into segment 1, %v).AlongM = %v, want 0", q, m.AlongM)
	}
	if m.Closest.Segment != 1 {
		t.Errorf("Metrics(user 100 m into segment 1, %v).Closest.Segment = %d, want 1", q, m.Closest.Segment)
	}
}

// TestMarkerPastRouteEnd: Ahead is false only when the foot on the last segment lies past the end.
func TestMarkerPastRouteEnd(t *testing.T) {
	end := orb.Point{0.01, 0}
	r := mustRoute(t, []orb.Point{{0, 0}, end})
	user := r.PlaceAt(100)
	cases := []struct {
		name  string
		q     orb.Point
		ahead bool
	}{
		{"well past the end", orb.Point{0.02, 0.001}, false},
		{"past the end by 2e-6 m", orb.Point{0.01 + 2e-6*degPerM, 0.001}, false},
		{"past the end by 0.5e-6 m: within the tolerance", orb.Point{0.01 + 0.5e-6*degPerM, 0.001}, true},
		{"at the end", end, true},
		{"beside the last stretch", orb.Point{0.009, 0.001}, true},
	}
	for _, c := range cases {
		m := checkAgreesWithScan(t, r, user, c.q)
		if m.Ahead != c.ahead {
			t.Errorf("%s: Metrics(user at 100 m, %v).Ahead = %v, want %v", c.name, c.q, m.Ahead, c.ahead)
		}
		if !c.ahead {
			if m.Closest.Point != end {
				t.Errorf("%s: Metrics(user at 100 m, %v).Closest.Point = %v, want the end %v exactly", c.name, c.q, m.Closest.Point, end)
			}
			near(t, fmt.Sprintf("%s: Metrics(user at 100 m, %v).AlongM", c.name, c.q), m.AlongM, r.LengthM()-100, 1e-9)
		}
	}
}

// TestAntimeridian: a route crossing ±180 behaves like any other.
func TestAntimeridian(t *testing.T) {
	r := mustRoute(t, []orb.Point{{179.995, 0}, {-179.995, 0}, {-179.99, 0.005}})
	q := orb.Point{180, 0.001}
	p := r.Snap(q)
	if p.Segment != 0 {
		t.Errorf("Snap(%v).Segment = %d, want 0", q, p.Segment)
	}
	near(t, fmt.Sprintf("Snap(%v).AlongM", q), p.AlongM, r.Segment(0).LengthM/2, 1e-6)
	near(t, fmt.Sprintf("|Snap(%v).Point longitude|", q), math.Abs(p.Point[0]), 180, 1e-12)
	near(t, fmt.Sprintf("Snap(%v).Point latitude", q), p.Point[1], 0, 1e-12)
	// 0.001° of latitude at the equator: a(1 − e²)·0.001° (meridional radius of curvature).
	near(t, fmt.Sprintf("Snap(%v).DistM", q), p.DistM, wgs84A*(1-wgs84E2)*0.001*degRad, 1e-6)
	m := checkAgreesWithScan(t, r, r.PlaceAt(0), q)
	if m.Side != Left {
		t.Errorf("Metrics(start, %v).Side = %v, want %v", q, m.Side, Left)
	}
	q2 := orb.Point{-179.999, -0.002}
	m = checkAgreesWithScan(t, r, r.PlaceAt(0), q2)
	if m.Side != Right {
		t.Errorf("Metrics(start, %v).Side = %v, want %v", q2, m.Side, Right)
	}
	if got := r.Segment(0).HeadingDeg; got != 90 {
		t.Errorf("Segment(0).HeadingDeg = %v, want 90 (east across ±180)", got)
	}
}

// TestSideOnAndMargin: within 0.01 m of the line is On; the margin is the distance to flipping.
func TestSideOnAndMargin(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.01, 0}})
	user := r.PlaceAt(0)
	mPerDegLat := wgs84A * (1 - wgs84E2) * degRad // at the equator
	cases := []struct {
		northM float64
		side   Side
		margin float64
	}{
		{0.005, On, 0.005},
		{-0.005, On, 0.005},
		{0, On, 0.01},
		{0.02, Left, 0.01},
		{-0.02, Right, 0.01},
		{0.0101, Left, 0.0001},
		{25, Left, 24.99},
	}
	for _, c := range cases {
		m := checkAgreesWithScan(t, r, user, orb.Point{0.005, c.northM / mPerDegLat})
		if m.Side != c.side {
			t.Errorf("%v m north: Metrics.Side = %v, want %v", c.northM, m.Side, c.side)
		}
		near(t, fmt.Sprintf("%v m north: Metrics.SideMarginM", c.northM), m.SideMarginM, c.margin, 1e-9)
		near(t, fmt.Sprintf("%v m north: Metrics.CrossTrackM", c.northM), m.CrossTrackM, c.northM, 1e-9)
	}
	for _, c := range []struct {
		side Side
		want string
	}{{Left, "left"}, {Right, "right"}, {On, "on"}} {
		if got := c.side.String(); got != c.want {
			t.Errorf("Side(%d).String() = %q, want %q", int8(c.side), got, c.want)
		}
	}
}

// TestZeroLengthSegmentsChangeNothing: duplicates give the same answers as the route without them.
func TestZeroLengthSegmentsChangeNothing(t *testing.T) {
	base := []orb.Point{{10, 50}, {10.01, 50}, {10.01, 50.01}, {10.02, 50.02}}
	dup := []orb.Point{base[0], base[0], base[1], base[2], base[2], base[2], base[3]}
	r1 := mustRoute(t, base, 10, 20, 30)
	r2 := mustRoute(t, dup, 99, 10, 20, 99, 99, 30)
	u1, u2 := r1.Snap(orb.Point{10.005, 50.0001}), r2.Snap(orb.Point{10.005, 50.0001})
	rng := rand.New(rand.NewPCG(1, 2))
	for _, q := range markersNear(rng, base, 50) {
		m1, m2 := r1.Metrics(u1, q), r2.Metrics(u2, q)
		m1.Closest.pc, m2.Closest.pc = placeCache{}, placeCache{}
		if !reflect.DeepEqual(m2, m1) {
			t.Errorf("marker %v: Metrics with duplicate vertices = %+v, want %+v (without)", q, m2, m1)
		}
	}
}

// TestEtaUsesSegmentSpeeds: 1000 m at 10 m/s then 1000 m at 20 m/s.
func TestEtaUsesSegmentSpeeds(t *testing.T) {
	r := equatorRoute(t, []float64{1000, 1000}, []float64{10, 20})
	q := orb.Point{1500 / wgs84A * radDeg, 0.001}
	m := checkAgreesWithScan(t, r, r.PlaceAt(0), q)
	near(t, fmt.Sprintf("Metrics(start, %v).AlongM", q), m.AlongM, 1500, 1e-6)
	near(t, fmt.Sprintf("Metrics(start, %v).EtaS", q), m.EtaS, 100+25, 1e-6)
	near(t, fmt.Sprintf("Metrics(start, %v).EtaS vs TimeBetweenS(0, %v)", q, m.Closest.AlongM), m.EtaS, r.TimeBetweenS(0, m.Closest.AlongM), 1e-9)
}

// TestClosestPointAgainstS2: the closest point found is at the smallest spherical distance golang/geo
// measures to any segment (s2.DistanceFromSegment), and lies on the route.
func TestClosestPointAgainstS2(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	pts := cityRoute(rng, orb.Point{-73.98, 40.75}, 300, 70)
	r := mustRoute(t, pts)
	vec := func(p orb.Point) s2.Point { return s2.PointFromLatLng(s2.LatLngFromDegrees(p[1], p[0])) }
	for _, q := range markersNear(rng, pts, 300) {
		p := r.Snap(q)
		qv := vec(q)
		minAng, onRoute := math.Inf(1), math.Inf(1)
		for i := 0; i+1 < len(pts); i++ {
			a, b := vec(pts[i]), vec(pts[i+1])
			minAng = math.Min(minAng, s2.DistanceFromSegment(qv, a, b).Radians())
			onRoute = math.Min(onRoute, s2.DistanceFromSegment(vec(p.Point), a, b).Radians())
		}
		got := qv.Distance(vec(p.Point)).Radians()
		near(t, fmt.Sprintf("Snap(%v) spherical distance (rad, vs s2.DistanceFromSegment)", q), got, minAng, 1e-13)
		if !(onRoute < 1e-13) {
			t.Errorf("Snap(%v).Point = %v is %v rad off the route, want < 1e-13", q, p.Point, onRoute)
		}
		near(t, fmt.Sprintf("GeodesicDistM(PointAt(Snap(%v).AlongM), Snap(%v).Point)", q, q), GeodesicDistM(r.PointAt(p.AlongM), p.Point), 0, 1e-6)
	}
}

func TestMetricsDoesNotAllocate(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	pts := cityRoute(rng, orb.Point{2.35, 48.85}, 200, 60)
	r := mustRoute(t, pts)
	user := r.Snap(pts[20])
	ms := markersNear(rng, pts, 50)
	n := testing.AllocsPerRun(20, func() {
		for _, q := range ms {
			_ = r.Metrics(user, q)
		}
		_ = r.Snap(ms[0])
	})
	if n != 0 {
		t.Errorf("Metrics and Snap allocate %v times a run, want 0", n)
	}
	// A Place whose fields were changed by hand is re-derived, not trusted.
	moved := user
	moved.AlongM += 500
	fresh := r.PlaceAt(moved.AlongM)
	fresh.Query = user.Query
	for _, q := range ms[:10] {
		if got, want := r.Metrics(moved, q).Closest.AlongM, r.Metrics(fresh, q).Closest.AlongM; got != want {
			t.Errorf("Metrics(hand-moved Place, %v).Closest.AlongM = %v, want %v (from PlaceAt)", q, got, want)
		}
	}
}

// TestRegressions keeps cases the properties once shrank to, with 17-digit inputs.
func TestRegressions(t *testing.T) {
	// A U-turn; the marker 3.7 µm from vertex 1. The index found the foot at the last bit before
	// the vertex (segment 0), the scan found the vertex (segment 1): fixed by vertexSnapM.
	uturn := []orb.Point{{1, -1}, {1.0000000000383265, -0.9999910067963221}, {1.0000004268500902, -0.9999665644592572},
		{1.000001280239418, -0.9999421332926367}, {1.0000004268500902, -0.9999665644592572},
		{1.0000000000383265, -0.9999910067963221}, {1, -1}}
	r := mustRoute(t, uturn, 2.718281828459045)
	q := orb.Point{1.0000000000047908, -0.99999100679632213}
	p, ps := r.Snap(q), r.snapScan(q)
	if p.Segment != ps.Segment {
		t.Errorf("Snap(%v).Segment = %d, want %d (snapScan)", q, p.Segment, ps.Segment)
	}
	if p.Segment != 1 {
		t.Errorf("Snap(%v).Segment = %d, want 1", q, p.Segment)
	}
	if p.Point != uturn[1] {
		t.Errorf("Snap(%v).Point = %v, want vertex 1 %v exactly", q, p.Point, uturn[1])
	}

	// The user 2e-11 m past the first vertex, whose unit vector rounds to the vertex's. A foot
	// 5.6e-7 m along was snapped back to the vertex, behind the user.
	r = mustRoute(t, []orb.Point{{0, 0}, {0.001, 0}})
	user := r.PlaceAt(1.9667994472309299e-11)
	m := checkAgreesWithScan(t, r, user, orb.Point{5e-12, 0.0001})
	if !(m.Closest.AlongM >= user.AlongM) {
		t.Errorf("Metrics(user at %v m, [5e-12 0.0001]).Closest.AlongM = %v, want ≥ the user's", user.AlongM, m.Closest.AlongM)
	}
}

// TestManyTiedStretches: a route driving one road back and forth ten times ties more segments
// than the search keeps (maxTies), so the tie is settled by the second pass; the first stretch
// still wins, as in the direct scan.
func TestManyTiedStretches(t *testing.T) {
	a, b := orb.Point{2, 45}, orb.Point{2.01, 45}
	pts := []orb.Point{a}
	for i := range 10 {
		if i%2 == 0 {
			pts = append(pts, b)
		} else {
			pts = append(pts, a)
		}
	}
	r := mustRoute(t, pts)
	if !(r.NumSegments() > maxTies) {
		t.Fatalf("NumSegments() = %d, want > maxTies %d", r.NumSegments(), maxTies)
	}
	q := orb.Point{2.004, 45.0003}
	p := r.Snap(q)
	if p.Segment != 0 {
		t.Errorf("Snap(%v).Segment = %d, want 0", q, p.Segment)
	}
	if want := r.snapScan(q).Segment; p.Segment != want {
		t.Errorf("Snap(%v).Segment = %d, want %d (snapScan)", q, p.Segment, want)
	}
	// From a user on the fourth pass, the fourth pass wins.
	user := r.PlaceAt(r.Segment(3).StartM + 1)
	q = orb.Point{2.009, 45.0003}
	m := checkAgreesWithScan(t, r, user, q)
	if m.Closest.Segment != 3 {
		t.Errorf("Metrics(user on the fourth pass, %v).Closest.Segment = %d, want 3", q, m.Closest.Segment)
	}
}

// footOnCircle returns the foot of the perpendicular from q on the great circle through a and b
// (vector algebra on the sphere of geodetic latitude, written out here) and the side of q: +1 left
// of travel from a to b, −1 right.
func footOnCircle(q, a, b orb.Point) (orb.Point, float64) {
	qv, _, _ := unitVec(q)
	av, _, _ := unitVec(a)
	bv, _, _ := unitVec(b)
	n := av.Cross(bv).Normalize()
	z := qv.Dot(n)
	f := qv.Sub(n.Mul(z)).Normalize()
	return orb.Point{math.Atan2(f.Y, f.X) * radDeg, math.Asin(f.Z) * radDeg}, math.Copysign(1, z)
}

// TestCrossTrackAtAVertex: when the closest point is a vertex, the cross-track distance is still
// to the foot on the side segment's great circle, however far along the circle that foot lies
// (here up to 30° behind the vertex), under 1 km (local metric) and beyond (Vincenty). Expected:
// the foot by footOnCircle, then GeodesicDistM (itself checked against GeodSolve) from the marker.
func TestCrossTrackAtAVertex(t *testing.T) {
	cases := []struct {
		name    string
		pts     []orb.Point
		q       orb.Point
		sideSeg int // the segment holding the closest vertex
	}{
		{"behind the start, 30° along, 100 m off", []orb.Point{{0, 0}, {0, 1}}, orb.Point{0.001, -30}, 0},
		{"behind the start, 30° along, 290 km off", []orb.Point{{0, 0}, {0, 1}}, orb.Point{3, -30}, 0},
		{"behind the start, 20° along, 60 m off, left", []orb.Point{{10, 20}, {10.5, 20.5}}, orb.Point{-9.9995, 0.0004}, 0},
		{"past a corner, 30° behind the next segment, 100 m off its circle", []orb.Point{{0, 0}, {10, 0}, {10, 10}}, orb.Point{10.001, -30}, 1},
		{"past a corner, 40 m off the next segment's circle", []orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.01}}, orb.Point{0.0104, -0.0003}, 1},
		{"past a corner, 5 km off the next segment's circle", []orb.Point{{0, 0}, {1, 0}, {1, 1}}, orb.Point{1.045, -0.3}, 1},
	}
	for _, c := range cases {
		r := mustRoute(t, c.pts)
		m := r.Metrics(r.PlaceAt(0), c.q)
		if m.Closest.Point != c.pts[c.sideSeg] {
			t.Errorf("%s: Metrics(start, %v).Closest.Point = %v, want the vertex %v", c.name, c.q, m.Closest.Point, c.pts[c.sideSeg])
			continue
		}
		foot, side := footOnCircle(c.q, c.pts[c.sideSeg], c.pts[c.sideSeg+1])
		want := side * GeodesicDistM(c.q, foot)
		near(t, fmt.Sprintf("%s: Metrics(start, %v).CrossTrackM", c.name, c.q), m.CrossTrackM, want, 1e-6)
		wantSide := map[float64]Side{1: Left, -1: Right}[side]
		if m.Side != wantSide {
			t.Errorf("%s: Metrics(start, %v).Side = %v, want %v", c.name, c.q, m.Side, wantSide)
		}
	}
}

// TestNotAheadOnTheLastCircleExactly: a marker on the last segment's great circle (its component
// along the segment's start exactly −1, across it exactly 0) is past the end by 170°, so not
// Ahead (the definition of Ahead in Metrics).
func TestNotAheadOnTheLastCircleExactly(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0, 10}})
	// The antipode of the start (components −1 and 0, past the end by 170°) and the north pole
	// (components 0 and 1, past the end by 80°), both on the meridian circle of the route.
	for _, q := range []orb.Point{{180, 0}, {0, 90}} {
		m := r.Metrics(r.PlaceAt(0), q)
		if m.Closest.Point != (orb.Point{0, 10}) || m.Ahead {
			t.Errorf("Metrics(start, %v): Closest.Point %v, Ahead %v; want the end (0, 10) and Ahead false", q, m.Closest.Point, m.Ahead)
		}
	}
}

// TestCrossTrackIsRouteDistAtAFoot: where the closest point is the foot of the perpendicular, the
// cross-track distance is RouteDistM itself, to the bit (the documentation of CrossTrackM), with
// the side's sign.
func TestCrossTrackIsRouteDistAtAFoot(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.01}, {0.5, 0.3}})
	for _, q := range []orb.Point{{0.004, 0.0003}, {0.004, -0.002}, {0.0102, 0.006}, {0.3, 0.1}, {0.3, 0.5}} {
		m := r.Metrics(r.PlaceAt(0), q)
		if math.Abs(m.CrossTrackM) != m.RouteDistM {
			t.Errorf("Metrics(start, %v): CrossTrackM %.17g, RouteDistM %.17g: want equal magnitudes", q, m.CrossTrackM, m.RouteDistM)
		}
	}
}

// TestUserQueryMovedAlone: Place is a value, and a caller may move its Query without its AlongM;
// Metrics then measures UserDistM from the new Query (the documentation of Metrics). Expected:
// GeodesicDistM between the new Query and the marker.
func TestUserQueryMovedAlone(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.01, 0}, {0.02, 0.005}})
	user := r.Snap(orb.Point{0.003, 0.0004})
	user.Query = orb.Point{0.003, -0.0007}
	q := orb.Point{0.015, 0.004}
	m := r.Metrics(user, q)
	near(t, fmt.Sprintf("Metrics(user with Query moved to %v, %v).UserDistM", user.Query, q), m.UserDistM, GeodesicDistM(user.Query, q), tolLocalM)
}

// TestVertexRuleAtTheUsersVertex: on the user's own segment the start vertex is part of the
// considered arc when the user stands at it, so a foot within vertexSnapM after it is that vertex
// (the vertex rule of Snap, which Metrics follows); from the start of the route and from an
// interior vertex.
func TestVertexRuleAtTheUsersVertex(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.01, 0}, {0.02, 0}})
	for _, v := range []int{0, 1} {
		vertex := r.preps[v].point()
		// 0.5e-6 m along the route after the vertex, 10 m to the north.
		q := orb.Point{vertex[0] + 0.5e-6*degPerM, 10 * degPerM}
		user := r.PlaceAt(r.Segment(v).StartM)
		m := r.Metrics(user, q)
		if m.Closest.Point != vertex || m.Closest.AlongM != r.Segment(v).StartM || m.AlongM != 0 {
			t.Errorf("Metrics(user at vertex %d, %v).Closest = %v at %v m (AlongM %v), want the vertex %v at %v m exactly",
				v, q, m.Closest.Point, m.Closest.AlongM, m.AlongM, vertex, r.Segment(v).StartM)
		}
	}
}

// TestTieFoundSecond: ties go to the smaller along-route position also when
// the search meets the nearer, later stretch first. A hairpin whose
// outbound stretch runs north of the equator and whose return runs south,
// then a road far north: the tree puts the return (segment 2) in the leaf
// nearer a marker on the equator, so it is met first; a marker 0.6e-6 m
// nearer the return than the outbound is tied, and the outbound (segment
// 0) wins; 1.4e-6 m nearer, the return wins.
func TestTieFoundSecond(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0.001}, {0.01, 0.001}, {0.01, -0.001}, {0, -0.001}, {0, 1}, {0.5, 1}})
	if r.items[0].seg != 2 {
		t.Fatalf("the tree's first leaf starts with segment %d, want the return stretch (2): the test's premise", r.items[0].seg)
	}
	for _, c := range []struct {
		name    string
		southM  float64 // marker's shift south of the equator, metres (mean-radius sphere)
		wantSeg int
	}{
		{"0.6e-6 m nearer the return: tied, the outbound", 0.3e-6, 0},
		{"1.4e-6 m nearer the return: the return", 0.7e-6, 2},
	} {
		q := orb.Point{0.005, -c.southM * degPerM}
		if got := r.Snap(q).Segment; got != c.wantSeg {
			t.Errorf("%s: Snap(%v).Segment = %d, want %d", c.name, q, got, c.wantSeg)
		}
		if m := checkAgreesWithScan(t, r, r.PlaceAt(0), q); m.Closest.Segment != c.wantSeg {
			t.Errorf("%s: Metrics(start, %v).Closest.Segment = %d, want %d", c.name, q, m.Closest.Segment, c.wantSeg)
		}
	}
}

// TestManyTiedStretchesFromUser: the second pass of a many-way tie
// (firstWithin) considers the user's own segment from the user's place on,
// and the user's segment itself: a road driven twenty times over one
// segment each way, so that all twenty arcs are the same and the tree's
// leaves are runs of consecutive segments.
func TestManyTiedStretchesFromUser(t *testing.T) {
	a, b := orb.Point{2, 45}, orb.Point{2.01, 45}
	pts := []orb.Point{a}
	for i := range 20 {
		pts = append(pts, [2]orb.Point{b, a}[i%2])
	}
	r := mustRoute(t, pts)
	for _, c := range []struct {
		desc    string
		userM   float64 // along the route
		marker  orb.Point
		wantSeg int
	}{
		// The user on the second drive (segment 1): it wins.
		{"user on the second drive, marker ahead", r.Segment(1).StartM + 100, orb.Point{2.002, 45.0003}, 1},
		// The same on the fourth drive (segment 3, the last of the leaf {0, 1, 2, 3}: its subtree's
		// largest index is the user's segment, which the second pass must still open).
		{"user on the fourth drive, marker ahead", r.Segment(3).StartM + 100, orb.Point{2.002, 45.0003}, 3},
		// The user in the middle of the fifth drive (segment 4, eastward like the first): a marker
		// beside its start is behind the user on it, and the sixth drive passes it first.
		{"user mid fifth drive, marker behind", r.Segment(4).StartM + r.Segment(4).LengthM/2, orb.Point{2.001, 45.0003}, 5},
	} {
		m := checkAgreesWithScan(t, r, r.PlaceAt(c.userM), c.marker)
		if m.Closest.Segment != c.wantSeg {
			t.Errorf("%s: Metrics(...).Closest.Segment = %d, want %d", c.desc, m.Closest.Segment, c.wantSeg)
		}
	}
}

// TestTieComparedAsAngles: ties are judged on spherical distances (SPEC
// §4: within 1e-6 m as an angle at the mean radius), not on chords, which
// differ from them by the factor cos(θ/2) far from the route. A marker 50°
// south of a crossing of two stretches, A along the equator (segment 0) and
// B through the same point tilted by α (segment 2), is farther from A than
// from B by asin(sin 50°) − asin(sin 50°·cos α) ≈ α²·tan 50°/2 (worked by
// hand on the unit sphere: B's pole is (0, −sin α, cos α)). At 1.05e-6 m the
// chords differ by cos 25° of it, 0.95e-6 m, within the tolerance as chords
// but not as angles: B wins. At 0.95e-6 m both are within: A, the earlier,
// wins.
func TestTieComparedAsAngles(t *testing.T) {
	q := orb.Point{0, -50}
	for _, c := range []struct {
		diffM   float64 // how much nearer B is, as an angle at the mean radius
		wantSeg int
	}{
		{1.05e-6, 2},
		{0.95e-6, 0},
	} {
		alpha := math.Sqrt(2 * c.diffM / meanRadiusM / math.Tan(50*degRad))
		dLat := 0.01 * math.Tan(alpha) // B from (0.01, −dLat) to (−0.01, dLat) crosses (0, 0) at α
		r := mustRoute(t, []orb.Point{{-0.01, 0}, {0.01, 0}, {0.01, -dLat}, {-0.01, dLat}})
		if got := r.Snap(q).Segment; got != c.wantSeg {
			t.Errorf("B nearer by %g m: Snap(%v).Segment = %d, want %d", c.diffM, q, got, c.wantSeg)
		}
		if got := r.snapScan(q).Segment; got != c.wantSeg {
			t.Errorf("B nearer by %g m: snapScan(%v).Segment = %d, want %d", c.diffM, q, got, c.wantSeg)
		}
	}
}
