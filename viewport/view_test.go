package viewport_test

import (
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/props"
	"github.com/viewspec/viewspec/viewport"
)

// mercUlpM is the float64 resolution of Mercator coordinates near the given
// points, in metres: 32 ulp of the largest |X|+|Y| (T, the point and their
// difference each round once per coordinate, and placement adds a few more).
// Far from the origin at zoom 20+ the coordinates themselves, not the
// formulas, set the floor of every comparison.
func mercUlpM(ms ...viewport.Mercator) float64 {
	var big float64
	for _, m := range ms {
		big = math.Max(big, math.Abs(m.X)+math.Abs(m.Y))
	}
	return 32 * (math.Nextafter(big+1, math.Inf(1)) - (big + 1))
}

// roundTripTolPx is 1e-6 px plus the Mercator resolution near m carried
// through the projection to pixel sp: a ground-frame error e (world px)
// moves the pixel by e·f/depth directly and, through depth = f + v·sin θ,
// by |pixel − principal point|·e·sin θ/depth (the near rows of a steep view
// divide by a small depth).
func roundTripTolPx(v *viewport.View, m viewport.Mercator, sp viewport.ScreenPoint, extraM float64) float64 {
	e := (mercUlpM(m, v.Target()) + extraM) * v.ScalePxPerM()
	c := v.Camera()
	off := math.Abs(sp.X-c.Device.WidthPx/2) + math.Abs(sp.Y-c.Device.HeightPx/2)
	sinP := math.Sin(c.PitchDeg * math.Pi / 180)
	return 1e-6 + e*v.FocalPx()/sp.DepthPx + off*e*sinP/sp.DepthPx
}

func mustPrepare(t interface {
	Helper()
	Fatalf(string, ...any)
}, c viewport.Camera) viewport.View {
	t.Helper()
	v, err := viewport.Prepare(c)
	if err != nil {
		t.Fatalf("Prepare(%+v): %v", c, err)
	}
	return v
}

// clearPixel draws a pixel inside the clear area and below the far row.
func clearPixel(t *rapid.T, v *viewport.View) viewport.Pixel {
	l, tp, r, b := v.ClearArea()
	top := math.Max(tp, v.FarRowPx())
	if top >= b {
		t.Skip("empty footprint")
	}
	return viewport.Pixel{
		X: rapid.Float64Range(l, r).Draw(t, "x"),
		Y: rapid.Float64Range(top, b).Draw(t, "y"),
	}
}

// Unprojecting a pixel below the horizon and projecting the ground point
// back lands on the same pixel within 1e-6 px.
func TestUnprojectProjectRoundTrip(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		// Away from the poles' clamp and at zooms where the world is wider
		// than float64 resolution allows at this precision.
		if math.Abs(c.LatDeg) > 84 {
			t.Skip("latitude clamped")
		}
		v := mustPrepare(t, c)
		if v.Wrapped() {
			t.Skip("view wider than half the world")
		}
		px := clearPixel(t, &v)
		m, ok := v.UnprojectMercator(px)
		if !ok {
			t.Fatalf("Unproject(%v) found no ground below the far row", px)
		}
		sp := v.ProjectMercator(m)
		if !sp.HasPixel() {
			t.Fatalf("Project(Unproject(%v)) has no pixel", px)
		}
		if d, tol := math.Hypot(sp.X-px.X, sp.Y-px.Y), roundTripTolPx(&v, m, sp, 0); d > tol {
			t.Fatalf("Project(Unproject(%v)) = %v, off by %.3g px, tolerance %.3g px", px, sp.Pixel(), d, tol)
		}
	})
}

// The round trip through latitude and longitude keeps the pixel too, at the
// precision the conversion to degrees and back carries: the inverse
// Mercator's 2·atan(e^(y/R)) − π/2 loses up to a few ulp of π/2 radians,
// R·4·ulp(π/2) ≈ 6 nm on the ground, more in Y by sec φ.
func TestUnprojectProjectRoundTripLatLon(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		if math.Abs(c.LatDeg) > 84 {
			t.Skip("latitude clamped")
		}
		v := mustPrepare(t, c)
		if v.Wrapped() {
			t.Skip("view wider than half the world")
		}
		px := clearPixel(t, &v)
		p, ok := v.Unproject(px)
		if !ok {
			t.Fatalf("Unproject(%v) found no ground", px)
		}
		if math.Abs(p[1]) >= viewport.MaxLatDeg {
			t.Skip("ground point beyond the Mercator limit")
		}
		m := viewport.ToMercator(p)
		sp := v.Project(p)
		ulpHalfPi := math.Nextafter(math.Pi/2, 4) - math.Pi/2
		extraM := 4 * ulpHalfPi * viewport.EarthRadiusM * (1 + 1/math.Cos(p[1]*math.Pi/180))
		tol := roundTripTolPx(&v, m, sp, extraM)
		if d := math.Hypot(sp.X-px.X, sp.Y-px.Y); d > tol {
			t.Fatalf("Project(Unproject(%v)) = %v, off by %.3g px, tolerance %.3g px", px, sp.Pixel(), d, tol)
		}
	})
}

