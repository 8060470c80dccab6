// Package gate shows what a change of zoom rules does to visibility before
// it ships: it drives every drive of a set under a base rule set and a new
// one (SPEC §5, §8) and reports, per drive and in total, how many markers
// move between buckets and which ones (with when each was first shown under
// each rule set), the shown seconds gained and lost, the footprint's
// area-seconds, the zoom and pitch ranges and how often the speed band
// changes; and it evaluates gate conditions on those measures.
//
// Reading: [ReadTrips] (drive files and folders, saying which files of a
// folder are not drives), [ReadMarkerNames]. Comparing: [CompareRules]
// gives a [Comparison] of [TripDiff]s with their [Measures] and
// [MarkerMove]s. Gating: [ParseCondition], [Condition.Holds],
// [Comparison.Check]. Reports: [Comparison.WriteText],
// [Comparison.WriteMarkdown]; the JSON report is the Comparison itself.
//
// Times are seconds, areas square metres (area-seconds m²·s), zoom in zoom
// levels, pitch in degrees. Buckets are early, mid, late and never. Gained
// and lost are from the base rules to the new: both are ≥ 0, and a
// positive lost measure means the new rules show less.
package gate

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// Buckets lists the buckets in report order.
var Buckets = []timeline.Bucket{timeline.Early, timeline.Mid, timeline.Late, timeline.Never}

// Trace is what one rule set did on one drive, tick by tick.
type Trace struct {
	TimesS   []float64
	Zoom     []float64
	PitchDeg []float64
	Band     []int
}

// Outcome is one drive under one rule set.
type Outcome struct {
	// Params are the timeline's parameters the drive ran with.
	Params  TimelineParams
	Markers []timeline.Result
	Trace   Trace
	// AreaS is the footprint's area integrated over the drive, m²·s.
	AreaS float64
}

// TripDiff compares one drive under the two rule sets.
type TripDiff struct {
	Name string `json:"name"`
	Measures
	// Moves[from][to] counts markers by their bucket under the base rules
	// (from) and the new rules (to), in the order early, mid, late, never.
	Moves     [4][4]int `json:"moves"`
	Base, New Outcome   `json:"-"`
	drives    int       // drives folded in (the total)
}

// Measures are the numbers a gate condition can name.
type Measures struct {
	Markers int `json:"markers"`
	// ShownSBase and ShownSNew are the markers' shown_s summed, seconds.
	ShownSBase float64 `json:"shown_s_base"`
	ShownSNew  float64 `json:"shown_s_new"`
	// GainedShownS and LostShownS sum, over the markers, the increases and
	// the decreases of shown_s from the base rules to the new, seconds;
	// both are ≥ 0 (a marker shown 10 s less adds 10 to LostShownS).
	GainedShownS float64 `json:"gained_shown_s"`
	LostShownS   float64 `json:"lost_shown_s"`
	// GainedShownPct and LostShownPct are GainedShownS and LostShownS as
	// percentages of ShownSBase, so both are ≥ 0 too: positive
	// lost_shown_pct means shown time lost (lost_shown_pct 10: the new
	// rules show markers, marker by marker, for 10 % of the base's shown
	// time less), and 'lost_shown_pct > 5' fails a rule change that loses
	// more than 5 %. When ShownSBase is 0, a percentage is 100 if its
	// seconds are positive, else 0.
	GainedShownPct float64 `json:"gained_shown_pct"`
	LostShownPct   float64 `json:"lost_shown_pct"`
	Moved          int     `json:"moved"`
	NeverAdded     int     `json:"never_added"`
	NeverRemoved   int     `json:"never_removed"`
	EarlyLost      int     `json:"early_lost"`
	EarlyAdded     int     `json:"early_added"`
	AreaSBase      float64 `json:"area_s_base"`
	AreaSNew       float64 `json:"area_s_new"`
	// AreaChangePct is the change of the footprint's area-seconds from the
	// base rules to the new, as a percentage of AreaSBase: positive when
	// the new rules show more ground (a lower zoom, a wider view).
	AreaChangePct   float64 `json:"area_change_pct"`
	BandChangesBase int     `json:"band_changes_base"`
	BandChangesNew  int     `json:"band_changes_new"`
	ZoomMinBase     float64 `json:"zoom_min_base"`
	ZoomMaxBase     float64 `json:"zoom_max_base"`
	ZoomMinNew      float64 `json:"zoom_min_new"`
	ZoomMaxNew      float64 `json:"zoom_max_new"`
	PitchMinBase    float64 `json:"pitch_min_base"`
	PitchMaxBase    float64 `json:"pitch_max_base"`
	PitchMinNew     float64 `json:"pitch_min_new"`
	PitchMaxNew     float64 `json:"pitch_max_new"`
}

