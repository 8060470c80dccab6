package viewport

import (
	"math"
	"strconv"

	"github.com/paulmach/orb"
)

// View is a camera prepared for projection: every trigonometric and
// placement term is computed once, so projecting a point costs a handful of
// multiplications and one division. Build it with Prepare.
//
// The ground frame is centred on the target T, the ground point seen at the
// principal point (the screen centre): u runs to the right of the heading and
// v forward along it, both in world pixels (Mercator metres × scale).
type View struct {
	cam Camera

	scale      float64 // screen pixels per Mercator metre
	focal      float64 // focal length f in pixels
	cx, cy     float64 // principal point, pixels
	sinP, cosP float64 // pitch
	sinH, cosH float64 // heading
	sCosH      float64 // scale·cos β
	sSinH      float64 // scale·sin β
	fCosP      float64 // f·cos θ

	// The projection as a ratio of linear forms in the Mercator offset
	// (dx, dy) from T: depth = f + dX·dx + dY·dy, x = cx + (xX·dx + xY·dy)/depth,
	// y = cy + (yX·dx + yY·dy)/depth. Expanded from the closed form in Prepare.
	dX, dY, xX, xY, yX, yY float64

	target Mercator // T, Mercator metres
	user   Mercator // U, Mercator metres (latitude clamped)
	uA, vA float64  // the user (anchor) in the ground frame, world pixels

	left, right, top, bottom float64 // clear area, pixels (closed)
	maxDepth                 float64 // k·f, pixels
	farRow                   float64 // the screen row where depth = k·f; −Inf at pitch 0
	wrapped                  bool

	// The clear area's sides relative to the principal point, for the
	// tracker's quick test (tracker.go).
	leftC, rightC float64
}

// Prepare validates c and returns its prepared view. The camera is placed so
// that the user appears at the anchor pixel: the anchor is unprojected to
// (u_A, v_A) about a target at the origin, and T = U − (u_A·Rt + v_A·F)/s.
func Prepare(c Camera) (View, error) {
	if err := c.validateFields(); err != nil {
		return View{}, err
	}
	var v View
	if err := v.place(&c); err != nil {
		return View{}, err
	}
	return v, nil
}

// reachesHalfWorld reports whether any ground seen on the screen (down to
// the far limit), or the user, lies half the world's width or more east or
// west of the target.
func (v *View) reachesHalfWorld() bool {
	d := v.cam.Device
	limit := worldWidthM / 2 * v.scale // world pixels
	far := max(0, v.farRow)
	if far >= d.HeightPx {
		far = d.HeightPx
	}
	// East-west offset of ground-frame (u, w) from T, in world pixels.
	east := func(u, w float64) float64 { return math.Abs(u*v.cosH + w*v.sinH) }
	if east(v.uA, v.vA) >= limit {
		return true
	}
	// A bound first: ground on the screen at or below the far row has
	// |u| ≤ k·W/2 (depth ≤ k·f) and |v| ≤ k·f/sin θ (below the far row, and
	// above −f/sin θ), or |v| ≤ H/2 at pitch 0. At any zoom a drive uses
	// this settles it without unprojecting the corners.
	bound := d.FarRatio * d.WidthPx / 2
	if v.sinP > 0 {
		bound += d.FarRatio * v.focal / v.sinP
	} else {
		bound += d.HeightPx / 2
	}
	if bound < limit {
		return false
	}
	for _, y := range [2]float64{far, d.HeightPx} {
		for _, x := range [2]float64{0, d.WidthPx} {
			if u, w, ok := v.groundOfPixel(x, y); ok && east(u, w) >= limit {
				return true
			}
		}
	}
	return false
}

// Wrapped reports whether the view reaches half the world's width or more
// east or west of the target (a low zoom on a wide or tilted screen). The map
// then shows some ground more than once, and Project reports only the copy
// nearest the target.
func (v *View) Wrapped() bool { return v.wrapped }

// Camera returns the camera v was prepared from.
func (v *View) Camera() Camera { return v.cam }

// ScalePxPerM returns the view's scale in screen pixels per Mercator metre.
func (v *View) ScalePxPerM() float64 { return v.scale }

// FocalPx returns the focal length f in pixels, (H/2)/tan(fov_y/2).
func (v *View) FocalPx() float64 { return v.focal }

// Target returns T, the Mercator point seen at the principal point.
func (v *View) Target() Mercator { return v.target }

// UserMercator returns the user's Mercator point (latitude clamped).
func (v *View) UserMercator() Mercator { return v.user }

