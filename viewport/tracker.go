package viewport

import (
	"math"
	"slices"
)

// Tracker keeps which of a fixed set of Mercator points are in view of a
// view that moves a little at a time, as a drive's does from tick to tick.
// Instead of projecting every point at every step, it tests a point only
// when the footprint may have crossed it: each tested point gets a safe
// distance (see seeIndexed), and it is tested again once the footprint's
// vertices have moved that far in total. The answers are exactly those of
// ProjectMercator(...).InView() for every point at every step.
//
// The views given to See must share one device (a drive's does), and be
// placed with Place or Prepare.
type Tracker struct {
	merc []Mercator

	// The points in view: in per point, and as a list in no particular
	// order with each one's position in it (−1 when out); entered lists
	// the points that came into view at the last See.
	in      []bool
	visible []int32
	visPos  []int32
	entered []int32

	// The terms of the frame (see seeIndexed) and the bits of the pitch,
	// zoom and heading they were made for: the quick test's shape, the
	// trapezoid's vertices about T, the cap on safe distances, and the
	// quick test but for T.
	frameKey [3]uint64
	frameOK  bool
	shape    quickShape
	offs     [4]Mercator
	capM     float64
	quick    quickTest

	// Safe distances (see seeIndexed), kept for an epoch, which ends when
	// the footprint's continuity does (empty, wrapped, first view): T, the
	// footprint's vertices about it and the user at the view before, the
	// vertices' total movement so far (Mercator metres), and per point the
	// total up to which its answer holds.
	prevOK     bool
	prevTarget Mercator
	prevOffs   [4]Mercator
	prevUser   Mercator
	moved      float64
	safeUntil  []float64
	due        []int32 // room for the points due at a step
	// The near list: points whose key lay below nearM when it was
	// gathered (and so every point whose key lies below nearM), looked at
	// every step while the movement stays below nearM.
	near  []int32
	nearM float64

	// see brings in and visible up to a view, through SetIn or flip; the
	// indexed search unless a test says otherwise.
	see func(r *Tracker, v *View)
}

// NewTracker returns a tracker of points, none of them in view yet. It
// keeps the slice.
func NewTracker(points []Mercator) *Tracker {
	r := new(Tracker)
	r.Reset(points)
	return r
}

// Reset makes r a tracker of points, none of them in view yet, as
// NewTracker does, in the memory r already has where it is large enough:
// a server that runs one drive timeline after another reuses one tracker.
// It keeps the slice.
func (r *Tracker) Reset(points []Mercator) {
	n := len(points)
	see := r.see
	if see == nil {
		see = (*Tracker).seeIndexed
	}
	*r = Tracker{merc: points, see: see,
		in:        slices.Grow(r.in[:0], n)[:n],
		visible:   slices.Grow(r.visible[:0], n),
		visPos:    slices.Grow(r.visPos[:0], n)[:n],
		entered:   slices.Grow(r.entered[:0], n),
		safeUntil: slices.Grow(r.safeUntil[:0], n)[:n],
		due:       slices.Grow(r.due[:0], n)[:n],
		near:      slices.Grow(r.near[:0], n)[:n],
	}
	clear(r.in)
	for i := range r.visPos {
		r.visPos[i] = -1
	}
}

// See brings the answers up to view v, the next view of the moving one.
func (r *Tracker) See(v *View) {
	r.entered = r.entered[:0]
	r.see(r, v)
}

// In reports whether point i is in view at the last See.
func (r *Tracker) In(i int) bool { return r.in[i] }

// Visible returns the indices of the points in view at the last See, in
// no particular order; the slice is valid until the next See.
func (r *Tracker) Visible() []int32 { return r.visible }

// Entered returns the indices of the points that came into view at the
// last See; the slice is valid until the next See.
func (r *Tracker) Entered() []int32 { return r.entered }

// SetIn records whether point i is in view, for a search of a test's own.
func (r *Tracker) SetIn(i int, in bool) {
	if in != r.in[i] {
		r.flip(int32(i))
	}
}

