package rules

import (
	"encoding/json"
	"errors"
	"reflect"
	"strconv"
)

// Set is one rule set: how the map's zoom and pitch follow the vehicle's speed and the next turn, and how
// fast the heading-up map may rotate. The field names on the wire and in files are those of SPEC §6; the
// same struct decodes from JSON (encoding/json, through [Set.UnmarshalJSON], which also insists that
// every field is there) and from YAML (yaml tags; a plain yaml.Unmarshal does not check presence, [Parse]
// does). Decoding checks only shape; call [Set.Validate] (or use [Parse], which does both) before
// evaluating.
type Set struct {
	// Bands, ascending by speed. Band i holds the speeds in [Bands[i-1].BelowKmh, Bands[i].BelowKmh);
	// the first band starts at 0 km/h and the last band, which has no BelowKmh, holds every speed above
	// the one before it.
	Bands []Band `json:"bands" yaml:"bands"`
	// HysteresisKmh is how far past a band edge the speed must go (km/h, ≥ 0) before the band changes.
	HysteresisKmh float64 `json:"hysteresis_kmh" yaml:"hysteresis_kmh"`
	// MaxZoomRatePerS bounds how fast the zoom moves toward its target (zoom levels per second, > 0).
	MaxZoomRatePerS float64 `json:"max_zoom_rate_per_s" yaml:"max_zoom_rate_per_s"`
	// MaxPitchRateDegPerS bounds how fast the pitch moves toward its target (degrees per second, > 0).
	MaxPitchRateDegPerS float64 `json:"max_pitch_rate_deg_per_s" yaml:"max_pitch_rate_deg_per_s"`
	// Turn is the zoom-in override near a turn.
	Turn Turn `json:"turn" yaml:"turn"`
	// MinZoom and MaxZoom bound every target zoom (zoom levels, 0 ≤ MinZoom ≤ MaxZoom ≤ 30).
	MinZoom float64 `json:"min_zoom" yaml:"min_zoom"`
	MaxZoom float64 `json:"max_zoom" yaml:"max_zoom"`
	// MaxTurnRateDegPerS bounds how fast the heading-up map rotates (degrees per second, > 0); the drive
	// timeline applies it with [TurnHeadingDeg]. The zoom and pitch evaluation does not use it.
	MaxTurnRateDegPerS float64 `json:"max_turn_rate_deg_per_s" yaml:"max_turn_rate_deg_per_s"`
}

// Band is one speed band: the zoom and pitch the map aims for while the speed is in it.
type Band struct {
	// BelowKmh is the band's upper edge (km/h, > 0, exclusive): present on every band but the last,
	// absent (nil) on the last.
	BelowKmh *float64 `json:"below_kmh,omitempty" yaml:"below_kmh,omitempty"`
	// Zoom is the target zoom level in this band, in [0, 30].
	Zoom float64 `json:"zoom" yaml:"zoom"`
	// PitchDeg is the target camera tilt in this band, degrees from straight down, in [0, 90).
	PitchDeg float64 `json:"pitch_deg" yaml:"pitch_deg"`
}

// Turn is the turn override: within WithinM metres (along the route, ≥ 0) of the next turn, the target
// zoom is at least Zoom (in [0, 30]). A turn is a route vertex where the heading changes by at least
// MinAngleDeg degrees (in (0, 180]); finding turns is the route's business, and the zoom evaluation only
// sees the distance to the next one.
type Turn struct {
	WithinM     float64 `json:"within_m" yaml:"within_m"`
	MinAngleDeg float64 `json:"min_angle_deg" yaml:"min_angle_deg"`
	Zoom        float64 `json:"zoom" yaml:"zoom"`
}

// Edge returns a band's upper edge as a [Band.BelowKmh] value: a convenience for building sets in code.
func Edge(kmh float64) *float64 { return &kmh }

