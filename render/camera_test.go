package render_test

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// cameraCase is a camera to draw, with the options to draw it with.
type cameraCase struct {
	name string
	cam  viewport.Camera
	opts []render.Option
}

// cameraCases are the special cases of a plan view: heading wrap near 360,
// looking straight down, insets and an off-centre anchor, 512-pixel tiles,
// high latitude (cos φ small), a footprint across the antimeridian, a fixed
// span and a non-square map.
func cameraCases() []cameraCase {
	base := demoCamera()
	with := func(name string, f func(c *viewport.Camera), opts ...render.Option) cameraCase {
		c := base
		f(&c)
		return cameraCase{name, c, opts}
	}
	return []cameraCase{
		with("demo", func(*viewport.Camera) {}),
		with("straight-down", func(c *viewport.Camera) { c.PitchDeg = 0 }),
		with("heading-359.5", func(c *viewport.Camera) { c.HeadingDeg = 359.5 }),
		with("heading-0", func(c *viewport.Camera) { c.HeadingDeg = 0 }),
		with("steep-far", func(c *viewport.Camera) { c.PitchDeg = 75; c.Device.FarRatio = 30 }),
		with("anchor-left", func(c *viewport.Camera) { c.Device.AnchorX = 0.2; c.Device.InsetLeftPx = 80 }),
		with("tile-512", func(c *viewport.Camera) { c.Device.TilePx = 512; c.Zoom = 15.25 }),
		with("lat-70", func(c *viewport.Camera) { c.LatDeg = 70.5; c.LonDeg = 24.3 }),
		with("antimeridian", func(c *viewport.Camera) { c.LatDeg = -16.8; c.LonDeg = 179.9995; c.HeadingDeg = 90 }),
		with("antimeridian-west", func(c *viewport.Camera) { c.LatDeg = -16.8; c.LonDeg = -179.9995; c.HeadingDeg = 270 }),
		with("span-1500", func(*viewport.Camera) {}, render.WithSpanM(1500)),
		with("wide-map", func(c *viewport.Camera) { c.Zoom = 14 }, render.WithMapSize(900, 300)),
		with("zoom-22", func(c *viewport.Camera) { c.Zoom = 22 }),
	}
}

func prepare(t testing.TB, c viewport.Camera) *viewport.View {
	t.Helper()
	v, err := viewport.Prepare(c)
	if err != nil {
		t.Fatal(err)
	}
	return &v
}