// TimelineParams are the drive timeline's parameters (SPEC §5) a
// comparison ran with: the horizon and the tick, seconds; how many markers
// are shown at once; the bucket edges, seconds (early before the first,
// mid before the second, late to the horizon).
type TimelineParams struct {
	HorizonS     float64    `json:"horizon_s"`
	TickS        float64    `json:"tick_s"`
	Cap          int        `json:"cap"`
	BucketEdgesS [2]float64 `json:"bucket_edges_s"`
}

// MarkerMove is a marker whose bucket differs between the rule sets on one
// drive: its id, its name when the marker file gives one, its bucket under
// the base rules (From) and the new (To), and when it was first shown
// under each, seconds (nil, null in JSON, when never shown).
type MarkerMove struct {
	Drive           string   `json:"drive"`
	ID              string   `json:"id"`
	Name            string   `json:"name,omitempty"`
	From            string   `json:"from"`
	To              string   `json:"to"`
	FirstShownSBase *float64 `json:"first_shown_s_base"`
	FirstShownSNew  *float64 `json:"first_shown_s_new"`

	drive    int // index of the drive in Comparison.Drives
	from, to int // bucket indices in Buckets
}

// Comparison is the whole comparison.
type Comparison struct {
	// Timeline holds the parameters the drives ran with (those of the
	// first drive, after Setup.Configure).
	Timeline TimelineParams `json:"timeline"`
	Drives   []TripDiff     `json:"drives"`
	Total    TripDiff       `json:"total"`
	// MovedMarkers lists every marker that changed bucket, drive by drive
	// in the drives' order, then by the bucket it leaves and the one it
	// enters (early, mid, late, never), then by its first-shown time under
	// the base rules and then the new (never shown last), then by id.
	MovedMarkers []MarkerMove `json:"moved_markers"`
	// Skipped lists the files of drive folders that were not drives
	// ([ReadTrips]); CompareRules leaves it empty for its caller to fill.
	Skipped []Skipped `json:"skipped"`
}

// Setup are the drives' common inputs.
type Setup struct {
	Device  viewport.Device
	Markers []timeline.Marker
	// MarkerNames, when set, names markers by id for the list of markers
	// that moved ([ReadMarkerNames]).
	MarkerNames map[string]string
	// Configure, when set, adjusts each drive before it runs (horizon,
	// tick, cap, bucket edges).
	Configure func(d *timeline.Drive)
}

// runDrive drives dr under rs and records the trace.
func runDrive(dr Trip, rs *rules.Set, opt *Setup) (Outcome, error) {
	d := timeline.NewDrive(dr.Route, dr.StartAlongM, opt.Device, rs)
	if opt.Configure != nil {
		opt.Configure(&d)
	}
	var run Outcome
	run.Params = TimelineParams{HorizonS: d.HorizonS, TickS: d.TickS, Cap: d.Cap, BucketEdgesS: d.BucketEdgesS}
	// Validate before sizing the traces by the number of ticks, which a
	// zero or non-finite tick would make meaningless.
	if err := d.Validate(); err != nil {
		return run, fmt.Errorf("%s: %w", dr.label(), err)
	}
	n := d.Ticks() + 1
	run.Trace = Trace{TimesS: make([]float64, 0, n), Zoom: make([]float64, 0, n), PitchDeg: make([]float64, 0, n), Band: make([]int, 0, n)}
	d.OnTick = func(k int, v *viewport.View, _ []int) {
		c := v.Camera()
		run.Trace.TimesS = append(run.Trace.TimesS, float64(k)*d.TickS)
		run.Trace.Zoom = append(run.Trace.Zoom, c.Zoom)
		run.Trace.PitchDeg = append(run.Trace.PitchDeg, c.PitchDeg)
		run.AreaS += v.Footprint().AreaM2 * d.TickS
	}
	d.OnBand = func(_, band int) { run.Trace.Band = append(run.Trace.Band, band) }
	ms, err := timeline.Compute(&d, opt.Markers)
	if err != nil {
		return run, fmt.Errorf("%s: %w", dr.label(), err)
	}
	run.Markers = ms
	return run, nil
}

