package audit

import (
	"math"

	"github.com/viewspec/viewspec/timeline"
)

// Offset histogram (SPEC §9): the phone's first display minus the
// reference's first showing, in bins of OffsetBinS from −OffsetRangeS to
// +OffsetRangeS, with one bin below and one above.
const (
	OffsetBinS   = 0.25
	OffsetRangeS = 10.0
	offsetBins   = int(2*OffsetRangeS/OffsetBinS) + 2
)

// Buckets in the order of predictions: early, mid, late, never.
var Buckets = [4]timeline.Bucket{timeline.Early, timeline.Mid, timeline.Late, timeline.Never}

// bucketIndex is b's place in a prediction.
func bucketIndex(b timeline.Bucket) int {
	switch b {
	case timeline.Early:
		return 0
	case timeline.Mid:
		return 1
	case timeline.Late:
		return 2
	}
	return 3
}

// CalibrationBins is the number of equal-width probability bins of a
// reliability diagram.
const CalibrationBins = 10

// LogLossClip keeps log losses finite: probabilities are clipped to
// [LogLossClip, 1 − LogLossClip], LogLossClip = 2⁻⁵², the float64 machine
// epsilon (common practice in scoring libraries).
const LogLossClip = 0x1p-52

// Bin is one calibration bin: how many predictions fell in it, their
// probabilities' sum and how many came true.
type Bin struct {
	N, Hits int64
	SumP    Sum
}

// BucketScore accumulates the scores of one bucket's predicted
// probabilities against outcomes (one against the rest).
type BucketScore struct {
	Brier, LogLoss Sum
	Bins           [CalibrationBins]Bin
}

// Scores accumulates the predictions' scores against the phone's outcomes
// and against the reference's.
type Scores struct {
	N          int64
	Phone, Ref BucketScores
}

// BucketScores are the scores of the four buckets, in prediction order.
type BucketScores [4]BucketScore

// Tally is the exact, mergeable account of audited candidates (SPEC §9):
// counts, the offset histogram and the score sums. Merging tallies in any
// order and grouping gives the same tally.
type Tally struct {
	Records, Candidates         int64
	Agree, Disagree, Borderline int64
	Displayed, Shown            int64
	DisplayedNeverVisible       int64
	OverCap                     int64
	// MaxOnScreen is the most candidates displayed at once in one record,
	// and MaxOnScreenCap that record's cap (the largest excess wins).
	MaxOnScreen, MaxOnScreenCap int
	Causes                      map[string]int64
	Edges                       map[string]int64
	Offsets                     [offsetBins]int64
	Scores                      Scores
	// Examples holds, per finding kind, the request id and the replayable
	// request of the record with the smallest id showing it.
	Examples map[string]Example
	// OnScreenKnown counts the records whose log gave display intervals,
	// the only ones the cap is checked on.
	OnScreenKnown int64
	// Hypotheses[h] sums Result.Hypotheses.
	Hypotheses []HypothesisCount
}

// Example is a record that shows a finding: its id and its drive as one
// timeline request line.
type Example struct {
	RequestID string
	Request   string
}

// Finding kinds that keep an example.
const (
	exLag         = "lag"
	exOverCap     = "over_cap"
	exEdge        = "edge"
	exNever       = "never_visible"
	exDisagree    = "disagree"
	exCrowdedOut  = "crowded_out"
	exNotDisplayd = "not_displayed"
)

func (t *Tally) init() {
	if t.Causes == nil {
		t.Causes, t.Edges, t.Examples = map[string]int64{}, map[string]int64{}, map[string]Example{}
	}
}

// offsetBin returns the histogram bin of an offset.
func offsetBin(s float64) int {
	switch {
	case s < -OffsetRangeS:
		return 0
	case s >= OffsetRangeS:
		return offsetBins - 1
	}
	return 1 + int(math.Floor((s+OffsetRangeS)/OffsetBinS))
}

// OffsetBinRange returns the offsets bin i holds, [lo, hi) seconds
// (infinite at the ends).
func OffsetBinRange(i int) (lo, hi float64) {
	switch i {
	case 0:
		return math.Inf(-1), -OffsetRangeS
	case offsetBins - 1:
		return OffsetRangeS, math.Inf(1)
	}
	lo = -OffsetRangeS + float64(i-1)*OffsetBinS
	return lo, lo + OffsetBinS
}

// calibrationBin returns the bin of probability p: bin i holds p in
// (e_i, e_i+1] with e_k = k × 0.1 in float64, p = 0 in bin 0 (the bins of
// a reliability diagram of ten equal widths).
func calibrationBin(p float64) int {
	i := 0
	for k := 1; k < CalibrationBins; k++ {
		if float64(k)*(1.0/CalibrationBins) < p {
			i = k
		}
	}
	return i
}

