package routes

import "github.com/paulmach/orb"

// Walker follows a drive along a route in time from a start position, for
// loops over ticks: it remembers the segments it last found, so a step to
// a nearby time or position costs O(1) instead of a search. Any order of
// calls is allowed. Its answers are exactly those of the Route methods and
// NextTurnDistM it mirrors.
type Walker struct {
	r      *Route
	startS float64 // travel time from the route's start to the drive's start
	// The hints (see firstAboveFrom): where the last time fell among the
	// segments' start times, the last position among their starts, and
	// the last position among the turns.
	timeHint, alongHint, turnHint int
}

// Walk returns a walker for a drive leaving startAlongM.
func (r *Route) Walk(startAlongM float64) Walker {
	return Walker{r: r, startS: r.timeAt(startAlongM), timeHint: -1, alongHint: -1}
}

// AlongAfterS returns r.AlongAfterS(startAlongM, tS).
func (w *Walker) AlongAfterS(tS float64) float64 {
	return w.r.alongAtS(w.startS+tS, &w.timeHint)
}

// SegmentAt returns r.SegmentAt(alongM).
func (w *Walker) SegmentAt(alongM float64) int {
	return segmentFrom(w.r.startM, w.r.clampAlong(alongM), &w.alongHint)
}

// PointAt returns r.PointAt(alongM).
func (w *Walker) PointAt(alongM float64) orb.Point {
	return w.r.pointAt(alongM, &w.alongHint)
}

// NextTurnDistM returns NextTurnDistM(turns, alongM); turns must be the same
// slice at every call.
func (w *Walker) NextTurnDistM(turns []float64, alongM float64) (distM float64, ok bool) {
	return nextTurn(turns, alongM, firstAboveFrom(turns, alongM, &w.turnHint))
}