// The footprint polygon's points are the reference's Mercator vertices
// (viewport.Footprint.Mercator) mapped through the frame the picture
// declares, recomputed here from the formula in the package doc; the frame
// is CameraFrame's, centred on the user, who is drawn at its origin.
func TestRenderCameraFootprintMatchesReference(t *testing.T) {
	for _, tc := range cameraCases() {
		t.Run(tc.name, func(t *testing.T) {
			v := prepare(t, tc.cam)
			svg, err := render.CameraSVG(v, demoRoutePoints(), demoMarkers(), nil, tc.opts...)
			if err != nil {
				t.Fatal(err)
			}
			root := parseXML(t, svg)
			if root.XMLName.Local != "svg" || root.XMLName.Space != "http://www.w3.org/2000/svg" {
				t.Fatalf("root element %v, want svg in the SVG namespace", root.XMLName)
			}
			f := readFrame(t, root)
			want, err := render.CameraFrame(v, tc.opts...)
			if err != nil {
				t.Fatal(err)
			}
			if f.cx != want.Center.X || f.cy != want.Center.Y || f.ox != want.OriginX || f.oy != want.OriginY ||
				f.k != want.UnitsPerM || f.g != want.GroundScale {
				t.Fatalf("declared frame %+v, CameraFrame says %+v", f, want)
			}
			if u := v.UserMercator(); f.cx != u.X || f.cy != u.Y {
				t.Errorf("frame centre (%v, %v), want the user's Mercator point %v", f.cx, f.cy, u)
			}
			if g := viewport.GroundScale(tc.cam.LatDeg); f.g != g {
				t.Errorf("ground scale %v, want cos φ_U = %v", f.g, g)
			}

			fp := v.Footprint()
			if fp.Empty {
				t.Fatal("case has an empty footprint")
			}
			poly := root.byID(t, "footprint")
			if poly.XMLName.Local != "polygon" {
				t.Fatalf("#footprint is <%s>, want <polygon>", poly.XMLName.Local)
			}
			var wantPts [][2]float64
			for _, m := range fp.Mercator {
				wantPts = append(wantPts, f.apply(m))
			}
			if err := closePoints(parsePoints(t, poly.get("points")), wantPts, unitTol); err != nil {
				t.Errorf("footprint: %v", err)
			}
			user := translateOf(t, root.byID(t, "user").get("transform"))
			if err := closePoints([][2]float64{user}, [][2]float64{{f.ox, f.oy}}, unitTol); err != nil {
				t.Errorf("user: %v", err)
			}
			if !strings.Contains(root.byID(t, "user").get("transform"), "rotate("+strconv.FormatFloat(tc.cam.HeadingDeg, 'g', -1, 64)+")") {
				t.Errorf("user transform %q does not turn by the heading %g", root.byID(t, "user").get("transform"), tc.cam.HeadingDeg)
			}
			// Fitted pictures hold the whole footprint in the map area.
			if len(tc.opts) == 0 {
				area := root.byID(t, "map-area")
				w, h := area.float(t, "width"), area.float(t, "height")
				for i, p := range wantPts {
					if p[0] < 0 || p[0] > w || p[1] < 0 || p[1] > h {
						t.Errorf("footprint vertex %d at %v lies outside the %g×%g map area", i, p, w, h)
					}
				}
			}
		})
	}
}

// The scale bar is a round ground length (1, 2 or 5 × 10ⁿ m), the largest
// that fits in 30 % of the map's width, drawn at the frame's scale: its
// length in picture units is length_m × units_per_m / cos φ_U.
func TestRenderCameraScaleBar(t *testing.T) {
	for _, tc := range cameraCases() {
		t.Run(tc.name, func(t *testing.T) {
			v := prepare(t, tc.cam)
			svg, err := render.CameraSVG(v, nil, nil, nil, tc.opts...)
			if err != nil {
				t.Fatal(err)
			}
			root := parseXML(t, svg)
			f := readFrame(t, root)
			bar := root.byID(t, "scale-bar")
			lengthM := bar.float(t, "data-length-m")
			if !isRound(lengthM) {
				t.Errorf("scale bar %v m is not 1, 2 or 5 × 10ⁿ", lengthM)
			}
			line := root.byID(t, "scale-bar-line")
			drawn := line.float(t, "x2") - line.float(t, "x1")
			perGroundM := f.k / viewport.GroundScale(tc.cam.LatDeg)
			if want := lengthM * perGroundM; math.Abs(drawn-want) > unitTol {
				t.Errorf("scale bar of %v m drawn %v units long, want %v (off by %.3g, tolerance %g)", lengthM, drawn, want, drawn-want, unitTol)
			}
			mapW := root.byID(t, "map-area").float(t, "width")
			if drawn > 0.3*mapW+unitTol {
				t.Errorf("scale bar %v units is more than 30%% of the map width %v", drawn, mapW)
			}
			if next := render.RoundLengthM(lengthM * 2.6); next*perGroundM <= 0.3*mapW {
				t.Errorf("scale bar %v m: the round length %v m also fits", lengthM, next)
			}
			label := strings.TrimSpace(bar.text())
			if !strings.HasSuffix(label, " m") && !strings.HasSuffix(label, " km") {
				t.Errorf("scale bar label %q names no unit", label)
			}
		})
	}
}

