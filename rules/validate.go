package rules

import (
	"math"
	"strconv"
)

// interval is the set of values a field may take; lo and hi may be infinite.
type interval struct {
	lo, hi         float64
	loOpen, hiOpen bool
}

var (
	zoomLevels  = interval{lo: 0, hi: 30}
	pitchDegs   = interval{lo: 0, hi: 90, hiOpen: true}
	nonNegative = interval{lo: 0, hi: math.Inf(1), hiOpen: true}
	positive    = interval{lo: 0, hi: math.Inf(1), loOpen: true, hiOpen: true}
	turnAngles  = interval{lo: 0, hi: 180, loOpen: true}
)

// fieldRanges gives each numeric field's interval by its name (the names are unique up to zoom, which
// has one range wherever it appears). The published schema states the same intervals; a test holds the
// two together.
var fieldRanges = map[string]interval{
	"below_kmh":                positive,
	"zoom":                     zoomLevels,
	"pitch_deg":                pitchDegs,
	"hysteresis_kmh":           nonNegative,
	"max_zoom_rate_per_s":      positive,
	"max_pitch_rate_deg_per_s": positive,
	"within_m":                 nonNegative,
	"min_angle_deg":            turnAngles,
	"min_zoom":                 zoomLevels,
	"max_zoom":                 zoomLevels,
	"max_turn_rate_deg_per_s":  positive,
}

func (r interval) contains(v float64) bool {
	if v < r.lo || (r.loOpen && v == r.lo) {
		return false
	}
	return v < r.hi || (!r.hiOpen && v == r.hi)
}

// String writes the interval in the usual notation: "[0, 30]", "[0, 90)", "(0, +Inf)".
func (r interval) String() string {
	open, close := "[", "]"
	if r.loOpen {
		open = "("
	}
	if r.hiOpen {
		close = ")"
	}
	return open + fmtNum(r.lo) + ", " + fmtNum(r.hi) + close
}

// checkNum appends a problem when v is not finite or not in r, and reports whether v was fine. The field
// is leaf, or bands[band].leaf when band ≥ 0; its name is built only when there is a problem, so that a
// valid set is checked without allocating.
func checkNum(errs Errors, band int, leaf string, v float64, r interval) (Errors, bool) {
	if r.contains(v) {
		return errs, true
	}
	field := leaf
	if band >= 0 {
		field = bandField(band, leaf)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return append(errs, &Problem{Kind: KindNotFinite, Field: field, Msg: notFiniteMsg(v)}), false
	}
	return append(errs, &Problem{Kind: KindRange, Field: field, Msg: rangeMsg(v, r)}), false
}

func notFiniteMsg(v float64) string { return fmtNum(v) + " is not a finite number" }
func rangeMsg(v float64, r interval) string {
	return fmtNum(v) + " is outside " + r.String()
}

const (
	msgMissingEdge = "missing: every band but the last needs its upper edge"
	msgNoBands     = "empty: at least one band is needed"
)

func lastEdgeMsg(v float64) string {
	return fmtNum(v) + " given on the last band, which has no upper edge (it holds every speed above the edge before it)"
}

func bandField(i int, leaf string) string {
	return "bands[" + strconv.Itoa(i) + "]." + leaf
}

// Validate checks a rule set's values: every number finite and in its interval (zoom levels in [0, 30],
// pitch in [0, 90), rates > 0, hysteresis ≥ 0, within_m ≥ 0, min_angle_deg in (0, 180], band edges > 0),
// at least one band, below_kmh on every band but the last and not on the last, edges strictly increasing,
// min_zoom ≤ max_zoom. It returns nil or an [Errors] with one [Problem] per problem in field order,
// and allocates nothing when the set is valid. Presence of the other fields is the decoder's job
// ([Parse], and the wire package for requests): a Go value always has them.
func (s *Set) Validate() error {
	if errs := s.appendErrors(nil); len(errs) > 0 {
		return errs
	}
	return nil
}

func (s *Set) appendErrors(errs Errors) Errors {
	last := len(s.Bands) - 1
	if last < 0 {
		errs = append(errs, &Problem{Kind: KindMissing, Field: "bands", Msg: msgNoBands})
	}
	prevEdge, prevOK := 0.0, false
	for i := range s.Bands {
		b := &s.Bands[i]
		switch {
		case i < last && b.BelowKmh == nil:
			errs = append(errs, &Problem{Kind: KindMissing, Field: bandField(i, "below_kmh"), Msg: msgMissingEdge})
			prevOK = false
		case i < last:
			var ok bool
			edge := *b.BelowKmh
			if errs, ok = checkNum(errs, i, "below_kmh", edge, positive); ok && prevOK && !(edge > prevEdge) {
				errs = append(errs, &Problem{Kind: KindOrder, Field: bandField(i, "below_kmh"),
					Msg: fmtNum(edge) + " is not above bands[" + strconv.Itoa(i-1) + "].below_kmh " + fmtNum(prevEdge) +
						": band edges must increase strictly"})
				ok = false
			}
			prevEdge, prevOK = edge, ok
		case b.BelowKmh != nil:
			errs = append(errs, &Problem{Kind: KindLastEdge, Field: bandField(i, "below_kmh"), Msg: lastEdgeMsg(*b.BelowKmh)})
		}
		errs, _ = checkNum(errs, i, "zoom", b.Zoom, zoomLevels)
		errs, _ = checkNum(errs, i, "pitch_deg", b.PitchDeg, pitchDegs)
	}
	errs, _ = checkNum(errs, -1, "hysteresis_kmh", s.HysteresisKmh, nonNegative)
	errs, _ = checkNum(errs, -1, "max_zoom_rate_per_s", s.MaxZoomRatePerS, positive)
	errs, _ = checkNum(errs, -1, "max_pitch_rate_deg_per_s", s.MaxPitchRateDegPerS, positive)
	errs, _ = checkNum(errs, -1, "turn.within_m", s.Turn.WithinM, nonNegative)
	errs, _ = checkNum(errs, -1, "turn.min_angle_deg", s.Turn.MinAngleDeg, turnAngles)
	errs, _ = checkNum(errs, -1, "turn.zoom", s.Turn.Zoom, zoomLevels)
	var minOK, maxOK bool
	errs, minOK = checkNum(errs, -1, "min_zoom", s.MinZoom, zoomLevels)
	errs, maxOK = checkNum(errs, -1, "max_zoom", s.MaxZoom, zoomLevels)
	if minOK && maxOK && s.MinZoom > s.MaxZoom {
		errs = append(errs, &Problem{Kind: KindMinAboveMax, Field: "min_zoom",
			Msg: fmtNum(s.MinZoom) + " is above max_zoom " + fmtNum(s.MaxZoom)})
	}
	errs, _ = checkNum(errs, -1, "max_turn_rate_deg_per_s", s.MaxTurnRateDegPerS, positive)
	return errs
}

