package viewport

import "math"

// quickTest is one view's in-view test for batches of points, as four
// linear forms in the Mercator offset (dx, dy) from T: the signed distances
// in world pixels from the footprint's four lines, positive outside — its
// near and far rows (v = vNear, v = vFar in the ground frame) and its sides
// (f·u = (left − cx)·depth and f·u = (right − cx)·depth with
// depth = f + v·sin θ, which are lines in the ground plane). Their largest,
// d, has no division in it. An answer counts as sure when |d| exceeds
// 1e-9 of the footprint's magnitudes, far beyond the ~1e-16 relative
// rounding of this form and of ProjectMercator's, so a sure answer is
// exactly ProjectMercator's; the rest must be asked of ProjectMercator.
//
// d also bounds the distance to the footprint: outside, the distance to
// the farthest line whose wrong side the point is on is a lower bound on
// its distance to the (convex) footprint; inside, −d is the distance to
// its boundary.
type quickTest struct {
	tx, ty     float64 // T, Mercator metres
	wX, wY     float64 // v = wX·dx + wY·dy
	vMid       float64 // the v midway between the near and far rows, world pixels
	halfV      float64 // half the v from the near row to the far: both rows' distance is |v − vMid| − halfV
	aX, aY, aC float64 // the left side's distance: aX·dx + aY·dy + aC
	bX, bY, bC float64 // the right side's
	tolPx      float64 // the sure margin, world pixels
	invScale   float64 // Mercator metres per world pixel
}

// signedPx returns d, the largest of the four signed distances (world
// pixels, positive outside), for the Mercator offset (dx, dy) from T.
func (q *quickTest) signedPx(dx, dy float64) float64 {
	w := q.wX*dx + q.wY*dy
	return max(math.Abs(w-q.vMid)-q.halfV, q.aX*dx+q.aY*dy+q.aC, q.bX*dx+q.bY*dy+q.bC)
}

// quickShape is what the quick test takes from the device and the pitch
// alone: the trapezoid in the ground frame (ok false when it is empty),
// the sides' gradient lengths, and the sure margin. The drive timeline
// keeps it while the pitch stays.
type quickShape struct {
	uv     [4][2]float64
	ok     bool
	ga, gb float64 // 1 / the left and right sides' gradient lengths
	tolPx  float64
}

// quickShapeOf returns the quick test's shape of the view.
func (v *View) quickShapeOf() quickShape {
	var s quickShape
	if s.uv, _, _, s.ok = v.trapezoid(); !s.ok {
		return s
	}
	f, sinP := v.focal, v.sinP
	s.ga = 1 / math.Hypot(f, v.leftC*sinP)
	s.gb = 1 / math.Hypot(f, v.rightC*sinP)
	span := f
	for _, p := range s.uv {
		span += math.Abs(p[0]) + math.Abs(p[1])
	}
	s.tolPx = 1e-9 * span
	return s
}

// quickOf returns the quick test of the view, whose shape s (not empty)
// is from quickShapeOf.
func (v *View) quickOf(s *quickShape) quickTest {
	f, sinP := v.focal, v.sinP
	sc, ss := v.sCosH, v.sSinH
	ga, gb := s.ga, s.gb
	// u = sc·dx − ss·dy and v = ss·dx + sc·dy (world pixels). The left
	// side's value −(f·u − leftC·depth), over its gradient's length in
	// (u, v), is its signed distance; likewise the right side's with the
	// sign turned.
	return quickTest{
		tx: v.target.X, ty: v.target.Y, wX: ss, wY: sc,
		vMid: (s.uv[0][1] + s.uv[3][1]) / 2, halfV: (s.uv[3][1] - s.uv[0][1]) / 2,
		aX: ga * (v.leftC*sinP*ss - f*sc), aY: ga * (v.leftC*sinP*sc + f*ss), aC: ga * v.leftC * f,
		bX: gb * (f*sc - v.rightC*sinP*ss), bY: -gb * (f*ss + v.rightC*sinP*sc), bC: -gb * v.rightC * f,
		tolPx:    s.tolPx,
		invScale: 1 / v.scale,
	}
}
