package viewport

import "math"

// CheckedTracker returns a tracker of points that checks, at every See,
// that its indexed search finds exactly the points ProjectMercator puts in
// view, each once, with the list and its positions in agreement; bad
// returns the first step (counted from 0) where it did not and the point,
// or −1, −1.
func CheckedTracker(points []Mercator) (tr *Tracker, bad func() (step, point int)) {
	tr = NewTracker(points)
	badStep, badPoint, step := -1, -1, 0
	count := make([]int, len(points))
	tr.see = func(r *Tracker, v *View) {
		r.seeIndexed(v)
		clear(count)
		for p, i := range r.visible {
			count[i]++
			if r.visPos[i] != int32(p) {
				count[i] = -1 // the list and its positions disagree
			}
		}
		for i, m := range r.merc {
			want := 0
			if v.ProjectMercator(m).InView() {
				want = 1
			}
			if (count[i] != want || r.in[i] != (want == 1)) && badStep < 0 {
				badStep, badPoint = step, i
			}
		}
		step++
	}
	return tr, func() (int, int) { return badStep, badPoint }
}

// QuickTest runs the timeline's quick test of v on m: whether its answer
// is sure, the answer, and its distance bound in Mercator metres. ok is
// false when the footprint is empty.
func QuickTest(v *View, m Mercator) (sure, in bool, distM float64, ok bool) {
	s := v.quickShapeOf()
	if !s.ok {
		return false, false, 0, false
	}
	q := v.quickOf(&s)
	d := q.signedPx(ShortDXM(m.X-q.tx), m.Y-q.ty)
	return math.Abs(d) > q.tolPx, d < 0, math.Abs(d) * q.invScale, true
}

// SafeDistanceM returns the drive timeline's safe distance for the
// Mercator point m in view v, Mercator metres, as its tick loop computes
// it, and the quick test's answer; ok is false when the view has no
// trapezoid or wraps, or the quick test is unsure (the loop then asks
// ProjectMercator and keeps no safe distance).
func SafeDistanceM(v *View, m Mercator) (distM float64, in, ok bool) {
	s := v.quickShapeOf()
	if !s.ok || v.wrapped {
		return 0, false, false
	}
	_, capM := v.footprintOffsets(&s.uv)
	q := v.quickOf(&s)
	d := q.signedPx(ShortDXM(m.X-q.tx), m.Y-q.ty)
	if math.Abs(d) <= q.tolPx {
		return 0, false, false
	}
	return safeDistM(math.Abs(d), q.safeToM(), capM), d < 0, true
}

// TrackerKeys returns a copy of the tracker's keys (the total movement,
// Mercator metres, up to which each point's answer holds; −Inf: due at the
// next step) and its total movement so far.
func TrackerKeys(tr *Tracker) (keys []float64, movedM float64) {
	return append([]float64(nil), tr.safeUntil...), tr.moved
}
