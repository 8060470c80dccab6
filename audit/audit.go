package audit

import (
	"math"
	"sort"
	"strings"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// Tolerances of the audit (SPEC §9): a phone is a real implementation, held
// to the field profile of SPEC §7. A disagreement whose reference decision
// lies within them is borderline.
const (
	// PixelTolPx bounds in-view decisions: a marker within half a pixel of
	// the clear area's edge may be in view on the phone and not in the
	// reference.
	PixelTolPx = 0.5
	// TurnTolDeg bounds the U-turn direction decision.
	TurnTolDeg = 0.1
)

// Verdict is the reference's judgement of one candidate's display log.
type Verdict int8

const (
	Agree Verdict = iota
	Disagree
	Borderline
)

// String returns the verdict's name in reports: agree, disagree, borderline.
func (v Verdict) String() string {
	switch v {
	case Disagree:
		return "disagree"
	case Borderline:
		return "borderline"
	}
	return "agree"
}

// Causes of a disagreement, as reports name them.
const (
	// CauseNeverVisible: displayed, but never in view in the reference.
	CauseNeverVisible = "displayed_never_visible"
	// CauseCrowdedOut: displayed, but the reference kept it off for the cap
	// (in view, never given a slot).
	CauseCrowdedOut = "displayed_crowded_out"
	// CauseNotDisplayed: shown by the reference, never displayed.
	CauseNotDisplayed = "shown_not_displayed"
	// CauseFirstShown: both displayed, first shown more than a tick apart.
	CauseFirstShown = "first_shown"
	// CauseBucket: both displayed within a tick, in different buckets.
	CauseBucket = "bucket"
)

// Features are what a display-prediction model may know of a candidate at
// request time (t = 0): distances in metres, times in seconds. Pointers are
// nil where the value does not exist (no planned route; the route ends
// before the candidate; an empty footprint).
type Features struct {
	UserDistM        float64
	RouteDistM       *float64
	AlongM           *float64
	EtaS             *float64
	ViewDistM        *float64
	FootprintAreaM2  float64
	VisibleRadiusM   float64
	AspectRatio      float64 // device width / height
	SpeedMps         float64
	PriorityOfMarker float64
}

// Outcome is one candidate's audit: the reference's timeline, the phone's
// display, the verdict and the features.
type Outcome struct {
	ID  string
	Ref timeline.Result
	// Phone is the phone's display, nil when it never displayed the
	// candidate; PhoneBucket its bucket by the same edges.
	Phone       *Display
	PhoneBucket timeline.Bucket
	Verdict     Verdict
	Cause       string // empty when the verdict is agree
	// OffsetS is the phone's first display minus the reference's first
	// showing, seconds, when both showed the candidate (else NaN).
	OffsetS float64
	// Edge names the edge of the in-view region that decided the
	// reference's answer at the moment of a disagreement ("left edge",
	// "far limit", "behind the camera"…), empty otherwise.
	Edge string
	// BestMarginPx is, for a candidate the reference never had in view, the
	// largest in-view margin it reached over the drive (negative); NaN
	// otherwise.
	BestMarginPx float64
	// OverCap: displayed at a moment when more than cap candidates were
	// on screen (known only when the log gives intervals).
	OverCap   bool
	Features  Features
	Predicted *[4]float64
}

// Result is one record's audit.
type Result struct {
	Record   *Record
	Outcomes []Outcome
	// MaxOnScreen is the most candidates the phone displayed at once, when
	// OnScreenKnown (the log gave every display's intervals).
	MaxOnScreen   int
	OnScreenKnown bool
	// Hypotheses[h] counts the record's disagreements Hypotheses[h]
	// explains; nil when the record has none.
	Hypotheses []HypothesisCount
}

// BucketOf returns the bucket of a first showing at firstS seconds (SPEC
// §5): early in [0, e1), mid in [e1, e2), late in [e2, horizon].
func BucketOf(firstS float64, edges [2]float64) timeline.Bucket {
	switch {
	case firstS < edges[0]:
		return timeline.Early
	case firstS < edges[1]:
		return timeline.Mid
	}
	return timeline.Late
}

// Audit replays rec's drive through the reference timeline and judges each
// candidate's display log (SPEC §9).
func Audit(rec *Record) (*Result, error) {
	d := rec.Drive // a copy: the callbacks are this run's
	n := len(rec.Candidates)
	merc := make([]viewport.Mercator, n)
	for i, c := range rec.Candidates {
		merc[i] = viewport.ToMercator(c.Point)
	}
	res := &Result{Record: rec, Outcomes: make([]Outcome, n)}
	requestFeatures(rec, merc, &d, res.Outcomes)
	got, err := timeline.Compute(&d, rec.Candidates)
	if err != nil {
		return nil, err
	}
	var interest []int // candidates whose disagreement needs a look at the view
	for i := range res.Outcomes {
		o := &res.Outcomes[i]
		o.ID, o.Ref, o.OffsetS, o.BestMarginPx = rec.Candidates[i].ID, got[i], math.NaN(), math.NaN()
		o.Phone = rec.Displayed[i]
		if rec.Predicted != nil {
			o.Predicted = rec.Predicted[i]
		}
		judge(o, &d)
		if o.Verdict != Agree {
			interest = append(interest, i)
		}
	}
	res.MaxOnScreen, res.OnScreenKnown = markOverCap(res.Outcomes, d.Cap)
	if len(interest) > 0 {
		if err := explain(rec, merc, interest, res.Outcomes); err != nil {
			return nil, err
		}
	}
	if err := testHypotheses(rec, res); err != nil {
		return nil, err
	}
	return res, nil
}

// judge sets o's verdict and cause from the reference's result and the
// phone's display, before the view is consulted.
func judge(o *Outcome, d *timeline.Drive) {
	o.PhoneBucket = timeline.Never
	if o.Phone != nil {
		o.PhoneBucket = BucketOf(o.Phone.FirstShownS, d.BucketEdgesS)
	}
	ref := &o.Ref
	turnEdge := ref.TurnMarginDeg <= TurnTolDeg
	switch {
	case o.Phone == nil && !ref.Shown:
		o.Verdict = Agree
	case o.Phone != nil && !ref.Shown:
		o.Verdict, o.Cause = Disagree, CauseNeverVisible
		if ref.Visible {
			o.Cause = CauseCrowdedOut
		}
	case o.Phone == nil:
		o.Verdict, o.Cause = Disagree, CauseNotDisplayed
		if ref.FirstShownMarginPx <= PixelTolPx && ref.ShownS <= d.TickS {
			o.Verdict = Borderline // one tick at the edge: another sound camera may never see it
		}
	default:
		o.OffsetS = o.Phone.FirstShownS - ref.FirstShownS
		switch {
		case math.Abs(o.OffsetS) > d.TickS*(1+1e-9):
			o.Verdict, o.Cause = Disagree, CauseFirstShown
			if ref.FirstShownMarginPx <= PixelTolPx {
				o.Verdict = Borderline
			}
		case o.PhoneBucket != ref.Bucket:
			// Within a tick of each other but across an edge: the edge
			// decided it.
			o.Verdict, o.Cause = Borderline, CauseBucket
		default:
			o.Verdict = Agree
		}
	}
	if o.Verdict == Disagree && turnEdge {
		o.Verdict = Borderline
	}
}

// markOverCap marks the displays that overlap a moment with more than cap
// candidates on screen and returns the most on screen at once. It needs
// every display's intervals; known is false (and nothing is marked) when
// the log lacks them.
func markOverCap(os []Outcome, capN int) (most int, known bool) {
	type ev struct {
		t     float64
		delta int
		i     int
	}
	var evs []ev
	for i := range os {
		p := os[i].Phone
		if p == nil {
			continue
		}
		if p.Intervals == nil {
			return 0, false
		}
		for _, iv := range p.Intervals {
			evs = append(evs, ev{iv[0], 1, i}, ev{iv[1], -1, i})
		}
	}
	// Ends before starts at the same moment: a slot handed over is not an
	// overlap.
	sort.Slice(evs, func(a, b int) bool {
		if evs[a].t != evs[b].t {
			return evs[a].t < evs[b].t
		}
		if evs[a].delta != evs[b].delta {
			return evs[a].delta < evs[b].delta
		}
		return evs[a].i < evs[b].i
	})
	on := map[int]bool{}
	for _, e := range evs {
		if e.delta < 0 {
			delete(on, e.i)
			continue
		}
		on[e.i] = true
		most = max(most, len(on))
		if len(on) > capN {
			for i := range on {
				os[i].OverCap = true
			}
		}
	}
	return most, true
}

// Hypothesis is a fault a build may have, tested by running the reference
// with it: the disagreements it turns into agreements are the ones it
// explains (SPEC §9).
type Hypothesis struct {
	Name string
	// Applies reports whether the fault would change anything in d.
	Applies func(d *timeline.Drive) bool
	// Apply plants the fault in d, for a drive of n candidates.
	Apply func(d *timeline.Drive, n int)
	// Says is the finding's conclusion when the fault explains a group.
	Says string
}

// Hypotheses are the faults the audit tests.
var Hypotheses = []Hypothesis{
	{Name: "insets_swapped",
		Applies: func(d *timeline.Drive) bool { return d.Device.InsetLeftPx != d.Device.InsetRightPx },
		Apply: func(d *timeline.Drive, _ int) {
			d.Device.InsetLeftPx, d.Device.InsetRightPx = d.Device.InsetRightPx, d.Device.InsetLeftPx
		},
		Says: "the build swaps the left and right insets"},
	{Name: "cap_ignored",
		Applies: func(*timeline.Drive) bool { return true },
		Apply:   func(d *timeline.Drive, n int) { d.Cap = n + 1 },
		Says:    "the build ignores the cap"},
}

// HypothesisCount is how many disagreements a hypothesis was tested on and
// how many of them it turned into agreements.
type HypothesisCount struct {
	Tested, Explained int64
}

// testHypotheses runs the reference with each applicable hypothesis and
// counts the disagreements it explains.
func testHypotheses(rec *Record, res *Result) error {
	var dis []int
	for i := range res.Outcomes {
		if res.Outcomes[i].Verdict == Disagree {
			dis = append(dis, i)
		}
	}
	if len(dis) == 0 {
		return nil
	}
	res.Hypotheses = make([]HypothesisCount, len(Hypotheses))
	for h, hy := range Hypotheses {
		d := rec.Drive
		if !hy.Applies(&d) {
			continue
		}
		hy.Apply(&d, len(rec.Candidates))
		got, err := timeline.Compute(&d, rec.Candidates)
		if err != nil {
			return err
		}
		c := &res.Hypotheses[h]
		for _, i := range dis {
			o := res.Outcomes[i]
			o.Ref = got[i]
			judge(&o, &d)
			c.Tested++
			if o.Verdict != Disagree {
				c.Explained++
			}
		}
	}
	return nil
}

// requestFeatures fills each outcome's features and arranges for d's tick 0
// to fill the view-dependent ones.
func requestFeatures(rec *Record, merc []viewport.Mercator, d *timeline.Drive, os []Outcome) {
	user := rec.UserAt()
	speed := 0.0
	if len(d.Stops) == 0 || d.Stops[0].AtS > 0 {
		speed = d.Route.Segment(0).SpeedMps
	}
	aspect := d.Device.WidthPx / d.Device.HeightPx
	var place routes.Place
	if rec.Planned != nil {
		place = rec.Planned.Snap(user)
	}
	// One backing array for the optional numbers.
	nums := make([]float64, 4*len(os))
	for i, c := range rec.Candidates {
		f := &os[i].Features
		f.UserDistM = routes.GeodesicDistM(user, c.Point)
		f.SpeedMps, f.AspectRatio, f.PriorityOfMarker = speed, aspect, c.Priority
		if rec.Planned != nil {
			m := rec.Planned.Metrics(place, c.Point)
			n := nums[4*i : 4*i+3]
			n[0] = m.RouteDistM
			f.RouteDistM = &n[0]
			if m.Ahead {
				n[1], n[2] = m.AlongM, m.EtaS
				f.AlongM, f.EtaS = &n[1], &n[2]
			}
		}
	}
	d.OnTick = func(tick int, v *viewport.View, _ []int) {
		if tick != 0 {
			return
		}
		fp := v.Footprint()
		for i := range os {
			f := &os[i].Features
			f.FootprintAreaM2, f.VisibleRadiusM = fp.AreaM2, fp.VisibleRadiusM
			if dist, ok := v.GroundDistM(&fp, merc[i]); ok {
				nums[4*i+3] = dist
				f.ViewDistM = &nums[4*i+3]
			}
		}
	}
}

// explain runs the drive again to name, for each candidate of interest, the
// edge that decided the reference's answer at the moment of the
// disagreement, and the best margin of one never in view; a never-visible
// display that came within PixelTolPx of the view is borderline.
func explain(rec *Record, merc []viewport.Mercator, interest []int, os []Outcome) error {
	d := rec.Drive
	at := make([]int, len(interest)) // the tick to look at
	for k, i := range interest {
		o := &os[i]
		t := o.Ref.FirstShownS
		switch {
		case o.Phone != nil && (!o.Ref.Shown || o.Phone.FirstShownS < o.Ref.FirstShownS):
			t = o.Phone.FirstShownS
		}
		at[k] = int(math.Round(t / d.TickS))
		if !o.Ref.Visible {
			o.BestMarginPx = math.Inf(-1)
		}
	}
	d.OnTick = func(tick int, v *viewport.View, _ []int) {
		for k, i := range interest {
			o := &os[i]
			if !o.Ref.Visible {
				if s := v.ProjectMercator(merc[i]); s.HasPixel() {
					o.BestMarginPx = max(o.BestMarginPx, s.MarginPx)
				}
			}
			if tick == at[k] && o.Cause != CauseCrowdedOut {
				e := v.BindingEdge(v.ProjectMercator(merc[i]))
				if j := strings.IndexByte(e, ':'); j > 0 {
					e = e[:j]
				}
				o.Edge = e
			}
		}
	}
	if _, err := timeline.Compute(&d, rec.Candidates); err != nil {
		return err
	}
	for _, i := range interest {
		o := &os[i]
		if o.Cause == CauseNeverVisible && o.BestMarginPx >= -PixelTolPx {
			o.Verdict = Borderline
		}
	}
	return nil
}
