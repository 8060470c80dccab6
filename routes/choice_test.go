package routes

import (
	"math"
	"testing"

	"github.com/golang/geo/s2"
	"github.com/paulmach/orb"
	"pgregory.net/rapid"
)

// The choice margins of hand-built cases on the equator, where a degree of
// longitude or latitude is R·π/180 of the mean sphere (the rules' metric;
// degPerM converts): each expectation follows from the construction.
func TestChoiceMarginM(t *testing.T) {
	corner := []orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.01}} // east, then north
	retrace := []orb.Point{{0, 0}, {0.01, 0}, {0, 0}}      // out and back
	for _, tc := range []struct {
		name      string
		pts       []orb.Point
		marker    orb.Point
		want, tol float64
	}{
		// Inside the corner, 0.5 m north of the first leg and 1 m west of
		// the second: the second leg would win were it 0.5 m − 1e-6 m
		// nearer; the vertex rule is 1 m away.
		{"inside corner", corner, orb.Point{0.01 - 1*degPerM, 0.5 * degPerM}, 0.5, 1e-4},
		// A foot 3e-6 m before the corner, 10 m to the south: the vertex
		// rule is 2e-6 m away, the second leg's tie 1e-6 m (its start, the
		// corner, is 10 m + 4.5e-13 m away).
		{"foot at the corner", corner, orb.Point{0.01 - 3e-6*degPerM, -10 * degPerM}, 1e-6, 1e-8},
		// Beside an out-and-back road both legs are equally near: the
		// return leg wins were it 1e-6 m nearer (the tie tolerance).
		{"retraced road", retrace, orb.Point{0.004, 0.001}, 1e-6, 1e-8},
		// Well inside one leg and far from the rules: the margin is the
		// foot's distance from the vertex rule's threshold, measured along
		// the route, where on the equator the WGS84 geodesic is a·Δλ
		// (a = 6,378,137 m).
		{"mid-leg", []orb.Point{{0, 0}, {0.01, 0}}, orb.Point{0.004, 0.001}, equatorM(0.004) - 1e-6, 1e-6},
		// Outside the corner, nearest to the corner itself: both legs'
		// closest point is that vertex, so neither tie decides anything;
		// the first leg's far end is 1,110 m farther than its near one.
		{"outside corner", corner, orb.Point{0.01 + 5*degPerM, -5 * degPerM}, math.Hypot(0.01/degPerM+5, 5) - math.Sqrt(50), 0.01},
	} {
		r := mustRoute(t, tc.pts)
		got := r.ChoiceMarginM(r.PlaceAt(0), tc.marker)
		if math.IsNaN(got) || math.Abs(got-tc.want) > tc.tol {
			t.Errorf("%s: ChoiceMarginM = %g m, want %g (tolerance %g)", tc.name, got, tc.want, tc.tol)
		}
	}
}

// The route-end rule: a marker 1e-6 m + 2 µm past the end in the direction
// of travel is 2 µm from being "ahead".
func TestChoiceMarginAtRouteEnd(t *testing.T) {
	r := mustRoute(t, []orb.Point{{0, 0}, {0.01, 0}})
	q := orb.Point{0.01 + 3e-6*degPerM, 0.001}
	if got := r.ChoiceMarginM(r.PlaceAt(0), q); math.Abs(got-2e-6) > 1e-8 {
		t.Errorf("ChoiceMarginM past the end = %g m, want 2e-6", got)
	}
	if got := r.SnapChoiceMarginM(orb.Point{0.005, 0.001}); math.Abs(got-(equatorM(0.005)-1e-6)) > 1e-6 {
		t.Errorf("SnapChoiceMarginM mid-route = %g m, want %g", got, equatorM(0.005)-1e-6)
	}
}

// What the margin promises: when the choice is more than 1 m from changing,
// moving the marker by 1 mm moves its closest point continuously (along by
// at most a few mm), on every generated route shape.
func TestPropChoiceMarginBoundsJumps(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		r, _ := drawRoute(t)
		user := drawUser(t, r)
		q := drawNear(t, r, "marker")
		m := r.ChoiceMarginM(user, q)
		if math.IsNaN(m) || m < 0 {
			t.Fatalf("ChoiceMarginM = %g", m)
		}
		if m <= 1 {
			return
		}
		a := r.Metrics(user, q)
		b := r.Metrics(user, offsetPoint(q, rapid.Float64Range(0, 360).Draw(t, "nudge_bearing_deg"), 1e-3))
		if d := math.Abs(a.Closest.AlongM - b.Closest.AlongM); d > 0.01 {
			t.Fatalf("margin %g m, but a 1 mm nudge moved the closest point %g m along", m, d)
		}
	})
}

