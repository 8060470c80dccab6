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
	// The hints: the segment of the last time, of the last position, and
	// the index of the last next turn.
	timeSeg, alongSeg, turn int
}

// Walk returns a walker for a drive leaving startAlongM.
func (r *Route) Walk(startAlongM float64) Walker {
	return Walker{r: r, startS: r.timeAt(startAlongM), timeSeg: -1, alongSeg: -1}
}

// AlongAfterS returns r.AlongAfterS(startAlongM, tS).
func (w *Walker) AlongAfterS(tS float64) float64 {
	return w.r.alongAtS(w.startS+tS, &w.timeSeg)
}

// SegmentAt returns r.SegmentAt(alongM).
func (w *Walker) SegmentAt(alongM float64) int {
	return segmentFrom(w.r.startM, w.r.clampAlong(alongM), &w.alongSeg)
}

// PointAt returns r.PointAt(alongM).
func (w *Walker) PointAt(alongM float64) orb.Point {
	return w.r.pointAt(alongM, &w.alongSeg)
}

// NextTurnDistM returns NextTurnDistM(turns, alongM); turns must be the same
// slice at every call.
func (w *Walker) NextTurnDistM(turns []float64, alongM float64) (distM float64, ok bool) {
	const walk = 8
	i := w.turn
	switch {
	case i < 0 || i > len(turns) || alongM != alongM || (i > 0 && turns[i-1] > alongM):
		i = firstAbove(turns, alongM)
	default:
		for n := 0; i < len(turns) && turns[i] <= alongM; n++ {
			if n == walk {
				i += firstAbove(turns[i:], alongM)
				break
			}
			i++
		}
	}
	w.turn = i
	return nextTurn(turns, alongM, i)
}
