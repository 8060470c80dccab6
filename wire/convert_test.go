package wire_test

import (
	"errors"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/wire"
)

// Pieces of requests for the conversion table below.
const (
	cvDevice = `{"width_px":400,"height_px":800,"fov_y_deg":60}`
	cvCamera = `{"lat":0,"lon":0,"heading_deg":0,"pitch_deg":0,"zoom":16,"device":` + cvDevice + `}`
	cvRoute  = `{"points":[{"lat":0,"lon":0},{"lat":0.01,"lon":0}],"speed_mps":10}`
	cvFixes  = `[{"t_s":0,"lat":0,"lon":0},{"t_s":10,"lat":0.001,"lon":0}]`
)

// timelineLine is a valid timeline request with extra fields after the
// route (or in its place when route is "").
func timelineLine(route, extra string) string {
	s := `{"op":"timeline","device":` + cvDevice + `,"rules":` + rulesWorked + `,"markers":[]`
	if route != "" {
		s += `,"route":` + route
	}
	return s + extra + `}`
}

// Each conversion from wire objects to the geometry's values names the
// field that is missing or out of range, with the error's kind (SPEC §6:
// missing_field, invalid_value), and takes the values at the edges of
// their ranges: a pixel at ±1e9, a tile of 512, a cap of 2^30, a start at
// the route's end.
func TestConversionsNameTheField(t *testing.T) {
	camera := func(req *wire.Request) error { _, err := req.Camera.View("camera"); return err }
	pixel := func(req *wire.Request) error { _, err := req.Pixels[0].Value("pixels[0]"); return err }
	route := func(req *wire.Request) error { _, err := req.Route.Value("route"); return err }
	markers := func(req *wire.Request) error { _, err := wire.Markers(req.Markers, "markers"); return err }
	drive := func(req *wire.Request) error { _, err := req.Drive(); return err }
	rulesOf := func(req *wire.Request) error { _, err := req.Rules.Value("rules"); return err }
	const ok = ""
	for _, c := range []struct {
		desc  string
		line  string
		conv  func(*wire.Request) error
		field string // "" when the conversion succeeds
		kind  spec.Kind
	}{
		{"camera without device width", `{"op":"footprint","camera":{"lat":0,"lon":0,"heading_deg":0,"pitch_deg":0,"zoom":1,"device":{"height_px":8,"fov_y_deg":60}}}`, camera, "camera.device.width_px", spec.Missing},
		{"camera without fov", `{"op":"footprint","camera":{"lat":0,"lon":0,"heading_deg":0,"pitch_deg":0,"zoom":1,"device":{"width_px":8,"height_px":8}}}`, camera, "camera.device.fov_y_deg", spec.Missing},
		{"tile 300", `{"op":"footprint","camera":` + strings.Replace(cvCamera, `"fov_y_deg":60`, `"fov_y_deg":60,"tile_px":300`, 1) + `}`, camera, "camera.device.tile_px", spec.Invalid},
		{"tile 512", `{"op":"footprint","camera":` + strings.Replace(cvCamera, `"fov_y_deg":60`, `"fov_y_deg":60,"tile_px":512`, 1) + `}`, camera, ok, 0},
		{"tile 256", `{"op":"footprint","camera":` + strings.Replace(cvCamera, `"fov_y_deg":60`, `"fov_y_deg":60,"tile_px":256`, 1) + `}`, camera, ok, 0},
		{"pixel null", `{"op":"unproject","pixels":[null]}`, pixel, "pixels[0]", spec.Missing},
		{"pixel without x", `{"op":"unproject","pixels":[{"y":1}]}`, pixel, "pixels[0].x", spec.Missing},
		{"pixel without y", `{"op":"unproject","pixels":[{"x":1}]}`, pixel, "pixels[0].y", spec.Missing},
		{"pixel x at 1e9", `{"op":"unproject","pixels":[{"x":1e9,"y":-1e9}]}`, pixel, ok, 0},
		{"pixel x at -1e9", `{"op":"unproject","pixels":[{"x":-1e9,"y":1e9}]}`, pixel, ok, 0},
		{"pixel x beyond 1e9", `{"op":"unproject","pixels":[{"x":1.0000000000000002e9,"y":0}]}`, pixel, "pixels[0].x", spec.Invalid},
		{"pixel x below -1e9", `{"op":"unproject","pixels":[{"x":-1.0000000000000002e9,"y":0}]}`, pixel, "pixels[0].x", spec.Invalid},
		{"pixel y beyond 1e9", `{"op":"unproject","pixels":[{"x":0,"y":1.0000000000000002e9}]}`, pixel, "pixels[0].y", spec.Invalid},
		{"pixel y below -1e9", `{"op":"unproject","pixels":[{"x":0,"y":-1.0000000000000002e9}]}`, pixel, "pixels[0].y", spec.Invalid},
		{"route without points", `{"op":"metrics","route":{"speed_mps":10}}`, route, "route.points", spec.Missing},
		{"route point without lat", `{"op":"metrics","route":{"points":[{"lon":0},{"lat":1,"lon":0}],"speed_mps":10}}`, route, "route.points[0].lat", spec.Missing},
		{"route of one vertex", `{"op":"metrics","route":{"points":[{"lat":0,"lon":0},{"lat":0,"lon":0}],"speed_mps":10}}`, route, "route.points", spec.Invalid},
		{"marker without id", `{"op":"metrics","markers":[{"lat":0,"lon":0}]}`, markers, "markers[0].id", spec.Missing},
		{"marker null", `{"op":"metrics","markers":[null]}`, markers, "markers[0]", spec.Missing},
		{"markers absent", `{"op":"metrics"}`, markers, "markers", spec.Missing},
		{"rules without bands", `{"op":"zoom","rules":{"hysteresis_kmh":0}}`, rulesOf, "rules.bands", spec.Missing},
		{"rules with no band", `{"op":"zoom","rules":{"bands":[]}}`, rulesOf, "rules.bands", spec.Invalid},
		{"rules with a null band", `{"op":"zoom","rules":{"bands":[null]}}`, rulesOf, "rules.bands[0]", spec.Missing},
		{"rules without turn", `{"op":"zoom","rules":` + strings.Replace(rulesWorked, `"turn"`, `"turn_"`, 1) + `}`, rulesOf, "rules.turn", spec.Missing},
		{"timeline", timelineLine(cvRoute, ``), drive, ok, 0},
		{"timeline with route and fixes", timelineLine(cvRoute, `,"fixes":`+cvFixes), drive, "fixes", spec.Invalid},
		{"timeline with fixes and a start", timelineLine("", `,"fixes":`+cvFixes+`,"start_along_m":0`), drive, "fixes", spec.Invalid},
		{"timeline with fixes and a user", timelineLine("", `,"fixes":`+cvFixes+`,"user":{"lat":0,"lon":0}`), drive, "fixes", spec.Invalid},
		{"timeline with fixes", timelineLine("", `,"fixes":`+cvFixes), drive, ok, 0},
		{"timeline with a fix without t_s", timelineLine("", `,"fixes":[{"lat":0,"lon":0},{"t_s":1,"lat":0,"lon":0}]`), drive, "fixes[0].t_s", spec.Missing},
		{"timeline with a fix without lat", timelineLine("", `,"fixes":[{"t_s":0,"lon":0},{"t_s":1,"lat":0,"lon":0}]`), drive, "fixes[0].lat", spec.Missing},
		{"timeline with a fix without lon", timelineLine("", `,"fixes":[{"t_s":0,"lat":0},{"t_s":1,"lat":0,"lon":0}]`), drive, "fixes[0].lon", spec.Missing},
		{"timeline with a null fix", timelineLine("", `,"fixes":[null,{"t_s":1,"lat":0,"lon":0}]`), drive, "fixes[0]", spec.Missing},
		{"timeline with fixes that never move", timelineLine("", `,"fixes":[{"t_s":0,"lat":0,"lon":0},{"t_s":1,"lat":0,"lon":0}]`), drive, "fixes", spec.Invalid},
		{"timeline with start and user", timelineLine(cvRoute, `,"start_along_m":0,"user":{"lat":0,"lon":0}`), drive, "user", spec.Invalid},
		{"timeline with a user without lat", timelineLine(cvRoute, `,"user":{"lon":0}`), drive, "user.lat", spec.Missing},
		{"timeline with a user", timelineLine(cvRoute, `,"user":{"lat":0.005,"lon":0}`), drive, ok, 0},
		{"timeline without route", timelineLine("", ``), drive, "route", spec.Missing},
		{"timeline cap 0", timelineLine(cvRoute, `,"cap":0`), drive, "cap", spec.Invalid},
		{"timeline cap 1", timelineLine(cvRoute, `,"cap":1`), drive, ok, 0},
		{"timeline cap 1.5", timelineLine(cvRoute, `,"cap":1.5`), drive, "cap", spec.Invalid},
		{"timeline cap 2^30", timelineLine(cvRoute, `,"cap":1073741824`), drive, ok, 0},
		{"timeline cap 2^30 + 1", timelineLine(cvRoute, `,"cap":1073741825`), drive, "cap", spec.Invalid},
		{"timeline with one bucket edge", timelineLine(cvRoute, `,"bucket_edges_s":[5]`), drive, "bucket_edges_s", spec.Invalid},
		{"timeline with a null bucket edge", timelineLine(cvRoute, `,"bucket_edges_s":[5,null]`), drive, "bucket_edges_s[1]", spec.Missing},
		{"timeline with a tick not dividing the horizon", timelineLine(cvRoute, `,"horizon_s":10,"tick_s":3`), drive, "tick_s", spec.Invalid},
		{"timeline without device", `{"op":"timeline","route":` + cvRoute + `,"rules":` + rulesWorked + `}`, drive, "device", spec.Missing},
		{"timeline with a device of no width", `{"op":"timeline","route":` + cvRoute + `,"device":{"width_px":0,"height_px":8,"fov_y_deg":60},"rules":` + rulesWorked + `}`, drive, "device.width_px", spec.Invalid},
	} {
		var req wire.Request
		if err := wire.DecodeRequest([]byte(c.line), &req); err != nil {
			t.Fatalf("%s: DecodeRequest(%s) = %v", c.desc, c.line, err)
		}
		err := c.conv(&req)
		var fe *spec.FieldError
		switch {
		case c.field == ok && err != nil:
			t.Errorf("%s: %v, want no error", c.desc, err)
		case c.field == ok:
		case !errors.As(err, &fe):
			t.Errorf("%s: %v, want a field error naming %s", c.desc, err, c.field)
		case fe.Field != c.field || fe.Kind != c.kind:
			t.Errorf("%s: error on %q (kind %d): %v, want %q (kind %d)", c.desc, fe.Field, fe.Kind, err, c.field, c.kind)
		}
	}
}