// flip turns point i's answer over: into the visible list, or out of it.
func (r *Tracker) flip(i int32) {
	in := !r.in[i]
	r.in[i] = in
	if in {
		r.visPos[i] = int32(len(r.visible))
		r.visible = append(r.visible, i)
		r.entered = append(r.entered, i)
		return
	}
	p, last := r.visPos[i], r.visible[len(r.visible)-1]
	r.visible[p], r.visPos[last] = last, p
	r.visible = r.visible[:len(r.visible)-1]
	r.visPos[i] = -1
}

// seeIndexed brings the in-view answers up to view v, testing only the
// markers whose safe distance the footprint has moved past (all of them
// when an epoch starts).
//
// A tested marker gets a safe distance: the quick test's bound on its
// distance to the footprint's boundary. The footprint is convex and its
// vertices move by at most δ a tick, so no point of it moves farther than
// δ (every point is a fixed blend of the vertices): the marker keeps its
// answer until the footprint has moved, in total, as far as its safe
// distance. The quick test takes the copy of the marker nearest T, as
// ProjectMercator does; another copy lies at least half the world's width
// from T, so at least πR − L from a footprint that reaches L east or west
// of T, which caps the safe distance. The total is rounded up and the keys
// down, so rounding never lengthens a safe distance.
//
// Between turns the total grows by about the user's travel a tick, and few
// markers come due; they are found in a near list of markers whose keys
// lie a few ticks ahead (see dueNow), so that only a tick that turns,
// zooms or tilts the view looks at every marker's key.
func (r *Tracker) seeIndexed(v *View) {
	r.frame(v)
	if !r.shape.ok || v.wrapped {
		// No continuity: ask ProjectMercator of every marker (an empty
		// trapezoid may still have a row of ground on the screen, where
		// the far row meets the clear area's bottom).
		r.prevOK = false
		for i, m := range r.merc {
			r.SetIn(i, v.ProjectMercator(m).InView())
		}
		return
	}
	h := r.advance(v)
	due, gather := r.dueNow(h)
	// The loop runs for every marker due, so it works on a local copy of
	// the quick test (signedPx inlines).
	q := r.quick
	q.tx, q.ty = v.target.X, v.target.Y
	tx, ty, tol, capM := q.tx, q.ty, q.tolPx, r.capM
	toM := q.safeToM()
	moved, safeUntil := r.moved, r.safeUntil
	merc, inView := r.merc, r.in
	for _, i := range due {
		m := merc[i]
		d := q.signedPx(ShortDXM(m.X-tx), m.Y-ty)
		ad := math.Abs(d)
		// The key is shrunk by 2⁻⁵¹ of itself, to below the float before
		// it, so that its rounding cannot lengthen the safe distance (a key
		// not above 0 is due next tick all the same).
		safeUntil[i] = (moved + safeDistM(ad, toM, capM)) * (1 - 0x1p-51)
		in := d < 0
		if ad <= tol {
			// Unsure (rare): ask ProjectMercator, and again next tick.
			in, safeUntil[i] = v.ProjectMercator(m).InView(), math.Inf(-1)
		}
		if in != inView[i] {
			r.flip(i)
		}
	}
	if gather {
		// The markers just tested are in the near list; those whose new
		// key lies at or beyond nearM leave it, so that it stays short.
		near, nearM := r.near, r.nearM
		nn := 0
		for _, i := range near {
			near[nn] = i // nn is at most the index read
			nn += b2i(safeUntil[i] < nearM)
		}
		r.near = near[:nn]
	}
}

// frame brings the frame's terms up to view v: they are kept while pitch,
// zoom and heading stay (the device does not change in a drive), which is
// most ticks, and are the same numbers either way.
func (r *Tracker) frame(v *View) {
	c := &v.cam
	key := [3]uint64{math.Float64bits(c.PitchDeg), math.Float64bits(c.Zoom), math.Float64bits(c.HeadingDeg)}
	if r.frameOK && key == r.frameKey {
		return
	}
	if !r.frameOK || key[0] != r.frameKey[0] {
		r.shape = v.quickShapeOf()
	}
	if r.shape.ok {
		r.offs, r.capM = v.footprintOffsets(&r.shape.uv)
		r.quick = v.quickOf(&r.shape)
	}
	r.frameKey, r.frameOK = key, true
}

