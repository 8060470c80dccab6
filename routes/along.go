package routes

import (
	"math"

	"github.com/paulmach/orb"
)

// Along-route positions are metres from the route's start along its segments. Every function here
// clamps an along-route position to [0, LengthM()] and counts NaN as 0. At an interior vertex the
// current segment is the one that starts there; at the route's end it is the last one.

// SegmentAt returns the index of the segment holding along-route position alongM: the i with
// start_i ≤ alongM < start_{i+1}, or the last segment at the route's end. O(log n), no allocation.
func (r *Route) SegmentAt(alongM float64) int {
	return segmentIn(r.startM, r.clampAlong(alongM))
}

// segmentIn returns the largest i < len(starts)−1 with starts[i] ≤ v (v ≥ starts[0]).
func segmentIn(starts []float64, v float64) int {
	return firstAbove(starts[:len(starts)-1], v) - 1
}

// segmentFrom is segmentIn(starts, v) with the search started from the hint *i (see
// firstAboveFrom, whose index it keeps there).
func segmentFrom(starts []float64, v float64, i *int) int {
	return firstAboveFrom(starts[:len(starts)-1], v, i) - 1
}

// PointAt returns the point ([lon, lat] degrees) at along-route position alongM. On segment i it
// lies at the fraction (alongM − start_i)/length_i of the segment's great-circle arc by angle
// (spherical linear interpolation), the same parametrisation Snap and Metrics invert. Vertices are
// returned exactly as given.
func (r *Route) PointAt(alongM float64) orb.Point {
	i := -1
	return r.pointAt(alongM, &i)
}

// pointAt is PointAt with the segment found from the hint *i (see
// segmentFrom).
func (r *Route) pointAt(alongM float64, hint *int) orb.Point {
	along := r.clampAlong(alongM)
	i := segmentFrom(r.startM, along, hint)
	if along == r.startM[i] {
		return r.preps[i].point()
	}
	if along >= r.startM[i+1] {
		return r.preps[i+1].point()
	}
	sg := &r.segs[i]
	s := (along - r.startM[i]) / sg.lengthM * sg.theta
	sn, cs := math.Sincos(s)
	return latLonOf(sg.a.Mul(cs).Add(sg.t.Mul(sn)))
}

// HeadingDegAt returns the Mercator-plane heading, degrees clockwise from north in [0, 360), of the
// segment holding alongM (see SegmentAt).
func (r *Route) HeadingDegAt(alongM float64) float64 {
	return r.segs[r.SegmentAt(alongM)].headingDeg
}

// SpeedMpsAt returns the speed in m/s of the segment holding alongM (see SegmentAt).
func (r *Route) SpeedMpsAt(alongM float64) float64 {
	return r.segs[r.SegmentAt(alongM)].speedMps
}

// timeAt returns the travel time in seconds from the route's start to along-route position alongM.
func (r *Route) timeAt(alongM float64) float64 {
	along := r.clampAlong(alongM)
	if along >= r.LengthM() {
		// The end exactly: its time read back gives the end again, so a
		// drive that starts there is stopped at t = 0 (the sum over the
		// last segment can round a hair below DurationS otherwise).
		return r.DurationS()
	}
	return r.timeAtS(segmentIn(r.startM, along), along)
}

// TimeBetweenS returns the travel time in seconds from along-route position fromM to toM at the
// segments' speeds: negative when toM is behind fromM.
func (r *Route) TimeBetweenS(fromM, toM float64) float64 {
	return r.timeAt(toM) - r.timeAt(fromM)
}

// AlongAfterS returns the along-route position reached tS seconds after leaving startAlongM,
// moving at each segment's speed: segment ends are crossed exactly (the time left over on one
// segment is spent on the next at its speed), and the motion stops at the route's end (and, for
// negative tS, which moves backwards in time, at its start). The position depends only on the
// elapsed time, so calling it with k·tick for tick k accumulates no error. O(log n), no allocation.
func (r *Route) AlongAfterS(startAlongM, tS float64) float64 {
	j := -1
	return r.alongAtS(r.timeAt(startAlongM)+tS, &j)
}

