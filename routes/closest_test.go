package routes

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/s2"
	"github.com/paulmach/orb"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
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
	require.NoError(t, err)
	return r
}

// checkAgreesWithScan asserts that Metrics and the direct scan give the same answer.
func checkAgreesWithScan(t *testing.T, r *Route, user Place, q orb.Point) Metrics {
	t.Helper()
	m := r.Metrics(user, q)
	s := r.metricsScan(user, q)
	assert.Equal(t, s.Closest.Segment, m.Closest.Segment, "segment: index vs scan for %v", q)
	assert.InDelta(t, s.Closest.AlongM, m.Closest.AlongM, 1e-6, "along: index vs scan for %v", q)
	assert.InDelta(t, s.RouteDistM, m.RouteDistM, 1e-6, "route_dist: index vs scan for %v", q)
	assert.Equal(t, s.Ahead, m.Ahead, "ahead: index vs scan for %v", q)
	assert.Equal(t, s.Side, m.Side, "side: index vs scan for %v", q)
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
		assert.Equal(t, c.wantSeg, r.Snap(q).Segment, "%s: Snap", c.name)
		assert.Equal(t, c.wantSeg, r.snapScan(q).Segment, "%s: snapScan", c.name)
		m := checkAgreesWithScan(t, r, start, q)
		assert.Equal(t, c.wantSeg, m.Closest.Segment, "%s: Metrics", c.name)
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
		assert.Equal(t, c.wantAlong, p.AlongM, "%s: Snap(%v)", c.name, q)
		assert.Equal(t, c.wantAlong, r.snapScan(q).AlongM, "%s: snapScan(%v)", c.name, q)
	}
	// On the axis of the segment's great circle every point of it is equally far: the start.
	assert.Equal(t, 0.0, r.Snap(orb.Point{0, 90}).AlongM)
	assert.Equal(t, orb.Point{0, 0}, r.Snap(orb.Point{123, -90}).Point)
}

// TestVertexRule: a marker outside a corner is closest to the vertex; the place belongs to the
// segment that starts there, its point is the vertex as given, and its side is judged against
// that segment.
func TestVertexRule(t *testing.T) {
	corner := orb.Point{0.01, 0}
	r := mustRoute(t, []orb.Point{{0, 0}, corner, {0.01, 0.01}})
	q := orb.Point{0.011, -0.001}
	p := r.Snap(q)
	assert.Equal(t, 1, p.Segment)
	assert.Equal(t, corner, p.Point)
	assert.Equal(t, r.Segment(1).StartM, p.AlongM)
	assert.InDelta(t, GeodesicDistM(q, corner), p.DistM, tolLocalM)

	m := checkAgreesWithScan(t, r, r.PlaceAt(0), q)
	assert.Equal(t, 1, m.Closest.Segment)
	assert.Equal(t, corner, m.Closest.Point)
	// Segment 1 runs north along lon 0.01; the marker is east of it: right, and its cross-track
	// distance is to the foot on that meridian, level with the marker.
	assert.Equal(t, Right, m.Side)
	assert.InDelta(t, -GeodesicDistM(q, orb.Point{0.01, -0.001}), m.CrossTrackM, 1e-6)
	assert.InDelta(t, math.Abs(m.CrossTrackM)-SideOnM, m.SideMarginM, 1e-12)

	// At the route's end the last segment holds the place.
	end := r.Snap(orb.Point{0.012, 0.02})
	assert.Equal(t, 1, end.Segment)
	assert.Equal(t, r.LengthM(), end.AlongM)
}

