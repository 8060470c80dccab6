package timeline

import (
	"reflect"
	"strconv"

	"github.com/viewspec/viewspec/viewport"
)

// naiveSeer finds the markers in view by preparing each view's camera in
// full and projecting every marker from latitude and longitude.
type naiveSeer struct {
	ms      []Marker
	in      []bool
	visible []int32
	entered []int32
}

func (s *naiveSeer) See(v *viewport.View) {
	full, err := viewport.Prepare(v.Camera())
	if err != nil {
		panic(err) // Place accepted the same camera
	}
	s.visible, s.entered = s.visible[:0], s.entered[:0]
	for i, m := range s.ms {
		in := full.Project(m.Point).InView()
		if in {
			s.visible = append(s.visible, int32(i))
			if !s.in[i] {
				s.entered = append(s.entered, int32(i))
			}
		}
		s.in[i] = in
	}
}
func (s *naiveSeer) In(i int) bool    { return s.in[i] }
func (s *naiveSeer) Visible() []int32 { return s.visible }
func (s *naiveSeer) Entered() []int32 { return s.entered }

// ComputeNaive is Compute with the naive visibility search: a camera
// prepared in full and every marker projected at every tick. It is the
// test oracle of the tracker and the baseline of its benchmark.
func ComputeNaive(d *Drive, ms []Marker) ([]Result, error) {
	r, err := newRun(d, ms, new(scratch))
	if err != nil {
		return nil, err
	}
	r.seen = &naiveSeer{ms: ms, in: make([]bool, len(ms))}
	return r.run()
}

// checkedSeer is the tracker, checked at every tick against
// ProjectMercator: the first tick where a marker's answer or its count in
// the visible list is wrong, and the marker.
type checkedSeer struct {
	*viewport.Tracker
	merc           []viewport.Mercator
	tick           int
	badTick, badAt int
	count          []int
}

func (s *checkedSeer) See(v *viewport.View) {
	s.Tracker.See(v)
	clear(s.count)
	for _, i := range s.Visible() {
		s.count[i]++
	}
	for i, m := range s.merc {
		want := 0
		if v.ProjectMercator(m).InView() {
			want = 1
		}
		if (s.count[i] != want || s.In(i) != (want == 1)) && s.badTick < 0 {
			s.badTick, s.badAt = s.tick, i
		}
	}
	s.tick++
}

// ComputeChecked is Compute checking, at every tick, that the tracker
// finds exactly the markers ProjectMercator puts in view, each once. It
// returns the first tick where it does not and the marker, or −1.
func ComputeChecked(d *Drive, ms []Marker) (out []Result, badTick, badMarker int, err error) {
	r, err := newRun(d, ms, new(scratch))
	if err != nil {
		return nil, -1, -1, err
	}
	s := &checkedSeer{Tracker: viewport.NewTracker(r.merc), merc: r.merc, badTick: -1, badAt: -1, count: make([]int, len(ms))}
	r.seen = s
	out, err = r.run()
	return out, s.badTick, s.badAt, err
}

// Best returns the markers of ws (indices into ms) that k free slots go
// to, in the order a tick gives them out.
func Best(ms []Marker, ws []int, k int) []int {
	r := &driveRun{ms: ms}
	return r.best(append([]int(nil), ws...), k)
}

// ComputeAfter runs Compute in the scratch memory of a run before it: one
// of drive d0 on markers ms0, which may have failed.
func ComputeAfter(d0 *Drive, ms0 []Marker, d *Drive, ms []Marker) ([]Result, error) {
	sc := new(scratch)
	if r0, err := newRun(d0, ms0, sc); err == nil {
		r0.run()
	}
	r, err := newRun(d, ms, sc)
	if err != nil {
		return nil, err
	}
	return r.run()
}

// Reused reports whether a run on n markers reuses the array of Mercator
// points and the set of ids of a run on n0 markers before it in the same
// scratch memory.
func Reused(n0, n int) (points, ids bool) {
	sc := new(scratch)
	ms := make([]Marker, max(n0, n))
	for i := range ms {
		ms[i].ID = strconv.Itoa(i)
	}
	merc0, err := markerPoints(ms[:n0], sc)
	if err != nil {
		panic(err)
	}
	set0 := reflect.ValueOf(sc.ids).UnsafePointer()
	merc, err := markerPoints(ms[:n], sc)
	if err != nil {
		panic(err)
	}
	return n > 0 && cap(merc0) > 0 && &merc[:1][0] == &merc0[:1][0],
		reflect.ValueOf(sc.ids).UnsafePointer() == set0
}
