package wire

// Margins are the reference's decision margins, kept beside the expected
// answer: one entry per point, pixel, marker (null where the decision does
// not exist).
type Margins struct {
	MarginPx    []*float64 `json:"margin_px,omitempty"`
	HorizonPx   []*float64 `json:"horizon_px,omitempty"`
	EmptyPx     *float64   `json:"empty_px,omitempty"`
	SideMarginM []*float64 `json:"side_margin_m,omitempty"`
	// ChoiceMarginM is how far each marker's closest point (and the
	// user's place) is from another choice by the tie, vertex and route-end
	// rules (SPEC §4), metres; null when no rule was near deciding.
	ChoiceMarginM      []*float64 `json:"choice_margin_m,omitempty"`
	BucketMarginS      []*float64 `json:"bucket_margin_s,omitempty"`
	FirstShownMarginPx []*float64 `json:"first_shown_margin_px,omitempty"`
	// TurnMarginDeg is present only when some marker's outcome came after
	// a turn limited by the turn rate (see MarkerTimeline).
	TurnMarginDeg []*float64 `json:"turn_margin_deg,omitempty"`
}