// The wire shapes, with every field a pointer so that absence can be told from zero.
type wireSet struct {
	Bands               *[]wireBand `json:"bands"`
	HysteresisKmh       *float64    `json:"hysteresis_kmh"`
	MaxZoomRatePerS     *float64    `json:"max_zoom_rate_per_s"`
	MaxPitchRateDegPerS *float64    `json:"max_pitch_rate_deg_per_s"`
	Turn                *wireTurn   `json:"turn"`
	MinZoom             *float64    `json:"min_zoom"`
	MaxZoom             *float64    `json:"max_zoom"`
	MaxTurnRateDegPerS  *float64    `json:"max_turn_rate_deg_per_s"`
}

type wireBand struct {
	BelowKmh *float64 `json:"below_kmh"`
	Zoom     *float64 `json:"zoom"`
	PitchDeg *float64 `json:"pitch_deg"`
}

type wireTurn struct {
	WithinM     *float64 `json:"within_m"`
	MinAngleDeg *float64 `json:"min_angle_deg"`
	Zoom        *float64 `json:"zoom"`
}

// UnmarshalJSON decodes the rules object of the wire (SPEC §6). Every field is required except
// below_kmh (which only the last band lacks, checked by [Set.Validate]); a missing or null field is an
// [Errors] naming each one (a null below_kmh counts as absent, as encoding/json reads a null pointer;
// rule files read by [Parse] must leave it out instead). Fields the format does not have are ignored, as
// the wire's readers must.
// A JSON null for the whole object leaves the Set unchanged, as encoding/json does for other types.
func (s *Set) UnmarshalJSON(data []byte) error {
	if string(data) == "null" {
		return nil
	}
	var w wireSet
	if err := json.Unmarshal(data, &w); err != nil {
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) {
			field := te.Field
			if field == "" {
				field = "(rules)"
			}
			return Errors{{Kind: KindType, Field: field, Msg: "got JSON " + te.Value + ", want " + wantJSON(te)}}
		}
		return err
	}
	var errs Errors
	need := func(p *float64, field string) float64 {
		if p == nil {
			errs = append(errs, &FieldError{Kind: KindMissing, Field: field, Msg: "missing"})
			return 0
		}
		return *p
	}
	var out Set
	if w.Bands == nil {
		errs = append(errs, &FieldError{Kind: KindMissing, Field: "bands", Msg: "missing"})
	} else {
		out.Bands = make([]Band, len(*w.Bands))
		for i, b := range *w.Bands {
			p := "bands[" + strconv.Itoa(i) + "]."
			out.Bands[i] = Band{BelowKmh: b.BelowKmh, Zoom: need(b.Zoom, p+"zoom"), PitchDeg: need(b.PitchDeg, p+"pitch_deg")}
		}
	}
	out.HysteresisKmh = need(w.HysteresisKmh, "hysteresis_kmh")
	out.MaxZoomRatePerS = need(w.MaxZoomRatePerS, "max_zoom_rate_per_s")
	out.MaxPitchRateDegPerS = need(w.MaxPitchRateDegPerS, "max_pitch_rate_deg_per_s")
	if w.Turn == nil {
		errs = append(errs, &FieldError{Kind: KindMissing, Field: "turn", Msg: "missing"})
	} else {
		out.Turn = Turn{
			WithinM:     need(w.Turn.WithinM, "turn.within_m"),
			MinAngleDeg: need(w.Turn.MinAngleDeg, "turn.min_angle_deg"),
			Zoom:        need(w.Turn.Zoom, "turn.zoom"),
		}
	}
	out.MinZoom = need(w.MinZoom, "min_zoom")
	out.MaxZoom = need(w.MaxZoom, "max_zoom")
	out.MaxTurnRateDegPerS = need(w.MaxTurnRateDegPerS, "max_turn_rate_deg_per_s")
	if errs != nil {
		return errs
	}
	*s = out
	return nil
}

func wantJSON(te *json.UnmarshalTypeError) string {
	t := te.Type
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	switch t.Kind() {
	case reflect.Float64:
		return "number"
	case reflect.Slice:
		return "array"
	case reflect.Struct:
		return "object"
	}
	return t.String()
}
