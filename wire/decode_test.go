package wire_test

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/wire"
)

// SPEC §6: keys are matched exactly. A key in another case is a field the
// format does not have, so it is ignored, at the top level as inside
// objects: the field it looks like is then missing.
func TestKeysMatchedExactly(t *testing.T) {
	for _, c := range []struct {
		desc, line, want string
	}{
		{"a camera spelled Camera", `{"op":"footprint","id":1,"Camera":` + camJSON + `}`,
			`{"id":1,"error":{"code":"missing_field","message":"line 1: camera: missing (required)"}}`},
		{"an op spelled OP", `{"OP":"hello","id":2}`,
			`{"id":2,"error":{"code":"missing_field","message":"line 1: op: missing (required)"}}`},
		{"a latitude spelled LAT inside the camera", `{"op":"footprint","id":3,"camera":{"LAT":1,"lon":2,"heading_deg":0,"pitch_deg":0,"zoom":15,"device":{"width_px":300,"height_px":600,"fov_y_deg":45}}}`,
			`{"id":3,"error":{"code":"missing_field","message":"line 1: camera.lat: missing (required)"}}`},
		{"samples spelled SAMPLES", `{"op":"zoom","id":4,"rules":` + rulesWorked + `,"SAMPLES":[]}`,
			`{"id":4,"error":{"code":"missing_field","message":"line 1: samples: missing (required)"}}`},
		{"bands spelled BANDS inside rules", `{"op":"zoom","id":5,"rules":` + strings.Replace(rulesWorked, `"bands"`, `"BANDS"`, 1) + `,"samples":[]}`,
			`{"id":5,"error":{"code":"missing_field","message":"line 1: rules.bands: missing (required)"}}`},
	} {
		if got := string(reference.AnswerLine([]byte(c.line), 1)); got != c.want {
			t.Errorf("%s:\n got %s\nwant %s", c.desc, got, c.want)
		}
	}
}

// DecodeRequest ignores a mistyped field that the request's op does not
// read (SPEC §6), and reports one it reads.
func TestDecodeIgnoresFieldsTheOpDoesNotRead(t *testing.T) {
	var req wire.Request
	if err := wire.DecodeRequest([]byte(`{"op":"footprint","pixels":"none","camera":`+camJSON+`}`), &req); err != nil {
		t.Fatalf("footprint with a string pixels: %v", err)
	}
	err := wire.DecodeRequest([]byte(`{"op":"unproject","pixels":"none","camera":`+camJSON+`}`), &req)
	if code, msg := wire.DecodeError(err); code != wire.CodeBadType || msg != "pixels: expected an array, got a string" {
		t.Fatalf("unproject with a string pixels: %s %s", code, msg)
	}
}

// One code per class of fault, whatever the field: a number beyond the
// double range is invalid_value for a speed as for a camera field (speeds
// said bad_type); a null in a number array is missing, not 0.
func TestOneCodePerClass(t *testing.T) {
	route := func(speeds string) string {
		return `{"op":"metrics","id":1,"route":{"points":[{"lat":0,"lon":0},{"lat":0,"lon":1},{"lat":0,"lon":2}],"speed_mps":` + speeds + `},"user":{"lat":0,"lon":0},"markers":[]}`
	}
	for _, c := range []struct{ line, want string }{
		{route(`1e400`), `"code":"invalid_value","message":"line 1: route.speed_mps = 1e400: not a finite number"`},
		{route(`[10,1e400]`), `"code":"invalid_value","message":"line 1: route.speed_mps[1] = 1e400: not a finite number"`},
		{route(`[10,null]`), `"code":"missing_field","message":"line 1: route.speed_mps[1]: missing (required)"`},
		{route(`[10,"x"]`), `"code":"bad_type","message":"line 1: route.speed_mps[1]: expected a number"`},
		{route(`"x"`), `"code":"bad_type","message":"line 1: route.speed_mps: expected a number or an array of numbers"`},
		{`{"op":"footprint","id":1,"camera":{"lat":1e400}}`, `"code":"invalid_value","message":"line 1: camera.lat = 1e400: not a finite number"`},
		{`{"op":"zoom","id":1,"rules":{"hysteresis_kmh":1e400},"samples":[]}`, `"code":"invalid_value","message":"line 1: rules.hysteresis_kmh = 1e400: not a finite number"`},
	} {
		if got := string(reference.AnswerLine([]byte(c.line), 1)); !strings.Contains(got, c.want) {
			t.Errorf("%s\n got %s\nwant …%s…", c.line, got, c.want)
		}
	}
}