// The user projects to the anchor pixel.
func TestUserAtAnchor(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		v := mustPrepare(t, c)
		if v.Wrapped() {
			t.Skip("view wider than half the world")
		}
		sp := v.ProjectMercator(v.UserMercator())
		want := viewport.Pixel{X: c.Device.AnchorX * c.Device.WidthPx, Y: c.Device.AnchorY * c.Device.HeightPx}
		tol := roundTripTolPx(&v, v.UserMercator(), sp, 0)
		if !sp.HasPixel() || math.Hypot(sp.X-want.X, sp.Y-want.Y) > tol {
			t.Fatalf("Project(user) = %+v, want anchor %v within %.3g px", sp, want, tol)
		}
	})
}

// The footprint's vertices project to the clear area's corners, with the
// far edge at the top of the clear area or the far cut.
func TestFootprintVerticesAtCorners(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		v := mustPrepare(t, c)
		fp := v.Footprint()
		if fp.Wrapped {
			t.Skip("footprint wider than half the world")
		}
		l, tp, r, b := v.ClearArea()
		far := math.Max(tp, v.FarRowPx())
		if fp.Empty {
			if far < b {
				t.Fatalf("footprint empty with far row %v above near row %v", far, b)
			}
			return
		}
		want := [4]viewport.Pixel{{X: l, Y: b}, {X: r, Y: b}, {X: r, Y: far}, {X: l, Y: far}}
		for i, m := range fp.Mercator {
			sp := v.ProjectMercator(m)
			tol := roundTripTolPx(&v, m, sp, 0)
			if !sp.HasPixel() || math.Hypot(sp.X-want[i].X, sp.Y-want[i].Y) > tol {
				t.Fatalf("vertex %d projects to %+v, want %v within %.3g px", i, sp, want[i], tol)
			}
		}
	})
}

// groundLenM is the ground length in metres of the Mercator segment a–b at
// the user's latitude.
func groundLenM(a, b viewport.Mercator, latDeg float64) float64 {
	return math.Hypot(a.X-b.X, a.Y-b.Y) * viewport.GroundScale(latDeg)
}

// At pitch 0 the footprint is a rectangle whose sides are the clear area's
// size in ground metres at the user's latitude.
func TestPitchZeroRectangle(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		c.PitchDeg = 0
		v := mustPrepare(t, c)
		fp := v.Footprint()
		l, tp, r, b := v.ClearArea()
		mpp := viewport.GroundMPerPx(c.LatDeg, c.Zoom, c.Device.TilePx)
		wantW, wantH := (r-l)*mpp, (b-tp)*mpp
		m := fp.Mercator
		sides := [4]float64{wantW, wantH, wantW, wantH}
		for i := range 4 {
			got := groundLenM(m[i], m[(i+1)%4], c.LatDeg)
			if math.Abs(got-sides[i]) > 1e-9*sides[i]+mercUlpM(m[:]...) {
				t.Fatalf("side %d = %.12g m, want %.12g m", i, got, sides[i])
			}
		}
		// Right angles: the diagonals are equal.
		d1 := groundLenM(m[0], m[2], c.LatDeg)
		d2 := groundLenM(m[1], m[3], c.LatDeg)
		if math.Abs(d1-d2) > 1e-9*d1+mercUlpM(m[:]...) {
			t.Fatalf("diagonals %.12g and %.12g m differ: not a rectangle", d1, d2)
		}
		if want := wantW * wantH; math.Abs(fp.AreaM2-want) > 1e-9*want {
			t.Fatalf("AreaM2 = %.12g, want %.12g", fp.AreaM2, want)
		}
	})
}

// rotate returns m turned clockwise by deg about centre, in the Mercator
// plane (a heading grows clockwise, so the map content turns with it).
func rotate(m, centre viewport.Mercator, deg float64) viewport.Mercator {
	s, c := math.Sincos(deg * math.Pi / 180)
	dx, dy := m.X-centre.X, m.Y-centre.Y
	return viewport.Mercator{X: centre.X + dx*c + dy*s, Y: centre.Y - dx*s + dy*c}
}