// advance adds how far the footprint's vertices moved since the tick
// before to the epoch's total (rounded up), or starts an epoch, and
// returns h: eight ticks of the user's travel at this tick's pace, Mercator
// metres (and a little more, so that a stopped view does not gather its
// near list again at every tick).
func (r *Tracker) advance(v *View) (h float64) {
	t, pt := v.target, r.prevTarget
	if r.prevOK {
		var d float64
		if r.offs == r.prevOffs {
			// Neither turned, zoomed nor tilted (most ticks): the footprint
			// moved as T did.
			d = math.Hypot(ShortDXM(t.X-pt.X), t.Y-pt.Y)
		} else {
			var d2 float64
			for i, o := range r.offs {
				po := r.prevOffs[i]
				dx, dy := ShortDXM((t.X+o.X)-(pt.X+po.X)), (t.Y+o.Y)-(pt.Y+po.Y)
				d2 = max(d2, dx*dx+dy*dy)
			}
			d = math.Sqrt(d2)
		}
		r.moved = math.Nextafter(r.moved+d, math.Inf(1))
		h = 8*math.Hypot(ShortDXM(v.user.X-r.prevUser.X), v.user.Y-r.prevUser.Y) + 1e-9*(1+r.moved)
	} else {
		// A new epoch: no earlier safe distance holds, and the near list
		// is gathered again.
		r.moved, r.nearM = 0, math.Inf(-1)
		for i := range r.safeUntil {
			r.safeUntil[i] = math.Inf(-1)
		}
	}
	r.prevOK, r.prevTarget, r.prevOffs, r.prevUser = true, t, r.offs, v.user
	return h
}

// dueNow returns the markers whose key the movement has reached, found
// without a branch on each (keys are never NaN): those of the near list,
// or, once the movement reaches nearM, those of all, in the same pass that
// gathers the near list anew (gather true): every marker whose key lies
// below nearM, h ahead of the movement. Until the movement reaches nearM,
// a marker outside the list is not due.
func (r *Tracker) dueNow(h float64) (due []int32, gather bool) {
	moved, safeUntil := r.moved, r.safeUntil
	due = r.due[:len(safeUntil)]
	nd := 0
	if gather = !(moved < r.nearM); gather {
		nearM := moved + h
		near := r.near[:len(safeUntil)]
		nn := 0
		for i, su := range safeUntil {
			due[nd], near[nn] = int32(i), int32(i)
			nd += b2i(su <= moved)
			nn += b2i(su < nearM)
		}
		r.near, r.nearM = near[:nn], nearM
		return due[:nd], true
	}
	for _, i := range r.near {
		due[nd] = i
		nd += b2i(safeUntil[i] <= moved)
	}
	return due[:nd], false
}

// footprintOffsets returns the Mercator offsets from T of the vertices of
// the view's trapezoid uv (see offsetOf), and the cap on safe distances:
// πR less how far the vertices reach east or west of T (another copy of a
// marker lies at least that far from the footprint).
func (v *View) footprintOffsets(uv *[4][2]float64) (offs [4]Mercator, capM float64) {
	var reachM float64
	for i, p := range uv {
		offs[i] = v.offsetOf(p[0], p[1])
		reachM = max(reachM, math.Abs(offs[i].X))
	}
	return offs, max(0, worldWidthM/2-reachM)
}

// safeToM returns the factor that turns the quick test's distances (world
// pixels) into Mercator metres for safe distances, shrunk by 1e-9 for
// their rounding.
func (q *quickTest) safeToM() float64 { return q.invScale * (1 - 1e-9) }

// safeDistM returns the safe distance in Mercator metres of a marker whose
// quick test distance is adPx (sure, so above the sure margin): adPx·toM,
// at most capM, less a millimetre for the rounding of the points.
func safeDistM(adPx, toM, capM float64) float64 {
	s := adPx * toM
	if s > capM {
		s = capM
	}
	return s - 1e-3
}

// b2i returns 1 for true and 0 for false.
func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}