// A null inside bucket_edges_s is a missing edge, not an edge at 0 s.
func TestNullBucketEdgeIsMissing(t *testing.T) {
	line := `{"op":"timeline","id":1,"route":{"points":[{"lat":0,"lon":0},{"lat":0,"lon":0.01}],"speed_mps":10},` +
		`"device":{"width_px":390,"height_px":844,"fov_y_deg":45},"rules":` + rulesWorked + `,"markers":[],"bucket_edges_s":[1,null]}`
	want := `"code":"missing_field","message":"line 1: bucket_edges_s[1]: missing (required)"`
	if got := string(reference.AnswerLine([]byte(line), 1)); !strings.Contains(got, want) {
		t.Errorf("got %s, want …%s…", got, want)
	}
}

// The error answers SPEC §6 settles, each of which read two ways before:
// an unknown op reads no field; the empty op is an unknown one, not a
// missing one; the id is echoed on a bad type whatever its place; a
// device's values are checked before the rules' presence.
func TestErrorAnswersFollowTheText(t *testing.T) {
	dev := `{"width_px":0,"height_px":844,"fov_y_deg":45}`
	for _, c := range []struct{ line, want string }{
		{`{"op":"nope","id":3,"camera":5}`, `{"id":3,"error":{"code":"unknown_op","message":"line 1: op: unknown op \"nope\" (known: footprint, hello, horizon, metrics, project, timeline, unproject, zoom)"}}`},
		{`{"op":"","id":4}`, `{"id":4,"error":{"code":"unknown_op","message":"line 1: op: unknown op \"\" (known: footprint, hello, horizon, metrics, project, timeline, unproject, zoom)"}}`},
		{`{"id":5}`, `{"id":5,"error":{"code":"missing_field","message":"line 1: op: missing (required)"}}`},
		{`{"op":null,"id":6}`, `{"id":6,"error":{"code":"missing_field","message":"line 1: op: missing (required)"}}`},
		{`{"op":5,"id":7}`, `{"id":7,"error":{"code":"bad_type","message":"line 1: op: expected a string, got a number"}}`},
		{`{"op":"timeline","markers":[{"id":"a","lat":0,"lon":0,"priority":"high"}],"id":8}`, `{"id":8,"error":{"code":"bad_type","message":"line 1: markers[0].priority: expected a number, got a string"}}`},
		{`{"op":"timeline","id":9,"route":{"points":[{"lat":0,"lon":0},{"lat":0,"lon":1}],"speed_mps":10},"device":` + dev + `}`,
			`{"id":9,"error":{"code":"invalid_value","message":"line 1: device.width_px = 0: width must be positive and at most 100000"}}`},
	} {
		if got := string(reference.AnswerLine([]byte(c.line), 1)); got != c.want {
			t.Errorf("%s\n got %s\nwant %s", c.line, got, c.want)
		}
	}
}

// "trace": true asks the reference for its state at every tick; the
// answer's markers are the same as without it.
func TestTimelineTrace(t *testing.T) {
	base := `{"op":"timeline","id":1,"route":{"points":[{"lat":0,"lon":0},{"lat":0.01,"lon":0}],"speed_mps":10},` +
		`"device":{"width_px":390,"height_px":844,"fov_y_deg":45},"rules":` + rulesWorked +
		`,"markers":[{"id":"a","lat":0.002,"lon":0}],"horizon_s":2,"tick_s":0.5,"bucket_edges_s":[0.5,1]`
	plain := reference.AnswerLine([]byte(base+`}`), 1)
	traced := reference.AnswerLine([]byte(base+`,"trace":true}`), 1)
	var a struct {
		Markers json.RawMessage `json:"markers"`
		Ticks   []struct {
			TS      float64 `json:"t_s"`
			Visible []struct {
				ID string `json:"id"`
			} `json:"visible"`
			Shown []string `json:"shown"`
		} `json:"ticks"`
	}
	if err := json.Unmarshal(traced, &a); err != nil || len(a.Ticks) != 5 {
		t.Fatalf("traced answer %s: want 5 ticks", traced)
	}
	if !strings.Contains(string(plain), string(a.Markers)) {
		t.Errorf("markers with the trace %s, without %s", a.Markers, plain)
	}
	if tk := a.Ticks[0]; tk.TS != 0 || len(tk.Visible) != 1 || tk.Visible[0].ID != "a" || len(tk.Shown) != 1 {
		t.Errorf("first tick %+v, want marker a in view and shown", tk)
	}
}
