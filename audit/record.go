package audit

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/wire"
)

// wireRecord is one drive-log line as JSON holds it (SPEC §9); pointers
// tell a missing field from a zero.
type wireRecord struct {
	RequestID    *string           `json:"request_id"`
	Tags         map[string]string `json:"tags"`
	Device       *wire.Device      `json:"device"`
	Rules        *wire.Rules       `json:"rules"`
	RulesRef     *string           `json:"rules_ref"`
	Cap          *float64          `json:"cap"`
	HorizonS     *float64          `json:"horizon_s"`
	TickS        *float64          `json:"tick_s"`
	BucketEdgesS []*float64        `json:"bucket_edges_s"`
	Trace        []*wire.Fix       `json:"trace"`
	Route        *wire.Route       `json:"route"`
	Candidates   []*wire.Marker    `json:"candidates"`
	Shown        []*wireShown      `json:"shown"`
	Predicted    []*wirePrediction `json:"predicted"`
}

type wireShown struct {
	ID          *string      `json:"id"`
	FirstShownS *float64     `json:"first_shown_s"`
	ShownS      *float64     `json:"shown_s"`
	IntervalsS  [][]*float64 `json:"intervals_s"`
}

type wirePrediction struct {
	ID *string    `json:"id"`
	P  []*float64 `json:"p"`
}

// Tag is one of a record's tags: a client version, a device class, a
// region.
type Tag struct{ Key, Value string }

// Display is one line of a phone's display log: when a candidate was first
// displayed and for how long in all, seconds after the request, and, when
// the log has them, the intervals it was on screen.
type Display struct {
	FirstShownS, ShownS float64
	Intervals           [][2]float64 // [from, to) seconds, increasing; nil when not logged
}

// Record is one server request of a drive log, decoded and checked: the
// drive the phone made (as the timeline's drive), the candidates sent, the
// phone's display log and the server's predictions.
type Record struct {
	RequestID string
	Tags      []Tag // sorted by key
	Drive     timeline.Drive
	// Fixes are the recorded positions the drive replays.
	Fixes []timeline.Fix
	// Planned is the planned route at request time, nil when the log has
	// none.
	Planned    *routes.Route
	Candidates []timeline.Marker
	// Displayed[i] is the phone's display of candidate i, nil when it never
	// displayed it.
	Displayed []*Display
	// Predicted[i] is the server's bucket probabilities for candidate i
	// (early, mid, late, never), nil when the log has none for it.
	Predicted []*[4]float64
}

// Tag returns the value of tag key, and whether the record has it.
func (r *Record) Tag(key string) (string, bool) {
	i, ok := slices.BinarySearchFunc(r.Tags, key, func(t Tag, k string) int {
		switch {
		case t.Key < k:
			return -1
		case t.Key > k:
			return 1
		}
		return 0
	})
	if !ok {
		return "", false
	}
	return r.Tags[i].Value, true
}

// ProbabilitySumTol is how far a prediction's four probabilities may sum
// from 1.
const ProbabilitySumTol = 1e-6

// ReadRuleDir reads every *.yaml in dir as a rule set named by its base
// name (phone.yaml is "phone"): parsed, and as its text, which a
// distributed run sends to its workers. An empty dir gives none; a dir
// without rule files is an error, as is a file that does not parse.
func ReadRuleDir(dir string) (RuleSets, map[string]string, error) {
	sets, texts := RuleSets{}, map[string]string{}
	if dir == "" {
		return sets, texts, nil
	}
	files, err := filepath.Glob(filepath.Join(dir, "*.yaml"))
	if err != nil {
		return nil, nil, err
	}
	if len(files) == 0 {
		return nil, nil, fmt.Errorf("--rules %s: no *.yaml rule files there", dir)
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			return nil, nil, err
		}
		set, err := rules.Parse(data, f)
		if err != nil {
			return nil, nil, err
		}
		name := strings.TrimSuffix(filepath.Base(f), ".yaml")
		sets[name], texts[name] = set, string(data)
	}
	return sets, texts, nil
}

