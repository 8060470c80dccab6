package viewport_test

import (
	"math"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/viewport"
)

// tiltedCamera is the worked camera of SPEC §2 (400 × 800 px, fov_y 60°,
// pitch 60°, far ratio 10, so f = 400√3 and y_far = 40) with the user at
// a quarter of the width from the left and a quarter of the height above
// the bottom (anchor 0.25, 0.75), a 100 px inset on the left, at latitude
// 60°.
func tiltedCamera(headingDeg float64) viewport.Camera {
	d := viewport.NewDevice(400, 800, 60)
	d.AnchorX, d.AnchorY, d.InsetLeftPx = 0.25, 0.75, 100
	return viewport.Camera{LatDeg: 60, LonDeg: 10, HeadingDeg: headingDeg, PitchDeg: 60, Zoom: 15, Device: d}
}

// The area and the visible radius of a tilted footprint, hand-computed in
// the ground frame (world pixels) from SPEC §2's unprojection,
// den = f·cos θ − b·sin θ, v = b·f/den, u = a·(f + v·sin θ)/f, with
// f = 400√3, θ = 60°, a = x − 200, b = 400 − y:
//
//	near row y = 800: b = −400, den = 200√3 + 200√3, v = −400, depth = 200√3,
//	                  u = a/2: −50 at the left column x = 100, 100 at the right x = 400
//	far row y = 40:   b = 360,  den = 200√3 − 180√3, v = 7200, depth = 4000√3,
//	                  u = 10·a: −1000 and 2000
//	user (100, 600):  a = −100, b = −200, den = 200√3 + 100√3, v = −800/3,
//	                  u = −100·(400√3 − 400√3/3)/(400√3) = −200/3
//
// So the trapezoid is 7600 px deep with widths 150 and 3000: 7600 × 1575
// px²; the farthest vertex from the user is the far-right one, (2000, 7200),
// at hypot(2000 + 200/3, 7200 + 800/3) px (the far-left one is 933 px across). Ground metres are px / s × cos φ_U, with
// s = 256·2^15/(2πR) at zoom 15, and cos 60° = ½. Neither depends on the
// heading.
func TestFootprintTiltedWorked(t *testing.T) {
	s := 256 * math.Pow(2, 15) / (2 * math.Pi * viewport.EarthRadiusM)
	g := math.Cos(60*math.Pi/180) / s // ground metres per world pixel
	wantArea := 7600 * 1575 * g * g
	wantRadius := math.Hypot(2000+200.0/3, 7200+800.0/3) * g
	const rel = 1e-12 // SPEC §2: area and visible radius within 1e-12 of the value
	for _, h := range []float64{0, 123} {
		v := mustPrepare(t, tiltedCamera(h))
		fp := v.Footprint()
		if fp.Empty {
			t.Fatalf("heading %v: empty footprint", h)
		}
		if d := math.Abs(fp.AreaM2 - wantArea); d > rel*wantArea {
			t.Errorf("Footprint(heading %v).AreaM2 = %.17g, want %.17g (off by %.3g m², tolerance %.3g)", h, fp.AreaM2, wantArea, d, rel*wantArea)
		}
		if d := math.Abs(fp.VisibleRadiusM - wantRadius); d > rel*wantRadius {
			t.Errorf("Footprint(heading %v).VisibleRadiusM = %.17g, want %.17g from the user (off by %.3g m, tolerance %.3g; from the target it would be %.17g)",
				h, fp.VisibleRadiusM, wantRadius, d, rel*wantRadius, math.Hypot(2000, 7200)*g)
		}
	}
}

