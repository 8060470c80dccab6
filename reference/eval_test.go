package reference_test

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// camJSON is a phone camera on the wire: a 390×844 screen, 45° field of
// view, the anchor three quarters down.
const camJSON = `{"lat":44.9312,"lon":-31.1704,"heading_deg":30,"pitch_deg":50,"zoom":16.5,"device":{"width_px":390,"height_px":844,"fov_y_deg":45,"anchor_y":0.75}}`

func decodeReq(t testing.TB, line string) *wire.Request {
	t.Helper()
	var req wire.Request
	if err := json.Unmarshal([]byte(line), &req); err != nil {
		t.Fatal(err)
	}
	return &req
}

// The evaluator's answers are the viewport package's, field for field, with
// the device defaults of SPEC §2 filled in.
func TestEvaluateProjectMatchesViewport(t *testing.T) {
	req := decodeReq(t, `{"op":"project","id":"x","camera":`+camJSON+`,"points":[{"lat":44.9330,"lon":-31.1690},{"lat":44.9312,"lon":-31.1704},{"lat":44.90,"lon":-31.1704}]}`)
	ans, err := reference.Evaluate(req)
	if err != nil {
		t.Fatal(err)
	}
	d := viewport.NewDevice(390, 844, 45)
	d.AnchorY = 0.75
	v, err := viewport.Prepare(viewport.Camera{LatDeg: 44.9312, LonDeg: -31.1704, HeadingDeg: 30, PitchDeg: 50, Zoom: 16.5, Device: d})
	if err != nil {
		t.Fatal(err)
	}
	pa := ans.(*wire.ProjectAnswer)
	if string(pa.ID) != `"x"` || len(pa.Screen) != 3 {
		t.Fatalf("answer %+v", pa)
	}
	for i, pw := range req.Points {
		sp := v.Project(orb.Point{*pw.Lon, *pw.Lat})
		got := pa.Screen[i]
		if !sp.HasPixel() {
			if got != nil {
				t.Errorf("point %d: got %+v, want null (behind the camera)", i, got)
			}
			continue
		}
		if got == nil || got.X != sp.X || got.Y != sp.Y || got.Depth != sp.DepthPx || got.InView != sp.InView() || *got.MarginPx != sp.MarginPx {
			t.Errorf("point %d: got %+v, want %+v", i, got, sp)
		}
	}
	// The user is at the anchor pixel (195, 633).
	if u := pa.Screen[1]; math.Abs(u.X-195) > 1e-9 || math.Abs(u.Y-633) > 1e-9 || !u.InView {
		t.Errorf("user answer %+v, want (195, 633) in view", u)
	}
}

// Unproject answers null at or above the horizon, and the footprint of a
// camera whose clear area lies beyond the far limit is empty, not an error.
func TestEvaluateSpecialAnswers(t *testing.T) {
	// Pitch 80°, fov 45°: the horizon row is cy − f·cot 80° = 422 − 1018.8·0.176 ≈ 242.4 px.
	cam := strings.Replace(camJSON, `"pitch_deg":50`, `"pitch_deg":80`, 1)
	ans, err := reference.Evaluate(decodeReq(t, `{"op":"unproject","camera":`+cam+`,"pixels":[{"x":195,"y":242},{"x":195,"y":243}]}`))
	if err != nil {
		t.Fatal(err)
	}
	pts := ans.(*wire.UnprojectAnswer).Points
	if pts[0] != nil || pts[1] == nil {
		t.Fatalf("unproject above/below the horizon = %v, %v; want null, a point", pts[0], pts[1])
	}
	// Far ratio 1.1 at pitch 80° puts the far row at cy − (0.1/1.1)·f·cot θ ≈ 405.7 px; an
	// inset leaving only rows above 400 px leaves nothing in view.
	cam = strings.Replace(cam, `"anchor_y":0.75`, `"anchor_y":0.5,"far_ratio":1.1,"inset_bottom_px":444`, 1)
	ans, err = reference.Evaluate(decodeReq(t, `{"op":"footprint","camera":`+cam+`}`))
	if err != nil {
		t.Fatal(err)
	}
	fa := ans.(*wire.FootprintAnswer)
	if len(fa.Vertices) != 0 || fa.AreaM2 != 0 {
		t.Fatalf("footprint = %+v, want empty", fa)
	}
	b, _ := json.Marshal(fa)
	if !bytes.Contains(b, []byte(`"vertices":[]`)) {
		t.Fatalf("empty footprint encodes as %s, want vertices: []", b)
	}
}