// Turning the heading by δ turns the footprint by δ about the user.
func TestHeadingTurnsFootprint(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		c.LonDeg = rapid.Float64Range(-170, 170).Draw(t, "lon_inland")
		if math.Abs(c.LatDeg) > 84 {
			t.Skip("latitude clamped")
		}
		delta := rapid.Float64Range(-360, 360).Draw(t, "delta_deg")
		c2 := c
		c2.HeadingDeg = math.Mod(c.HeadingDeg+delta+720, 360)
		v1, v2 := mustPrepare(t, c), mustPrepare(t, c2)
		f1, f2 := v1.Footprint(), v2.Footprint()
		if f1.Empty != f2.Empty {
			t.Fatalf("emptiness changed with heading")
		}
		if f1.Empty || f1.Wrapped {
			return
		}
		scale := v1.ScalePxPerM()
		for i := range 4 {
			want := rotate(f1.Mercator[i], v1.UserMercator(), c2.HeadingDeg-c.HeadingDeg)
			got := f2.Mercator[i]
			if d := math.Hypot(got.X-want.X, got.Y-want.Y) * scale; d > 1e-6 {
				t.Fatalf("vertex %d off by %.3g px after turning by %v°", i, d, delta)
			}
		}
	})
}

// One zoom level more halves every side of the footprint at pitch 0.
func TestZoomHalvesSides(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		c.PitchDeg = 0
		c.Zoom = rapid.Float64Range(0, 29).Draw(t, "zoom")
		c2 := c
		c2.Zoom++
		v1, v2 := mustPrepare(t, c), mustPrepare(t, c2)
		f1, f2 := v1.Footprint(), v2.Footprint()
		for i := range 4 {
			a := math.Hypot(f1.Mercator[i].X-f1.Mercator[(i+1)%4].X, f1.Mercator[i].Y-f1.Mercator[(i+1)%4].Y)
			b := math.Hypot(f2.Mercator[i].X-f2.Mercator[(i+1)%4].X, f2.Mercator[i].Y-f2.Mercator[(i+1)%4].Y)
			if math.Abs(b-a/2) > 1e-9*a+mercUlpM(f1.Mercator[:]...) {
				t.Fatalf("side %d: %.12g m at zoom %v, %.12g m at zoom %v, want half", i, a, c.Zoom, b, c2.Zoom)
			}
		}
	})
}

// The far edge is longer than the near edge when tilted, equal at pitch 0.
func TestFarEdgeWider(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		v := mustPrepare(t, c)
		fp := v.Footprint()
		if fp.Empty {
			return
		}
		m := fp.Mercator
		near := math.Hypot(m[1].X-m[0].X, m[1].Y-m[0].Y)
		far := math.Hypot(m[2].X-m[3].X, m[2].Y-m[3].Y)
		tol := mercUlpM(m[:]...)
		if c.PitchDeg == 0 {
			if math.Abs(far-near) > 1e-12*near+tol {
				t.Fatalf("pitch 0: far edge %.12g, near edge %.12g, want equal", far, near)
			}
			return
		}
		// The widening is depth_far/depth_near − 1, about sin θ·(v_far −
		// v_near)/f; below a milli-degree it can fall under the float64
		// resolution of the edge, so there the edge need only not shrink.
		if far < near-tol || (c.PitchDeg >= 1e-3 && !(far > near)) {
			t.Fatalf("pitch %v: far edge %.12g not longer than near edge %.12g", c.PitchDeg, far, near)
		}
	})
}

// inTrapezoid reports whether m lies in the convex ring q (counter-
// clockwise), and how far (in Mercator metres) it is from the boundary.
func inTrapezoid(q [4]viewport.Mercator, m viewport.Mercator) (bool, float64) {
	in := true
	dist := math.Inf(1)
	for i := range 4 {
		a, b := q[i], q[(i+1)%4]
		ex, ey := b.X-a.X, b.Y-a.Y
		cross := ex*(m.Y-a.Y) - ey*(m.X-a.X)
		if cross < 0 {
			in = false
		}
		dist = math.Min(dist, math.Abs(cross)/math.Hypot(ex, ey))
	}
	return in, dist
}