// equatorM is the WGS84 geodesic length of dLonDeg along the equator.
func equatorM(dLonDeg float64) float64 { return 6378137 * dLonDeg * math.Pi / 180 }

// The decisions of the margin one at a time, each built so that it alone is the nearest to its
// threshold, to 1e-8 m (a tenth of the tie tolerance's scale): distances on the mean sphere as
// the rules take them (degPerM), along the route as geodesics (equatorM), and, where the
// geometry gives no closed form, golang/geo's s2 angles × the mean radius.
func TestChoiceMarginEachDecision(t *testing.T) {
	corner := []orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.01}} // east, then north
	leg := []orb.Point{{0, 0}, {0.01, 0}}
	stairs := []orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.01}, {0.02, 0.01}}
	sphereM := func(a, b orb.Point) float64 {
		pa := s2.PointFromLatLng(s2.LatLngFromDegrees(a[1], a[0]))
		pb := s2.PointFromLatLng(s2.LatLngFromDegrees(b[1], b[0]))
		return pa.Distance(pb).Radians() * meanRadiusM
	}
	r := mustRoute(t, stairs)
	stairsUser := r.PlaceAt(r.Segment(1).StartM + 300) // on the northward leg
	outsideSecond := orb.Point{0.01 - 5*degPerM, 0.01 + 5*degPerM}
	for _, tc := range []struct {
		name      string
		pts       []orb.Point
		userAt    float64 // along-route metres
		marker    orb.Point
		want, tol float64
	}{
		// 2 m north of the first leg, 0.5 m west of the second: the second wins, and the first
		// would join the tie were it 1.5 m − 1e-6 m nearer.
		{"an earlier segment joining the tie", corner, 0, orb.Point{0.01 - 0.5*degPerM, 2 * degPerM}, 1.5 - 1e-6, 1e-8},
		// 0.5 m north of the first leg, 1 m west of the second: the first wins, and the second
		// would win were it 0.5 m + 1e-6 m nearer (a later segment must be a tolerance nearer).
		{"a later segment drawing a tolerance nearer", corner, 0, orb.Point{0.01 - 1*degPerM, 0.5 * degPerM}, 0.5 + 1e-6, 1e-8},
		// A foot 0.3 of the way from the end, 111 m off: the vertex rule at the end.
		{"foot nearer the end", leg, 0, orb.Point{0.007, 0.001}, equatorM(0.003) - 1e-6, 1e-8},
		// The user 100 m along, the foot at 0.004: the start vertex is not part of the arc ahead
		// of the user, so only the end's vertex rule counts.
		{"user inside the segment", leg, 100, orb.Point{0.004, 0.001}, equatorM(0.006) - 1e-6, 1e-6},
		// The user on the northward leg of the stairs, the marker outside the second corner:
		// the tie between the ends of the chosen segment, from the user's place (its start
		// here) to the corner.
		{"the ends' tie from the user's place", stairs, stairsUser.AlongM, outsideSecond,
			sphereM(outsideSecond, stairsUser.Point) - sphereM(outsideSecond, stairs[2]) - 1e-6, 1e-7},
		// The north pole and a route 60° up the meridian: past the end by 30°, nearer the
		// route-end rule (30°) than the ends' tie (60°).
		{"the route-end rule from the pole", []orb.Point{{0, 0}, {0, 60}}, 0, orb.Point{0, 90}, math.Pi/6*meanRadiusM - 1e-6, 1e-6},
		// A route of 100° from the north pole down the meridian and the south pole (components
		// −1 and exactly 0 in the segment's plane): past the end by 80°, nearer the route-end
		// rule than the ends' tie (100°).
		{"the route-end rule at the antipode of the start", []orb.Point{{0, 90}, {0, -10}}, 0, orb.Point{0, -90}, 4*math.Pi/9*meanRadiusM - 1e-6, 1e-6},
		// A foot 0.5e-6 m before the corner, 10 m to the south, is snapped to the corner; the
		// vertex rule is measured from the foot itself, 0.5e-6 m from its threshold.
		{"snapped foot at the corner", corner, 0, orb.Point{0.01 - 0.5e-6*degPerM, -10 * degPerM}, 0.5e-6, 1e-8},
	} {
		r := mustRoute(t, tc.pts)
		got := r.ChoiceMarginM(r.PlaceAt(tc.userAt), tc.marker)
		if math.IsNaN(got) || math.Abs(got-tc.want) > tc.tol {
			t.Errorf("%s: ChoiceMarginM = %.12g m, want %.12g (off by %.3g, tolerance %g)", tc.name, got, tc.want, got-tc.want, tc.tol)
		}
	}
}