// Markers are labelled with their ids (escaped in the markup, read back
// whole), styled by bucket, and the legend names every bucket.
func TestRenderCameraMarkersAndLegend(t *testing.T) {
	v := prepare(t, demoCamera())
	ms := demoMarkers()
	ms = append(ms, timeline.Marker{ID: `<tap & "bar">`, Point: offset(orb.Point{demoLon, demoLat}, 10, 60)})
	buckets := map[string]timeline.Bucket{
		"bakery": timeline.Early, "chandlery": timeline.Mid, "ferry-stop": timeline.Late,
		"fuel": timeline.Never, `<tap & "bar">`: timeline.Early,
	}
	svg, err := render.CameraSVG(v, demoRoutePoints(), ms, buckets, render.WithSpanM(3000))
	if err != nil {
		t.Fatal(err)
	}
	root := parseXML(t, svg)
	if title := root.all(func(n *node) bool { return n.XMLName.Local == "title" }); len(title) == 0 || title[0].Text == "" {
		t.Error("no <title>")
	}
	drawn := map[string]*node{}
	for _, g := range root.all(func(n *node) bool { return n.hasClass("marker") }) {
		drawn[g.get("data-id")] = g
	}
	wantClass := map[timeline.Bucket]string{timeline.Early: "bucket-early", timeline.Mid: "bucket-mid",
		timeline.Late: "bucket-late", timeline.Never: "bucket-never"}
	f := readFrame(t, root)
	for _, m := range ms {
		g, ok := drawn[m.ID]
		p := f.apply(viewport.ToMercator(m.Point))
		inside := p[0] >= 0 && p[0] <= 640 && p[1] >= 0 && p[1] <= 640
		if ok != inside {
			t.Errorf("marker %q at %v: drawn %v, inside the map area %v", m.ID, p, ok, inside)
			continue
		}
		if !ok {
			continue
		}
		want := "bucket-none"
		if b, has := buckets[m.ID]; has {
			want = wantClass[b]
		}
		if !g.hasClass(want) {
			t.Errorf("marker %q has class %q, want %q", m.ID, g.get("class"), want)
		}
		if err := closePoints([][2]float64{translateOf(t, g.get("transform"))}, [][2]float64{p}, unitTol); err != nil {
			t.Errorf("marker %q: %v", m.ID, err)
		}
		// A label is drawn where it fits; every marker names itself in its
		// hover title.
		for _, l := range g.all(func(n *node) bool { return n.hasClass("marker-label") }) {
			if got := strings.TrimSpace(l.text()); got != m.ID {
				t.Errorf("marker label %q, want %q", got, m.ID)
			}
		}
		if ti := g.all(func(n *node) bool { return n.XMLName.Local == "title" }); len(ti) != 1 || !strings.HasPrefix(ti[0].Text, m.ID) {
			t.Errorf("marker %q has no hover title naming it", m.ID)
		}
	}
	legend := root.byID(t, "legend").text()
	for _, want := range []string{"early", "mid", "late", "never shown", "no bucket given", "footprint", "route", "user"} {
		if !strings.Contains(legend, want) {
			t.Errorf("legend %q lacks %q", legend, want)
		}
	}
	root.byID(t, "north-arrow")
	root.byID(t, "route")
}

// Without buckets, markers are drawn by whether the camera has them in view.
func TestRenderCameraInViewMarkers(t *testing.T) {
	v := prepare(t, demoCamera())
	ms := demoMarkers()
	svg, err := render.CameraSVG(v, nil, ms, nil, render.WithSpanM(5000))
	if err != nil {
		t.Fatal(err)
	}
	root := parseXML(t, svg)
	seen := 0
	for _, g := range root.all(func(n *node) bool { return n.hasClass("marker") }) {
		id := g.get("data-id")
		for _, m := range ms {
			if m.ID != id {
				continue
			}
			seen++
			want := "out-of-view"
			if v.Project(m.Point).InView() {
				want = "in-view"
			}
			if !g.hasClass(want) {
				t.Errorf("marker %q has class %q, want %q", id, g.get("class"), want)
			}
		}
	}
	if seen == 0 {
		t.Fatal("no markers drawn")
	}
	legend := root.byID(t, "legend").text()
	for _, want := range []string{"marker in view", "marker out of view"} {
		if !strings.Contains(legend, want) {
			t.Errorf("legend %q lacks %q", legend, want)
		}
	}
	if caption := root.byID(t, "caption").text(); !strings.Contains(caption, "markers outside the picture") {
		t.Errorf("caption %q does not count the markers outside", caption)
	}
}