// The footprint's ring is counter-clockwise on the map (SPEC §2, RFC 7946):
// its shoelace area in the Mercator plane (X east, Y north) is positive,
// near-left comes before near-right, and at heading 0 near-right lies east
// of near-left and far-right north of near-right.
func TestFootprintRingCounterClockwise(t *testing.T) {
	for _, pitch := range []float64{0, 60} {
		for _, h := range []float64{0, 45, 180, 270, 359} {
			c := tiltedCamera(h)
			c.PitchDeg = pitch
			v := mustPrepare(t, c)
			fp := v.Footprint()
			var twice float64
			for i, a := range fp.Mercator {
				b := fp.Mercator[(i+1)%4]
				twice += a.X*b.Y - b.X*a.Y
			}
			if !(twice > 0) {
				t.Errorf("Footprint(pitch %v, heading %v) ring signed area %.6g m², want > 0 (counter-clockwise)", pitch, h, twice/2)
			}
			if h == 0 {
				m := fp.Mercator
				if !(m[1].X > m[0].X) || !(m[2].Y > m[1].Y) || !(m[3].X < m[2].X) {
					t.Errorf("Footprint(pitch %v, heading 0) = %v, want near-left, near-right (east of it), far-right (north), far-left (west)", pitch, m)
				}
			}
		}
	}
}

// Project clamps latitude to ±MaxLatDeg (SPEC §1) on its own path, not only
// through ToMercator: a point at ±89° projects where one at ±MaxLatDeg does,
// at Mercator Y = ±πR. Hand-computed: at pitch 0 and heading 0 with the user
// at the principal point, y = cy − s·(Y − Y_U) exactly as the map is drawn.
func TestProjectClampsLatitude(t *testing.T) {
	for _, sign := range []float64{1, -1} {
		c := viewport.Camera{LatDeg: sign * 85, LonDeg: 0, Zoom: 12, Device: viewport.NewDevice(400, 800, 60)}
		v := mustPrepare(t, c)
		uY := viewport.ToMercator(c.User()).Y
		wantY := 400 - v.ScalePxPerM()*(sign*math.Pi*viewport.EarthRadiusM-uY)
		for _, lat := range []float64{sign * 89, sign * 90, sign * viewport.MaxLatDeg} {
			p := orb.Point{0, lat}
			got := v.Project(p)
			const tol = 1e-6 // px: a few roundings of Mercator metres ≈ 2e7 at s ≈ 0.026 px/m
			if d := math.Abs(got.Y - wantY); d > tol {
				t.Errorf("Project(%v).Y = %.17g, want %.17g at Y = %vπR (off by %.3g px, tolerance %g)", p, got.Y, wantY, sign, d, tol)
			}
			if m := v.ProjectMercator(viewport.ToMercator(p)); got != m {
				t.Errorf("Project(%v) = %+v, want ProjectMercator(ToMercator) = %+v", p, got, m)
			}
		}
	}
}

// Insets that differ left and right bound the clear area each on its own
// side: with inset_left 60 and inset_right 10 on a 400 px wide screen the
// clear columns are [60, 390]. Hand-computed margins of pixels on the
// middle row (y 400, 400 px from top and bottom): x 30 is 30 px left of
// the left edge (−30), x 385 is 5 px inside the right edge (5), x 395 is
// 5 px beyond it (−5), x 65 is 5 px inside the left edge (5).
func TestClearAreaInsetsLeftRight(t *testing.T) {
	d := viewport.NewDevice(400, 800, 60)
	d.InsetLeftPx, d.InsetRightPx = 60, 10
	for _, pitch := range []float64{0, 45} {
		v := mustPrepare(t, viewport.Camera{LatDeg: 10, LonDeg: 20, HeadingDeg: 30, PitchDeg: pitch, Zoom: 15, Device: d})
		if l, tp, r, b := v.ClearArea(); l != 60 || r != 390 || tp != 0 || b != 800 {
			t.Fatalf("ClearArea() = %v, %v, %v, %v, want 60, 0, 390, 800", l, tp, r, b)
		}
		for _, c := range []struct{ x, margin float64 }{{30, -30}, {65, 5}, {385, 5}, {395, -5}} {
			m := mustUnproject(t, &v, c.x, 400)
			sp := v.ProjectMercator(m)
			tol := roundTripTolPx(&v, m, sp, 0)
			if dm := math.Abs(sp.MarginPx - c.margin); dm > tol {
				t.Errorf("pitch %v: Project(Unproject(%v, 400)).MarginPx = %.17g, want %v (off by %.3g px, tolerance %.3g)", pitch, c.x, sp.MarginPx, c.margin, dm, tol)
			}
			if sp.InView() != (c.margin >= 0) || v.InView(m) != (c.margin >= 0) {
				t.Errorf("pitch %v: pixel (%v, 400): in view %v (InView %v), want %v", pitch, c.x, sp.InView(), v.InView(m), c.margin >= 0)
			}
		}
		fp := v.Footprint()
		for i, x := range []float64{60, 390, 390, 60} {
			sp := v.ProjectMercator(fp.Mercator[i])
			if tol := roundTripTolPx(&v, fp.Mercator[i], sp, 0); math.Abs(sp.X-x) > tol {
				t.Errorf("pitch %v: footprint vertex %d at x = %.17g, want %v (tolerance %.3g)", pitch, i, sp.X, x, tol)
			}
		}
	}
}