// alongAtS returns the along-route position reached at travel time t from
// the route's start, the segment found from the hint *j (see segmentFrom).
func (r *Route) alongAtS(t float64, hint *int) float64 {
	if !(t > 0) { // also NaN
		return 0
	}
	if t >= r.DurationS() {
		return r.LengthM()
	}
	j := segmentFrom(r.startS, t, hint)
	return min(r.startM[j+1], r.startM[j]+(t-r.startS[j])*r.segs[j].speedMps)
}

// Turns returns the along-route positions, ascending, of the interior vertices where the Mercator
// heading changes by at least minAngleDeg degrees, measured the short way round (so a change from
// 350° to 10° is 20°, and a U-turn is 180°). A threshold ≤ 0 marks every interior vertex; NaN marks
// none.
// The turn at each vertex is measured once, when the route is made, and the route keeps the list of
// the last threshold asked for: a server runs one timeline after another on a route with one rule
// set, and finding the turns walks every vertex. The slice is shared: it must not be modified.
func (r *Route) Turns(minAngleDeg float64) []float64 {
	if c := r.turns.Load(); c != nil && math.Float64bits(c.minAngleDeg) == math.Float64bits(minAngleDeg) {
		return c.at
	}
	at := r.findTurns(minAngleDeg)
	r.turns.Store(&turnList{minAngleDeg: minAngleDeg, at: at})
	return at
}

// turnList is the answer of Turns for one threshold.
type turnList struct {
	minAngleDeg float64
	at          []float64
}

// findTurns returns Turns(minAngleDeg), found afresh.
func (r *Route) findTurns(minAngleDeg float64) []float64 {
	n := 0
	for k := 1; k < len(r.segs); k++ {
		if r.segs[k].turnInDeg >= minAngleDeg {
			n++
		}
	}
	if n == 0 {
		return nil
	}
	out := make([]float64, 0, n)
	for k := 1; k < len(r.segs); k++ {
		if r.segs[k].turnInDeg >= minAngleDeg {
			out = append(out, r.startM[k])
		}
	}
	return out
}

// HeadingChangeDeg returns the size, in degrees in [0, 180], of the turn from heading fromDeg to
// heading toDeg the short way round.
func HeadingChangeDeg(fromDeg, toDeg float64) float64 {
	return math.Abs(remainder360(toDeg - fromDeg))
}

// NextTurnDistM returns the along-route distance in metres from alongM to the first turn strictly
// ahead of it in turns (ascending along-route positions, as from Turns), and false when there is
// none. O(log n), no allocation.
func NextTurnDistM(turns []float64, alongM float64) (distM float64, ok bool) {
	return nextTurn(turns, alongM, firstAbove(turns, alongM))
}

// nextTurn is NextTurnDistM given i, the index of the first turn beyond
// alongM.
func nextTurn(turns []float64, alongM float64, i int) (distM float64, ok bool) {
	if i == len(turns) {
		return 0, false
	}
	return turns[i] - alongM, true
}

// firstAbove returns the first index i with xs[i] > v, or len(xs) (NaN is above none); xs
// ascends.
func firstAbove(xs []float64, v float64) int {
	lo, hi := 0, len(xs)
	for lo < hi {
		mid := (lo + hi) / 2
		if xs[mid] > v {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return lo
}

// firstAboveFrom is firstAbove(xs, v), found by walking on from the hint *i when the answer lies
// a few places on (then O(1)), else by halving; *i becomes the answer.
func firstAboveFrom(xs []float64, v float64, i *int) int {
	const walk = 8
	j := *i
	if j < 0 || j > len(xs) || v != v || (j > 0 && xs[j-1] > v) {
		j = firstAbove(xs, v)
	} else {
		for n := 0; j < len(xs) && xs[j] <= v; n++ {
			if n == walk {
				j += firstAbove(xs[j:], v)
				break
			}
			j++
		}
	}
	*i = j
	return j
}
