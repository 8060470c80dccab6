package viewport

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
)

// Marker is a place that may be shown on the map: an id (ties between equal
// priorities go to the smaller id, byte by byte), a position ([lon, lat]
// degrees) and a priority (higher first).
type Marker struct {
	ID       string
	Point    orb.Point
	Priority float64
}

// Drive is the input of the drive timeline (SPEC §5) apart from its markers:
// a route with speeds, where on it the drive starts, the device, the zoom
// rules, and the timeline's horizon, tick, on-screen cap and bucket edges.
type Drive struct {
	Route        *routes.Route
	StartAlongM  float64
	Device       Device
	Rules        *rules.Set
	HorizonS     float64    // seconds, > 0; default 120
	TickS        float64    // seconds, > 0, dividing HorizonS; default 0.25
	Cap          int        // markers shown at once, ≥ 1; default 4
	BucketEdgesS [2]float64 // e1 < e2 ≤ HorizonS, seconds; default 5, 35

	// OnTick, when set, is called at every tick with the tick's index, its
	// view and the indices of the markers shown (valid during the call
	// only), for pictures and per-tick output.
	OnTick func(tick int, v *View, shown []int)
	// OnBand, when set, is called at every tick with the rule set's speed
	// band at that tick (an index into Rules.Bands), for reports of how
	// often the band changes.
	OnBand func(tick, band int)
}

// NewDrive returns a drive on r from startAlongM with the defaults of SPEC
// §5: a 120 s horizon, 0.25 s ticks, 4 markers at once, buckets at 5 and
// 35 s.
func NewDrive(r *routes.Route, startAlongM float64, d Device, rs *rules.Set) Drive {
	return Drive{Route: r, StartAlongM: startAlongM, Device: d, Rules: rs,
		HorizonS: 120, TickS: 0.25, Cap: 4, BucketEdgesS: [2]float64{5, 35}}
}

// Ticks returns the number of ticks after t = 0: HorizonS/TickS.
func (d *Drive) Ticks() int { return int(math.Round(d.HorizonS / d.TickS)) }

// Validate reports the first invalid field of d as a *FieldError (field
// names as on the wire), or an error from the rule set.
func (d *Drive) Validate() error {
	switch {
	case d.Route == nil:
		return &FieldError{Field: "route", Value: math.NaN(), Reason: "missing"}
	case d.Rules == nil:
		return &FieldError{Field: "rules", Value: math.NaN(), Reason: "missing"}
	case !(d.HorizonS > 0) || math.IsInf(d.HorizonS, 0):
		return &FieldError{Field: "horizon_s", Value: d.HorizonS, Reason: "horizon must be finite and positive"}
	case !(d.TickS > 0) || math.IsInf(d.TickS, 0):
		return &FieldError{Field: "tick_s", Value: d.TickS, Reason: "tick must be finite and positive"}
	}
	if n := d.HorizonS / d.TickS; math.Abs(n-math.Round(n)) > 1e-9 || n > 1e7 {
		return &FieldError{Field: "tick_s", Value: d.TickS,
			Reason: fmt.Sprintf("tick must divide the horizon %s s within 1e-9 (and give at most 1e7 ticks)", FormatNumber(d.HorizonS))}
	}
	if d.Cap < 1 {
		return &FieldError{Field: "cap", Value: float64(d.Cap), Reason: "cap must be at least 1"}
	}
	e1, e2 := d.BucketEdgesS[0], d.BucketEdgesS[1]
	switch {
	case !(e1 >= 0) || math.IsInf(e1, 0):
		return &FieldError{Field: "bucket_edges_s[0]", Value: e1, Reason: "bucket edge must be finite and non-negative"}
	case !(e2 > e1) || math.IsInf(e2, 0):
		return &FieldError{Field: "bucket_edges_s[1]", Value: e2, Reason: "bucket edges must increase"}
	case e2 > d.HorizonS:
		return &FieldError{Field: "bucket_edges_s[1]", Value: e2, Reason: "bucket edge beyond the horizon " + FormatNumber(d.HorizonS) + " s"}
	case !(d.StartAlongM >= 0 && d.StartAlongM <= d.Route.LengthM()):
		return &FieldError{Field: "start_along_m", Value: d.StartAlongM,
			Reason: "start must be on the route, within [0, " + FormatNumber(d.Route.LengthM()) + "] m"}
	}
	if err := d.Rules.Validate(); err != nil {
		return err
	}
	c := Camera{LatDeg: 0, LonDeg: 0, Zoom: d.Rules.MinZoom, Device: d.Device}
	return c.validateFields()
}

