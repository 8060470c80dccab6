package audit

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strings"
)

// Z95 is the standard normal quantile of 0.975, for 95% intervals.
const Z95 = 1.959963984540054

// Wilson returns the Wilson score interval of k successes in n trials at
// normal quantile z: (p + z²/2n ± z·√(p(1−p)/n + z²/4n²)) / (1 + z²/n), with
// p = k/n; [0, 1] when n is 0.
func Wilson(k, n int64, z float64) (lo, hi float64) {
	if n <= 0 {
		return 0, 1
	}
	nf := float64(n)
	p := float64(k) / nf
	z2 := z * z
	c := p + z2/(2*nf)
	h := z * math.Sqrt(p*(1-p)/nf+z2/(4*nf*nf))
	d := 1 + z2/nf
	return max(0, (c-h)/d), min(1, (c+h)/d)
}

// Stats are the printed figures of a tally: counts, the disagreement rate
// with its Wilson 95% interval (percent of candidates; borderline cases
// count as neither), what the phone displayed, the offsets and the scores.
type Stats struct {
	Records               int64                    `json:"records"`
	Candidates            int64                    `json:"candidates"`
	Agree                 int64                    `json:"agree"`
	Disagree              int64                    `json:"disagree"`
	Borderline            int64                    `json:"borderline"`
	DisagreePct           float64                  `json:"disagree_pct"`
	DisagreePctCI95       [2]float64               `json:"disagree_pct_ci95"`
	Displayed             int64                    `json:"displayed"`
	Shown                 int64                    `json:"shown_by_reference"`
	DisplayedNeverVisible int64                    `json:"displayed_never_visible"`
	DisplayedOverCap      int64                    `json:"displayed_over_cap"`
	MaxOnScreen           int                      `json:"max_on_screen"`
	MaxOnScreenCap        int                      `json:"max_on_screen_cap"`
	OnScreenKnown         int64                    `json:"records_with_intervals"`
	Hypotheses            map[string]HypothesisOut `json:"hypotheses"`
	Causes                map[string]int64         `json:"causes"`
	Edges                 map[string]int64         `json:"edges"`
	Offsets               []OffsetCount            `json:"first_shown_offsets"`
	Scores                *ScoreStats              `json:"scores,omitempty"`
}

// HypothesisOut is how many disagreements a hypothesis was tried on and
// how many it explained.
type HypothesisOut struct {
	Tested    int64 `json:"tested"`
	Explained int64 `json:"explained"`
}

// OffsetCount is one non-empty bin of the first-shown offsets (phone minus
// reference, seconds); null bounds are infinite.
type OffsetCount struct {
	LoS   *float64 `json:"lo_s"`
	HiS   *float64 `json:"hi_s"`
	Count int64    `json:"count"`
}

// ScoreStats are the predictions' scores: per bucket, against the phone's
// outcomes and the reference's.
type ScoreStats struct {
	Predictions int64             `json:"predictions"`
	Phone       [4]BucketScoreOut `json:"phone"`
	Ref         [4]BucketScoreOut `json:"reference"`
}

// BucketScoreOut is one bucket's mean Brier score, mean log loss and
// reliability bins.
type BucketScoreOut struct {
	Bucket  string   `json:"bucket"`
	Brier   float64  `json:"brier"`
	LogLoss float64  `json:"log_loss"`
	Bins    []BinOut `json:"bins"`
}

// BinOut is one non-empty calibration bin: its range, how many
// predictions, their mean probability and the fraction that came true.
type BinOut struct {
	Lo       float64 `json:"lo"`
	Hi       float64 `json:"hi"`
	N        int64   `json:"n"`
	MeanP    float64 `json:"mean_p"`
	FracTrue float64 `json:"frac_true"`
}

// Stats returns the printed figures of t.
func (t *Tally) Stats() Stats {
	t.init()
	s := Stats{Records: t.Records, Candidates: t.Candidates, Agree: t.Agree, Disagree: t.Disagree,
		Borderline: t.Borderline, Displayed: t.Displayed, Shown: t.Shown,
		DisplayedNeverVisible: t.DisplayedNeverVisible, DisplayedOverCap: t.OverCap,
		MaxOnScreen: t.MaxOnScreen, MaxOnScreenCap: t.MaxOnScreenCap, Causes: t.Causes, Edges: t.Edges,
		OnScreenKnown: t.OnScreenKnown, Offsets: []OffsetCount{}, Hypotheses: map[string]HypothesisOut{}}
	for h, c := range t.Hypotheses {
		if c.Tested > 0 {
			s.Hypotheses[Hypotheses[h].Name] = HypothesisOut{Tested: c.Tested, Explained: c.Explained}
		}
	}
	if t.Candidates > 0 {
		s.DisagreePct = 100 * float64(t.Disagree) / float64(t.Candidates)
	}
	lo, hi := Wilson(t.Disagree, t.Candidates, Z95)
	s.DisagreePctCI95 = [2]float64{100 * lo, 100 * hi}
	for i, c := range t.Offsets {
		if c == 0 {
			continue
		}
		lo, hi := OffsetBinRange(i)
		oc := OffsetCount{Count: c}
		if !math.IsInf(lo, 0) {
			oc.LoS = &lo
		}
		if !math.IsInf(hi, 0) {
			oc.HiS = &hi
		}
		s.Offsets = append(s.Offsets, oc)
	}
	if t.Scores.N > 0 {
		sc := &ScoreStats{Predictions: t.Scores.N}
		for b := range 4 {
			sc.Phone[b] = t.Scores.Phone[b].out(Buckets[b].String(), t.Scores.N)
			sc.Ref[b] = t.Scores.Ref[b].out(Buckets[b].String(), t.Scores.N)
		}
		s.Scores = sc
	}
	return s
}

func (s *BucketScore) out(name string, n int64) BucketScoreOut {
	o := BucketScoreOut{Bucket: name, Brier: s.Brier.Float64() / float64(n), LogLoss: s.LogLoss.Float64() / float64(n), Bins: []BinOut{}}
	for i, b := range s.Bins {
		if b.N == 0 {
			continue
		}
		o.Bins = append(o.Bins, BinOut{Lo: float64(i) / CalibrationBins, Hi: float64(i+1) / CalibrationBins, N: b.N,
			MeanP: b.SumP.Float64() / float64(b.N), FracTrue: float64(b.Hits) / float64(b.N)})
	}
	return o
}

// Finding is a likely cause the audit names in plain words, with the group
// it holds for and a record that shows it, replayable as one timeline
// request.
type Finding struct {
	Group   string   `json:"group"`
	Kind    string   `json:"kind"`
	Text    string   `json:"text"`
	Example *Example `json:"example,omitempty"`
}

// Thresholds of the findings (SPEC §9).
const (
	// minDisplays is the fewest displays a group needs for a lag finding.
	minDisplays = 20
	// lagShare is the share of displays the modal offset bin must hold.
	lagShare = 0.5
	// minExplained and explainShare: a hypothesis is named when it was
	// tried on at least minExplained disagreements and turned at least
	// explainShare of them into agreements.
	minExplained = 10
	explainShare = 0.6
	// minRatePct is the disagreement rate (Wilson lower bound, percent)
	// above which a group is named at all.
	minRatePct = 0.5
)

// Findings returns the likely causes t shows, for group (e.g.
// "client=4.2", or "all").
func (t *Tally) Findings(group string) []Finding {
	t.init()
	var fs []Finding
	add := func(kind, ex, text string, args ...any) {
		f := Finding{Group: group, Kind: kind, Text: group + ": " + fmt.Sprintf(text, args...)}
		if e, ok := t.Examples[ex]; ok {
			f.Example = &e
		}
		fs = append(fs, f)
	}
	// A fault that explains nearly every disagreement is the cause; what
	// else the group shows follows from it.
	settled := false
	for h, c := range t.Hypotheses {
		if c.Tested >= minExplained && float64(c.Explained) >= explainShare*float64(c.Tested) {
			settled = settled || float64(c.Explained) >= 0.9*float64(c.Tested)
			hy := Hypotheses[h]
			add(hy.Name, "hypothesis:"+hy.Name, "with the fault planted (%s), the reference agrees on %.0f%% of the disagreeing candidates it was tried on (%d of %d): %s",
				hy.Name, 100*float64(c.Explained)/float64(c.Tested), c.Explained, c.Tested, hy.Says)
		}
	}
	var displays int64
	for _, c := range t.Offsets {
		displays += c
	}
	if displays >= minDisplays && !settled {
		mode := 0
		for i, c := range t.Offsets {
			if c > t.Offsets[mode] {
				mode = i
			}
		}
		lo, hi := OffsetBinRange(mode)
		share := float64(t.Offsets[mode]) / float64(displays)
		if share >= lagShare && (lo >= 0.5 || hi <= -0.5) {
			word, a, b := "later", lo, hi
			if hi <= 0 {
				word, a, b = "earlier", -hi, -lo
			}
			span := fmtS(a) + "–" + fmtS(b)
			if math.IsInf(b, 1) {
				span = "more than " + fmtS(a)
			}
			add("lag", exLag, "first shown %s s %s than the reference in %.0f%% of displays", span, word, 100*share)
		}
	}
	if t.OnScreenKnown > 0 && t.MaxOnScreen > t.MaxOnScreenCap {
		add("over_cap", exOverCap, "up to %d displayed at once with cap %d (%d displays while more than the cap were on screen)",
			t.MaxOnScreen, t.MaxOnScreenCap, t.OverCap)
	}
	lo, hi := Wilson(t.Disagree, t.Candidates, Z95)
	if 100*lo <= minRatePct {
		return fs
	}
	rate := func() Finding {
		pct := 100 * float64(t.Disagree) / float64(t.Candidates)
		f := Finding{Group: group, Kind: "rate", Text: fmt.Sprintf("%s: disagrees on %.2f%% of candidates (95%% interval %.2f–%.2f%%)", group, pct, 100*lo, 100*hi)}
		if e, ok := t.Examples[exDisagree]; ok {
			f.Example = &e
		}
		return f
	}
	if settled {
		fs = append(fs, rate())
		return fs
	}
	if n := t.Causes[CauseNeverVisible]; n > 0 && float64(n) >= 0.1*float64(t.Disagree) {
		add("never_visible", exNever, "%d displays of candidates the reference never has in view", n)
	}
	if n := t.Causes[CauseCrowdedOut]; n > 0 && float64(n) >= 0.1*float64(t.Disagree) {
		add("crowded_out", exCrowdedOut, "%d displays of candidates the reference keeps off the screen for the cap", n)
	}
	if n := t.Causes[CauseNotDisplayed]; n > 0 && float64(n) >= 0.1*float64(t.Disagree) {
		add("not_displayed", exNotDisplayd, "%d candidates the reference shows are never displayed", n)
	}
	return append(fs, rate())
}

func fmtS(s float64) string {
	return strings.TrimSuffix(strings.TrimRight(fmt.Sprintf("%.2f", s), "0"), ".")
}

// GroupStats is one group's figures: the records whose tag has the value.
type GroupStats struct {
	Tag   string `json:"tag"`
	Value string `json:"value"`
	Stats
}

// Summary is the audit's result as `viewspec audit --json` prints it.
type Summary struct {
	Stats
	BadRecords int64        `json:"bad_records"`
	Groups     []GroupStats `json:"groups"`
	Findings   []Finding    `json:"findings"`
}

// NoTag is the value of a --by tag a record does not have.
const NoTag = "(none)"

// Totals are the tallies of an audit: all records, and per value of each
// grouping tag; mergeable like Tally.
type Totals struct {
	By         []string
	All        Tally
	Groups     map[string]map[string]*Tally // tag → value → tally
	BadRecords int64
}

// NewTotals returns empty totals grouped by the tags by.
func NewTotals(by []string) *Totals {
	t := &Totals{By: by, Groups: map[string]map[string]*Tally{}}
	for _, k := range by {
		t.Groups[k] = map[string]*Tally{}
	}
	return t
}

// Add accounts one record's audit.
func (t *Totals) Add(r *Result) {
	var line string
	example := func() string {
		if line == "" {
			line = ReplayLine(r.Record)
		}
		return line
	}
	t.All.add(r, example)
	for _, k := range t.By {
		v, ok := r.Record.Tag(k)
		if !ok {
			v = NoTag
		}
		g := t.Groups[k][v]
		if g == nil {
			g = &Tally{}
			t.Groups[k][v] = g
		}
		g.add(r, example)
	}
}

// Merge adds other totals, grouped by the same tags.
func (t *Totals) Merge(o *Totals) {
	t.All.Merge(&o.All)
	t.BadRecords += o.BadRecords
	for k, vs := range o.Groups {
		if t.Groups[k] == nil {
			t.Groups[k] = map[string]*Tally{}
		}
		for v, g := range vs {
			if t.Groups[k][v] == nil {
				t.Groups[k][v] = &Tally{}
			}
			t.Groups[k][v].Merge(g)
		}
	}
}

// SummaryJSON returns s as summary.json holds it: indented JSON and a
// newline. `viewspec audit --out` writes it; any engine that merges
// partial totals into s writes the same bytes.
func SummaryJSON(s *Summary) ([]byte, error) {
	b, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}

// Summary returns the printed summary: groups sorted by tag then value,
// findings for each group (for all records when there are no groups).
func (t *Totals) Summary() Summary {
	s := Summary{Stats: t.All.Stats(), BadRecords: t.BadRecords, Groups: []GroupStats{}, Findings: []Finding{}}
	for _, k := range t.By {
		vals := make([]string, 0, len(t.Groups[k]))
		for v := range t.Groups[k] {
			vals = append(vals, v)
		}
		sort.Strings(vals)
		for _, v := range vals {
			g := t.Groups[k][v]
			s.Groups = append(s.Groups, GroupStats{Tag: k, Value: v, Stats: g.Stats()})
			s.Findings = append(s.Findings, g.Findings(k+"="+v)...)
		}
	}
	if len(t.By) == 0 {
		s.Findings = append(s.Findings, t.All.Findings("all")...)
	}
	return s
}
