package render

import (
	"errors"
	"math"
	"strconv"

	"github.com/viewspec/viewspec/viewport"
)

// Frame is the affine map from the Mercator plane to picture units, north
// up, around the user:
//
//	x = OriginX + shortΔ(X − Center.X)·UnitsPerM
//	y = OriginY − (Y − Center.Y)·UnitsPerM
//
// with the X difference taken the short way round the world (SPEC §1) and y
// growing down the picture.
type Frame struct {
	// Center is the user's Mercator point, metres.
	Center viewport.Mercator
	// OriginX and OriginY are where Center is drawn, picture units.
	OriginX, OriginY float64
	// UnitsPerM is the scale, picture units per Mercator metre.
	UnitsPerM float64
	// GroundScale is cos φ of the user's latitude: ground metres per
	// Mercator metre (SPEC §1).
	GroundScale float64
}

// Point returns the picture position (x right, y down, picture units) of
// the Mercator point m.
func (f Frame) Point(m viewport.Mercator) (x, y float64) {
	return f.OriginX + viewport.ShortDXM(m.X-f.Center.X)*f.UnitsPerM, f.OriginY - (m.Y-f.Center.Y)*f.UnitsPerM
}

// UnitsPerGroundM returns the scale in picture units per ground metre:
// UnitsPerM / GroundScale.
func (f Frame) UnitsPerGroundM() float64 { return f.UnitsPerM / f.GroundScale }

// errWrapped is the answer for views that show ground more than once.
var errWrapped = errors.New("render: the view wraps round the world (zoom too low for a local picture)")

// minSpanGroundM is the smallest ground extent a fitted picture shows, so
// that a single point (an empty footprint and the user) still gets a
// readable neighbourhood.
const minSpanGroundM = 200

// fitFrame returns the frame that centres the box of pts (Mercator) in a
// w×h map area with pad picture units on every side, at one scale for both
// axes, with center as the frame's centre point. With spanGroundM > 0 the
// box is ignored: the user is drawn at the centre and the shorter side of
// the area spans spanGroundM ground metres.
func fitFrame(center viewport.Mercator, groundScale float64, pts []viewport.Mercator, w, h, pad, spanGroundM float64) Frame {
	f := Frame{Center: center, GroundScale: groundScale}
	if spanGroundM > 0 {
		f.UnitsPerM = min(w, h) / spanGroundM * groundScale
		f.OriginX, f.OriginY = w/2, h/2
		return f
	}
	// The box in ground metres east and north of the centre.
	minE, maxE, minN, maxN := 0.0, 0.0, 0.0, 0.0
	for _, p := range pts {
		e, n := viewport.ShortDXM(p.X-center.X)*groundScale, (p.Y-center.Y)*groundScale
		minE, maxE = min(minE, e), max(maxE, e)
		minN, maxN = min(minN, n), max(maxN, n)
	}
	grow := func(lo, hi float64) (float64, float64) {
		if d := minSpanGroundM - (hi - lo); d > 0 {
			return lo - d/2, hi + d/2
		}
		return lo, hi
	}
	minE, maxE = grow(minE, maxE)
	minN, maxN = grow(minN, maxN)
	perGroundM := min((w-2*pad)/(maxE-minE), (h-2*pad)/(maxN-minN))
	f.UnitsPerM = perGroundM * groundScale
	f.OriginX = w/2 - (minE+maxE)/2*perGroundM
	f.OriginY = h/2 + (minN+maxN)/2*perGroundM
	return f
}

// RoundLengthM returns the largest round length (1, 2 or 5 × 10ⁿ metres)
// not above maxM, for scale bars; 0 when maxM is not positive and finite.
func RoundLengthM(maxM float64) float64 {
	if !(maxM > 0) || math.IsInf(maxM, 0) {
		return 0
	}
	// 10ⁿ correctly rounded (as the literal "1eN" reads), one step down or
	// up where Log10 lands a hair off an exact power.
	pow10 := func(n int) float64 {
		v, _ := strconv.ParseFloat("1e"+strconv.Itoa(n), 64)
		return v
	}
	n := int(math.Floor(math.Log10(maxM)))
	p := pow10(n)
	if p > maxM {
		p = pow10(n - 1)
	} else if up := pow10(n + 1); up <= maxM {
		p = up
	}
	for _, k := range [...]float64{5, 2} {
		if k*p <= maxM {
			return k * p
		}
	}
	return p
}

// lengthLabel writes a ground length for a scale bar: metres below 1 km,
// else kilometres.
func lengthLabel(m float64) string {
	if m >= 1000 {
		return strconv.FormatFloat(m/1000, 'g', -1, 64) + " km"
	}
	return strconv.FormatFloat(m, 'g', -1, 64) + " m"
}

// num writes a picture coordinate rounded to 1e-7 of a unit, without
// trailing zeros, and never as "-0".
func num(v float64) string {
	s := strconv.FormatFloat(v, 'f', 7, 64)
	i := len(s)
	for i > 0 && s[i-1] == '0' {
		i--
	}
	if i > 0 && s[i-1] == '.' {
		i--
	}
	s = s[:i]
	if s == "-0" {
		return "0"
	}
	return s
}

// round7 rounds v to 1e-7, as num writes it, for JSON data.
func round7(v float64) float64 {
	r := math.Round(v*1e7) / 1e7
	if r == 0 {
		return 0 // no −0
	}
	return r
}
