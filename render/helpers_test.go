package render_test

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// Tolerance tiers of these tests.
const (
	// unitTol bounds a picture coordinate against its recomputation from
	// the reference's vertices: coordinates are written rounded to 1e-7.
	unitTol = 1e-6
)

// The demo place: Saltmarsh Key, an invented island in the South Atlantic.
// The user drives north-east along its harbour road.
const demoLat, demoLon = -41.2537, -18.6120

func demoDevice() viewport.Device {
	d := viewport.NewDevice(390, 844, 45)
	d.AnchorY = 0.75
	d.InsetTopPx = 60
	d.InsetBottomPx = 120
	return d
}

func demoCamera() viewport.Camera {
	return viewport.Camera{LatDeg: demoLat, LonDeg: demoLon, HeadingDeg: 30, PitchDeg: 50, Zoom: 16.5, Device: demoDevice()}
}

// offset returns the point de metres east and dn metres north of p (a
// local approximation, good to a few centimetres over a kilometre, which
// is all the demo data needs).
func offset(p orb.Point, de, dn float64) orb.Point {
	const mPerDeg = 111320.0
	return orb.Point{p[0] + de/(mPerDeg*math.Cos(p[1]*math.Pi/180)), p[1] + dn/mPerDeg}
}

// demoRoutePoints is the harbour road: north-east for 700 m, a left turn
// east along the front for 1.4 km, then south-east for 1.5 km.
func demoRoutePoints() []orb.Point {
	p0 := offset(orb.Point{demoLon, demoLat}, -150, -260)
	p1 := offset(p0, 350, 606)
	p2 := offset(p1, 1400, 0)
	p3 := offset(p2, 1060, -1060)
	return []orb.Point{p0, p1, p2, p3}
}

// demoMarkers are shops and stops along the road and a few off it: ids in
// byte order differ from priority order on purpose, and there are more
// markers in view at the start than the cap.
func demoMarkers() []timeline.Marker {
	pts := demoRoutePoints()
	var ms []timeline.Marker
	add := func(id string, p orb.Point, pr float64) {
		ms = append(ms, timeline.Marker{ID: id, Point: p, Priority: pr})
	}
	add("bakery", offset(pts[0], 200, 300), 2)
	add("chandlery", offset(pts[0], 290, 420), 1)
	add("ferry-stop", offset(pts[0], 120, 150), 3)
	add("fuel", offset(pts[1], -40, 30), 5)
	add("harbour-office", offset(pts[1], 300, 60), 1)
	add("ice-house", offset(pts[0], 60, 240), 0)
	add("lighthouse", offset(pts[1], 1250, 140), 4)
	add("market", offset(pts[1], 700, -50), 2)
	add("net-loft", offset(pts[2], 400, -380), 0)
	add("old-pier", offset(pts[0], -300, -300), 1) // behind the start
	add("pharmacy", offset(pts[2], 700, -720), 2)
	add("quay-cafe", offset(pts[2], 150, 60), 3)
	add("school", offset(pts[0], 2500, -2500), 1) // far off
	return ms
}

// phoneRules is a phone-like rule set: four bands, zoom in near turns.
func phoneRules() *rules.Set {
	return &rules.Set{
		Bands: []rules.Band{
			{BelowKmh: rules.Edge(30), Zoom: 17.5, PitchDeg: 45},
			{BelowKmh: rules.Edge(60), Zoom: 16.5, PitchDeg: 50},
			{BelowKmh: rules.Edge(90), Zoom: 15.5, PitchDeg: 55},
			{Zoom: 14.5, PitchDeg: 60},
		},
		HysteresisKmh: 5, MaxZoomRatePerS: 0.5, MaxPitchRateDegPerS: 10,
		Turn:    rules.Turn{WithinM: 250, MinAngleDeg: 30, Zoom: 17},
		MinZoom: 13, MaxZoom: 18, MaxTurnRateDegPerS: 60,
	}
}

// carRules is an in-car rule set: a wider screen's calmer bands.
func carRules() *rules.Set {
	return &rules.Set{
		Bands: []rules.Band{
			{BelowKmh: rules.Edge(50), Zoom: 16.5, PitchDeg: 40},
			{Zoom: 15, PitchDeg: 55},
		},
		HysteresisKmh: 4, MaxZoomRatePerS: 0.3, MaxPitchRateDegPerS: 6,
		Turn:    rules.Turn{WithinM: 400, MinAngleDeg: 30, Zoom: 16},
		MinZoom: 12, MaxZoom: 18, MaxTurnRateDegPerS: 45,
	}
}

// demoDrive is 120 s of the harbour road: 14 m/s, then 24 m/s (86 km/h)
// along the front, then 14 m/s.
func demoDrive(t testing.TB, rs *rules.Set) timeline.Drive {
	t.Helper()
	r, err := routes.New(demoRoutePoints(), []float64{14, 24, 14})
	if err != nil {
		t.Fatal(err)
	}
	return timeline.NewDrive(r, 0, demoDevice(), rs)
}

// node is a parsed XML element.
type node struct {
	XMLName xml.Name
	Attrs   []xml.Attr `xml:",any,attr"`
	Nodes   []node     `xml:",any"`
	Text    string     `xml:",chardata"`
}