func bucketIndex(b timeline.Bucket) int { return slices.Index(Buckets, b) }

// CompareRules drives every drive under base and next and compares them.
func CompareRules(drives []Trip, base, next *rules.Set, opt Setup) (*Comparison, error) {
	rep := &Comparison{Total: TripDiff{Name: "total"}, MovedMarkers: []MarkerMove{}, Skipped: []Skipped{}}
	for k, dr := range drives {
		b, err := runDrive(dr, base, &opt)
		if err != nil {
			return nil, err
		}
		n, err := runDrive(dr, next, &opt)
		if err != nil {
			return nil, err
		}
		if k == 0 {
			rep.Timeline = b.Params
		}
		dd := TripDiff{Name: dr.Name, Base: b, New: n}
		dd.compare(opt.Markers)
		rep.Drives = append(rep.Drives, dd)
		rep.Total.add(&dd)
		rep.MovedMarkers = dd.appendMoves(rep.MovedMarkers, k, opt.Markers, opt.MarkerNames)
	}
	rep.Total.finish()
	slices.SortStableFunc(rep.MovedMarkers, compareMoves)
	return rep, nil
}

// appendMoves appends the markers that changed bucket on drive k.
func (dd *TripDiff) appendMoves(out []MarkerMove, k int, ms []timeline.Marker, names map[string]string) []MarkerMove {
	shownAt := func(r timeline.Result) *float64 {
		if !r.Shown {
			return nil
		}
		t := r.FirstShownS
		return &t
	}
	for i, m := range ms {
		b, n := dd.Base.Markers[i], dd.New.Markers[i]
		if b.Bucket == n.Bucket {
			continue
		}
		out = append(out, MarkerMove{Drive: dd.Name, ID: m.ID, Name: names[m.ID],
			From: b.Bucket.String(), To: n.Bucket.String(),
			FirstShownSBase: shownAt(b), FirstShownSNew: shownAt(n),
			drive: k, from: bucketIndex(b.Bucket), to: bucketIndex(n.Bucket)})
	}
	return out
}

// compareMoves orders moves as Comparison.MovedMarkers says.
func compareMoves(a, b MarkerMove) int {
	return cmp.Or(cmp.Compare(a.drive, b.drive), cmp.Compare(a.from, b.from), cmp.Compare(a.to, b.to),
		compareShown(a.FirstShownSBase, b.FirstShownSBase), compareShown(a.FirstShownSNew, b.FirstShownSNew),
		cmp.Compare(a.ID, b.ID))
}

// compareShown orders first-shown times, never shown (nil) last.
func compareShown(a, b *float64) int {
	switch {
	case a == nil && b == nil:
		return 0
	case a == nil:
		return 1
	case b == nil:
		return -1
	}
	return cmp.Compare(*a, *b)
}