// A far row exactly on the clear area's bottom row leaves nothing in view:
// the footprint is empty (SPEC §2: y_far at or below the bottom row). The
// bottom inset is chosen, to the last bit, so that the bottom row is the
// far row of the worked camera (y_far = 40).
func TestFootprintEmptyWhenFarRowIsTheBottom(t *testing.T) {
	c := tiltedCamera(0)
	v := mustPrepare(t, c)
	far := v.FarRowPx()
	inset := c.Device.HeightPx - far
	for i := 0; i < 8 && c.Device.HeightPx-inset != far; i++ {
		inset = math.Nextafter(inset, inset+(c.Device.HeightPx-inset-far))
	}
	c.Device.InsetBottomPx = inset
	v = mustPrepare(t, c)
	if _, _, _, b := v.ClearArea(); b != v.FarRowPx() {
		t.Fatalf("bottom row %.17g, far row %.17g: want them equal", b, v.FarRowPx())
	}
	if fp := v.Footprint(); !fp.Empty || fp.AreaM2 != 0 || fp.VisibleRadiusM != 0 {
		t.Errorf("Footprint(far row on the bottom row) = %+v, want empty, area 0, radius 0", fp)
	}
}

// Top and bottom insets bound the clear area's rows on their own sides:
// with inset_top 20 and inset_bottom 30 on an 800 px high screen the clear
// rows are [20, 770]. Hand-computed margins on the middle column (x 200,
// 200 px from either side): y 10 is 10 px above the top edge (−10), y 775
// is 5 px below the bottom edge (−5), y 765 is 5 px inside it (5).
func TestClearAreaInsetsTopBottom(t *testing.T) {
	d := viewport.NewDevice(400, 800, 60)
	d.InsetTopPx, d.InsetBottomPx = 20, 30
	v := mustPrepare(t, viewport.Camera{LatDeg: 10, LonDeg: 20, HeadingDeg: 30, Zoom: 15, Device: d})
	if l, tp, r, b := v.ClearArea(); l != 0 || r != 400 || tp != 20 || b != 770 {
		t.Fatalf("ClearArea() = %v, %v, %v, %v, want 0, 20, 400, 770", l, tp, r, b)
	}
	for _, c := range []struct{ y, margin float64 }{{10, -10}, {775, -5}, {765, 5}} {
		m := mustUnproject(t, &v, 200, c.y)
		sp := v.ProjectMercator(m)
		tol := roundTripTolPx(&v, m, sp, 0)
		if dm := math.Abs(sp.MarginPx - c.margin); dm > tol {
			t.Errorf("Project(Unproject(200, %v)).MarginPx = %.17g, want %v (off by %.3g px, tolerance %.3g)", c.y, sp.MarginPx, c.margin, dm, tol)
		}
	}
}
