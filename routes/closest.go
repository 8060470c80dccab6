package routes

import (
	"math"

	"github.com/golang/geo/r3"
	"github.com/golang/geo/s1"
	"github.com/golang/geo/s2"
	"github.com/paulmach/orb"
)

// Place is a position on a route.
type Place struct {
	// AlongM is the along-route position, metres from the route's start, in [0, LengthM()].
	AlongM float64
	// Segment is the index of the segment holding the place: at an interior vertex the segment
	// that starts there, at the route's end the last one (as SegmentAt(AlongM)).
	Segment int
	// Point is the place itself, [lon, lat] degrees; route vertices are returned exactly as given.
	Point orb.Point
	// DistM is the WGS84 geodesic distance from Query to Point, metres.
	DistM float64
	// Query is the position that was placed on the route (the user's or the marker's own
	// position); for a place made by PlaceAt it is Point.
	Query orb.Point

	pc placeCache
}

// placeCache holds what Metrics needs about the user's place, valid while AlongM and Query are
// the values it was made for (Place is a value: callers may change the exported fields).
type placeCache struct {
	ok      bool
	alongM  float64
	query   orb.Point
	seg     int
	cl, sl  float64   // direction of the place in its segment's (a, t) plane
	v       r3.Vector // the place's unit vector
	onRoute orb.Point // the place's [lon, lat]
	onPrep  ellPoint  // onRoute prepared for the geodesic
	qv      r3.Vector // Query's unit vector
	qPrep   ellPoint  // Query prepared for the geodesic
}

// Side is the side of the direction of travel a marker lies on.
type Side int8

const (
	Left  Side = 1
	Right Side = 2
	On    Side = 3 // within SideOnM of the line
)

// String returns the wire name: "left", "right" or "on".
func (s Side) String() string {
	switch s {
	case Left:
		return "left"
	case Right:
		return "right"
	case On:
		return "on"
	}
	return "side(?)"
}

// SideOnM is the cross-track distance, in metres, within which a marker is On the line (SPEC §4).
const SideOnM = 0.01

// Metrics is what a marker's position means relative to a user on a route (SPEC §4).
type Metrics struct {
	// UserDistM is the WGS84 geodesic distance from the user (the Place's Query) to the marker.
	// (All distances here: see "Distances in Snap and Metrics" below Metrics.)
	UserDistM float64
	// RouteDistM is the WGS84 geodesic distance from the marker to Closest.Point, its closest
	// point at or ahead of the user.
	RouteDistM float64
	// AlongM is Closest.AlongM minus the user's AlongM (≥ 0), and EtaS the travel time over that
	// stretch at the segments' speeds. When Ahead is false they measure the stretch to the route's
	// end, and callers report both as null.
	AlongM float64
	EtaS   float64
	// Ahead is false when the route ends before the marker's nearest stretch: the closest point at
	// or ahead of the user is the route's final vertex and the foot of the perpendicular from the
	// marker to the last segment's great circle lies past that vertex, in the direction of travel,
	// by more than the tie tolerance (1e-6 m, as an angle at the mean radius).
	Ahead bool
	// Side is Left or Right of the direction of travel, or On when |CrossTrackM| ≤ SideOnM.
	Side Side
	// CrossTrackM is the marker's signed distance from the great circle of the side segment
	// (positive on the left): the WGS84 geodesic distance from the marker to the foot of its
	// perpendicular on that great circle (not clamped to the segment). The side segment is the one
	// holding Closest: at an interior vertex the segment that starts there, at the route's end the
	// last one. When the foot is Closest it equals RouteDistM; otherwise, under 1 km it comes from
	// the ellipsoid's local metric (within 0.1 µm of the geodesic), beyond from Vincenty.
	CrossTrackM float64
	// SideMarginM is how far the side decision is from flipping, | |CrossTrackM| − SideOnM |
	// metres: moving the marker across the line by less than this cannot change Side unless the
	// closest point moves to another segment (which this margin does not measure).
	SideMarginM float64
	// Closest is the closest point at or ahead of the user, with DistM = RouteDistM and Query the
	// marker.
	Closest Place
}

