package render_test

import (
	"bytes"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// screenFrame is a screen picture's layout, read back from its root: pixel
// (x, y) is drawn at (ox + x·k, oy + y·k).
type screenFrame struct {
	ox, oy, k, w, h float64
}

func readScreenFrame(t testing.TB, root *node) screenFrame {
	t.Helper()
	return screenFrame{ox: root.float(t, "data-screen-origin-x"), oy: root.float(t, "data-screen-origin-y"),
		k: root.float(t, "data-units-per-px"), w: root.float(t, "data-width-px"), h: root.float(t, "data-height-px")}
}

func (f screenFrame) at(x, y float64) [2]float64 { return [2]float64{f.ox + x*f.k, f.oy + y*f.k} }

// screenMarkersScene is the demo markers with a few more placed to reach
// every state: behind the user (behind the camera at a steep pitch), far
// ahead (beyond the far limit), and off to the side.
func screenMarkersScene() []timeline.Marker {
	u := orb.Point{demoLon, demoLat}
	ms := demoMarkers()
	ms = append(ms,
		timeline.Marker{ID: "far-ahead", Point: offset(u, 2500, 4300)},
		timeline.Marker{ID: "just-left", Point: offset(u, -170, 60)},
		timeline.Marker{ID: "behind", Point: offset(u, -60, -110)},
		timeline.Marker{ID: "under-inset", Point: offset(u, 40, -40)},
	)
	return ms
}

// wantState is the state the package doc gives a reference screen point,
// recomputed here from the reference's answer.
func wantState(v *viewport.View, sp viewport.ScreenPoint) string {
	switch {
	case sp.DepthPx <= 0:
		return "behind-camera"
	case sp.MarginPx >= 0:
		return "in-view"
	case sp.Y < v.FarRowPx():
		return "beyond-far"
	}
	return "outside-clear"
}

// Every marker drawn on the screen sits at the pixel the reference
// projects it to (data-x, data-y exactly; the symbol within 1e-6 of a
// picture unit, or clamped into the margin when off the screen), in the
// state the reference's answer gives it; markers behind the camera are
// listed (#behind-camera) and not drawn.
func TestRenderScreenMarkersMatchReference(t *testing.T) {
	ms := screenMarkersScene()
	states := map[string]bool{}
	for _, tc := range cameraCases() {
		t.Run(tc.name, func(t *testing.T) {
			v := prepare(t, tc.cam)
			svg, err := render.ScreenSVG(v, render.Scene{Route: demoRoutePoints(), Markers: ms})
			if err != nil {
				t.Fatal(err)
			}
			root := parseXML(t, svg)
			f := readScreenFrame(t, root)
			d := tc.cam.Device
			if f.w != d.WidthPx || f.h != d.HeightPx {
				t.Fatalf("screen %v×%v px, the device %v×%v", f.w, f.h, d.WidthPx, d.HeightPx)
			}
			drawn := map[string]*node{}
			for _, g := range root.all(func(n *node) bool { return n.hasClass("marker") }) {
				drawn[g.get("data-id")] = g
			}
			caption := root.byID(t, "behind-camera").text()
			g0 := (44.0 - 12) / f.k // the pin box's reach beyond the screen, pixels
			for _, m := range ms {
				sp := v.Project(m.Point)
				st := wantState(v, sp)
				states[st] = true
				g, ok := drawn[m.ID]
				if st == "behind-camera" {
					if ok {
						t.Errorf("marker %q behind the camera is drawn", m.ID)
					}
					if !strings.Contains(caption, m.ID) {
						t.Errorf("marker %q behind the camera is not listed in #behind-camera %q", m.ID, caption)
					}
					continue
				}
				farOff := sp.X < -f.w || sp.X > 2*f.w || sp.Y < -f.h || sp.Y > 2*f.h
				if ok == farOff {
					t.Errorf("marker %q at pixel (%v, %v): drawn %v, more than a screen off %v", m.ID, sp.X, sp.Y, ok, farOff)
					continue
				}
				if !ok {
					continue
				}
				if gx, gy := g.float(t, "data-x"), g.float(t, "data-y"); gx != sp.X || gy != sp.Y {
					t.Errorf("marker %q: data-x, data-y = (%v, %v), the reference projects it to (%v, %v)", m.ID, gx, gy, sp.X, sp.Y)
				}
				if g.get("data-state") != st || !g.hasClass("state-"+st) {
					t.Errorf("marker %q: state %q (class %q), want %q", m.ID, g.get("data-state"), g.get("class"), st)
				}
				px := max(-g0, min(f.w+g0, sp.X))
				py := max(-g0, min(f.h+g0, sp.Y))
				if err := closePoints([][2]float64{translateOf(t, g.get("transform"))}, [][2]float64{f.at(px, py)}, unitTol); err != nil {
					t.Errorf("marker %q drawn: %v", m.ID, err)
				}
				if pinned := px != sp.X || py != sp.Y; pinned != g.hasClass("pinned") {
					t.Errorf("marker %q: class %q, pinned %v", m.ID, g.get("class"), pinned)
				}
			}
		})
	}
	for _, st := range []string{"in-view", "outside-clear", "beyond-far", "behind-camera"} {
		if !states[st] {
			t.Errorf("no case has a marker %s: the test proves less than it says", st)
		}
	}
}

// The footprint's vertices are drawn at the reference's pixels of its
// Mercator vertices, which lie on the clear area's sides and on its bottom
// row and max(top, far-limit row) (SPEC §2); the horizon and far rows are
// the reference's.
func TestRenderScreenFootprintMatchesReference(t *testing.T) {
	for _, tc := range cameraCases() {
		t.Run(tc.name, func(t *testing.T) {
			v := prepare(t, tc.cam)
			svg, err := render.ScreenSVG(v, render.Scene{})
			if err != nil {
				t.Fatal(err)
			}
			root := parseXML(t, svg)
			f := readScreenFrame(t, root)
			fp := v.Footprint()
			var want [][2]float64
			left, top, right, bottom := v.ClearArea()
			farRow := max(top, v.FarRowPx())
			// Near-left, near-right, far-right, far-left (SPEC §2).
			corners := [4][2]float64{{left, bottom}, {right, bottom}, {right, farRow}, {left, farRow}}
			for i, m := range fp.Mercator {
				sp := v.ProjectMercator(m)
				want = append(want, f.at(sp.X, sp.Y))
				// The vertex lands on its corner of the in-view region, up to
				// the unprojection's round trip (1e-6 px, SPEC §2's bound).
				if dx, dy := math.Abs(sp.X-corners[i][0]), math.Abs(sp.Y-corners[i][1]); dx > 1e-6 || dy > 1e-6 {
					t.Errorf("footprint vertex %d at pixel (%v, %v), want the corner %v (off by %.3g, %.3g px, tolerance 1e-6)", i, sp.X, sp.Y, corners[i], dx, dy)
				}
			}
			if err := closePoints(parsePoints(t, root.byID(t, "footprint").get("points")), want, unitTol); err != nil {
				t.Errorf("footprint: %v", err)
			}
			rows := root.all(func(n *node) bool { return n.get("id") == "far-row" })
			if far := v.FarRowPx(); far >= 0 && far <= f.h {
				if len(rows) != 1 || rows[0].float(t, "data-row-px") != far {
					t.Errorf("far row %v on the screen: drawn %d times", far, len(rows))
				}
			} else if len(rows) != 0 {
				t.Errorf("far row %v off the screen is drawn", far)
			}
			if h, ok := v.HorizonRowPx(); ok && h >= 0 && h <= f.h {
				if root.byID(t, "horizon").float(t, "data-row-px") != h {
					t.Errorf("horizon drawn at another row than %v", h)
				}
			}
			// The user is at the reference's pixel of the user; north turns with
			// the heading.
			u := v.ProjectMercator(v.UserMercator())
			if err := closePoints([][2]float64{translateOf(t, root.byID(t, "user").get("transform"))}, [][2]float64{f.at(u.X, u.Y)}, unitTol); err != nil {
				t.Errorf("user: %v", err)
			}
			if tr := root.byID(t, "north-arrow").get("transform"); !strings.HasSuffix(tr, "rotate("+strconv.FormatFloat(-tc.cam.HeadingDeg, 'g', -1, 64)+")") &&
				!(tc.cam.HeadingDeg == 0 && strings.HasSuffix(tr, "rotate(0)")) {
				t.Errorf("north arrow transform %q does not turn by −%g", tr, tc.cam.HeadingDeg)
			}
		})
	}
}

// The route is clipped on the ground at the far limit before it is
// projected: every drawn vertex unprojects to ground no deeper than k·f,
// and at or below the far row; and a pitched camera looking down a long
// road draws the road up to the far row.
func TestRenderScreenRouteClipped(t *testing.T) {
	for _, tc := range cameraCases() {
		t.Run(tc.name, func(t *testing.T) {
			v := prepare(t, tc.cam)
			u := orb.Point{tc.cam.LonDeg, tc.cam.LatDeg}
			h := tc.cam.HeadingDeg * math.Pi / 180
			// A road through the user along the heading, 200 km each way
			// (past the far limit of every case), longitudes wrapped.
			wrap := func(p orb.Point) orb.Point { p[0] = math.Remainder(p[0], 360); return p }
			const l = 200e3
			road := []orb.Point{wrap(offset(u, -l*math.Sin(h), -l*math.Cos(h))), u, wrap(offset(u, l*math.Sin(h), l*math.Cos(h)))}
			svg, err := render.ScreenSVG(v, render.Scene{Route: road})
			if err != nil {
				t.Fatal(err)
			}
			root := parseXML(t, svg)
			f := readScreenFrame(t, root)
			pts := pathPoints(t, root.byID(t, "route").get("d"))
			if len(pts) < 2 {
				t.Fatalf("route drawn with %d points", len(pts))
			}
			kf := tc.cam.Device.FarRatio * v.FocalPx()
			minY := math.Inf(1)
			for _, p := range pts {
				px := viewport.Pixel{X: (p[0] - f.ox) / f.k, Y: (p[1] - f.oy) / f.k}
				minY = min(minY, px.Y)
				m, ok := v.UnprojectMercator(px)
				if !ok {
					t.Errorf("route vertex at pixel %v is at or above the horizon", px)
					continue
				}
				// Written to 1e-7 of a unit, a vertex on the far row reads back up
				// to 1e-6 px above it, where a grazing view's depth grows fast:
				// so the test is on the row, and on the depth to 1e-6 relative.
				if d := v.ProjectMercator(m).DepthPx; d > kf*(1+1e-6) || px.Y < v.FarRowPx()-1e-6 {
					t.Errorf("route vertex at pixel %v has depth %v px beyond k·f = %v px (far row %v)", px, d, kf, v.FarRowPx())
				}
			}
			if far := v.FarRowPx(); far > 0 && math.Abs(minY-far) > 1e-6 {
				t.Errorf("route reaches up to row %v, want the far row %v (off by %.3g px, tolerance 1e-6)", minY, far, minY-far)
			}
		})
	}
}

// pathPoints reads the points of an SVG path of M and L commands.
func pathPoints(t testing.TB, d string) [][2]float64 {
	t.Helper()
	var out [][2]float64
	f := strings.Fields(d)
	for i := 0; i+1 < len(f); i += 2 {
		xs := strings.TrimLeft(f[i], "ML")
		x, err1 := strconv.ParseFloat(xs, 64)
		y, err2 := strconv.ParseFloat(f[i+1], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("path %q: %q %q", d, f[i], f[i+1])
		}
		out = append(out, [2]float64{x, y})
	}
	return out
}

// The scale bar on the user's row is a round ground length drawn at the
// pixels per ground metre along that row: recomputed here by projecting
// the user and a point 37 ground metres to the right of the heading.
func TestRenderScreenScaleBar(t *testing.T) {
	for _, tc := range cameraCases() {
		t.Run(tc.name, func(t *testing.T) {
			v := prepare(t, tc.cam)
			svg, err := render.ScreenSVG(v, render.Scene{})
			if err != nil {
				t.Fatal(err)
			}
			root := parseXML(t, svg)
			f := readScreenFrame(t, root)
			bar := root.byID(t, "scale-bar")
			lengthM := bar.float(t, "data-length-m")
			if !isRound(lengthM) {
				t.Errorf("scale bar %v m is not 1, 2 or 5 × 10ⁿ", lengthM)
			}
			um := v.UserMercator()
			g := viewport.GroundScale(tc.cam.LatDeg)
			h := tc.cam.HeadingDeg * math.Pi / 180
			d := 37 / g // Mercator metres of 37 ground metres
			a := v.ProjectMercator(um)
			b := v.ProjectMercator(viewport.Mercator{X: um.X + d*math.Cos(h), Y: um.Y - d*math.Sin(h)})
			perM := math.Hypot(b.X-a.X, b.Y-a.Y) / 37
			line := root.byID(t, "scale-bar-line")
			drawn := (line.float(t, "x2") - line.float(t, "x1")) / f.k
			if want := lengthM * perM; math.Abs(drawn-want) > 1e-6*max(1, want) {
				t.Errorf("scale bar of %v m drawn %v px long, want %v (off by %.3g px)", lengthM, drawn, want, drawn-want)
			}
			if y := (line.float(t, "y1") - f.oy) / f.k; math.Abs(y-a.Y) > unitTol {
				t.Errorf("scale bar on row %v, the user's row is %v", y, a.Y)
			}
		})
	}
}

// The same scene gives the same bytes, and the legend explains the codes
// drawn.
func TestRenderScreenDeterministicAndLegend(t *testing.T) {
	v := prepare(t, demoCamera())
	sc := render.Scene{Route: demoRoutePoints(), Markers: screenMarkersScene(), Shown: []string{"bakery"},
		Streets: []render.Street{{Name: "Harbour Road", Points: demoRoutePoints()}},
		Names:   map[string]string{"bakery": "Wren & Sons Bakery"}}
	a, err := render.ScreenSVG(v, sc)
	if err != nil {
		t.Fatal(err)
	}
	b, err := render.ScreenSVG(v, sc)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a, b) {
		t.Error("two pictures of the same scene differ")
	}
	root := parseXML(t, a)
	legend := root.byID(t, "legend").text()
	for _, want := range []string{"inset", "clear area", "footprint", "far limit", "horizon", "anchor", "street", "route",
		"marker in view", "outside the clear area", "beyond the far limit", "pinned", "shown", "north"} {
		if !strings.Contains(legend, want) {
			t.Errorf("legend lacks %q", want)
		}
	}
	if !strings.Contains(string(a), "Wren &amp; Sons Bakery") {
		t.Error("the bakery is not labelled with its name")
	}
	if _, err := render.ScreenSVG(v, render.Scene{Markers: []timeline.Marker{{ID: "x", Point: orb.Point{0, 91}}}}); err == nil {
		t.Error("a marker at latitude 91 is accepted")
	}
}