// Bucket says when a marker was first shown: within the first edge
// (early), between the edges (mid), from the second edge to the horizon
// (late), or never.
type Bucket int8

const (
	Never Bucket = iota
	Early
	Mid
	Late
)

// String returns the wire name of b.
func (b Bucket) String() string {
	switch b {
	case Early:
		return "early"
	case Mid:
		return "mid"
	case Late:
		return "late"
	}
	return "never"
}

// MarkerTimeline is what the drive timeline says of one marker.
type MarkerTimeline struct {
	// Visible and FirstVisibleS: whether and when (seconds) it was first in
	// view.
	Visible       bool
	FirstVisibleS float64
	// Shown and FirstShownS: whether and when it was first given a slot.
	Shown       bool
	FirstShownS float64
	// ShownS is the number of ticks it was shown × the tick, seconds.
	ShownS float64
	Bucket Bucket
	// BucketMarginS is the decision margin of the bucket: seconds from the
	// first-shown time to the nearest bucket edge or the horizon (0 when
	// it lies on one). Meaningless for Never.
	BucketMarginS float64
	// FirstShownMarginPx is how close the first showing came to going the
	// other way in pixels: the smaller |in-view margin| of the marker at
	// that tick and at the tick before (that tick alone at t = 0, or when
	// the marker had no pixel the tick before). Under 0.5 px the first-shown
	// tick may differ between implementations that agree within half a
	// pixel.
	FirstShownMarginPx float64
}

// Timeline runs the drive of SPEC §5 and returns, for each marker in the
// order given, when it was first visible and first shown, how long it was
// shown and its bucket. Motion is exact in time; the camera at tick k
// follows the route position at t = k·tick, the heading turned toward the
// current segment's bearing by at most max_turn_rate·tick, and the zoom and
// pitch of the rules fed by the current speed and the distance to the next
// turn. Memory grows with markers + ticks, not their product.
func Timeline(d *Drive, ms []Marker) ([]MarkerTimeline, error) {
	r, err := newRun(d, ms)
	if err != nil {
		return nil, err
	}
	return r.run()
}

// newRun validates d and ms and returns the run of the drive.
func newRun(d *Drive, ms []Marker) (*driveRun, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	merc, err := markerPoints(ms)
	if err != nil {
		return nil, err
	}
	return newDriveRun(d, ms, merc), nil
}

// markerPoints validates ms and returns their Mercator points.
func markerPoints(ms []Marker) ([]Mercator, error) {
	merc := make([]Mercator, len(ms))
	seen := make(map[string]int, len(ms))
	for i, m := range ms {
		if lat, lon := m.Point[1], m.Point[0]; !(lat >= -90 && lat <= 90 && lon >= -180 && lon <= 180) {
			return nil, routes.ValidateLatLon(fmt.Sprintf("markers[%d]", i), m.Point)
		}
		if !finite(m.Priority) {
			return nil, &FieldError{Field: fmt.Sprintf("markers[%d].priority", i), Value: m.Priority, Reason: "priority must be finite"}
		}
		if j, dup := seen[m.ID]; dup {
			return nil, &FieldError{Field: fmt.Sprintf("markers[%d].id", i), Value: float64(j),
				Reason: fmt.Sprintf("duplicate id %q (the value is the first index)", m.ID)}
		}
		seen[m.ID] = i
		merc[i] = ToMercator(m.Point)
	}
	return merc, nil
}

// driveRun is the state of one timeline run.
type driveRun struct {
	d     *Drive
	ms    []Marker
	merc  []Mercator
	turns []float64

	out   []MarkerTimeline
	t     float64 // the tick's time, seconds
	prev  *View   // the view at the tick before, for first-shown margins
	shown []int   // indices of the shown markers

	// The markers in view at this tick: in per marker, and as a list in no
	// particular order with each one's position in it (−1 when out).
	in      []bool
	visible []int32
	visPos  []int32

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
	// the footprint's continuity does (empty, wrapped, first tick): the
	// footprint's vertices and the user at the tick before, the vertices'
	// total movement so far (Mercator metres), and per marker the total up
	// to which its answer holds.
	prevOK    bool
	prevVerts [4]Mercator
	prevUser  Mercator
	moved     float64
	safeUntil []float64
	due       []int32 // room for the markers due at a tick
	// The near list: markers whose key lay below nearM when it was
	// gathered (and so every marker whose key lies below nearM), looked at
	// every tick while the movement stays below nearM.
	near  []int32
	nearM float64

	// see brings r.in and r.visible up to tick k, through setIn; the
	// indexed search by default.
	see func(r *driveRun, k int32, v *View)
}