// Snap returns the user's place on the route: the closest point of p ([lon, lat] degrees) over all
// segments. Closest points are found on the unit sphere, segment by segment (the foot of the
// perpendicular on the great-circle arc, or the nearer end), and compared by their spherical
// distance from p; per-segment closest points within 1e-6 m of the minimum (as an angle at the
// mean radius) are tied and the one with the smallest along-route position wins, also between the
// two ends of one segment. A foot of the perpendicular within 1e-6 m (along the route) of a vertex
// is taken to be that vertex, so that the segment holding the place never hangs on rounding. DistM
// is then the WGS84 geodesic distance from p to that point.
//
// Because the choice is made on the sphere and the measurement on the ellipsoid, DistM can exceed
// the geodesic distance from p to some other route point by at most the ellipsoid's spread of
// radii of curvature, (1 − e²)^(−3/2) − 1 ≈ 1.0%.
//
// p must be valid (ValidateLatLon); Snap does not allocate.
func (r *Route) Snap(p orb.Point) Place {
	qv, sinLat, cosLat := unitVec(p)
	qq := query{q: qv, u: 0, cl: 1, sl: 0, lo: r.segs[0].a}
	seg := r.nearest(&qq)
	c := r.resolve(seg, &qq, nil)
	qPrep := prepSinCos(p[1], p[0], sinLat, cosLat)
	pl := Place{AlongM: c.alongM, Segment: c.normSeg, Point: c.pt, DistM: pairDistM(c.v, &c.prep, qv, &qPrep), Query: p}
	pl.pc = placeCache{ok: true, alongM: pl.AlongM, query: p, seg: c.ownSeg, v: c.v, onRoute: c.pt, onPrep: c.prep, qv: qv, qPrep: qPrep}
	pl.pc.cl, pl.pc.sl = r.segDir(c.ownSeg, c.s)
	if c.ownSeg != c.normSeg { // at an interior vertex: the place starts the next segment
		pl.pc.seg, pl.pc.cl, pl.pc.sl = c.normSeg, 1, 0
	}
	return pl
}

// PlaceAt returns the place at along-route position alongM (clamped to [0, LengthM()]; NaN counts
// as 0), with Query = Point and DistM = 0. It does not allocate.
func (r *Route) PlaceAt(alongM float64) Place {
	pl := Place{}
	r.fillCache(&pl, r.clampAlong(alongM), nil)
	pl.AlongM, pl.Segment, pl.Point, pl.Query = pl.pc.alongM, pl.pc.seg, pl.pc.onRoute, pl.pc.onRoute
	return pl
}

// segDir returns (cos s, sin s) for an angle s along segment i.
func (r *Route) segDir(i int, s float64) (float64, float64) {
	sg := &r.segs[i]
	if s >= sg.theta {
		return sg.cosT, sg.sinT
	}
	sn, cs := math.Sincos(s)
	return cs, sn
}

// fillCache (re)computes the cache of a place at along (already clamped) for query (nil: the
// place itself).
func (r *Route) fillCache(pl *Place, along float64, query *orb.Point) {
	seg := r.SegmentAt(along)
	sg := &r.segs[seg]
	c := &pl.pc
	c.ok, c.alongM, c.seg = true, along, seg
	switch {
	case along == r.startM[seg]:
		c.cl, c.sl, c.v, c.onRoute, c.onPrep = 1, 0, sg.a, r.preps[seg].point(), r.preps[seg]
	case along >= r.startM[seg+1]:
		c.cl, c.sl, c.v, c.onRoute, c.onPrep = sg.cosT, sg.sinT, sg.b, r.preps[seg+1].point(), r.preps[seg+1]
	default:
		s := (along - r.startM[seg]) / sg.lengthM * sg.theta
		c.cl, c.sl = r.segDir(seg, s)
		c.v = sg.a.Mul(c.cl).Add(sg.t.Mul(c.sl))
		c.onRoute = latLonOf(c.v)
		c.onPrep = prepVec(c.v, c.onRoute)
	}
	if query == nil {
		c.query, c.qv, c.qPrep = c.onRoute, c.v, c.onPrep
	} else {
		c.query = *query
		var sinLat, cosLat float64
		c.qv, sinLat, cosLat = unitVec(c.query)
		c.qPrep = prepSinCos(c.query[1], c.query[0], sinLat, cosLat)
	}
}

func (r *Route) clampAlong(alongM float64) float64 {
	if !(alongM > 0) { // also NaN
		return 0
	}
	return min(alongM, r.LengthM())
}

// userCache returns the user's cache, recomputing it if the exported fields moved.
func (r *Route) userCache(user *Place) *placeCache {
	c := &user.pc
	if !c.ok || c.alongM != user.AlongM || c.query != user.Query {
		r.fillCache(user, r.clampAlong(user.AlongM), &user.Query)
	}
	return c
}