// RuleSets resolves a record's rules_ref: a name to a rule set.
type RuleSets map[string]*rules.Set

// DecodeRecord reads one drive-log line. Errors name the field: a
// *spec.FieldError, or a JSON error whose message wire.DecodeError words.
func DecodeRecord(line []byte, sets RuleSets) (*Record, error) {
	var w wireRecord
	if !decodeRecordFast(line, &w) {
		if err := decodeRecordGeneral(line, &w); err != nil {
			return nil, err
		}
	}
	return w.record(sets)
}

// decodeRecordGeneral reads a record by the general decoder.
func decodeRecordGeneral(line []byte, w *wireRecord) error {
	*w = wireRecord{}
	return wire.Unmarshal(line, w)
}

func (w *wireRecord) record(sets RuleSets) (*Record, error) {
	if w.RequestID == nil {
		return nil, spec.Absent("request_id")
	}
	rec := &Record{RequestID: *w.RequestID}
	for k, v := range w.Tags {
		rec.Tags = append(rec.Tags, Tag{k, v})
	}
	sort.Slice(rec.Tags, func(i, j int) bool { return rec.Tags[i].Key < rec.Tags[j].Key })

	if w.Trace == nil {
		return nil, spec.Absent("trace")
	}
	fixes, err := wire.FixesValue(w.Trace, "trace")
	if err != nil {
		return nil, err
	}
	rec.Fixes = fixes
	route, stops, err := timeline.Replay(fixes, "trace")
	if err != nil {
		return nil, err
	}
	// The drive as a timeline request along the fixes describes it, so
	// that a record replays as one wire line.
	req := wire.Request{Op: "timeline", Device: w.Device, Rules: w.Rules,
		HorizonS: w.HorizonS, TickS: w.TickS, Cap: w.Cap, BucketEdgesS: w.BucketEdgesS}
	switch {
	case w.Rules != nil && w.RulesRef != nil:
		return nil, &spec.FieldError{Field: "rules_ref", Reason: "give rules or rules_ref, not both"}
	case w.RulesRef != nil:
		set, ok := sets[*w.RulesRef]
		if !ok {
			return nil, &spec.FieldError{Field: "rules_ref", Value: *w.RulesRef, Reason: "no such rule set" + known(sets)}
		}
		req.Rules = wire.RulesOf(set)
	case w.Rules == nil:
		return nil, spec.Absent("rules")
	}
	if rec.Drive, err = req.DriveOn(route, stops); err != nil {
		return nil, err
	}
	if w.Route != nil {
		if rec.Planned, err = w.Route.Value("route"); err != nil {
			return nil, err
		}
	}
	if w.Candidates == nil {
		return nil, spec.Absent("candidates")
	}
	if rec.Candidates, err = wire.Markers(w.Candidates, "candidates"); err != nil {
		return nil, err
	}
	index := make(map[string]int, len(rec.Candidates))
	for i, c := range rec.Candidates {
		index[c.ID] = i
	}
	rec.Displayed = make([]*Display, len(rec.Candidates))
	ds := make([]Display, len(w.Shown))
	for i, s := range w.Shown {
		f := func() string { return spec.Index("shown", i) }
		switch {
		case s == nil:
			return nil, spec.Absent(f())
		case s.ID == nil:
			return nil, spec.Absent(f() + ".id")
		case s.FirstShownS == nil:
			return nil, spec.Absent(f() + ".first_shown_s")
		case s.ShownS == nil:
			return nil, spec.Absent(f() + ".shown_s")
		}
		j, ok := index[*s.ID]
		switch {
		case !ok:
			return nil, &spec.FieldError{Field: f() + ".id", Value: *s.ID, Reason: "not a candidate of this request"}
		case rec.Displayed[j] != nil:
			return nil, &spec.FieldError{Field: f() + ".id", Value: *s.ID, Reason: "displayed twice in the log"}
		case !(*s.FirstShownS >= 0 && *s.FirstShownS <= rec.Drive.HorizonS):
			return nil, spec.Out(f()+".first_shown_s", *s.FirstShownS, "must lie within the horizon [0, "+spec.FormatNumber(rec.Drive.HorizonS)+"] s")
		case !(*s.ShownS >= 0 && *s.ShownS <= rec.Drive.HorizonS+rec.Drive.TickS):
			return nil, spec.Out(f()+".shown_s", *s.ShownS, "must lie within [0, horizon + a tick]")
		}
		ds[i] = Display{FirstShownS: *s.FirstShownS, ShownS: *s.ShownS}
		if s.IntervalsS != nil {
			if ds[i].Intervals, err = intervals(s.IntervalsS, func() string { return f() + ".intervals_s" }, rec.Drive.HorizonS+rec.Drive.TickS); err != nil {
				return nil, err
			}
		}
		rec.Displayed[j] = &ds[i]
	}
	if w.Predicted != nil {
		rec.Predicted = make([]*[4]float64, len(rec.Candidates))
		ps := make([][4]float64, len(w.Predicted))
		for i, p := range w.Predicted {
			f := func() string { return spec.Index("predicted", i) }
			switch {
			case p == nil:
				return nil, spec.Absent(f())
			case p.ID == nil:
				return nil, spec.Absent(f() + ".id")
			case len(p.P) != 4:
				return nil, &spec.FieldError{Field: f() + ".p", Reason: "want 4 probabilities (early, mid, late, never)"}
			}
			j, ok := index[*p.ID]
			switch {
			case !ok:
				return nil, &spec.FieldError{Field: f() + ".id", Value: *p.ID, Reason: "not a candidate of this request"}
			case rec.Predicted[j] != nil:
				return nil, &spec.FieldError{Field: f() + ".id", Value: *p.ID, Reason: "predicted twice"}
			}
			sum := 0.0
			for k, v := range p.P {
				if v == nil {
					return nil, spec.Absent(spec.Index(f()+".p", k))
				}
				if !(*v >= 0 && *v <= 1) {
					return nil, spec.Out(spec.Index(f()+".p", k), *v, "a probability must lie in [0, 1]")
				}
				ps[i][k] = *v
				sum += *v
			}
			if math.Abs(sum-1) > ProbabilitySumTol {
				return nil, spec.Out(f()+".p", sum, "the probabilities must sum to 1 within 1e-6 (they sum to this)")
			}
			rec.Predicted[j] = &ps[i]
		}
	}
	return rec, nil
}

