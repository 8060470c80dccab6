package viewport

import "math"

// TimelineNaive is the timeline with the naive visibility search: a camera
// prepared in full and every marker projected from latitude and longitude
// at every tick. It is the test oracle of the indexed search and the
// baseline of its benchmark.
func TimelineNaive(d *Drive, ms []Marker) ([]MarkerTimeline, error) {
	r, err := newRun(d, ms)
	if err != nil {
		return nil, err
	}
	r.see = func(r *driveRun, k int32, v *View) {
		full, err := Prepare(v.cam)
		if err != nil {
			panic(err) // place accepted the same camera
		}
		for i, m := range ms {
			r.setIn(int32(i), full.Project(m.Point).InView())
		}
	}
	return r.run()
}

// TimelineChecked is Timeline checking, at every tick, that the indexed
// search finds exactly the markers ProjectMercator puts in view, each
// once. It returns the first tick where it does not and the marker, or −1.
func TimelineChecked(d *Drive, ms []Marker) (out []MarkerTimeline, badTick, badMarker int, err error) {
	r, err := newRun(d, ms)
	if err != nil {
		return nil, -1, -1, err
	}
	badTick, badMarker = -1, -1
	count := make([]int, len(ms))
	r.see = func(r *driveRun, k int32, v *View) {
		r.seeIndexed(k, v)
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
			if (count[i] != want || r.in[i] != (want == 1)) && badTick < 0 {
				badTick, badMarker = int(k), i
			}
		}
	}
	out, err = r.run()
	return out, badTick, badMarker, err
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

// Replace places v for c again, as the drive timeline does at every tick,
// keeping the terms whose inputs did not change.
func (v *View) Replace(c Camera) error {
	if err := c.validateFields(); err != nil {
		return err
	}
	return v.place(&c)
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