// closest is a resolved closest point.
type closest struct {
	ownSeg  int       // the segment it was found on
	normSeg int       // the segment holding it by the vertex rule (the next one at an interior vertex)
	s       float64   // angle along ownSeg from its start, radians
	at      int       // atFoot, atLo, atEnd
	x, y    float64   // Q in ownSeg's (a, t) plane
	v       r3.Vector // unit vector
	pt      orb.Point // [lon, lat] degrees
	prep    ellPoint  // pt prepared for the geodesic (vertices from their degrees, like queries)
	alongM  float64
}

// resolve turns the winning segment into the closest point. user is the user's cache when the
// query starts at the user's place (then atLo on the user's segment is the user's place itself).
func (r *Route) resolve(seg int, qq *query, user *placeCache) closest {
	sg := &r.segs[seg]
	_, at, x, y := r.segClosest(seg, qq)
	c := closest{ownSeg: seg, normSeg: seg, at: at, x: x, y: y}
	switch at {
	case atFoot:
		sLo := 0.0
		if seg == qq.u {
			sLo = math.Atan2(qq.sl, qq.cl)
		}
		c.s = math.Max(sLo, math.Min(sg.theta, math.Atan2(y, x)))
		if r.snapFootToVertex(&c, qq) {
			break
		}
		h := math.Sqrt(x*x + y*y)
		c.v = sg.a.Mul(x / h).Add(sg.t.Mul(y / h))
		c.pt = latLonOf(c.v)
		c.prep = prepVec(c.v, c.pt)
		c.alongM = r.startM[seg] + c.s/sg.theta*sg.lengthM
	case atEnd:
		c.s, c.v, c.pt, c.prep, c.alongM = sg.theta, sg.b, r.preps[seg+1].point(), r.preps[seg+1], r.startM[seg+1]
		if seg+1 < len(r.segs) {
			c.normSeg = seg + 1
		}
	default: // atLo
		if seg == qq.u && user != nil {
			c.s = math.Atan2(qq.sl, qq.cl)
			c.v, c.pt, c.prep, c.alongM = user.v, user.onRoute, user.onPrep, user.alongM
			if c.alongM >= r.startM[seg+1] && seg+1 < len(r.segs) {
				c.normSeg = seg + 1
			}
		} else {
			c.s, c.v, c.pt, c.prep, c.alongM = 0, sg.a, r.preps[seg].point(), r.preps[seg], r.startM[seg]
		}
	}
	return c
}

// vertexSnapM: a foot of the perpendicular within this along-route distance of a vertex is that
// vertex. Without the rule the segment holding a closest point next to a vertex (and so the side
// judged against it) would hang on rounding in the last bit of the foot's angle; with it, only a
// foot within rounding of vertexSnapM from a vertex is ambiguous. It equals the tie tolerance: the
// vertex is within it of the foot, so no farther from Q by more than that.
const vertexSnapM = tieTolM

// snapFootToVertex applies vertexSnapM to a foot at angle c.s on c.ownSeg, turning c into the
// vertex and reporting true when it applies. The start vertex is taken only when it is part of the
// considered arc (on the user's segment, only when the user is at that vertex).
func (r *Route) snapFootToVertex(c *closest, qq *query) bool {
	seg := c.ownSeg
	sg := &r.segs[seg]
	if (sg.theta-c.s)/sg.theta*sg.lengthM <= vertexSnapM {
		c.at, c.s, c.v, c.pt, c.prep, c.alongM = atEnd, sg.theta, sg.b, r.preps[seg+1].point(), r.preps[seg+1], r.startM[seg+1]
		if seg+1 < len(r.segs) {
			c.normSeg = seg + 1
		}
		return true
	}
	if c.s/sg.theta*sg.lengthM <= vertexSnapM && (seg != qq.u || (qq.cl == 1 && qq.sl == 0)) {
		c.at, c.s, c.v, c.pt, c.prep, c.alongM = atLo, 0, sg.a, r.preps[seg].point(), r.preps[seg], r.startM[seg]
		return true
	}
	return false
}

// timeAtS returns the travel time from the route's start to along-route position along on seg.
func (r *Route) timeAtS(seg int, along float64) float64 {
	return r.startS[seg] + (along-r.startM[seg])/r.segs[seg].speedMps
}