// parseXML parses b strictly (as XML: the pages are written to parse as
// both HTML and XML).
func parseXML(t testing.TB, b []byte) *node {
	t.Helper()
	var n node
	dec := xml.NewDecoder(bytes.NewReader(b))
	dec.Strict = true
	if err := dec.Decode(&n); err != nil {
		t.Fatalf("the markup does not parse as XML: %v", err)
	}
	return &n
}

func (n *node) attr(name string) (string, bool) {
	for _, a := range n.Attrs {
		if a.Name.Local == name {
			return a.Value, true
		}
	}
	return "", false
}

func (n *node) get(name string) string {
	v, _ := n.attr(name)
	return v
}

// all returns every element under n (n included) for which keep is true,
// in document order.
func (n *node) all(keep func(*node) bool) []*node {
	var out []*node
	var walk func(*node)
	walk = func(m *node) {
		if keep(m) {
			out = append(out, m)
		}
		for i := range m.Nodes {
			walk(&m.Nodes[i])
		}
	}
	walk(n)
	return out
}

// byID returns the element with id, failing the test when there is not
// exactly one.
func (n *node) byID(t testing.TB, id string) *node {
	t.Helper()
	got := n.all(func(m *node) bool { return m.get("id") == id })
	if len(got) != 1 {
		t.Fatalf("%d elements with id %q, want 1", len(got), id)
	}
	return got[0]
}

// hasClass reports whether n's class list holds c.
func (n *node) hasClass(c string) bool {
	for _, f := range strings.Fields(n.get("class")) {
		if f == c {
			return true
		}
	}
	return false
}

// text returns the text of n and everything under it.
func (n *node) text() string {
	var b strings.Builder
	b.WriteString(n.Text)
	for i := range n.Nodes {
		b.WriteString(n.Nodes[i].text())
	}
	return b.String()
}

func (n *node) float(t testing.TB, name string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(n.get(name), 64)
	if err != nil {
		t.Fatalf("<%s> attribute %s: %v", n.XMLName.Local, name, err)
	}
	return v
}

// parsePoints reads an SVG points attribute.
func parsePoints(t testing.TB, s string) [][2]float64 {
	t.Helper()
	var out [][2]float64
	for _, f := range strings.Fields(s) {
		x, y, ok := strings.Cut(f, ",")
		if !ok {
			t.Fatalf("points %q: pair %q has no comma", s, f)
		}
		px, err1 := strconv.ParseFloat(x, 64)
		py, err2 := strconv.ParseFloat(y, 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("points %q: pair %q: %v %v", s, f, err1, err2)
		}
		out = append(out, [2]float64{px, py})
	}
	return out
}

// pictureFrame is the documented map, read back from a picture's root.
type pictureFrame struct {
	cx, cy, ox, oy, k, g float64
}

func readFrame(t testing.TB, root *node) pictureFrame {
	t.Helper()
	return pictureFrame{
		cx: root.float(t, "data-center-x-m"), cy: root.float(t, "data-center-y-m"),
		ox: root.float(t, "data-origin-x"), oy: root.float(t, "data-origin-y"),
		k: root.float(t, "data-units-per-m"), g: root.float(t, "data-ground-scale"),
	}
}

// apply is the package doc's map, written out again here:
// x = ox + shortΔ(X − cx)·k, y = oy − (Y − cy)·k, with shortΔ into
// [−πR, πR) by the IEEE remainder (its ±πR end case does not arise here).
func (f pictureFrame) apply(m viewport.Mercator) [2]float64 {
	dx := math.Remainder(m.X-f.cx, 2*math.Pi*viewport.EarthRadiusM)
	return [2]float64{f.ox + dx*f.k, f.oy - (m.Y-f.cy)*f.k}
}

// closePoints reports the first pair of got and want more than tol apart.
func closePoints(got, want [][2]float64, tol float64) error {
	if len(got) != len(want) {
		return fmt.Errorf("%d points, want %d", len(got), len(want))
	}
	for i := range got {
		if dx, dy := math.Abs(got[i][0]-want[i][0]), math.Abs(got[i][1]-want[i][1]); !(dx <= tol && dy <= tol) {
			return fmt.Errorf("point %d = %v, want %v (off by %.3g, %.3g units, tolerance %g)", i, got[i], want[i], dx, dy, tol)
		}
	}
	return nil
}

// translateOf reads "translate(x y) …" from a transform attribute.
func translateOf(t testing.TB, s string) [2]float64 {
	t.Helper()
	var x, y float64
	if _, err := fmt.Sscanf(s, "translate(%g %g)", &x, &y); err != nil {
		t.Fatalf("transform %q: %v", s, err)
	}
	return [2]float64{x, y}
}

// isRound reports whether v is 1, 2 or 5 × 10ⁿ.
func isRound(v float64) bool {
	if !(v > 0) {
		return false
	}
	e := math.Floor(math.Log10(v))
	for _, p := range []float64{e - 1, e, e + 1} {
		for _, d := range []float64{1, 2, 5} {
			if w := d * math.Pow(10, p); math.Abs(v-w) <= 1e-12*w {
				return true
			}
		}
	}
	return false
}