func newDriveRun(d *Drive, ms []Marker, merc []Mercator) *driveRun {
	n := len(merc)
	r := &driveRun{d: d, ms: ms, merc: merc,
		turns:     d.Route.Turns(d.Rules.Turn.MinAngleDeg),
		out:       make([]MarkerTimeline, n),
		shown:     make([]int, 0, d.Cap),
		in:        make([]bool, n),
		visible:   make([]int32, 0, n),
		visPos:    make([]int32, n),
		safeUntil: make([]float64, n),
		due:       make([]int32, n),
		near:      make([]int32, n),
		see:       (*driveRun).seeIndexed,
	}
	for i := range r.visPos {
		r.visPos[i] = -1
	}
	return r
}

// setIn records whether marker i is in view at this tick.
func (r *driveRun) setIn(i int32, in bool) {
	if in != r.in[i] {
		r.flip(i)
	}
}

// flip turns marker i's answer over: into the visible list (its first
// visible time set), or out of it.
func (r *driveRun) flip(i int32) {
	in := !r.in[i]
	r.in[i] = in
	if in {
		r.visPos[i] = int32(len(r.visible))
		r.visible = append(r.visible, i)
		if o := &r.out[i]; !o.Visible {
			o.Visible, o.FirstVisibleS = true, r.t
		}
		return
	}
	p, last := r.visPos[i], r.visible[len(r.visible)-1]
	r.visible[p], r.visPos[last] = last, p
	r.visible = r.visible[:len(r.visible)-1]
	r.visPos[i] = -1
}

func (r *driveRun) run() ([]MarkerTimeline, error) {
	d := r.d
	rt := d.Route
	n := d.Ticks()
	lengthM := rt.LengthM()
	var st rules.State
	var heading float64
	// Two views, placed at alternate ticks, so that the one before stays
	// at hand without a copy.
	var views [2]View
	cam := Camera{Device: d.Device}
	walk := rt.Walk(d.StartAlongM)
	for k := 0; k <= n; k++ {
		t := float64(k) * d.TickS
		along := walk.AlongAfterS(t)
		seg := rt.Segment(walk.SegmentAt(along)) // the current segment, found once
		speed := seg.SpeedMps
		if along >= lengthM {
			speed = 0 // stopped at the route's end
		}
		turnDist, hasTurn := walk.NextTurnDistM(r.turns, along)
		target := seg.HeadingDeg
		if k == 0 {
			var err error
			if st, err = d.Rules.Start(speed, turnDist, hasTurn); err != nil {
				return nil, err
			}
			heading = target
		} else {
			if err := st.Step(d.TickS, speed, turnDist, hasTurn); err != nil {
				return nil, err
			}
			heading = rules.TurnHeadingDeg(heading, target, d.Rules.MaxTurnRateDegPerS*d.TickS)
		}
		pos := walk.PointAt(along)
		cam.LatDeg, cam.LonDeg = pos[1], pos[0]
		cam.HeadingDeg, cam.PitchDeg, cam.Zoom = heading, st.PitchDeg(), st.Zoom()
		v := &views[k&1]
		if err := v.placeKnown(&cam, v.focal > 0); err != nil { // the drive's device throughout
			return nil, fmt.Errorf("at t = %s s: %w", FormatNumber(t), err)
		}
		r.tick(k, t, v)
		if d.OnTick != nil {
			d.OnTick(k, v, r.shown)
		}
		if d.OnBand != nil {
			d.OnBand(k, st.Band())
		}
		r.prev = v
	}
	r.finish()
	return r.out, nil
}

