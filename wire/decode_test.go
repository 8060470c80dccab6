package wire_test

import (
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
