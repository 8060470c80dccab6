package timeline

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"sync"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/viewport"
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
	Device       viewport.Device
	Rules        *rules.Set
	HorizonS     float64    // seconds, > 0; default 120
	TickS        float64    // seconds, > 0, dividing HorizonS; default 0.25
	Cap          int        // markers shown at once, ≥ 1; default 4
	BucketEdgesS [2]float64 // e1 < e2 ≤ HorizonS, seconds; default 5, 35
	// Stops pause the motion (SPEC §5): sorted by AtS, not overlapping.
	// A drive replayed from a recorded trace stands still where the trace
	// repeats a position.
	Stops []Stop

	// OnTick, when set, is called at every tick with the tick's index, its
	// view and the indices of the markers shown, for pictures and per-tick
	// output. The view and the indices are valid during the call only (the
	// memory is the run's, and then the next run's): copy what is kept.
	OnTick func(tick int, v *viewport.View, shown []int)
	// OnBand, when set, is called at every tick with the rule set's speed
	// band at that tick (an index into Rules.Bands), for reports of how
	// often the band changes.
	OnBand func(tick, band int)
}

// Stop is a pause of a drive: from drive time AtS, for ForS seconds, the
// user stands still (speed 0) where the motion had brought them, and the
// motion resumes afterwards from there.
type Stop struct {
	AtS, ForS float64
}

// NewDrive returns a drive on r from startAlongM with the defaults of SPEC
// §5: a 120 s horizon, 0.25 s ticks, 4 markers at once, buckets at 5 and
// 35 s.
func NewDrive(r *routes.Route, startAlongM float64, d viewport.Device, rs *rules.Set) Drive {
	return Drive{Route: r, StartAlongM: startAlongM, Device: d, Rules: rs,
		HorizonS: 120, TickS: 0.25, Cap: 4, BucketEdgesS: [2]float64{5, 35}}
}

// Ticks returns the number of ticks after t = 0: HorizonS/TickS.
func (d *Drive) Ticks() int { return int(math.Round(d.HorizonS / d.TickS)) }