// tick finds who is in view at tick k and gives out the slots.
func (r *driveRun) tick(k int, t float64, v *View) {
	r.t = t
	r.see(r, int32(k), v)
	// Shown markers keep their slot while visible.
	kept := r.shown[:0]
	for _, i := range r.shown {
		if r.in[i] {
			kept = append(kept, i)
		}
	}
	r.shown = kept
	// Free slots go to visible, not-shown markers by rank (see ahead); the
	// shown are visible, so there is one while more are visible.
	for len(r.shown) < r.d.Cap && len(r.visible) > len(r.shown) {
		best := -1
		for _, i32 := range r.visible {
			i := int(i32)
			if r.isShown(i) {
				continue
			}
			if best < 0 || r.ahead(i, best) {
				best = i
			}
		}
		if best < 0 {
			break
		}
		r.shown = append(r.shown, best)
		o := &r.out[best]
		if !o.Shown {
			o.Shown, o.FirstShownS = true, t
			// Its own margin now, and at the tick before (where it has a
			// pixel there).
			o.FirstShownMarginPx = math.Abs(v.ProjectMercator(r.merc[best]).MarginPx)
			if k > 0 {
				if sp := r.prev.ProjectMercator(r.merc[best]); sp.HasPixel() {
					o.FirstShownMarginPx = min(o.FirstShownMarginPx, math.Abs(sp.MarginPx))
				}
			}
		}
	}
	for _, i := range r.shown {
		r.out[i].ShownS++ // ticks for now; seconds in finish
	}
}

// seeIndexed brings the in-view answers up to tick k, testing only the
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
func (r *driveRun) seeIndexed(k int32, v *View) {
	r.frame(v)
	if !r.shape.ok || v.wrapped {
		// No continuity: ask ProjectMercator of every marker (an empty
		// trapezoid may still have a row of ground on the screen, where
		// the far row meets the clear area's bottom).
		r.prevOK = false
		for i, m := range r.merc {
			r.setIn(int32(i), v.ProjectMercator(m).InView())
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
func (r *driveRun) frame(v *View) {
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
func (r *driveRun) advance(v *View) (h float64) {
	var verts [4]Mercator
	var d2 float64
	for i, o := range r.offs {
		p := Mercator{X: v.target.X + o.X, Y: v.target.Y + o.Y}
		verts[i] = p
		dx, dy := ShortDXM(p.X-r.prevVerts[i].X), p.Y-r.prevVerts[i].Y
		d2 = max(d2, dx*dx+dy*dy)
	}
	if r.prevOK {
		r.moved = math.Nextafter(r.moved+math.Sqrt(d2), math.Inf(1))
		h = 8*math.Hypot(ShortDXM(v.user.X-r.prevUser.X), v.user.Y-r.prevUser.Y) + 1e-9*(1+r.moved)
	} else {
		// A new epoch: no earlier safe distance holds, and the near list
		// is gathered again.
		r.moved, r.nearM = 0, math.Inf(-1)
		for i := range r.safeUntil {
			r.safeUntil[i] = math.Inf(-1)
		}
	}
	r.prevOK, r.prevVerts, r.prevUser = true, verts, v.user
	return h
}

// dueNow returns the markers whose key the movement has reached, found
// without a branch on each (keys are never NaN): those of the near list,
// or, once the movement reaches nearM, those of all, in the same pass that
// gathers the near list anew (gather true): every marker whose key lies
// below nearM, h ahead of the movement. Until the movement reaches nearM,
// a marker outside the list is not due.
func (r *driveRun) dueNow(h float64) (due []int32, gather bool) {
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

// ahead reports whether marker i ranks before marker j for a free slot:
// higher priority first, then the smaller id byte by byte (ids are
// unique, so this orders all markers).
func (r *driveRun) ahead(i, j int) bool {
	a, b := &r.ms[i], &r.ms[j]
	return a.Priority > b.Priority || (a.Priority == b.Priority && a.ID < b.ID)
}

func (r *driveRun) isShown(i int) bool {
	for _, j := range r.shown {
		if j == i {
			return true
		}
	}
	return false
}

// finish turns tick counts into seconds and assigns buckets.
func (r *driveRun) finish() {
	d := r.d
	e1, e2 := d.BucketEdgesS[0], d.BucketEdgesS[1]
	for i := range r.out {
		o := &r.out[i]
		o.ShownS *= d.TickS
		if !o.Shown {
			o.Bucket = Never
			continue
		}
		t := o.FirstShownS
		switch {
		case t < e1:
			o.Bucket = Early
		case t < e2:
			o.Bucket = Mid
		default:
			o.Bucket = Late
		}
		o.BucketMarginS = min(math.Abs(t-e1), math.Abs(t-e2), d.HorizonS-t)
	}
}