// add accounts one record's audit; example makes its replayable request
// when a finding needs it.
func (t *Tally) add(r *Result, example func() string) {
	t.init()
	t.Records++
	rec := r.Record
	if r.OnScreenKnown {
		t.OnScreenKnown++
		t.most(r.MaxOnScreen, rec.Drive.Cap)
	}
	t.addHypotheses(r.Hypotheses)
	kinds := map[string]bool{}
	for i := range r.Outcomes {
		o := &r.Outcomes[i]
		t.Candidates++
		switch o.Verdict {
		case Agree:
			t.Agree++
		case Disagree:
			t.Disagree++
			kinds[exDisagree] = true
		case Borderline:
			t.Borderline++
		}
		if o.Cause != "" && o.Verdict == Disagree {
			t.Causes[o.Cause]++
			if o.Edge != "" {
				t.Edges[o.Edge]++
				if o.Edge == "left edge" || o.Edge == "right edge" {
					kinds[exEdge] = true
				}
			}
			switch o.Cause {
			case CauseNeverVisible:
				kinds[exNever] = true
			case CauseCrowdedOut:
				kinds[exCrowdedOut] = true
			case CauseNotDisplayed:
				kinds[exNotDisplayd] = true
			}
		}
		if o.Phone != nil {
			t.Displayed++
			if !o.Ref.Visible {
				t.DisplayedNeverVisible++
			}
		}
		if o.Ref.Shown {
			t.Shown++
		}
		if o.OverCap {
			t.OverCap++
			kinds[exOverCap] = true
		}
		if !math.IsNaN(o.OffsetS) {
			t.Offsets[offsetBin(o.OffsetS)]++
			if math.Abs(o.OffsetS) > rec.Drive.TickS*(1+1e-9) {
				kinds[exLag] = true
			}
		}
		if o.Predicted != nil {
			t.Scores.N++
			t.Scores.Phone.add(o.Predicted, o.PhoneBucket)
			t.Scores.Ref.add(o.Predicted, o.Ref.Bucket)
		}
	}
	for h, c := range r.Hypotheses {
		if c.Explained > 0 {
			kinds["hypothesis:"+Hypotheses[h].Name] = true
		}
	}
	var line string
	for k := range kinds {
		if ex, ok := t.Examples[k]; !ok || rec.RequestID < ex.RequestID {
			if line == "" {
				line = example()
			}
			t.Examples[k] = Example{RequestID: rec.RequestID, Request: line}
		}
	}
}

func (t *Tally) addHypotheses(hs []HypothesisCount) {
	if hs == nil {
		return
	}
	if t.Hypotheses == nil {
		t.Hypotheses = make([]HypothesisCount, len(Hypotheses))
	}
	for i, h := range hs {
		t.Hypotheses[i].Tested += h.Tested
		t.Hypotheses[i].Explained += h.Explained
	}
}

// most keeps the record with the largest excess of candidates displayed
// at once over its cap (then the most displayed): an order-free choice.
func (t *Tally) most(n, capN int) {
	if n == 0 {
		return
	}
	ex, cur := n-capN, t.MaxOnScreen-t.MaxOnScreenCap
	if t.MaxOnScreen == 0 || ex > cur || ex == cur && n > t.MaxOnScreen {
		t.MaxOnScreen, t.MaxOnScreenCap = n, capN
	}
}

// add scores one prediction against outcome.
func (s *BucketScores) add(p *[4]float64, outcome timeline.Bucket) {
	hit := bucketIndex(outcome)
	for b := range 4 {
		y := 0.0
		if b == hit {
			y = 1
		}
		sc := &s[b]
		q := p[b]
		sc.Brier.Add((q - y) * (q - y))
		c := min(max(q, LogLossClip), 1-LogLossClip)
		if y == 1 {
			sc.LogLoss.Add(-math.Log(c))
		} else {
			sc.LogLoss.Add(-math.Log(1 - c))
		}
		bin := &sc.Bins[calibrationBin(q)]
		bin.N++
		bin.SumP.Add(q)
		if y == 1 {
			bin.Hits++
		}
	}
}

// Merge adds another tally into t.
func (t *Tally) Merge(o *Tally) {
	t.init()
	t.Records += o.Records
	t.Candidates += o.Candidates
	t.Agree += o.Agree
	t.Disagree += o.Disagree
	t.Borderline += o.Borderline
	t.Displayed += o.Displayed
	t.Shown += o.Shown
	t.DisplayedNeverVisible += o.DisplayedNeverVisible
	t.OverCap += o.OverCap
	t.most(o.MaxOnScreen, o.MaxOnScreenCap)
	t.OnScreenKnown += o.OnScreenKnown
	t.addHypotheses(o.Hypotheses)
	for k, v := range o.Causes {
		t.Causes[k] += v
	}
	for k, v := range o.Edges {
		t.Edges[k] += v
	}
	for i, v := range o.Offsets {
		t.Offsets[i] += v
	}
	t.Scores.N += o.Scores.N
	for b := range 4 {
		t.Scores.Phone[b].merge(&o.Scores.Phone[b])
		t.Scores.Ref[b].merge(&o.Scores.Ref[b])
	}
	for k, ex := range o.Examples {
		if cur, ok := t.Examples[k]; !ok || ex.RequestID < cur.RequestID {
			t.Examples[k] = ex
		}
	}
}

func (s *BucketScore) merge(o *BucketScore) {
	s.Brier.Merge(o.Brier)
	s.LogLoss.Merge(o.LogLoss)
	for i := range s.Bins {
		s.Bins[i].N += o.Bins[i].N
		s.Bins[i].Hits += o.Bins[i].Hits
		s.Bins[i].SumP.Merge(o.Bins[i].SumP)
	}
}
