package wire

import (
	"errors"

	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/spec"
)

// Rules is the rules object of SPEC §3 on the wire. Every field is a
// pointer so that absence is told from zero; below_kmh is absent on the
// last band only (checked by rules.Set.Validate). It is decoded by the
// same exact-key decoder as the rest of a request: "BANDS" is not
// "bands".
type Rules struct {
	Bands               []*Band  `json:"bands"`
	HysteresisKmh       *float64 `json:"hysteresis_kmh"`
	MaxZoomRatePerS     *float64 `json:"max_zoom_rate_per_s"`
	MaxPitchRateDegPerS *float64 `json:"max_pitch_rate_deg_per_s"`
	Turn                *Turn    `json:"turn"`
	MinZoom             *float64 `json:"min_zoom"`
	MaxZoom             *float64 `json:"max_zoom"`
	MaxTurnRateDegPerS  *float64 `json:"max_turn_rate_deg_per_s"`
}

// Band is one speed band of a rule set on the wire.
type Band struct {
	BelowKmh *float64 `json:"below_kmh,omitempty"`
	Zoom     *float64 `json:"zoom"`
	PitchDeg *float64 `json:"pitch_deg"`
}

// Turn is the turn override of a rule set on the wire.
type Turn struct {
	WithinM     *float64 `json:"within_m"`
	MinAngleDeg *float64 `json:"min_angle_deg"`
	Zoom        *float64 `json:"zoom"`
}

// Value returns the rule set of w, validated (rules.Set.Validate), or the
// first missing or invalid field under path.
func (w *Rules) Value(path string) (*rules.Set, error) {
	if w == nil {
		return nil, spec.Absent(path)
	}
	var s rules.Set
	var err error
	need := func(p *float64, field string) float64 {
		if p == nil && err == nil {
			err = spec.Absent(path + "." + field)
		}
		if p == nil {
			return 0
		}
		return *p
	}
	switch {
	case w.Bands == nil:
		err = spec.Absent(path + ".bands")
	case len(w.Bands) == 0:
		// Present but empty is a value out of its range (≥ 1 band), not a
		// missing field.
		err = &spec.FieldError{Field: path + ".bands", Value: "[]", Reason: "a rule set needs at least 1 band"}
	}
	s.Bands = make([]rules.Band, len(w.Bands))
	for i, b := range w.Bands {
		at := spec.Index("bands", i)
		if b == nil {
			if err == nil {
				err = spec.Absent(path + "." + at)
			}
			continue
		}
		s.Bands[i] = rules.Band{BelowKmh: b.BelowKmh, Zoom: need(b.Zoom, at+".zoom"), PitchDeg: need(b.PitchDeg, at+".pitch_deg")}
	}
	s.HysteresisKmh = need(w.HysteresisKmh, "hysteresis_kmh")
	s.MaxZoomRatePerS = need(w.MaxZoomRatePerS, "max_zoom_rate_per_s")
	s.MaxPitchRateDegPerS = need(w.MaxPitchRateDegPerS, "max_pitch_rate_deg_per_s")
	if w.Turn == nil {
		if err == nil {
			err = spec.Absent(path + ".turn")
		}
	} else {
		s.Turn = rules.Turn{
			WithinM:     need(w.Turn.WithinM, "turn.within_m"),
			MinAngleDeg: need(w.Turn.MinAngleDeg, "turn.min_angle_deg"),
			Zoom:        need(w.Turn.Zoom, "turn.zoom"),
		}
	}
	s.MinZoom = need(w.MinZoom, "min_zoom")
	s.MaxZoom = need(w.MaxZoom, "max_zoom")
	s.MaxTurnRateDegPerS = need(w.MaxTurnRateDegPerS, "max_turn_rate_deg_per_s")
	if err != nil {
		return nil, err
	}
	if err := s.Validate(); err != nil {
		return nil, rulesError(path, err)
	}
	return &s, nil
}

// RulesOf returns the wire form of s.
func RulesOf(s *rules.Set) *Rules {
	n := func(v float64) *float64 { return &v }
	w := &Rules{
		Bands:               make([]*Band, len(s.Bands)),
		HysteresisKmh:       n(s.HysteresisKmh),
		MaxZoomRatePerS:     n(s.MaxZoomRatePerS),
		MaxPitchRateDegPerS: n(s.MaxPitchRateDegPerS),
		Turn:                &Turn{WithinM: n(s.Turn.WithinM), MinAngleDeg: n(s.Turn.MinAngleDeg), Zoom: n(s.Turn.Zoom)},
		MinZoom:             n(s.MinZoom),
		MaxZoom:             n(s.MaxZoom),
		MaxTurnRateDegPerS:  n(s.MaxTurnRateDegPerS),
	}
	for i, b := range s.Bands {
		w.Bands[i] = &Band{BelowKmh: b.BelowKmh, Zoom: n(b.Zoom), PitchDeg: n(b.PitchDeg)}
	}
	return w
}

// rulesError returns a rule-set problem as a *spec.FieldError under path:
// a missing field as missing, a wrong type as bad_type, the rest invalid.
func rulesError(path string, err error) error {
	var p *rules.Problem
	if !errors.As(err, &p) {
		return &spec.FieldError{Field: path, Reason: err.Error()}
	}
	fe := &spec.FieldError{Field: path, Reason: p.Msg}
	switch p.Kind {
	case rules.KindMissing:
		fe.Kind = spec.Missing
	case rules.KindType:
		fe.Kind = spec.BadType
	}
	if p.Field != "" && p.Field != "(rules)" {
		fe.Field += "." + p.Field
	}
	return fe
}