// A point is inside the footprint exactly when it is in view, away from the
// decision margin.
func TestInViewIffInFootprint(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		c.LonDeg = rapid.Float64Range(-170, 170).Draw(t, "lon_inland")
		if math.Abs(c.LatDeg) > 84 {
			t.Skip("latitude clamped")
		}
		v := mustPrepare(t, c)
		fp := v.Footprint()
		if fp.Empty || fp.Wrapped {
			return
		}
		// A point near the footprint: a vertex blend pushed outward a little.
		var m viewport.Mercator
		var wsum float64
		for i := range 4 {
			w := rapid.Float64Range(0, 1).Draw(t, "w")
			m.X += w * fp.Mercator[i].X
			m.Y += w * fp.Mercator[i].Y
			wsum += w
		}
		if wsum == 0 {
			t.Skip("degenerate blend")
		}
		m.X /= wsum
		m.Y /= wsum
		push := rapid.Float64Range(-0.5, 0.5).Draw(t, "push")
		u := v.UserMercator()
		m.X += push * (m.X - u.X)
		m.Y += push * (m.Y - u.Y)
		// The copy of the point nearest the target, as Project sees it.
		if dx := m.X - v.Target().X; math.Abs(dx) >= math.Pi*viewport.EarthRadiusM {
			m.X -= math.Copysign(2*math.Pi*viewport.EarthRadiusM, dx)
		}
		in, distM := inTrapezoid(fp.Mercator, m)
		sp := v.ProjectMercator(m)
		if distM*v.ScalePxPerM() < 1e-6 || (sp.HasPixel() && math.Abs(sp.MarginPx) < 1e-6) {
			t.Skip("on the boundary")
		}
		if sp.InView() != in {
			t.Fatalf("in footprint = %v, InView = %v (margin %.3g px)", in, sp.InView(), sp.MarginPx)
		}
		if v.InView(m) != sp.InView() {
			t.Fatalf("InView = %v disagrees with Project's %v", v.InView(m), sp.InView())
		}
		if sp.HasPixel() && (sp.MarginPx >= 0) != sp.InView() {
			t.Fatalf("margin %.6g px has the wrong sign for InView = %v", sp.MarginPx, sp.InView())
		}
		d, ok := v.GroundDistM(&fp, m)
		if !ok || (in && d != 0) || (!in && !(d > 0)) {
			t.Fatalf("GroundDistM = %v, %v for a point with in = %v", d, ok, in)
		}
	})
}

// A point off every edge has a ground distance equal to its Mercator
// distance to the nearest edge, scaled at the user's latitude.
func TestGroundDistMStraightOut(t *testing.T) {
	c := viewport.Camera{LatDeg: 0, LonDeg: 0, Zoom: 16, Device: viewport.NewDevice(400, 800, 60)}
	v := mustPrepare(t, c)
	fp := v.Footprint()
	// At the equator, pitch 0, heading north: the rectangle spans
	// 400×800 px of 2.388657 m/px (156543.03392804097 / 2^16, the slippy-map
	// table's zoom-16 row computed exactly from 2πR/256). A point 100 m
	// north of the top edge is 100 m away.
	top := fp.Mercator[2].Y
	d, ok := v.GroundDistM(&fp, viewport.Mercator{X: 0, Y: top + 100})
	if !ok || math.Abs(d-100) > 1e-6 {
		t.Fatalf("GroundDistM(100 m north of the top edge) = %.9g, want 100 within 1 µm", d)
	}
	if d, _ := v.GroundDistM(&fp, viewport.ToMercator(orb.Point{0, 0})); d != 0 {
		t.Fatalf("GroundDistM(user) = %v, want 0", d)
	}
}

// The timeline's quick test: a sure answer is exactly ProjectMercator's,
// and its distance bound is at most the point's distance to the
// footprint's boundary (outside, a lower bound on the distance to the
// footprint; inside, the room to its edge), for points on, near and far
// from the footprint of any camera.
func TestQuickTestSureAndBound(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		v := mustPrepare(t, c)
		if v.Wrapped() {
			t.Skip("view wider than half the world")
		}
		fp := v.Footprint()
		if fp.Empty {
			t.Skip("empty footprint")
		}
		vs := fp.Mercator
		// A blend of the vertices, moved by up to a factor of the
		// footprint's size (from a nanometre's worth to twice its size).
		var m viewport.Mercator
		var wsum float64
		for _, p := range vs {
			w := rapid.SampledFrom([]float64{0, 0, 1, rapid.Float64Range(0, 1).Draw(t, "w")}).Draw(t, "weight")
			m.X += w * p.X
			m.Y += w * p.Y
			wsum += w
		}
		if wsum == 0 {
			m, wsum = vs[0], 1
		} else {
			m.X, m.Y = m.X/wsum, m.Y/wsum
		}
		size := math.Hypot(vs[2].X-vs[0].X, vs[2].Y-vs[0].Y)
		// Near the boundary, or anywhere up to a quarter of the world away
		// (the timeline asks the quick test of every marker).
		off := size * props.LogUniform(1e-12, 2).Draw(t, "offset")
		if rapid.Bool().Draw(t, "far") {
			off = size * props.LogUniform(1, max(2, math.Pi*viewport.EarthRadiusM/2/size)).Draw(t, "far_factor")
		}
		ang := rapid.Float64Range(0, 2*math.Pi).Draw(t, "angle")
		if rapid.Bool().Draw(t, "move") {
			m.X += off * math.Cos(ang)
			m.Y += off * math.Sin(ang)
		}
		// The copy of the point nearest T, the one ProjectMercator takes.
		tg := v.Target()
		m.X = tg.X + viewport.ShortDXM(m.X-tg.X)
		sure, in, distM, ok := viewport.QuickTest(&v, m)
		if !ok {
			t.Fatal("quick test found the footprint empty")
		}
		if !sure {
			return
		}
		if want := v.ProjectMercator(m).InView(); in != want {
			t.Fatalf("%v: quick test says in view %v, ProjectMercator %v", m, in, want)
		}
		// The distance to the boundary: the nearest of the four edges.
		edge := boundaryDistM(vs, m)
		if tol := 1e-9*(edge+size) + mercUlpM(m, v.Target()); distM > edge+tol {
			t.Fatalf("%v (in view %v): bound %.9g m beyond the distance to the boundary %.9g m", m, in, distM, edge)
		}
	})
}