func TestHelloListsOps(t *testing.T) {
	ans, err := reference.Evaluate(&wire.Request{Op: "hello"})
	if err != nil {
		t.Fatal(err)
	}
	h := ans.(*wire.HelloAnswer)
	if h.Spec != "viewspec/1" || strings.Join(h.Ops, ",") != strings.Join(reference.Ops(), ",") || len(h.Ops) < 4 {
		t.Fatalf("hello = %+v", h)
	}
}

// The metrics op answers with routes.Metrics for the snapped user, writes
// along_m and eta_s as null past the route's end, and view_dist_m only with
// a camera (null when its footprint is empty).
func TestEvaluateMetrics(t *testing.T) {
	route := `{"points":[{"lat":0,"lon":0},{"lat":0,"lon":0.01},{"lat":0.01,"lon":0.01}],"speed_mps":[10,15]}`
	markers := `[{"id":"ahead","lat":0.001,"lon":0.005},{"id":"past-end","lat":0.02,"lon":0.01}]`
	req := decodeReq(t, `{"op":"metrics","route":`+route+`,"user":{"lat":0,"lon":0.002},"markers":`+markers+`}`)
	ans, err := reference.Evaluate(req)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := json.Marshal(ans)
	got := string(b)
	for _, want := range []string{`"id":"ahead"`, `"side":"left"`, `"along_m":null,"eta_s":null`} {
		if !strings.Contains(got, want) {
			t.Errorf("answer %s lacks %s", got, want)
		}
	}
	if strings.Contains(got, "view_dist_m") {
		t.Errorf("answer %s has view_dist_m without a camera", got)
	}
	ma := ans.(*wire.MetricsAnswer)
	// Hand-computed: the marker's foot on the equator is at 0.005° E,
	// 0.003° (333.958 m, a·π/180·0.003 with a = 6 378 137 m) past the user,
	// all at 10 m/s.
	if a := ma.Markers[0]; math.Abs(*a.AlongM-333.9584724) > 1e-6 || math.Abs(*a.EtaS-33.39584724) > 1e-7 {
		t.Errorf("ahead: along %v m, eta %v s; want 333.9584724 m, 33.39584724 s", *a.AlongM, *a.EtaS)
	}

	cam := strings.Replace(camJSON, `"anchor_y":0.75`, `"anchor_y":0.5,"far_ratio":1.1,"inset_bottom_px":444`, 1)
	cam = strings.Replace(cam, `"pitch_deg":50`, `"pitch_deg":80`, 1)
	req = decodeReq(t, `{"op":"metrics","route":`+route+`,"user":{"lat":0,"lon":0.002},"markers":`+markers+`,"camera":`+cam+`}`)
	ans, err = reference.Evaluate(req)
	if err != nil {
		t.Fatal(err)
	}
	b, _ = json.Marshal(ans)
	if !strings.Contains(string(b), `"view_dist_m":null`) {
		t.Errorf("empty footprint: answer %s, want view_dist_m null", b)
	}
}

const rulesJSON = `{"bands":[{"below_kmh":40,"zoom":17,"pitch_deg":45},{"zoom":15,"pitch_deg":60}],"hysteresis_kmh":5,` +
	`"max_zoom_rate_per_s":0.5,"max_pitch_rate_deg_per_s":10,"turn":{"within_m":150,"min_angle_deg":30,"zoom":17.5},` +
	`"min_zoom":10,"max_zoom":19,"max_turn_rate_deg_per_s":45}`

// The zoom op follows SPEC §3 (hand-computed): 5 m/s is 18 km/h, band 0;
// 12 m/s is 43.2 km/h, under 40 + 5 km/h of hysteresis, so band 0 holds;
// 20 m/s is 72 km/h, band 1 (zoom 15, pitch 60), but a turn 100 m ahead
// raises the target to 17.5, reached at 0.5 zoom/s in one second; the pitch
// moves from 45° toward 60° at 10°/s.
func TestEvaluateZoomWorked(t *testing.T) {
	req := decodeReq(t, `{"op":"zoom","rules":`+rulesJSON+`,"samples":[{"t_s":0,"speed_mps":5},{"t_s":1,"speed_mps":12,"turn_dist_m":null},{"t_s":2,"speed_mps":20,"turn_dist_m":100}]}`)
	ans, err := reference.Evaluate(req)
	if err != nil {
		t.Fatal(err)
	}
	z := ans.(*wire.ZoomAnswer)
	if fmt.Sprint(z.Zoom) != "[17 17 17.5]" || fmt.Sprint(z.PitchDeg) != "[45 45 55]" {
		t.Fatalf("zoom %v, pitch %v; want [17 17 17.5], [45 45 55]", z.Zoom, z.PitchDeg)
	}
}

