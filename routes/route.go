package routes

import (
	"fmt"
	"math"
	"sync/atomic"

	"github.com/golang/geo/r3"
	"github.com/golang/geo/s2"
	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/spec"
)

// maxArcRad is the longest great-circle arc a segment may span. Nearer antipodal than this (about
// 6 m on the ground) the arc between two consecutive vertices is not determined well enough to
// place points on it (its plane's normal is the cross product of nearly opposite vectors).
const maxArcRad = math.Pi - 1e-6

// segment is one great-circle arc of a route, from vertex a to vertex b, with everything the
// queries need precomputed.
type segment struct {
	arc
	theta      float64 // arc angle, radians, in (0, maxArcRad]
	lengthM    float64 // WGS84 geodesic length between the ends, metres
	speedMps   float64
	headingDeg float64 // Mercator-plane bearing, degrees clockwise from north in [0, 360)
	turnInDeg  float64 // HeadingChangeDeg from the segment before (0 for the first), for Turns
}

// arc is the geometry of a segment that closest-point queries read.
type arc struct {
	// Unit vectors on the sphere: a and b the ends; n = a × b normalised, the pole of the arc's
	// great circle on its left (Q·n > 0 ⇔ Q is left of the direction of travel); t = n × a, the
	// direction of travel at a. The arc is p(s) = a·cos s + t·sin s for s ∈ [0, theta].
	a, b, t, n r3.Vector
	// cosT, sinT: the direction of b in the (a, t) plane, b = a·cosT + t·sinT.
	cosT, sinT float64
}

// Route is a prepared route: its distinct vertices, one great-circle segment between each
// consecutive pair, the speed on each, and a spatial index over the segments. A Route is immutable
// and safe for concurrent use.
type Route struct {
	// preps are the distinct vertices, len(segs)+1 of them, as given in degrees (point) and
	// prepared for the geodesic from those degrees (as queries are).
	preps  []ellPoint
	segs   []segment
	startM []float64 // along-route position of each vertex, metres; startM[len(segs)] = LengthM()
	startS []float64 // travel time from the start to each vertex, seconds
	tree   []node    // the spatial index's internal nodes
	root   int32     // the root's code (see node)
	items  []item    // the segments' arcs in the index's leaf order
	// turns is the answer of Turns for the last threshold asked for.
	turns atomic.Pointer[turnList]
}

// unitVec returns the unit vector of p ([lon, lat] degrees) on the sphere that treats geodetic
// latitude as spherical latitude, with the sine and cosine of the latitude. At ±90° it is exactly
// the pole whatever the longitude.
func unitVec(p orb.Point) (v r3.Vector, sinLat, cosLat float64) {
	if math.Abs(p[1]) == 90 {
		s := math.Copysign(1, p[1])
		return r3.Vector{X: 0, Y: 0, Z: s}, s, 0
	}
	sinLat, cosLat = math.Sincos(p[1] * degRad)
	sl, cl := math.Sincos(p[0] * degRad)
	return r3.Vector{X: cl * cosLat, Y: sl * cosLat, Z: sinLat}, sinLat, cosLat
}

// prepUnit returns prepLatLon(p[1], p[0]) from the sine and cosine of p's latitude that unitVec
// found (exactly ±1 and 0 at a pole), the same numbers, without finding them again.
func prepUnit(p orb.Point, sinLat, cosLat float64) ellPoint {
	return prepSinCos(p[1], p[0], sinLat, cosLat)
}

// latLonOf returns the [lon, lat] degrees of a unit vector.
func latLonOf(v r3.Vector) orb.Point {
	return orb.Point{math.Atan2(v.Y, v.X) * radDeg, math.Atan2(v.Z, math.Sqrt(v.X*v.X+v.Y*v.Y)) * radDeg}
}

// prepVec prepares a unit vector and its [lon, lat] for the geodesic without further trigonometry.
func prepVec(v r3.Vector, ll orb.Point) ellPoint {
	return prepSinCos(ll[1], ll[0], v.Z, math.Sqrt(v.X*v.X+v.Y*v.Y))
}

