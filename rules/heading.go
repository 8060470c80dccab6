package rules

import "math"

// TurnHeadingDeg turns a heading toward a target heading by at most maxStepDeg degrees and returns the
// new heading. Headings are degrees clockwise from true north; inputs may be any finite angle and the
// result is in [0, 360). The turn goes the short way round; a target exactly opposite turns clockwise.
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
	// d is now the signed short turn, in (−180, 180].
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