// ClearArea returns the clear area's left, top, right and bottom edges in
// screen pixels (y down); the area is closed.
func (v *View) ClearArea() (left, top, right, bottom float64) {
	return v.left, v.top, v.right, v.bottom
}

// FarRowPx returns the screen row (y, pixels, down) at which depth reaches
// k·f; rows above it are beyond the far limit. It is −Inf at pitch 0, where
// every depth equals f.
func (v *View) FarRowPx() float64 { return v.farRow }

// groundOfPixel returns the ground-frame point (u, v) seen at pixel (x, y),
// and false when the pixel is at or above the horizon.
func (v *View) groundOfPixel(x, y float64) (u, w float64, ok bool) {
	a := x - v.cx
	b := v.cy - y
	den := v.fCosP - b*v.sinP
	if !(den > 0) {
		return 0, 0, false
	}
	w = b * v.focal / den
	u = a * (v.focal + w*v.sinP) / v.focal
	return u, w, true
}

// groundFrame returns m in the ground frame around T, in world pixels; the X
// difference is taken the short way round the world.
func (v *View) groundFrame(m Mercator) (u, w float64) {
	dx := ShortDXM(m.X - v.target.X)
	dy := m.Y - v.target.Y
	return dx*v.sCosH - dy*v.sSinH, dx*v.sSinH + dy*v.sCosH
}

// mercatorOf returns the Mercator point of ground-frame point (u, w).
func (v *View) mercatorOf(u, w float64) Mercator {
	o := v.offsetOf(u, w)
	return Mercator{X: v.target.X + o.X, Y: v.target.Y + o.Y}
}

// offsetOf returns the Mercator offset from T of ground-frame point (u, w):
// T plus it is mercatorOf(u, w), to the bit.
func (v *View) offsetOf(u, w float64) Mercator {
	return Mercator{X: (u*v.cosH + w*v.sinH) / v.scale, Y: (-u*v.sinH + w*v.cosH) / v.scale}
}

// Pixel is a screen position in pixels: origin top-left, x right, y down.
type Pixel struct {
	X, Y float64
}

// ScreenPoint is where a ground point lands on the screen. It is four
// numbers so that it travels in registers; HasPixel and InView are read
// from them.
type ScreenPoint struct {
	// X and Y are the pixel (origin top-left, y down), when HasPixel.
	X, Y float64
	// DepthPx is the distance from the camera along its view axis, in pixels
	// (f at the target). At or below 0 the point is at or behind the camera
	// plane and has no pixel.
	DepthPx float64
	// MarginPx is the in-view decision margin: the signed distance in pixels
	// from the pixel to the nearest clear-area edge or to the far row,
	// positive inside. Its magnitude is how far the pixel must move (in the
	// max norm) before InView can flip. It is −Inf without a pixel.
	MarginPx float64
}

// HasPixel reports whether the point lies in front of the camera plane.
func (s ScreenPoint) HasPixel() bool { return s.DepthPx > 0 }

// InView reports whether the pixel lies in the closed clear area and at a
// depth of at most k·f.
func (s ScreenPoint) InView() bool { return s.MarginPx >= 0 }

// Pixel returns the point's pixel.
func (s ScreenPoint) Pixel() Pixel { return Pixel{s.X, s.Y} }

// Project returns the screen point of p ([lon, lat] degrees). It is
// ProjectMercator(ToMercator(p)), written out so that the Mercator
// conversion's logarithm is nearly all it costs.
func (v *View) Project(p orb.Point) ScreenPoint {
	lat := p[1]
	if lat > MaxLatDeg {
		lat = MaxLatDeg
	} else if lat < -MaxLatDeg {
		lat = -MaxLatDeg
	}
	x := p[0] * (worldWidthM / 360)
	y := EarthRadiusM * math.Log(math.Tan(math.Pi/4+lat*(math.Pi/360)))
	return v.ProjectMercator(Mercator{x, y})
}

// ProjectMercator returns the screen point of the Mercator point m.
// depth = f + v·sin θ; x = cx + f·u/depth; y = cy − f·v·cos θ/depth (y down).
func (v *View) ProjectMercator(m Mercator) ScreenPoint {
	dx := ShortDXM(m.X - v.target.X)
	dy := m.Y - v.target.Y
	depth := v.focal + dx*v.dX + dy*v.dY
	if !(depth > 0) {
		return ScreenPoint{DepthPx: depth, MarginPx: math.Inf(-1)}
	}
	inv := 1 / depth
	x := v.cx + (dx*v.xX+dy*v.xY)*inv
	y := v.cy + (dx*v.yX+dy*v.yY)*inv
	// The margin: the smallest of the five signed distances (every operand
	// is finite here). In view exactly when none is negative: inside the
	// closed clear area and at or below the far row, which is depth ≤ k·f
	// (y falls as depth grows, so the two tests are one). Deciding both from
	// the margin keeps InView and MarginPx consistent to the last bit.
	margin := min(x-v.left, v.right-x, y-v.top, v.bottom-y, y-v.farRow)
	return ScreenPoint{X: x, Y: y, DepthPx: depth, MarginPx: margin}
}