// New prepares a route from its vertices ([lon, lat] WGS84 degrees, in the order travelled) and
// speeds in m/s: either one speed for the whole route or one per segment as given
// (len(points)−1 entries, the i-th for points[i] → points[i+1]).
//
// Consecutive duplicate vertices are dropped together with the speed entry of the zero-length
// segment between them (that entry is not looked at). A segment is zero-length when its WGS84
// length is 0 (the same point, including longitudes −180 and 180 at one latitude, or any two
// longitudes at a pole) or its ends are closer than the unit sphere resolves an arc between
// them (distinct inputs about 1e-9 m apart or less).
//
// New returns a *spec.FieldError naming the first offending field: fewer than 2 points or fewer than 2
// distinct vertices ("points"); a non-finite or out-of-range coordinate ("points[3].lat", latitude
// in [-90, 90], longitude in [-180, 180]); a speed count other than 1 or len(points)−1
// ("speed_mps"); a speed that is not finite and > 0 ("speed_mps" or "speed_mps[2]"); consecutive
// distinct vertices less than 6 m from antipodal, between which the great-circle arc is not
// determined ("points[4]").
func New(points []orb.Point, speedsMps []float64) (*Route, error) {
	if len(points) < 2 {
		return nil, &spec.FieldError{Field: "points", Value: fmt.Sprintf("%d given", len(points)),
			Reason: "a route needs at least 2 distinct vertices"}
	}
	for i, p := range points {
		// The path is formatted only when the check fails.
		if !(p[1] >= -90 && p[1] <= 90 && p[0] >= -180 && p[0] <= 180) {
			return nil, ValidateLatLon(spec.Index("points", i), p)
		}
	}
	if len(speedsMps) != 1 && len(speedsMps) != len(points)-1 {
		return nil, &spec.FieldError{Field: "speed_mps", Value: fmt.Sprintf("%d entries", len(speedsMps)),
			Reason: fmt.Sprintf("want 1 or %d (one per segment as given)", len(points)-1)}
	}
	if len(speedsMps) == 1 {
		if err := checkSpeed("speed_mps", speedsMps[0]); err != nil {
			return nil, err
		}
	}
	r := &Route{segs: make([]segment, 0, len(points)-1), preps: make([]ellPoint, 0, len(points))}
	prevIdx := 0
	prevVec, sLat, cLat := unitVec(points[0])
	prevPrep := prepUnit(points[0], sLat, cLat)
	prevY := mercatorY(points[0][1]) // each vertex's Mercator y is found once
	r.preps = append(r.preps, prevPrep)
	for j := 1; j < len(points); j++ {
		v, sLat, cLat := unitVec(points[j])
		pp := prepUnit(points[j], sLat, cLat)
		lengthM := inverseDist(&prevPrep, &pp)
		if lengthM == 0 || v == prevVec {
			continue // zero-length segment: drop the vertex and its speed entry
		}
		speed := speedsMps[0]
		if len(speedsMps) > 1 {
			speed = speedsMps[j-1]
		}
		y := mercatorY(points[j][1])
		sg, kind := makeSegment(prevVec, v, lengthM, speed)
		if kind == segDegenerate {
			continue // the ends differ but no arc is resolvable between them: zero-length
		}
		if kind == segAntipodal {
			return nil, &spec.FieldError{Field: fmt.Sprintf("points[%d]", j),
				Value: fmt.Sprintf("[%s, %s]", formatValue(points[j][0]), formatValue(points[j][1])),
				Reason: fmt.Sprintf("less than 6 m from antipodal to points[%d] [%s, %s]: the great-circle arc between consecutive vertices is not determined",
					prevIdx, formatValue(points[prevIdx][0]), formatValue(points[prevIdx][1]))}
		}
		if len(speedsMps) > 1 {
			if err := checkSpeed(fmt.Sprintf("speed_mps[%d]", j-1), speed); err != nil {
				return nil, err
			}
		}
		sg.headingDeg = mercatorHeadingDegY(points[prevIdx], points[j], prevY, y)
		r.segs = append(r.segs, sg)
		r.preps = append(r.preps, pp)
		prevIdx, prevVec, prevPrep, prevY = j, v, pp, y
	}
	if len(r.segs) == 0 {
		return nil, &spec.FieldError{Field: "points", Value: fmt.Sprintf("%d given, 1 distinct", len(points)),
			Reason: "a route needs at least 2 distinct vertices"}
	}
	m := len(r.segs)
	r.startM = make([]float64, m+1)
	r.startS = make([]float64, m+1)
	for i := 1; i < m; i++ {
		r.segs[i].turnInDeg = HeadingChangeDeg(r.segs[i-1].headingDeg, r.segs[i].headingDeg)
	}
	for i := range r.segs {
		r.startM[i+1] = r.startM[i] + r.segs[i].lengthM
		r.startS[i+1] = r.startS[i] + r.segs[i].lengthM/r.segs[i].speedMps
	}
	r.tree, r.root, r.items = buildTree(r.segs)
	return r, nil
}

func checkSpeed(field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return &spec.FieldError{Field: field, Value: formatValue(v), Reason: "not a finite number"}
	}
	if v <= 0 {
		return &spec.FieldError{Field: field, Value: formatValue(v), Reason: "must be > 0 m/s"}
	}
	return nil
}

// What makeSegment found.
const (
	segOK         = iota
	segDegenerate // the ends are distinct but closer than an arc can be resolved (θ ≤ 0)
	segAntipodal  // the ends are within maxArcRad of antipodal
)

// makeSegment precomputes one arc, all but its heading (New sets it, from each vertex's Mercator y
// found once).
func makeSegment(a, b r3.Vector, lengthM, speed float64) (segment, int) {
	// PointCross is accurate also for nearly parallel and nearly opposite vectors.
	n := s2.Point{Vector: a}.PointCross(s2.Point{Vector: b}).Vector.Normalize()
	t := n.Cross(a).Normalize()
	cosT, sinT := b.Dot(a), b.Dot(t)
	theta := math.Atan2(sinT, cosT)
	switch {
	case !(theta > 0):
		return segment{}, segDegenerate
	case theta > maxArcRad:
		return segment{}, segAntipodal
	}
	h := math.Hypot(cosT, sinT)
	return segment{
		arc:      arc{a: a, b: b, t: t, n: n, cosT: cosT / h, sinT: sinT / h},
		theta:    theta,
		lengthM:  lengthM,
		speedMps: speed,
	}, segOK
}

// mercatorClampLatDeg is the Web Mercator latitude limit, ±85.0511287798066° (SPEC §1).
const mercatorClampLatDeg = 85.0511287798066

// mercatorY returns y/R = ln tan(π/4 + φ/2) with the latitude clamped to the Web Mercator limit.
func mercatorY(latDeg float64) float64 {
	lat := math.Max(-mercatorClampLatDeg, math.Min(mercatorClampLatDeg, latDeg)) * degRad
	return math.Log(math.Tan(math.Pi/4 + lat/2))
}

// mercatorHeadingDegY returns the bearing of a → b in the Web Mercator plane, atan2(Δx, Δy), in
// degrees clockwise from north in [0, 360), given the ends' mercatorY (ya of a, yb of b: New finds
// each vertex's once). Δx is taken the short way across the antimeridian (longitudes exactly 180°
// apart go the way lon(b) − lon(a) points). Both latitudes are clamped to ±85.0511287798066° as the
// map plane is; a segment lying entirely beyond the clamp along one meridian has Δx = Δy = 0 there,
// and its heading is then the limit as the clamp is lifted: 0 going north, 180 going south.
func mercatorHeadingDegY(a, b orb.Point, ya, yb float64) float64 {
	dx := remainder360(b[0]-a[0]) * degRad
	dy := yb - ya
	if dx == 0 && dy == 0 {
		if b[1] < a[1] {
			return 180
		}
		return 0
	}
	return normDeg(math.Atan2(dx, dy) * radDeg)
}

// LengthM returns the route's length in metres: the sum of its segments' WGS84 geodesic lengths.
func (r *Route) LengthM() float64 { return r.startM[len(r.segs)] }

// DurationS returns the time in seconds to travel the whole route at the segments' speeds.
func (r *Route) DurationS() float64 { return r.startS[len(r.segs)] }

// NumSegments returns the number of segments (distinct vertices minus one).
func (r *Route) NumSegments() int { return len(r.segs) }

// Points returns a copy of the route's distinct vertices ([lon, lat] degrees), duplicates dropped.
func (r *Route) Points() []orb.Point {
	pts := make([]orb.Point, len(r.preps))
	for i := range r.preps {
		pts[i] = r.preps[i].point()
	}
	return pts
}

// SegmentInfo describes one segment of a route.
type SegmentInfo struct {
	From, To   orb.Point // ends, [lon, lat] degrees
	StartM     float64   // along-route position of From, metres
	LengthM    float64   // WGS84 geodesic length, metres
	StartS     float64   // travel time from the route's start to From, seconds
	SpeedMps   float64
	HeadingDeg float64 // Mercator-plane bearing, degrees clockwise from north in [0, 360)
}

// Segment returns segment i (0 ≤ i < NumSegments(); i is clamped into that range).
func (r *Route) Segment(i int) SegmentInfo {
	i = max(0, min(i, len(r.segs)-1))
	sg := &r.segs[i]
	return SegmentInfo{From: r.preps[i].point(), To: r.preps[i+1].point(), StartM: r.startM[i], LengthM: sg.lengthM,
		StartS: r.startS[i], SpeedMps: sg.speedMps, HeadingDeg: sg.headingDeg}
}