// Placing one View again and again, changing some of the camera's inputs
// each time (as the drive timeline does), gives the very View that Prepare
// builds from scratch: the kept terms are the same numbers. An error leaves
// nothing kept.
func TestPlaceAgainIsPrepare(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		var v viewport.View
		c := props.Camera().Draw(t, "camera")
		for step := range rapid.IntRange(1, 6).Draw(t, "steps") {
			if step > 0 && rapid.Bool().Draw(t, "fail_step") {
				// The anchor near the top at pitch 88° is above the
				// horizon; the next step starts from the camera before.
				bad := c
				bad.Device.AnchorY, bad.PitchDeg = 0.02, 88
				if _, err := viewport.Prepare(bad); err == nil {
					t.Fatalf("step %d: %+v prepared, want an anchor error", step, bad)
				}
				if err := v.Place(bad); err == nil {
					t.Fatalf("step %d: %+v placed again, want an anchor error", step, bad)
				}
				continue
			}
			next := props.Camera().Draw(t, "next")
			// Keep each input group of the camera before with some chance.
			if rapid.Bool().Draw(t, "keep_device") {
				next.Device = c.Device
			}
			if rapid.Bool().Draw(t, "keep_pitch") {
				next.PitchDeg = c.PitchDeg
			}
			if rapid.Bool().Draw(t, "keep_zoom") {
				next.Zoom = c.Zoom
			}
			if rapid.Bool().Draw(t, "keep_heading") {
				next.HeadingDeg = c.HeadingDeg
			}
			if rapid.Bool().Draw(t, "keep_position") {
				next.LatDeg, next.LonDeg = c.LatDeg, c.LonDeg
			}
			c = next
			want, wantErr := viewport.Prepare(c)
			err := v.Place(c)
			if (err != nil) != (wantErr != nil) {
				t.Fatalf("step %d: placed again: %v; prepared: %v", step, err, wantErr)
			}
			if err == nil && v != want {
				t.Fatalf("step %d: placed again\n%+v\nprepared\n%+v", step, v, want)
			}
		}
	})
}

// boundaryDistM returns the distance from m to the nearest edge of the
// polygon vs (Mercator metres).
func boundaryDistM(vs [4]viewport.Mercator, m viewport.Mercator) float64 {
	best := math.Inf(1)
	for i := range vs {
		a, b := vs[i], vs[(i+1)%len(vs)]
		ex, ey := b.X-a.X, b.Y-a.Y
		s := 0.0
		if l2 := ex*ex + ey*ey; l2 > 0 {
			s = max(0, min(1, ((m.X-a.X)*ex+(m.Y-a.Y)*ey)/l2))
		}
		best = min(best, math.Hypot(m.X-a.X-s*ex, m.Y-a.Y-s*ey))
	}
	return best
}

// BindingEdge names the edge MarginPx measures to. Hand-computed on a
// 400 × 800 px, 60° screen at pitch 60° (horizon row 0, far row 40, see
// horizon_test.go) with a 60 px left inset: the pixel (30, 500) is left of
// the clear area, (200, 20) beyond the far limit.
func TestBindingEdge(t *testing.T) {
	d := viewport.NewDevice(400, 800, 60)
	d.InsetLeftPx = 60
	v, err := viewport.Prepare(viewport.Camera{LatDeg: 10, LonDeg: 20, PitchDeg: 60, Zoom: 15, Device: d})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		x, y float64
		want string
	}{
		{30, 500, "left edge: x 30.0 px < 60.0 px"},
		{200, 20, "far limit: depth "},
		{200, 795, "bottom edge: y 795.0 px ≤ 800.0 px"},
	} {
		m, ok := v.UnprojectMercator(viewport.Pixel{X: c.x, Y: c.y})
		if !ok {
			t.Fatalf("(%v, %v) sees no ground", c.x, c.y)
		}
		if got := v.BindingEdge(v.ProjectMercator(m)); !strings.HasPrefix(got, c.want) {
			t.Errorf("BindingEdge at (%v, %v) = %q, want it to start %q", c.x, c.y, got, c.want)
		}
	}
	far := v.BindingEdge(v.ProjectMercator(mustUnproject(t, &v, 200, 20)))
	// Hand-computed: k·f = 10 × 400/tan 30° = 4000√3 = 6928.2 px.
	if !strings.Contains(far, "> k·f 6928.2 px") {
		t.Errorf("beyond the far limit: %q, want depth > k·f 6928.2 px", far)
	}
}