// known lists the rule sets' names for an error message.
func known(sets RuleSets) string {
	if len(sets) == 0 {
		return " (no rule sets given: --rules DIR)"
	}
	names := make([]string, 0, len(sets))
	for k := range sets {
		names = append(names, k)
	}
	sort.Strings(names)
	s := " (known: "
	for i, n := range names {
		if i > 0 {
			s += ", "
		}
		s += n
	}
	return s + ")"
}

// UserAt returns the recorded position at the request (the first fix).
func (r *Record) UserAt() orb.Point { return r.Fixes[0].Point }

// intervals checks a display's intervals: pairs [from, to), from < to,
// each starting at or after the one before ends, within [0, limit].
func intervals(ws [][]*float64, path func() string, limit float64) ([][2]float64, error) {
	out := make([][2]float64, len(ws))
	end := 0.0
	for i, w := range ws {
		f := func() string { return spec.Index(path(), i) }
		if len(w) != 2 {
			return nil, &spec.FieldError{Field: f(), Reason: "want [from_s, to_s]"}
		}
		for k := range 2 {
			if w[k] == nil {
				return nil, spec.Absent(spec.Index(f(), k))
			}
		}
		from, to := *w[0], *w[1]
		switch {
		case !(from >= end):
			return nil, spec.Out(spec.Index(f(), 0), from, "intervals must start at or after 0 and after the one before ends")
		case !(to > from && to <= limit):
			return nil, spec.Out(spec.Index(f(), 1), to, "an interval must end after it starts, within the horizon and a tick")
		}
		out[i] = [2]float64{from, to}
		end = to
	}
	return out, nil
}