// A camera whose far limit lies below the clear area sees no ground: the
// polygon is there, empty, and the caption says so (SPEC §2, empty
// footprint).
func TestRenderCameraEmptyFootprint(t *testing.T) {
	c := demoCamera()
	c.PitchDeg = 80
	c.Device.FarRatio = 1.05
	c.Device.InsetBottomPx = 440 // the clear area ends at y = 404, above y_far ≈ 413.4
	c.Device.AnchorY = 0.9
	v := prepare(t, c)
	if !v.Footprint().Empty {
		t.Fatal("case should have an empty footprint")
	}
	svg, err := render.CameraSVG(v, demoRoutePoints(), demoMarkers(), nil)
	if err != nil {
		t.Fatal(err)
	}
	root := parseXML(t, svg)
	poly := root.byID(t, "footprint")
	if poly.get("points") != "" || !poly.hasClass("empty") {
		t.Errorf("empty footprint drawn as points=%q class=%q", poly.get("points"), poly.get("class"))
	}
	if caption := root.byID(t, "caption").text(); !strings.Contains(caption, "footprint empty") {
		t.Errorf("caption %q does not say the footprint is empty", caption)
	}
}

func TestRenderCameraErrors(t *testing.T) {
	wide := demoCamera()
	wide.Zoom = 0.5
	wide.Device = viewport.NewDevice(2000, 800, 60)
	vw := prepare(t, wide)
	if !vw.Wrapped() {
		t.Fatal("case should wrap")
	}
	if _, err := render.CameraSVG(vw, nil, nil, nil); err == nil || !strings.Contains(err.Error(), "wraps") {
		t.Errorf("wrapped view: error %v, want one saying it wraps", err)
	}
	v := prepare(t, demoCamera())
	badRoute := []orb.Point{{demoLon, demoLat}, {demoLon, 91}}
	if _, err := render.CameraSVG(v, badRoute, nil, nil); err == nil || !strings.Contains(err.Error(), "route[1]") {
		t.Errorf("route latitude 91: error %v, want one naming route[1]", err)
	}
	badMarkers := []timeline.Marker{{ID: "x", Point: orb.Point{math.NaN(), 0}}}
	if _, err := render.CameraSVG(v, nil, badMarkers, nil); err == nil || !strings.Contains(err.Error(), "markers[0]") {
		t.Errorf("NaN marker: error %v, want one naming markers[0]", err)
	}
	for _, o := range []render.Option{render.WithMapSize(10, 500), render.WithMapSize(500, math.Inf(1)), render.WithSpanM(-1), render.WithSpanM(math.NaN())} {
		if _, err := render.CameraSVG(v, nil, nil, nil, o); err == nil {
			t.Error("a bad option gave no error")
		}
	}
}

// RoundLengthM: the largest of 1, 2, 5 × 10ⁿ not above its argument.
func TestRenderRoundLengthM(t *testing.T) {
	for _, c := range []struct{ in, want float64 }{
		{1, 1}, {1.999, 1}, {2, 2}, {4.99, 2}, {5, 5}, {9.99, 5}, {10, 10},
		{0.3, 0.2}, {0.001, 0.001}, {3e-4, 2e-4}, {99.9, 50}, {192, 100}, {1999, 1000}, {2000, 2000},
		{7.3e5, 5e5}, {1e300, 1e300},
		{0, 0}, {-3, 0}, {math.NaN(), 0}, {math.Inf(1), 0},
	} {
		if got := render.RoundLengthM(c.in); got != c.want && math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("RoundLengthM(%v) = %v, want %v", c.in, got, c.want)
		}
	}
}