func mustUnproject(t *testing.T, v *viewport.View, x, y float64) viewport.Mercator {
	t.Helper()
	m, ok := v.UnprojectMercator(viewport.Pixel{X: x, Y: y})
	if !ok {
		t.Fatalf("(%v, %v) sees no ground", x, y)
	}
	return m
}

// GroundDistM off a side and off a corner of a turned footprint at
// latitude 60°, where a Mercator metre is half a ground metre. Hand-computed
// in the Mercator plane with the heading's forward F = (sin h, cos h) and
// right Rt = (cos h, −sin h): a point 70 m along Rt from the middle of the
// right edge is 70 m from it (35 ground metres); one 100 m along F and 50 m
// along Rt from the far-right corner is hypot(100, 50) m from that corner.
func TestGroundDistMOffSideAndCorner(t *testing.T) {
	c := viewport.Camera{LatDeg: 60, LonDeg: 10, HeadingDeg: 30, Zoom: 16, Device: viewport.NewDevice(400, 800, 60)}
	v := mustPrepare(t, c)
	fp := v.Footprint()
	h := 30 * math.Pi / 180
	F := [2]float64{math.Sin(h), math.Cos(h)}
	Rt := [2]float64{math.Cos(h), -math.Sin(h)}
	g := viewport.GroundScale(60)
	nr, fr := fp.Mercator[1], fp.Mercator[2] // near-right, far-right
	for _, c := range []struct {
		desc string
		p    viewport.Mercator
		want float64
	}{
		{"70 m off the right side", viewport.Mercator{X: (nr.X+fr.X)/2 + 70*Rt[0], Y: (nr.Y+fr.Y)/2 + 70*Rt[1]}, 70 * g},
		{"off the far-right corner", viewport.Mercator{X: fr.X + 100*F[0] + 50*Rt[0], Y: fr.Y + 100*F[1] + 50*Rt[1]}, math.Hypot(100, 50) * g},
	} {
		d, ok := v.GroundDistM(&fp, c.p)
		const tol = 1e-6 // m: Mercator coordinates near 1e7 m carry 2e-9 m
		if !ok || math.Abs(d-c.want) > tol {
			t.Errorf("GroundDistM(%s) = %.9g, want %.9g (off by %.3g m, tolerance %g m)", c.desc, d, c.want, d-c.want, tol)
		}
	}
}

// The quick test's distance is the distance to the footprint's line for a
// point straight out from the middle of a side: 50 Mercator metres out
// from the left and the right side of a tilted, turned footprint, inside
// the near and far rows, is 50 m from the footprint (hand-computed: the
// foot of the perpendicular is the side's midpoint).
func TestQuickTestDistanceOffTheSides(t *testing.T) {
	d := viewport.NewDevice(400, 800, 60)
	d.InsetLeftPx = 60
	v := mustPrepare(t, viewport.Camera{LatDeg: 20, LonDeg: 5, HeadingDeg: 30, PitchDeg: 50, Zoom: 16, Device: d})
	vs := v.Footprint().Mercator
	for _, side := range []struct {
		desc string
		a, b viewport.Mercator // the side, from near to far
		out  float64           // +1: its outside is to the left of a→b
	}{{"left", vs[0], vs[3], 1}, {"right", vs[1], vs[2], -1}} {
		ex, ey := side.b.X-side.a.X, side.b.Y-side.a.Y
		n := math.Hypot(ex, ey)
		// (−ey, ex)/n is the left normal of a→b.
		p := viewport.Mercator{X: (side.a.X+side.b.X)/2 - side.out*50*ey/n, Y: (side.a.Y+side.b.Y)/2 + side.out*50*ex/n}
		sure, in, distM, ok := viewport.QuickTest(&v, p)
		const tol = 1e-6 // m: Mercator coordinates near 2e6 m carry 3e-10 m, the sums a few times that
		if !ok || !sure || in || math.Abs(distM-50) > tol {
			t.Errorf("QuickTest(50 m out from the %s side) = sure %v, in %v, %.9g m, want sure, out, 50 m (off by %.3g m, tolerance %g m)",
				side.desc, sure, in, distM, distM-50, tol)
		}
	}
}

// A view is wrapped when the screen shows ground half the world's width
// or more east or west of T (SPEC §2). Hand-computed at pitch 0, where a
// screen corner lies (x − cx, cy − y) world pixels from T: heading 0 puts
// the corners W/2 px east or west, heading 90° puts them H/2 px; at zoom 1
// half the world is 256·2/2 = 256 px. So 512 px across is wrapped and
// 510 px is not; the far ratio (next to 1 here) does not enter at pitch 0.
func TestWrappedAtHalfTheWorld(t *testing.T) {
	for _, c := range []struct {
		w, h, headingDeg float64
		want             bool
	}{
		{512, 256, 0, true}, {510, 256, 0, false},
		{256, 512, 90, true}, {256, 510, 90, false},
		{512, 100, 180, true}, {100, 512, 270, true},
	} {
		d := viewport.NewDevice(c.w, c.h, 60)
		d.FarRatio = 1.0000001
		v := mustPrepare(t, viewport.Camera{LatDeg: 0, LonDeg: 0, HeadingDeg: c.headingDeg, Zoom: 1, Device: d})
		if got := v.Wrapped(); got != c.want {
			t.Errorf("Wrapped(%v × %v px, heading %v°, zoom 1) = %v, want %v", c.w, c.h, c.headingDeg, got, c.want)
		}
	}
}