// The timeline op: a marker 333 m ahead on a straight drive is early, one
// 2.2 km behind is never visible; bad drives are named errors.
func TestEvaluateTimeline(t *testing.T) {
	base := `{"op":"timeline","route":{"points":[{"lat":0,"lon":0},{"lat":0.05,"lon":0}],"speed_mps":15},` +
		`"device":{"width_px":390,"height_px":844,"fov_y_deg":45,"anchor_y":0.75},"rules":` + rulesJSON
	ans, err := reference.Evaluate(decodeReq(t, base+`,"markers":[{"id":"a","lat":0.003,"lon":0},{"id":"c","lat":-0.02,"lon":0}]}`))
	if err != nil {
		t.Fatal(err)
	}
	ms := ans.(*wire.TimelineAnswer).Markers
	if ms[0].Bucket != "early" || *ms[0].FirstShownS != 0 || ms[1].Bucket != "never" || ms[1].FirstVisibleS != nil {
		t.Fatalf("timeline %+v", ms)
	}
	for _, c := range []struct{ extra, want string }{
		{`,"markers":[],"tick_s":0.7`, "tick_s = 0.7"},
		{`,"markers":[],"cap":1.5`, "cap = 1.5"},
		{`,"markers":[],"bucket_edges_s":[5]`, "bucket_edges_s: want 2 edges"},
		{`,"markers":[],"start_along_m":1,"user":{"lat":0,"lon":0}`, "give start_along_m or user, not both"},
		{`,"markers":[],"start_along_m":1e9`, "start_along_m = 1e+09: start must be on the route"},
		{`,"markers":[{"id":"a","lat":0,"lon":0},{"id":"a","lat":0,"lon":0}]`, `markers[1].id = "a": duplicate id (first at markers[0])`},
	} {
		_, err := reference.Evaluate(decodeReq(t, base+c.extra+`}`))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.extra, err, c.want)
		}
	}
}

// op horizon answers the viewport's rows, and null for both at pitch 0
// (SPEC §2). The 400 × 800 px, 60° camera at pitch 60° has its horizon on
// row 0 and its far row on row 40 (hand-computed in
// viewport/horizon_test.go).
func TestEvaluateHorizon(t *testing.T) {
	cam := `{"lat":10,"lon":20,"heading_deg":0,"pitch_deg":60,"zoom":15,"device":{"width_px":400,"height_px":800,"fov_y_deg":60}}`
	ans, err := reference.Evaluate(decodeReq(t, `{"op":"horizon","id":1,"camera":`+cam+`}`))
	if err != nil {
		t.Fatal(err)
	}
	v, err := viewport.Prepare(viewport.Camera{LatDeg: 10, LonDeg: 20, PitchDeg: 60, Zoom: 15, Device: viewport.NewDevice(400, 800, 60)})
	if err != nil {
		t.Fatal(err)
	}
	h := ans.(*wire.HorizonAnswer)
	row, _ := v.HorizonRowPx()
	if h.HorizonRowPx == nil || *h.HorizonRowPx != row || h.FarRowPx == nil || *h.FarRowPx != v.FarRowPx() {
		t.Fatalf("horizon answer %+v, want rows %v and %v", h, row, v.FarRowPx())
	}
	if math.Abs(row) > 1e-9 || math.Abs(v.FarRowPx()-40) > 1e-9 {
		t.Errorf("rows %v and %v, want 0 and 40", row, v.FarRowPx())
	}
	ans, err = reference.Evaluate(decodeReq(t, `{"op":"horizon","id":2,"camera":`+strings.Replace(cam, `"pitch_deg":60`, `"pitch_deg":0`, 1)+`}`))
	if err != nil {
		t.Fatal(err)
	}
	if h := ans.(*wire.HorizonAnswer); h.HorizonRowPx != nil || h.FarRowPx != nil {
		t.Errorf("at pitch 0: %+v, want both rows null", h)
	}
}