// TestLoop: a closed square. The start and end are one position: Snap gives along 0 (the tie
// rule); for a user near the end, a marker at the start is reached at the end, and a marker just
// past the end has no closest point ahead.
func TestLoop(t *testing.T) {
	sq := []orb.Point{{-0.01, -0.01}, {0.01, -0.01}, {0.01, 0.01}, {-0.01, 0.01}, {-0.01, -0.01}}
	r := mustRoute(t, sq)
	L := r.LengthM()
	assert.Equal(t, 0.0, r.Snap(sq[0]).AlongM)

	user := r.PlaceAt(0.9 * L)
	m := checkAgreesWithScan(t, r, user, sq[0])
	assert.True(t, m.Ahead)
	assert.Equal(t, L, m.Closest.AlongM)
	assert.InDelta(t, 0.1*L, m.AlongM, 1e-9)
	assert.Equal(t, 0.0, m.RouteDistM)

	past := orb.Point{-0.01, -0.011} // south of the end, in the last segment's direction of travel
	m = checkAgreesWithScan(t, r, user, past)
	assert.False(t, m.Ahead)
	assert.Equal(t, sq[4], m.Closest.Point)
	assert.InDelta(t, 0.1*L, m.AlongM, 1e-9) // the stretch to the end; callers report null
	assert.InDelta(t, GeodesicDistM(past, sq[4]), m.RouteDistM, tolLocalM)
}

// TestUTurn: out and back along one line. Beside it, both legs are equally near: the outbound leg
// wins for a user before the turn; a user past the turn gets the return leg, on the other side.
func TestUTurn(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.01, 0}, {0, 0}})
	L := r.LengthM()
	q := orb.Point{0.005, 0.0005}
	m := checkAgreesWithScan(t, r, r.PlaceAt(0), q)
	assert.Equal(t, 0, m.Closest.Segment)
	assert.Equal(t, Left, m.Side) // north of an eastbound leg
	assert.InDelta(t, L/4, m.AlongM, 1e-3)

	m = checkAgreesWithScan(t, r, r.PlaceAt(0.6*L), q)
	assert.Equal(t, 1, m.Closest.Segment)
	assert.Equal(t, Right, m.Side) // north of a westbound leg
	assert.InDelta(t, 0.75*L-0.6*L, m.AlongM, 1e-3)
	assert.InDelta(t, 0.15*L/10, m.EtaS, 1e-4)
}

// TestMarkerBehindUser: on the user's own segment only the part from the user on counts, so a
// marker behind gets the user's own place.
func TestMarkerBehindUser(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.02, 0}, {0.03, 0}})
	user := r.PlaceAt(1000)
	q := orb.Point{0.002, 0.001}
	m := checkAgreesWithScan(t, r, user, q)
	assert.True(t, m.Ahead)
	assert.Equal(t, 0.0, m.AlongM)
	assert.Equal(t, 0.0, m.EtaS)
	assert.Equal(t, user.Point, m.Closest.Point)
	assert.InDelta(t, GeodesicDistM(q, user.Point), m.RouteDistM, tolLocalM)
	assert.Equal(t, Left, m.Side)
	// The cross-track distance is to the foot on the segment's great circle, behind the user.
	assert.InDelta(t, GeodesicDistM(q, orb.Point{0.002, 0}), m.CrossTrackM, 1e-6)

	// Behind the user on an earlier segment: the same.
	user = r.PlaceAt(r.Segment(1).StartM + 100)
	m = checkAgreesWithScan(t, r, user, q)
	assert.Equal(t, 0.0, m.AlongM)
	assert.Equal(t, 1, m.Closest.Segment)
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
		assert.Equal(t, c.ahead, m.Ahead, c.name)
		if !c.ahead {
			assert.Equal(t, end, m.Closest.Point, c.name)
			assert.InDelta(t, r.LengthM()-100, m.AlongM, 1e-9, c.name)
		}
	}
}