// Metrics returns the marker q's metrics ([lon, lat] degrees) for a user at the place user (from
// Snap or PlaceAt, or any Place whose AlongM is set; Segment is re-derived from AlongM, and
// UserDistM is measured from user.Query).
//
// The closest point at or ahead of the user is found as in Snap over the part of the route from
// the user's place to its end: on the user's own segment only from the user's fraction on (so a
// marker behind the user on that segment gets the user's own place, AlongM = 0), ties within
// 1e-6 m going to the smallest along-route position. See the fields of Metrics for the rest.
//
// q must be valid (ValidateLatLon). Metrics does not allocate.
func (r *Route) Metrics(user Place, q orb.Point) Metrics {
	uc := r.userCache(&user)
	qv, sinLat, cosLat := unitVec(q)
	qq := query{q: qv, u: uc.seg, cl: uc.cl, sl: uc.sl, lo: uc.v}
	seg := r.nearest(&qq)
	qPrep := prepSinCos(q[1], q[0], sinLat, cosLat)
	return r.finish(uc, q, &qPrep, r.resolve(seg, &qq, uc), &qq)
}

// Distances in Snap and Metrics are WGS84 geodesic lengths: by Vincenty's method as in
// GeodesicDistM, or, for points under 1 km apart, from the ellipsoid's local metric, which agrees
// with it within 0.1 µm (see localDistM) and costs a tenth as much.

// finish computes the metrics from a resolved closest point.
func (r *Route) finish(uc *placeCache, q orb.Point, qPrep *ellPoint, c closest, qq *query) Metrics {
	var m Metrics
	m.RouteDistM = pairDistM(c.v, &c.prep, qq.q, qPrep)
	m.UserDistM = pairDistM(uc.qv, &uc.qPrep, qq.q, qPrep)
	m.AlongM = math.Max(0, c.alongM-uc.alongM)
	// The time between the two vertices, then the offsets within the two segments, so that on one
	// segment no cumulative times (which can reach 1e7 s) are subtracted.
	m.EtaS = math.Max(0, (r.startS[c.normSeg]-r.startS[uc.seg])+
		((c.alongM-r.startM[c.normSeg])/r.segs[c.normSeg].speedMps-(uc.alongM-r.startM[uc.seg])/r.segs[uc.seg].speedMps))
	m.Closest = Place{AlongM: c.alongM, Segment: c.normSeg, Point: c.pt, DistM: m.RouteDistM, Query: q}

	last := len(r.segs) - 1
	m.Ahead = true
	if c.alongM >= r.startM[last+1] {
		sg := &r.segs[last]
		x := qq.q.Dot(sg.a)
		y := qq.q.Dot(sg.t)
		if (x != 0 || y != 0) && math.Atan2(y, x)-sg.theta > tieTolRad {
			m.Ahead = false
		}
	}

	// Side: against the great circle of the segment holding the closest point.
	ss := c.normSeg
	sg := &r.segs[ss]
	z := qq.q.Dot(sg.n)
	var xt float64
	if c.at == atFoot && ss == c.ownSeg {
		xt = m.RouteDistM // the foot is the closest point
	} else {
		x, y := qq.q.Dot(sg.a), qq.q.Dot(sg.t)
		h := math.Sqrt(x*x + y*y)
		f := sg.a
		if h > 0 {
			f = sg.a.Mul(x / h).Add(sg.t.Mul(y / h))
		}
		if delta := math.Atan2(math.Abs(z), h); delta*wgs84A < localMaxM {
			xt = localDistM(f, qq.q, delta) // within 0.1 µm of the geodesic, without iterating
		} else {
			fp := r.preps[ss]
			if h > 0 {
				fp = prepVec(f, latLonOf(f))
			}
			xt = inverseDist(qPrep, &fp)
		}
	}
	switch {
	case xt <= SideOnM || z == 0:
		m.Side = On
	case z > 0:
		m.Side = Left
	default:
		m.Side = Right
	}
	if z < 0 {
		xt = -xt
	}
	m.CrossTrackM = xt
	m.SideMarginM = math.Abs(math.Abs(xt) - SideOnM)
	return m
}

