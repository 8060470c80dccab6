package viewport

import (
	"math"

	"github.com/paulmach/orb"
)

// Footprint is the ground region in view: a trapezoid whose near and far
// edges are perpendicular to the heading (rows of constant screen y are lines
// of constant v), wider at the far edge when the camera is tilted.
type Footprint struct {
	// Empty is true when the far limit lies at or below the clear area's
	// bottom row, so that nothing on the ground is in view; the other fields
	// are then zero.
	Empty bool
	// Vertices are near-left, near-right, far-right, far-left: counter-
	// clockwise on the map, as RFC 7946 wants for an exterior ring.
	Vertices [4]orb.Point
	// Mercator holds the same vertices in the Mercator plane, unwrapped: X
	// may pass ±πR where the footprint crosses the antimeridian.
	Mercator [4]Mercator
	// Wrapped is View.Wrapped: the screen shows some ground more than once.
	Wrapped bool
	// NearRowPx and FarRowPx are the screen rows (y down) of the near and far
	// edges: the bottom of the clear area, and the top of the clear area or
	// the far-limit row, whichever is lower on the screen.
	NearRowPx, FarRowPx float64
	// AreaM2 is the trapezoid's Mercator area scaled to square metres at the
	// user's latitude (× cos² φ_U).
	AreaM2 float64
	// VisibleRadiusM is the largest ground distance from the user to a
	// vertex (Mercator distance × cos φ_U), metres.
	VisibleRadiusM float64

	// The trapezoid in the ground frame (world pixels), and cos φ of the
	// user's (clamped) latitude, for ground distances.
	uv          [4][2]float64
	groundScale float64
}

// Footprint returns the view's footprint. A top row at or above the horizon
// is always cut by the far limit v_far = (k−1)·f/sin θ, so the footprint is
// bounded for every pitch below 90°.
func (v *View) Footprint() Footprint {
	var fp Footprint
	uv, near, far, ok := v.trapezoid()
	if !ok {
		fp.Empty = true
		return fp
	}
	fp.uv, fp.groundScale = uv, GroundScale(v.cam.LatDeg)
	fp.NearRowPx, fp.FarRowPx = near, far
	fp.Wrapped = v.wrapped
	gs := fp.groundScale
	for i, q := range uv {
		m := v.mercatorOf(q[0], q[1])
		fp.Mercator[i] = m
		fp.Vertices[i] = m.LatLon()
		d := math.Hypot(q[0]-v.uA, q[1]-v.vA) / v.scale * gs
		fp.VisibleRadiusM = max(fp.VisibleRadiusM, d)
	}
	// A trapezoid: height (v_far − v_near) times the mean of its widths.
	areaPx := (uv[3][1] - uv[0][1]) * ((uv[1][0] - uv[0][0]) + (uv[2][0] - uv[3][0])) / 2
	g := gs / v.scale
	fp.AreaM2 = areaPx * g * g
	return fp
}

// trapezoid returns the footprint in the ground frame (world pixels),
// vertices near-left, near-right, far-right, far-left, with the screen rows
// of its near and far edges; ok is false when it is empty.
func (v *View) trapezoid() (uv [4][2]float64, near, far float64, ok bool) {
	near = v.bottom
	far = max(v.top, v.farRow)
	if far >= near {
		return uv, near, far, false
	}
	for i, y := range [2]float64{near, far} {
		// Both rows are below the horizon: the near row is below the far
		// row, and the far row is at or below the far-limit row, which lies
		// below the horizon for every k > 1.
		_, w, _ := v.groundOfPixel(v.cx, y)
		depth := v.focal + w*v.sinP
		ul := (v.left - v.cx) * depth / v.focal
		ur := (v.right - v.cx) * depth / v.focal
		if i == 0 {
			uv[0], uv[1] = [2]float64{ul, w}, [2]float64{ur, w}
		} else {
			uv[2], uv[3] = [2]float64{ur, w}, [2]float64{ul, w}
		}
	}
	return uv, near, far, true
}

// GroundDistM returns the ground distance in metres from the Mercator point
// m to the footprint fp of this view: 0 inside or on the boundary,
// else the Mercator distance to the nearest edge scaled by cos φ_U. It
// returns false when fp is empty.
func (v *View) GroundDistM(fp *Footprint, m Mercator) (float64, bool) {
	if fp.Empty {
		return 0, false
	}
	u, w := v.groundFrame(m)
	inside := true
	best := math.Inf(1)
	for i := range 4 {
		a, b := fp.uv[i], fp.uv[(i+1)%4]
		ex, ey := b[0]-a[0], b[1]-a[1]
		px, py := u-a[0], w-a[1]
		// Counter-clockwise ring in (u, v) as well (u right, v forward has
		// the same handedness as east, north): inside is to the left.
		if ex*py-ey*px < 0 {
			inside = false
		}
		t := (px*ex + py*ey) / (ex*ex + ey*ey)
		t = max(0, min(1, t))
		best = min(best, math.Hypot(px-t*ex, py-t*ey))
	}
	if inside {
		return 0, true
	}
	return best / v.scale * fp.groundScale, true
}