// Validate reports the first invalid field of d as a *spec.FieldError (field
// names as on the wire), or an error from the rule set.
func (d *Drive) Validate() error {
	switch {
	case d.Route == nil:
		return spec.Absent("route")
	case d.Rules == nil:
		return spec.Absent("rules")
	case !(d.HorizonS > 0) || math.IsInf(d.HorizonS, 0):
		return spec.Out("horizon_s", d.HorizonS, "horizon must be finite and positive")
	case !(d.TickS > 0) || math.IsInf(d.TickS, 0):
		return spec.Out("tick_s", d.TickS, "tick must be finite and positive")
	}
	if n := d.HorizonS / d.TickS; math.Abs(n-math.Round(n)) > 1e-9 || n > 1e7 {
		return spec.Out("tick_s", d.TickS,
			"tick must divide the horizon "+spec.FormatNumber(d.HorizonS)+" s within 1e-9 (and give at most 1e7 ticks)")
	}
	if d.Cap < 1 {
		return spec.Out("cap", float64(d.Cap), "cap must be at least 1")
	}
	e1, e2 := d.BucketEdgesS[0], d.BucketEdgesS[1]
	switch {
	case !(e1 >= 0) || math.IsInf(e1, 0):
		return spec.Out("bucket_edges_s[0]", e1, "bucket edge must be finite and non-negative")
	case !(e2 > e1) || math.IsInf(e2, 0):
		return spec.Out("bucket_edges_s[1]", e2, "bucket edges must increase")
	case e2 > d.HorizonS:
		return spec.Out("bucket_edges_s[1]", e2, "bucket edge beyond the horizon "+spec.FormatNumber(d.HorizonS)+" s")
	case !(d.StartAlongM >= 0 && d.StartAlongM <= d.Route.LengthM()):
		return spec.Out("start_along_m", d.StartAlongM,
			"start must be on the route, within [0, "+spec.FormatNumber(d.Route.LengthM())+"] m")
	}
	end := 0.0
	for i, st := range d.Stops {
		switch {
		case !(st.AtS >= end) || math.IsInf(st.AtS, 0):
			return spec.Out(spec.Index("stops", i)+".at_s", st.AtS, "stops must start at or after 0 and after the stop before ends ("+spec.FormatNumber(end)+" s)")
		case !(st.ForS > 0) || math.IsInf(st.ForS, 0):
			return spec.Out(spec.Index("stops", i)+".for_s", st.ForS, "a stop must last a finite, positive time")
		}
		end = st.AtS + st.ForS
	}
	if err := d.Rules.Validate(); err != nil {
		return err
	}
	c := viewport.Camera{LatDeg: 0, LonDeg: 0, Zoom: d.Rules.MinZoom, Device: d.Device}
	return c.Validate()
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

// Result is what the drive timeline says of one marker.
type Result struct {
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
	// TurnMarginDeg is how near the drive came, up to the marker's first
	// showing (the whole drive when it was never shown), to turning the
	// map the other way round at a U-turn (rules.TurnMarginDeg), degrees;
	// +Inf when no turn was limited by the turn rate. Under the angle
	// tolerance, implementations may show the marker at different times.
	TurnMarginDeg float64
}

// Compute runs the drive of SPEC §5 and returns, for each marker in the
// order given, when it was first visible and first shown, how long it was
// shown and its bucket. Motion is exact in time; the camera at tick k
// follows the route position at t = k·tick, the heading turned toward the
// current segment's bearing by at most max_turn_rate·tick, and the zoom and
// pitch of the rules fed by the current speed and the distance to the next
// turn. Memory grows with markers + ticks, not their product, and all of it
// but the results is kept for the next call (calls may run at once).
func Compute(d *Drive, ms []Marker) ([]Result, error) {
	sc := scratchPool.Get().(*scratch)
	defer scratchPool.Put(sc)
	r, err := newRun(d, ms, sc)
	if err != nil {
		return nil, err
	}
	return r.run()
}

// scratch is the memory of a run that the next run can reuse: all of it
// but the results. A server computes one timeline after another, and
// allocating this afresh each time cost almost half of a short timeline's
// time (one tick, 200 markers), much of it in the garbage collector.
type scratch struct {
	merc    []viewport.Mercator
	ids     map[string]struct{}
	idsFor  int // the most ids the map has held
	tracker viewport.Tracker
	isIn    []bool
	waiting []int
	shown   []int
	views   [2]viewport.View
}

// scratchPool holds the scratch of finished runs.
var scratchPool = sync.Pool{New: func() any { return new(scratch) }}

// MaxMarkerTicks is the most markers × ticks one timeline computes: about
// 10 s of work on one core when every marker must be tested at every tick
// (a drive that turns all the time), and well under that on a real drive.
// SPEC §5 states it, so that a server refusing larger requests agrees with
// the reference.
const MaxMarkerTicks = 1e8

// newRun validates d and ms and returns the run of the drive, in the
// memory of sc.
func newRun(d *Drive, ms []Marker, sc *scratch) (*driveRun, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	if work := float64(d.Ticks()+1) * float64(len(ms)); work > MaxMarkerTicks {
		return nil, &spec.FieldError{Field: "markers", Value: strconv.Itoa(len(ms)) + " markers × " + strconv.Itoa(d.Ticks()+1) + " ticks",
			Reason: "more than " + spec.FormatNumber(MaxMarkerTicks) + " marker-ticks, the most one timeline computes (SPEC §5)"}
	}
	merc, err := markerPoints(ms, sc)
	if err != nil {
		return nil, err
	}
	return newDriveRun(d, ms, merc, sc), nil
}

// markerPoints validates ms and returns their Mercator points, in sc's
// memory.
func markerPoints(ms []Marker, sc *scratch) ([]viewport.Mercator, error) {
	merc := slices.Grow(sc.merc[:0], len(ms))[:len(ms)]
	sc.merc = merc
	for i, m := range ms {
		// The path is formatted only when the check fails.
		if spec.CheckLatLon("", m.Point[1], m.Point[0]) != nil {
			return nil, spec.CheckLatLon(spec.Index("markers", i), m.Point[1], m.Point[0])
		}
		if math.IsNaN(m.Priority) || math.IsInf(m.Priority, 0) {
			return nil, spec.Out(spec.Index("markers", i)+".priority", m.Priority, "priority must be finite")
		}
		merc[i] = viewport.ToMercator(m.Point)
	}
	// The map of ids is reused, unless a much larger run left it with
	// room that clearing would walk through for nothing.
	if sc.ids == nil || sc.idsFor > 4*len(ms)+64 {
		sc.ids, sc.idsFor = make(map[string]struct{}, len(ms)), 0
	}
	sc.idsFor = max(sc.idsFor, len(ms))
	defer clear(sc.ids) // holds no ids between runs
	return merc, checkIDsIn(sc.ids, ms, "markers")
}

// CheckIDs returns nil when the markers' ids are unique, or the error
// naming the second of the first two alike (path[i].id).
func CheckIDs(ms []Marker, path string) error {
	return checkIDsIn(make(map[string]struct{}, len(ms)), ms, path)
}

// checkIDsIn is CheckIDs with an empty map to fill.
// Each id is hashed once: it is put in the set, and a set that did not
// grow held it already (the first holder is then looked for).
func checkIDsIn(seen map[string]struct{}, ms []Marker, path string) error {
	for i, m := range ms {
		if seen[m.ID] = struct{}{}; len(seen) == i {
			j := slices.IndexFunc(ms, func(o Marker) bool { return o.ID == m.ID })
			return &spec.FieldError{Field: spec.Index(path, i) + ".id", Value: strconv.Quote(m.ID),
				Reason: "duplicate id (first at " + spec.Index(path, j) + ")"}
		}
	}
	return nil
}

// driveRun is the state of one timeline run.
type driveRun struct {
	d     *Drive
	ms    []Marker
	merc  []viewport.Mercator
	turns []float64

	out   []Result
	t     float64        // the tick's time, seconds
	prev  *viewport.View // the view at the tick before, for first-shown margins
	shown []int          // indices of the shown markers
	// isIn and waiting are scratch space of the slot assignment.
	isIn    []bool
	waiting []int

	// seen keeps which markers are in view from tick to tick.
	seen seer
	// views are the two views placed at alternate ticks, so that the one
	// before stays at hand without a copy. Each one's first placing is
	// with Place, which keeps nothing from a view left by another run
	// unless its device, pitch, zoom or heading are the same to the bit
	// (and then the numbers are the same).
	views *[2]viewport.View
	// turnMin is the smallest turn margin so far (rules.TurnMarginDeg).
	turnMin float64
}

// seer is what the run asks of its in-view tracking: a viewport.Tracker,
// or a test's oracle.
type seer interface {
	See(v *viewport.View)
	In(i int) bool
	Visible() []int32
	Entered() []int32
}

// newDriveRun returns the run of d for markers ms at Mercator points
// merc, in the memory of sc.
func newDriveRun(d *Drive, ms []Marker, merc []viewport.Mercator, sc *scratch) *driveRun {
	sc.tracker.Reset(merc)
	sc.isIn = slices.Grow(sc.isIn[:0], len(ms))[:len(ms)]
	clear(sc.isIn)
	sc.waiting = slices.Grow(sc.waiting[:0], len(ms))
	sc.shown = slices.Grow(sc.shown[:0], min(d.Cap, len(ms)))
	return &driveRun{d: d, ms: ms, merc: merc,
		turns:   d.Route.Turns(d.Rules.Turn.MinAngleDeg),
		out:     make([]Result, len(merc)),
		shown:   sc.shown,
		isIn:    sc.isIn,
		waiting: sc.waiting,
		seen:    &sc.tracker,
		views:   &sc.views,
		turnMin: math.Inf(1),
	}
}

func (r *driveRun) run() ([]Result, error) {
	d := r.d
	rt := d.Route
	n := d.Ticks()
	lengthM := rt.LengthM()
	var st rules.State
	var heading float64
	views := r.views
	cam := viewport.Camera{Device: d.Device}
	walk := rt.Walk(d.StartAlongM)
	var pause pauses
	for k := 0; k <= n; k++ {
		t := float64(k) * d.TickS
		moving, stopped := pause.at(d.Stops, t)
		along := walk.AlongAfterS(moving)
		seg := rt.Segment(walk.SegmentAt(along)) // the current segment, found once
		speed := seg.SpeedMps
		if along >= lengthM || stopped {
			speed = 0 // stopped at the route's end, or at a stop
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
			// At the segment's heading already (most ticks), TurnHeadingDeg
			// would keep it and TurnMarginDeg be +Inf; a heading of ±0 is
			// left to them (they give +0 for −0).
			if heading != target || !(heading > 0) {
				step := d.Rules.MaxTurnRateDegPerS * d.TickS
				if m := rules.TurnMarginDeg(heading, target, step); m < r.turnMin {
					r.turnMin = m
				}
				heading = rules.TurnHeadingDeg(heading, target, step)
			}
		}
		pos := walk.PointAt(along)
		v := &views[k&1]
		var err error
		if k < len(views) { // each view's first placing, with the device
			cam.LatDeg, cam.LonDeg = pos[1], pos[0]
			cam.HeadingDeg, cam.PitchDeg, cam.Zoom = heading, st.PitchDeg(), st.Zoom()
			err = v.Place(cam)
		} else {
			err = v.Move(pos[1], pos[0], heading, st.PitchDeg(), st.Zoom())
		}
		if err != nil {
			return nil, fmt.Errorf("at t = %s s: %w", spec.FormatNumber(t), err)
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
func (r *driveRun) tick(k int, t float64, v *viewport.View) {
	r.t = t
	r.seen.See(v)
	for _, i := range r.seen.Entered() {
		if o := &r.out[i]; !o.Visible {
			o.Visible, o.FirstVisibleS = true, t
		}
	}
	visible := r.seen.Visible()
	// Shown markers keep their slot while visible.
	kept := r.shown[:0]
	for _, i := range r.shown {
		if r.seen.In(i) {
			kept = append(kept, i)
		}
	}
	r.shown = kept
	// Free slots go to visible, not-shown markers by rank (see ahead); the
	// shown are visible, so there is one while more are visible.
	free := r.d.Cap - len(r.shown)
	if free <= 0 || len(visible) <= len(r.shown) {
		r.countShown()
		return
	}
	for _, i := range r.shown {
		r.isIn[i] = true
	}
	r.waiting = r.waiting[:0]
	for _, i32 := range visible {
		if !r.isIn[i32] {
			r.waiting = append(r.waiting, int(i32))
		}
	}
	for _, i := range r.shown {
		r.isIn[i] = false
	}
	r.waiting = r.best(r.waiting, free)
	for _, best := range r.waiting {
		r.shown = append(r.shown, best)
		o := &r.out[best]
		if !o.Shown {
			o.Shown, o.FirstShownS, o.TurnMarginDeg = true, t, r.turnMin
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
	r.countShown()
}

// best returns the first k of ws in rank order (see ahead), or all of them
// when there are no more, reordering ws. A few slots are free at a time
// (one, mostly), so the best are picked out in one pass over ws rather
// than by sorting it all; a larger k is sorted.
func (r *driveRun) best(ws []int, k int) []int {
	if k > 16 || k >= len(ws) {
		slices.SortFunc(ws, func(a, b int) int {
			if r.ahead(a, b) {
				return -1
			}
			return 1 // ids are unique: a ≠ b ranks after
		})
		return ws[:min(k, len(ws))]
	}
	// ws[:k] in rank order, then each later marker that ranks before the
	// last of them takes its place among them.
	for j := 1; j < k; j++ {
		r.insert(ws, j, ws[j])
	}
	for _, i := range ws[k:] {
		if r.ahead(i, ws[k-1]) {
			r.insert(ws, k-1, i)
		}
	}
	return ws[:k]
}

// insert puts marker i into ws[:j+1], whose first j are in rank order,
// over ws[j].
func (r *driveRun) insert(ws []int, j, i int) {
	for ; j > 0 && r.ahead(i, ws[j-1]); j-- {
		ws[j] = ws[j-1]
	}
	ws[j] = i
}

// countShown counts a tick for every shown marker.
func (r *driveRun) countShown() {
	for _, i := range r.shown {
		r.out[i].ShownS++ // ticks for now; seconds in finish
	}
}

// ahead reports whether marker i ranks before marker j for a free slot:
// higher priority first, then the smaller id byte by byte (ids are
// unique, so this orders all markers).
func (r *driveRun) ahead(i, j int) bool {
	a, b := &r.ms[i], &r.ms[j]
	return a.Priority > b.Priority || (a.Priority == b.Priority && a.ID < b.ID)
}

// finish turns tick counts into seconds and assigns buckets.
func (r *driveRun) finish() {
	d := r.d
	e1, e2 := d.BucketEdgesS[0], d.BucketEdgesS[1]
	for i := range r.out {
		o := &r.out[i]
		o.ShownS *= d.TickS
		if !o.Shown {
			o.Bucket, o.TurnMarginDeg = Never, r.turnMin
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

// pauses follows a drive's stops through increasing times.
type pauses struct {
	next    int     // the first stop not wholly before the last time
	pausedS float64 // the length of the stops before it
}

// at returns the time spent moving by drive time t, and whether the user
// stands at a stop at t (a stop holds from its start up to, not including,
// its end). Times must not decrease from call to call.
func (p *pauses) at(stops []Stop, t float64) (movingS float64, stopped bool) {
	for p.next < len(stops) && t >= stops[p.next].AtS+stops[p.next].ForS {
		p.pausedS += stops[p.next].ForS
		p.next++
	}
	if p.next < len(stops) && t >= stops[p.next].AtS {
		return stops[p.next].AtS - p.pausedS, true
	}
	return t - p.pausedS, false
}