// InView reports whether the Mercator point m is in view: it has a pixel in
// the clear area and lies no deeper than k·f.
func (v *View) InView(m Mercator) bool {
	dx := ShortDXM(m.X - v.target.X)
	dy := m.Y - v.target.Y
	depth := v.focal + dx*v.dX + dy*v.dY
	if !(depth > 0) {
		return false
	}
	// The same arithmetic and tests as ProjectMercator, so the two never
	// disagree.
	inv := 1 / depth
	x := v.cx + (dx*v.xX+dy*v.xY)*inv
	y := v.cy + (dx*v.yX+dy*v.yY)*inv
	return x >= v.left && x <= v.right && y >= v.top && y <= v.bottom && y >= v.farRow
}

// Unproject returns the ground point ([lon, lat] degrees, longitude in
// [−180, 180)) seen at pixel px, and false when px is at or above the
// horizon. Pixels outside the screen are unprojected all the same.
func (v *View) Unproject(px Pixel) (orb.Point, bool) {
	m, ok := v.UnprojectMercator(px)
	if !ok {
		return orb.Point{}, false
	}
	return m.LatLon(), true
}

// UnprojectMercator returns the Mercator point seen at pixel px, and false
// when px is at or above the horizon.
func (v *View) UnprojectMercator(px Pixel) (Mercator, bool) {
	u, w, ok := v.groundOfPixel(px.X, px.Y)
	if !ok {
		return Mercator{}, false
	}
	return v.mercatorOf(u, w), true
}

// HorizonRowPx returns the screen row (y, pixels, down) of the horizon:
// cy − f·cot θ; rows at or above it see no ground. It returns false at
// pitch 0, where the horizon is infinitely far above the screen, and when
// the row is farther than a float can say.
func (v *View) HorizonRowPx() (float64, bool) {
	row := v.cy - v.focal*v.cosP/v.sinP
	if v.sinP == 0 || math.IsInf(row, 0) {
		// At pitch 0, or so near it (below 1e-305°) that the row is beyond
		// every float.
		return 0, false
	}
	return row, true
}

// BindingEdge names the edge of the in-view region that decides whether
// the screen point s is in view, the one its MarginPx measures to, with the
// numbers on each side: "left edge: x 12.3 px, clear area from 60 px",
// "far limit: depth 1450.9 px > k·f 1074.8 px", "behind the camera: depth
// −3 px". A report uses it to say why an in-view answer came out as it did.
func (v *View) BindingEdge(s ScreenPoint) string {
	if !s.HasPixel() {
		return "behind the camera: depth " + fmtPx(s.DepthPx) + " px ≤ 0"
	}
	cmp := func(in bool, a, b string) string {
		if in {
			return a
		}
		return b
	}
	edges := [...]struct {
		margin float64
		text   string
	}{
		{s.X - v.left, "left edge: x " + fmtPx(s.X) + " px " + cmp(s.X >= v.left, "≥", "<") + " " + fmtPx(v.left) + " px"},
		{v.right - s.X, "right edge: x " + fmtPx(s.X) + " px " + cmp(s.X <= v.right, "≤", ">") + " " + fmtPx(v.right) + " px"},
		{s.Y - v.top, "top edge: y " + fmtPx(s.Y) + " px " + cmp(s.Y >= v.top, "≥", "<") + " " + fmtPx(v.top) + " px"},
		{v.bottom - s.Y, "bottom edge: y " + fmtPx(s.Y) + " px " + cmp(s.Y <= v.bottom, "≤", ">") + " " + fmtPx(v.bottom) + " px"},
		{s.Y - v.farRow, "far limit: depth " + fmtPx(s.DepthPx) + " px " + cmp(s.DepthPx <= v.maxDepth, "≤", ">") + " k·f " + fmtPx(v.maxDepth) + " px"},
	}
	best := 0
	for i, e := range edges {
		if e.margin < edges[best].margin {
			best = i
		}
	}
	return edges[best].text
}

// fmtPx writes a pixel quantity to a tenth of a pixel for people.
func fmtPx(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }
