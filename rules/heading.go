package rules

import "math"

// OppositeWithinDeg is how near to exactly opposite a target counts as opposite and turns clockwise
// (SPEC §3): the short way round is decided on |d| < 180 − OppositeWithinDeg, where d is the signed
// difference of the headings, so that two implementations whose headings of a U-turn's two legs
// differ in the last bits (atan2 of differences that are negatives of each other, computed
// separately, or a return leg whose vertices were rounded) still turn the same way. 1e-6° is far
// beyond that rounding (1e-13° for the same vertices, ~1e-9° for vertices rounded to 1e-12°) and far
// below any turn a route means (a 1e-6° bend over 10 km moves the road 0.17 mm).
const OppositeWithinDeg = 1e-6

// TurnHeadingDeg turns a heading toward a target heading by at most maxStepDeg degrees and returns the
// new heading. Headings are degrees clockwise from true north; inputs may be any finite angle and the
// result is in [0, 360). The turn goes the short way round; a target within OppositeWithinDeg of
// exactly opposite turns clockwise.
// When the target is within maxStepDeg the result is the target (normalised). The drive timeline calls it
// once a tick with maxStepDeg = max_turn_rate_deg_per_s × tick_s, which bounds how fast the heading-up
// map rotates on screen.
//
// Special cases, as in package math:
//
//	TurnHeadingDeg(c, t, s) = NaN            if c, t or s is NaN or c or t is ±Inf
//	TurnHeadingDeg(c, t, s) = c (normalised) if s ≤ 0
//	TurnHeadingDeg(c, t, +Inf) = t (normalised)
func TurnHeadingDeg(currentDeg, targetDeg, maxStepDeg float64) float64 {
	if math.IsNaN(maxStepDeg) || math.IsNaN(currentDeg) || math.IsNaN(targetDeg) ||
		math.IsInf(currentDeg, 0) || math.IsInf(targetDeg, 0) {
		return math.NaN()
	}
	cur, tgt := norm360(currentDeg), norm360(targetDeg)
	d := tgt - cur // in (−360, 360)
	if d > 180 {
		d -= 360
	} else if d <= -180 {
		d += 360
	}
	// d is now the signed short turn, in (−180, 180]; within OppositeWithinDeg of ±180 it is +180,
	// clockwise.
	if math.Abs(d) >= 180-OppositeWithinDeg {
		d = 180
	}
	switch {
	case math.Abs(d) <= maxStepDeg:
		return tgt
	case maxStepDeg <= 0:
		return cur
	case d > 0:
		return norm360(cur + maxStepDeg)
	}
	return norm360(cur - maxStepDeg)
}

// norm360 maps a finite angle in degrees into [0, 360); NaN stays NaN.
func norm360(deg float64) float64 {
	if deg > 0 && deg < 360 {
		return deg // as math.Mod would: most headings are already in range
	}
	r := math.Mod(deg, 360)
	if r < 0 {
		r += 360
	}
	if r >= 360 || r == 0 { // a tiny negative r rounds up to 360 when 360 is added; and no −0
		return 0
	}
	return r
}

// TurnMarginDeg returns how far the direction of the turn TurnHeadingDeg makes from currentDeg toward
// targetDeg with step maxStepDeg is from going the other way, in degrees: ||d| − (180 −
// OppositeWithinDeg)|, with d the signed short difference. It is +Inf when the step reaches the target
// (the direction then does not matter) or an input is not finite. Two implementations whose
// headings agree to within this margin turn the same way.
func TurnMarginDeg(currentDeg, targetDeg, maxStepDeg float64) float64 {
	if math.IsNaN(maxStepDeg) || math.IsNaN(currentDeg) || math.IsNaN(targetDeg) ||
		math.IsInf(currentDeg, 0) || math.IsInf(targetDeg, 0) {
		return math.Inf(1)
	}
	d := norm360(targetDeg) - norm360(currentDeg)
	if d > 180 {
		d -= 360
	} else if d <= -180 {
		d += 360
	}
	if math.Abs(d) <= maxStepDeg || maxStepDeg <= 0 {
		return math.Inf(1)
	}
	return math.Abs(math.Abs(d) - (180 - OppositeWithinDeg))
}