// TestAntimeridian: a route crossing ±180 behaves like any other.
func TestAntimeridian(t *testing.T) {
	r := mustRoute(t, []orb.Point{{179.995, 0}, {-179.995, 0}, {-179.99, 0.005}})
	q := orb.Point{180, 0.001}
	p := r.Snap(q)
	assert.Equal(t, 0, p.Segment)
	assert.InDelta(t, r.Segment(0).LengthM/2, p.AlongM, 1e-6)
	assert.InDelta(t, 180, math.Abs(p.Point[0]), 1e-12)
	assert.InDelta(t, 0, p.Point[1], 1e-12)
	// 0.001° of latitude at the equator: a(1 − e²)·0.001° (meridional radius of curvature).
	assert.InDelta(t, wgs84A*(1-wgs84E2)*0.001*degRad, p.DistM, 1e-6)
	m := checkAgreesWithScan(t, r, r.PlaceAt(0), q)
	assert.Equal(t, Left, m.Side)
	m = checkAgreesWithScan(t, r, r.PlaceAt(0), orb.Point{-179.999, -0.002})
	assert.Equal(t, Right, m.Side)
	assert.Equal(t, 90.0, r.Segment(0).HeadingDeg)
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
		assert.Equal(t, c.side, m.Side, "%v m north", c.northM)
		assert.InDelta(t, c.margin, m.SideMarginM, 1e-9, "%v m north", c.northM)
		assert.InDelta(t, c.northM, m.CrossTrackM, 1e-9, "%v m north", c.northM)
	}
	assert.Equal(t, "left", Left.String())
	assert.Equal(t, "right", Right.String())
	assert.Equal(t, "on", On.String())
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
		assert.Equal(t, m1, m2, "marker %v", q)
	}
}

// TestEtaUsesSegmentSpeeds: 1000 m at 10 m/s then 1000 m at 20 m/s.
func TestEtaUsesSegmentSpeeds(t *testing.T) {
	r := equatorRoute(t, []float64{1000, 1000}, []float64{10, 20})
	q := orb.Point{1500 / wgs84A * radDeg, 0.001}
	m := checkAgreesWithScan(t, r, r.PlaceAt(0), q)
	assert.InDelta(t, 1500, m.AlongM, 1e-6)
	assert.InDelta(t, 100+25, m.EtaS, 1e-6)
	assert.InDelta(t, r.TimeBetweenS(0, m.Closest.AlongM), m.EtaS, 1e-9)
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
		assert.InDelta(t, minAng, got, 1e-13, "Snap(%v) spherical distance vs s2", q)
		assert.Less(t, onRoute, 1e-13, "Snap(%v).Point off the route", q)
		assert.InDelta(t, 0, GeodesicDistM(r.PointAt(p.AlongM), p.Point), 1e-6, "PointAt(Snap(%v).AlongM)", q)
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
	assert.Zero(t, n)
	// A Place whose fields were changed by hand is re-derived, not trusted.
	moved := user
	moved.AlongM += 500
	fresh := r.PlaceAt(moved.AlongM)
	fresh.Query = user.Query
	for _, q := range ms[:10] {
		assert.Equal(t, r.Metrics(fresh, q).Closest.AlongM, r.Metrics(moved, q).Closest.AlongM)
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
	assert.Equal(t, ps.Segment, p.Segment, "Snap vs snapScan segment")
	assert.Equal(t, 1, p.Segment)
	assert.Equal(t, uturn[1], p.Point)

	// The user 2e-11 m past the first vertex, whose unit vector rounds to the vertex's. A foot
	// 5.6e-7 m along was snapped back to the vertex, behind the user.
	r = mustRoute(t, []orb.Point{{0, 0}, {0.001, 0}})
	user := r.PlaceAt(1.9667994472309299e-11)
	m := checkAgreesWithScan(t, r, user, orb.Point{5e-12, 0.0001})
	assert.GreaterOrEqual(t, m.Closest.AlongM, user.AlongM)
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
	require.Greater(t, r.NumSegments(), maxTies)
	q := orb.Point{2.004, 45.0003}
	p := r.Snap(q)
	assert.Equal(t, 0, p.Segment)
	assert.Equal(t, r.snapScan(q).Segment, p.Segment)
	// From a user on the fourth pass, the fourth pass wins.
	user := r.PlaceAt(r.Segment(3).StartM + 1)
	m := checkAgreesWithScan(t, r, user, orb.Point{2.009, 45.0003})
	assert.Equal(t, 3, m.Closest.Segment)
}