func (dd *TripDiff) compare(ms []timeline.Marker) {
	m := &dd.Measures
	m.Markers = len(ms)
	for i := range ms {
		b, n := dd.Base.Markers[i], dd.New.Markers[i]
		dd.Moves[bucketIndex(b.Bucket)][bucketIndex(n.Bucket)]++
		m.ShownSBase += b.ShownS
		m.ShownSNew += n.ShownS
		if d := n.ShownS - b.ShownS; d > 0 {
			m.GainedShownS += d
		} else {
			m.LostShownS -= d
		}
		if b.Bucket != n.Bucket {
			m.Moved++
		}
		switch {
		case b.Bucket != timeline.Never && n.Bucket == timeline.Never:
			m.NeverAdded++
		case b.Bucket == timeline.Never && n.Bucket != timeline.Never:
			m.NeverRemoved++
		}
		switch {
		case b.Bucket == timeline.Early && n.Bucket != timeline.Early:
			m.EarlyLost++
		case b.Bucket != timeline.Early && n.Bucket == timeline.Early:
			m.EarlyAdded++
		}
	}
	m.AreaSBase, m.AreaSNew = dd.Base.AreaS, dd.New.AreaS
	m.BandChangesBase, m.BandChangesNew = changes(dd.Base.Trace.Band), changes(dd.New.Trace.Band)
	m.ZoomMinBase, m.ZoomMaxBase = span(dd.Base.Trace.Zoom)
	m.ZoomMinNew, m.ZoomMaxNew = span(dd.New.Trace.Zoom)
	m.PitchMinBase, m.PitchMaxBase = span(dd.Base.Trace.PitchDeg)
	m.PitchMinNew, m.PitchMaxNew = span(dd.New.Trace.PitchDeg)
	dd.finish()
}

// add folds a drive into the total.
func (dd *TripDiff) add(o *TripDiff) {
	m, x := &dd.Measures, &o.Measures
	first := dd.drives == 0
	dd.drives++
	m.Markers += x.Markers
	m.ShownSBase += x.ShownSBase
	m.ShownSNew += x.ShownSNew
	m.GainedShownS += x.GainedShownS
	m.LostShownS += x.LostShownS
	m.Moved += x.Moved
	m.NeverAdded += x.NeverAdded
	m.NeverRemoved += x.NeverRemoved
	m.EarlyLost += x.EarlyLost
	m.EarlyAdded += x.EarlyAdded
	m.AreaSBase += x.AreaSBase
	m.AreaSNew += x.AreaSNew
	m.BandChangesBase += x.BandChangesBase
	m.BandChangesNew += x.BandChangesNew
	for i := range dd.Moves {
		for j := range dd.Moves[i] {
			dd.Moves[i][j] += o.Moves[i][j]
		}
	}
	if first {
		m.ZoomMinBase, m.ZoomMaxBase, m.ZoomMinNew, m.ZoomMaxNew = x.ZoomMinBase, x.ZoomMaxBase, x.ZoomMinNew, x.ZoomMaxNew
		m.PitchMinBase, m.PitchMaxBase, m.PitchMinNew, m.PitchMaxNew = x.PitchMinBase, x.PitchMaxBase, x.PitchMinNew, x.PitchMaxNew
		return
	}
	m.ZoomMinBase, m.ZoomMaxBase = min(m.ZoomMinBase, x.ZoomMinBase), max(m.ZoomMaxBase, x.ZoomMaxBase)
	m.ZoomMinNew, m.ZoomMaxNew = min(m.ZoomMinNew, x.ZoomMinNew), max(m.ZoomMaxNew, x.ZoomMaxNew)
	m.PitchMinBase, m.PitchMaxBase = min(m.PitchMinBase, x.PitchMinBase), max(m.PitchMaxBase, x.PitchMaxBase)
	m.PitchMinNew, m.PitchMaxNew = min(m.PitchMinNew, x.PitchMinNew), max(m.PitchMaxNew, x.PitchMaxNew)
}

// finish computes the percentages.
func (dd *TripDiff) finish() {
	m := &dd.Measures
	m.GainedShownPct = pct(m.GainedShownS, m.ShownSBase)
	m.LostShownPct = pct(m.LostShownS, m.ShownSBase)
	m.AreaChangePct = pct(m.AreaSNew-m.AreaSBase, m.AreaSBase)
}

func pct(part, whole float64) float64 {
	if whole == 0 {
		if part == 0 {
			return 0
		}
		return math.Copysign(100, part)
	}
	return 100 * part / whole
}

func changes(bands []int) int {
	n := 0
	for i := 1; i < len(bands); i++ {
		if bands[i] != bands[i-1] {
			n++
		}
	}
	return n
}

func span(xs []float64) (lo, hi float64) {
	if len(xs) == 0 {
		return 0, 0
	}
	return slices.Min(xs), slices.Max(xs)
}