// warnings returns the lint warnings of a valid set, in field order:
//
//   - zoom-rises: a band whose zoom is above the lowest zoom of the slower bands (the map would zoom in
//     as the vehicle speeds up), reported at that band's zoom;
//   - wide-hysteresis: the first band when hysteresis_kmh ≥ its upper edge (once left it is never entered
//     again, since that needs a speed below 0), and an inner band when 2·hysteresis_kmh ≥ its width
//     (speeding up it is held on [lo+h, hi+h), slowing down on [lo−h, hi−h), and no speed is in both, so
//     no speed reliably shows it); reported at the band's below_kmh. The last band is unbounded above;
//   - turn-inert: no band where the turn override changes the clamped target, that is no band with
//     bands[b].zoom < turn.zoom, bands[b].zoom < max_zoom and turn.zoom > min_zoom; reported at turn.zoom.
func (s *Set) warnings() Errors {
	var ws Errors
	lowest := 0
	for j := 1; j < len(s.Bands); j++ {
		if z := s.Bands[j].Zoom; z > s.Bands[lowest].Zoom {
			ws = append(ws, &Problem{Kind: KindZoomRises, Field: bandField(j, "zoom"),
				Msg: "zoom " + fmtNum(z) + " is above zoom " + fmtNum(s.Bands[lowest].Zoom) + " of the slower bands[" +
					strconv.Itoa(lowest) + "]: the map would zoom in as the speed rises"})
		} else if z < s.Bands[lowest].Zoom {
			lowest = j
		}
	}
	h := s.HysteresisKmh
	last := len(s.Bands) - 1
	for i := 0; i < last && h > 0; i++ {
		hi := *s.Bands[i].BelowKmh
		if i == 0 {
			if h >= hi {
				ws = append(ws, &Problem{Kind: KindWideHysteresis, Field: bandField(0, "below_kmh"),
					Msg: "hysteresis_kmh " + fmtNum(h) + " is at least the first band's upper edge " + fmtNum(hi) +
						": once the speed reaches " + fmtNum(hi+h) + " km/h the first band is never entered again (that needs a speed below " +
						fmtNum(hi-h) + ")"})
			}
			continue
		}
		lo := *s.Bands[i-1].BelowKmh
		if w := hi - lo; 2*h >= w {
			ws = append(ws, &Problem{Kind: KindWideHysteresis, Field: bandField(i, "below_kmh"),
				Msg: "hysteresis_kmh " + fmtNum(h) + " is at least half the width " + fmtNum(w) + " of bands[" + strconv.Itoa(i) +
					"] (" + fmtNum(lo) + " to " + fmtNum(hi) + " km/h): speeding up it is held on [" + fmtNum(lo+h) + ", " +
					fmtNum(hi+h) + "), slowing down on [" + fmtNum(lo-h) + ", " + fmtNum(hi-h) + "), and no speed is in both"})
		}
	}
	if len(s.Bands) > 0 && !s.turnCanAct() {
		ws = append(ws, &Problem{Kind: KindTurnInert, Field: "turn.zoom", Msg: s.turnInertMsg()})
	}
	return ws
}

// turnCanAct reports whether some band's clamped target zoom is raised by the turn override.
func (s *Set) turnCanAct() bool {
	tz := s.Turn.Zoom
	if tz <= s.MinZoom {
		return false
	}
	for _, b := range s.Bands {
		if b.Zoom < tz && b.Zoom < s.MaxZoom {
			return true
		}
	}
	return false
}

func (s *Set) turnInertMsg() string {
	tz := s.Turn.Zoom
	lowest := s.Bands[0].Zoom
	for _, b := range s.Bands {
		lowest = min(lowest, b.Zoom)
	}
	switch {
	case tz <= lowest:
		return fmtNum(tz) + " is at or below every band's zoom (the lowest is " + fmtNum(lowest) +
			"), so the turn override never changes the zoom"
	case tz <= s.MinZoom:
		return fmtNum(tz) + " is at or below min_zoom " + fmtNum(s.MinZoom) + ", so clamping undoes the turn override"
	}
	return "every band zoom below " + fmtNum(tz) + " is already at or above max_zoom " + fmtNum(s.MaxZoom) +
		", so clamping undoes the turn override"
}