// A tilted view is wrapped by its far corners. Hand-computed with SPEC §2's
// worked camera (400 × 800 px, fov_y 60°, pitch 60°, far ratio 10): the
// far row y = 40 lies v = 7200 world px ahead of T and the bottom row
// v = 400 behind, so heading east (90°) the far corners are 7200 px east
// of T: half the world is 128·2^5 = 4096 px at zoom 5 (wrapped) and 8192
// px at zoom 6 (not).
func TestWrappedByTheFarCorners(t *testing.T) {
	for _, c := range []struct {
		zoom float64
		want bool
	}{{5, true}, {6, false}} {
		v := mustPrepare(t, viewport.Camera{HeadingDeg: 90, PitchDeg: 60, Zoom: c.zoom, Device: viewport.NewDevice(400, 800, 60)})
		if got := v.Wrapped(); got != c.want {
			t.Errorf("Wrapped(pitch 60°, heading 90°, zoom %v) = %v, want %v", c.zoom, got, c.want)
		}
	}
}

// The two decisions at their edges (SPEC §2, §6): depth 0 has no pixel
// (depth ≤ 0); a margin of 0 is in view (margin ≥ 0).
func TestScreenPointEdges(t *testing.T) {
	if (viewport.ScreenPoint{DepthPx: 0}).HasPixel() {
		t.Errorf("ScreenPoint{DepthPx: 0}.HasPixel() = true, want false")
	}
	if !(viewport.ScreenPoint{DepthPx: 1, MarginPx: 0}).InView() {
		t.Errorf("ScreenPoint{MarginPx: 0}.InView() = false, want true")
	}
}

// BindingEdge names the edge a screen point's margin measures to, with
// the comparison as it stands, for points on either side of each edge and
// on it (an edge is in view: ≥ and ≤). Hand-made screen points on a 400 ×
// 800 px screen with insets 60, 10, 20, 30 (left, right, top, bottom): the
// clear area is [60, 390] × [20, 770]; at pitch 0 no far row binds. The
// far limit on the worked camera of SPEC §2 (pitch 60°, y_far = 40,
// k·f = 4000√3 = 6928.2 px).
func TestBindingEdgeEveryEdge(t *testing.T) {
	d := viewport.NewDevice(400, 800, 60)
	d.InsetLeftPx, d.InsetRightPx, d.InsetTopPx, d.InsetBottomPx = 60, 10, 20, 30
	flat := mustPrepare(t, viewport.Camera{LatDeg: 10, LonDeg: 20, Zoom: 15, Device: d})
	tilted := mustPrepare(t, viewport.Camera{LatDeg: 10, LonDeg: 20, PitchDeg: 60, Zoom: 15, Device: viewport.NewDevice(400, 800, 60)})
	for _, c := range []struct {
		v    *viewport.View
		s    viewport.ScreenPoint
		want string
	}{
		{&flat, viewport.ScreenPoint{X: 30, Y: 400, DepthPx: 1}, "left edge: x 30.0 px < 60.0 px"},
		{&flat, viewport.ScreenPoint{X: 30, Y: 100, DepthPx: 1}, "left edge: x 30.0 px < 60.0 px"}, // −30 against the top's 80
		{&flat, viewport.ScreenPoint{X: 70, Y: 10, DepthPx: 1}, "top edge: y 10.0 px < 20.0 px"},   // −10 against the left's 10
		{&flat, viewport.ScreenPoint{X: 60, Y: 20, DepthPx: 1}, "left edge: x 60.0 px ≥ 60.0 px"},  // a tie: the first edge
		{&flat, viewport.ScreenPoint{X: 60, Y: 400, DepthPx: 1}, "left edge: x 60.0 px ≥ 60.0 px"},
		{&flat, viewport.ScreenPoint{X: 70, Y: 400, DepthPx: 1}, "left edge: x 70.0 px ≥ 60.0 px"},
		{&flat, viewport.ScreenPoint{X: 395, Y: 400, DepthPx: 1}, "right edge: x 395.0 px > 390.0 px"},
		{&flat, viewport.ScreenPoint{X: 390, Y: 400, DepthPx: 1}, "right edge: x 390.0 px ≤ 390.0 px"},
		{&flat, viewport.ScreenPoint{X: 385, Y: 400, DepthPx: 1}, "right edge: x 385.0 px ≤ 390.0 px"},
		{&flat, viewport.ScreenPoint{X: 200, Y: 10, DepthPx: 1}, "top edge: y 10.0 px < 20.0 px"},
		{&flat, viewport.ScreenPoint{X: 200, Y: 20, DepthPx: 1}, "top edge: y 20.0 px ≥ 20.0 px"},
		{&flat, viewport.ScreenPoint{X: 200, Y: 25, DepthPx: 1}, "top edge: y 25.0 px ≥ 20.0 px"},
		{&flat, viewport.ScreenPoint{X: 200, Y: 775, DepthPx: 1}, "bottom edge: y 775.0 px > 770.0 px"},
		{&flat, viewport.ScreenPoint{X: 200, Y: 770, DepthPx: 1}, "bottom edge: y 770.0 px ≤ 770.0 px"},
		{&flat, viewport.ScreenPoint{X: 200, Y: 765, DepthPx: 1}, "bottom edge: y 765.0 px ≤ 770.0 px"},
		{&tilted, viewport.ScreenPoint{X: 200, Y: 30, DepthPx: 7000}, "far limit: depth 7000.0 px > k·f 6928.2 px"},
		{&tilted, viewport.ScreenPoint{X: 200, Y: 45, DepthPx: 6000}, "far limit: depth 6000.0 px ≤ k·f 6928.2 px"},
		{&tilted, viewport.ScreenPoint{X: 200, Y: 400, DepthPx: 0}, "behind the camera: depth 0.0 px ≤ 0"},
		{&tilted, viewport.ScreenPoint{X: 200, Y: 40, DepthPx: 10 * tilted.FocalPx()}, "far limit: depth 6928.2 px ≤ k·f 6928.2 px"},
	} {
		if got := c.v.BindingEdge(c.s); got != c.want {
			t.Errorf("BindingEdge(%+v) = %q, want %q", c.s, got, c.want)
		}
	}
}