// metricsScan is Metrics by a direct scan of every segment at or ahead of the user with golang/geo's
// per-edge distance arithmetic (s2.UpdateMinDistance, s2.Project), sharing only the final
// measurements with Metrics. It is the oracle of the tests and the baseline of the benchmarks.
func (r *Route) metricsScan(user Place, q orb.Point) Metrics {
	uc := r.userCache(&user)
	qv, sinLat, cosLat := unitVec(q)
	qq := query{q: qv, u: uc.seg, cl: uc.cl, sl: uc.sl, lo: uc.v}
	seg, p := r.scanNearest(&qq)
	c := r.resolveScan(seg, p, &qq, uc)
	qPrep := prepSinCos(q[1], q[0], sinLat, cosLat)
	return r.finish(uc, q, &qPrep, c, &qq)
}

// snapScan is Snap by direct scan (test oracle).
func (r *Route) snapScan(p orb.Point) Place {
	qv, sinLat, cosLat := unitVec(p)
	qq := query{q: qv, u: 0, cl: 1, sl: 0, lo: r.segs[0].a}
	seg, pt := r.scanNearest(&qq)
	c := r.resolveScan(seg, pt, &qq, nil)
	qPrep := prepSinCos(p[1], p[0], sinLat, cosLat)
	return Place{AlongM: c.alongM, Segment: c.normSeg, Point: c.pt, DistM: pairDistM(c.v, &c.prep, qv, &qPrep), Query: p}
}

// scanNearest finds, by scanning every edge, the winning segment by the same tie rule as nearest,
// and the closest point on it (s2.Project, then the tie rule between its ends).
func (r *Route) scanNearest(qq *query) (int, s2.Point) {
	x := s2.Point{Vector: qq.q}
	edge := func(i int) (s2.Point, s2.Point) {
		if i == qq.u {
			return s2.Point{Vector: qq.lo}, s2.Point{Vector: r.segs[i].b}
		}
		return s2.Point{Vector: r.segs[i].a}, s2.Point{Vector: r.segs[i].b}
	}
	// Pass 1: the minimum.
	minD := s1.InfChordAngle()
	for i := qq.u; i < len(r.segs); i++ {
		a, b := edge(i)
		minD, _ = s2.UpdateMinDistance(x, a, b, minD)
	}
	// Pass 2: the first edge within the tie tolerance of it.
	limit := s1.ChordAngleFromAngle(minD.Angle() + s1.Angle(tieTolRad)).Successor()
	win := len(r.segs) - 1
	for i := qq.u; i < len(r.segs); i++ {
		a, b := edge(i)
		if s2.IsDistanceLess(x, a, b, limit) {
			win = i
			break
		}
	}
	a, b := edge(win)
	p := s2.Project(x, a, b)
	switch {
	case x == a || x == b: // exactly at an end: that end (as segClosest)
		p = x
	case p == b:
		// The ends' tie rule: the start wins when it is as near within the tolerance.
		da, db := x.Distance(a).Radians(), x.Distance(b).Radians()
		if da-db <= tieTolRad {
			p = a
		}
	}
	return win, p
}

// resolveScan is resolve for a point found by scanNearest.
func (r *Route) resolveScan(seg int, p s2.Point, qq *query, user *placeCache) closest {
	sg := &r.segs[seg]
	c := closest{ownSeg: seg, normSeg: seg, at: atFoot, v: p.Vector}
	switch {
	case p.Vector == sg.b:
		c.at, c.s, c.pt, c.prep, c.alongM = atEnd, sg.theta, r.preps[seg+1].point(), r.preps[seg+1], r.startM[seg+1]
		if seg+1 < len(r.segs) {
			c.normSeg = seg + 1
		}
	case seg == qq.u && p.Vector == qq.lo && user != nil:
		c.at, c.s, c.pt, c.prep, c.alongM = atLo, math.Atan2(qq.sl, qq.cl), user.onRoute, user.onPrep, user.alongM
		if c.alongM >= r.startM[seg+1] && seg+1 < len(r.segs) {
			c.normSeg = seg + 1
		}
	case p.Vector == sg.a:
		c.at, c.s, c.pt, c.prep, c.alongM = atLo, 0, r.preps[seg].point(), r.preps[seg], r.startM[seg]
	default:
		c.s = math.Min(sg.theta, s2.Point{Vector: sg.a}.Distance(p).Radians())
		if r.snapFootToVertex(&c, qq) {
			break
		}
		c.pt = latLonOf(p.Vector)
		c.prep = prepVec(p.Vector, c.pt)
		c.alongM = r.startM[seg] + c.s/sg.theta*sg.lengthM
	}
	return c
}
