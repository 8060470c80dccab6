package rules

// Set is one rule set: how the map's zoom and pitch follow the vehicle's speed and the next turn, and how
// fast the heading-up map may rotate. The field names in files are those of SPEC §3; rule files are read
// by [Parse], which checks presence and ranges; on the wire the rules object is the wire package's, which
// converts to a Set. Call [Set.Validate] (or use [Parse], which does both) before evaluating.
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