// A timeline's results on the wire: null first times for a marker never
// shown, its times otherwise, and the margins beside them.
func TestTimelineOf(t *testing.T) {
	ms := []timeline.Marker{{ID: "a"}, {ID: "b"}}
	got := wire.TimelineOf(ms, []timeline.Result{
		{Visible: true, FirstVisibleS: 1.5, Shown: true, FirstShownS: 2, ShownS: 3.25, Bucket: timeline.Early, BucketMarginS: 3},
		{Bucket: timeline.Never},
	})
	if len(got) != 2 {
		t.Fatalf("TimelineOf = %+v, want 2 lines", got)
	}
	a, b := got[0], got[1]
	if a.ID != "a" || a.FirstVisibleS == nil || *a.FirstVisibleS != 1.5 || a.FirstShownS == nil || *a.FirstShownS != 2 || a.ShownS != 3.25 || a.Bucket != "early" {
		t.Errorf("TimelineOf(a) = %+v, want a: visible 1.5, shown 2 for 3.25 s, early", a)
	}
	if b.ID != "b" || b.FirstVisibleS != nil || b.FirstShownS != nil || b.ShownS != 0 || b.Bucket != "never" {
		t.Errorf("TimelineOf(b) = %+v, want b: never visible or shown", b)
	}
}