// Moving a view is placing it for the same device: the same View, to the
// bit, as Prepare gives, the same errors, and after an error the view is
// not placed until Place or Prepare places it again.
func TestMoveIsPrepare(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		v, err := viewport.Prepare(c)
		if err != nil {
			t.Skip("an anchor above the horizon: nothing to move")
		}
		placed := true
		for step := range rapid.IntRange(1, 6).Draw(t, "steps") {
			next := props.Camera().Draw(t, "next")
			next.Device = c.Device
			for _, keep := range []struct {
				name     string
				from, to *float64
			}{{"keep_pitch", &c.PitchDeg, &next.PitchDeg}, {"keep_zoom", &c.Zoom, &next.Zoom},
				{"keep_heading", &c.HeadingDeg, &next.HeadingDeg}, {"keep_lat", &c.LatDeg, &next.LatDeg}, {"keep_lon", &c.LonDeg, &next.LonDeg}} {
				if rapid.Bool().Draw(t, keep.name) {
					*keep.to = *keep.from
				}
			}
			if rapid.IntRange(0, 5).Draw(t, "bad") == 0 {
				// One field out of range (the values are hand-picked
				// just outside each range, or NaN).
				bad := rapid.SampledFrom([]struct {
					p *float64
					v float64
				}{{&next.LatDeg, 90.000001}, {&next.LonDeg, -180.5}, {&next.HeadingDeg, 360}, {&next.PitchDeg, 90},
					{&next.Zoom, 30.1}, {&next.Zoom, math.NaN()}, {&next.LatDeg, math.Inf(-1)}}).Draw(t, "which")
				*bad.p = bad.v
			}
			want, wantErr := viewport.Prepare(next)
			err := v.Move(next.LatDeg, next.LonDeg, next.HeadingDeg, next.PitchDeg, next.Zoom)
			switch {
			case !placed:
				if err == nil {
					t.Fatalf("step %d: moved a view left unplaced by an error", step)
				}
				if err = v.Place(next); (err != nil) != (wantErr != nil) {
					t.Fatalf("step %d: placed: %v; prepared: %v", step, err, wantErr)
				}
			case (err != nil) != (wantErr != nil):
				t.Fatalf("step %d: moved: %v; prepared: %v", step, err, wantErr)
			case err != nil && err.Error() != wantErr.Error():
				t.Fatalf("step %d: moved: %v; prepared: %v (the same error wanted)", step, err, wantErr)
			}
			if placed = err == nil; placed {
				if v != want {
					t.Fatalf("step %d: moved\n%+v\nprepared\n%+v", step, v, want)
				}
				c = next
			}
		}
	})
}

// A view never placed cannot be moved: there is no device to keep.
func TestMoveUnplaced(t *testing.T) {
	var v viewport.View
	if err := v.Move(0, 0, 0, 0, 10); err == nil {
		t.Fatalf("Move of a zero View = nil, want an error")
	}
}