// RouteOf writes one speed as a number and several as an array, as
// encoding/json writes numbers; Value reads them back to the same route.
func TestRouteOfRoundTrip(t *testing.T) {
	pts := []orb.Point{{0, 0}, {0, 0.01}, {0.01, 0.01}}
	for _, c := range []struct {
		speeds []float64
		want   string
	}{
		{[]float64{13.9}, `13.9`},
		{[]float64{13.9, 1e-7}, `[13.9,1e-7]`},
		{[]float64{1e21, 1e-6}, `[1e+21,0.000001]`}, // encoding/json's switch points to and from exponents
	} {
		w := wire.RouteOf(pts, c.speeds)
		if string(w.SpeedMps) != c.want {
			t.Errorf("RouteOf(speeds %v).speed_mps = %s, want %s", c.speeds, w.SpeedMps, c.want)
		}
		r, err := w.Value("route")
		if err != nil {
			t.Fatalf("RouteOf(speeds %v).Value: %v", c.speeds, err)
		}
		if got := r.Segment(1).SpeedMps; got != c.speeds[len(c.speeds)-1] {
			t.Errorf("RouteOf(speeds %v): segment 1 at %v m/s, want %v", c.speeds, got, c.speeds[len(c.speeds)-1])
		}
	}
}

// NearKeys finds the keys that look like a field: another case, or the
// field without its unit suffix; not the field itself, nor a key that only
// starts alike; none in a line that is not a JSON object.
func TestNearKeys(t *testing.T) {
	got := wire.NearKeys([]byte(`{"Heading_Deg":1,"heading":2,"heading_deg":3,"head":4,"headingdeg":5}`), "heading_deg")
	slices.Sort(got)
	if want := []string{"Heading_Deg", "heading"}; !slices.Equal(got, want) {
		t.Errorf("NearKeys(heading_deg) = %v, want %v", got, want)
	}
	if got := wire.NearKeys([]byte(`{"":1,"_x":2}`), "_x"); len(got) != 0 {
		t.Errorf("NearKeys(_x) = %v, want none (no stem before a leading underscore)", got)
	}
	if got := wire.NearKeys([]byte(`{"x":1}`), "_"); len(got) != 0 {
		t.Errorf("NearKeys(_) = %v, want none", got)
	}
	if got := wire.NearKeys([]byte(`[1]`), "x"); got != nil {
		t.Errorf("NearKeys(an array) = %v, want none", got)
	}
}

// An unknown op is named in its error cut to 40 bytes.
func TestUnknownOpErrorCut(t *testing.T) {
	long := strings.Repeat("o", 41)
	for _, c := range []struct{ op, want string }{
		{long[:40], `"` + long[:40] + `"`},
		{long, `"` + long[:40] + `…"`},
	} {
		if got := (&wire.UnknownOpError{Op: c.op, Known: []string{"hello"}}).Error(); got != "op: unknown op "+c.want+" (known: hello)" {
			t.Errorf("UnknownOpError(%d bytes) = %q, want the op as %s", len(c.op), got, c.want)
		}
	}
}
