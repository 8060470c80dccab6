package wire_test

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"testing"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/internal/jsonl"
	"github.com/viewspec/viewspec/props"
	"github.com/viewspec/viewspec/wire"
)

// v1Line is encoding/json's line for v (HTML left unescaped, as Marshal
// writes), the reference for the hand encoders; ok false when it fails.
func v1Line(v any) ([]byte, bool) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, false
	}
	return bytes.TrimSuffix(buf.Bytes(), []byte{'\n'}), true
}

// fastMatches reports whether the hand encoder took req, and fails t when
// what it wrote differs from encoding/json's line, or when it refused a
// request encoding/json writes and took one it fails on.
func fastMatches(t interface {
	Helper()
	Fatalf(string, ...any)
}, req *wire.Request) bool {
	t.Helper()
	got, ok := wire.FastMarshal(req)
	want, wantOK := v1Line(req)
	switch {
	case ok && !wantOK:
		t.Fatalf("the hand encoder wrote %s where encoding/json fails", got)
	case ok && !bytes.Equal(got, want):
		t.Fatalf("hand:\n%s\nencoding/json:\n%s", got, want)
	}
	return ok
}

// The hand encoder writes every op's requests, as the prober and the corpus
// generator draw them, exactly as encoding/json does, and takes them all.
func TestFastRequestEncoderMatches(t *testing.T) {
	ops := []string{"project", "unproject", "footprint", "horizon", "metrics", "zoom", "timeline"}
	rapid.Check(t, func(t *rapid.T) {
		op := rapid.SampledFrom(ops).Draw(t, "op")
		req := props.ProbeRequest(op).Draw(t, "request").Request
		if req == nil {
			t.Skip("a wire_errors request is raw JSON, not encoded")
		}
		req.ID = json.RawMessage(rapid.SampledFrom([]string{"", `"x"`, `12`}).Draw(t, "id"))
		if !fastMatches(t, req) {
			t.Fatalf("refused %s", must(v1Line(req)))
		}
	})
}

// The fields no family draws, and what the hand encoder must leave to
// encoding/json: nulls in every list, a trace flag, fixes, raw values that
// are not compact, strings that need escaping, numbers JSON cannot hold.
func TestFastRequestEncoderEdges(t *testing.T) {
	num := func(f float64) *float64 { return &f }
	str := func(s string) *string { return &s }
	yes := true
	for _, c := range []struct {
		desc string
		req  wire.Request
		take bool
	}{
		{"nulls in lists", wire.Request{Op: "timeline", Points: []*wire.Point{nil, {}}, Pixels: []*wire.Pixel{nil},
			Route:   &wire.Route{Points: []*wire.Point{nil, {Lat: num(1)}}},
			Markers: []*wire.Marker{nil, {}}, Rules: &wire.Rules{Bands: []*wire.Band{nil, {}}},
			Samples: []*wire.Sample{nil, {}}, BucketEdgesS: []*float64{nil, num(2)}, Fixes: []*wire.Fix{nil, {TS: num(1)}}}, true},
		{"empty objects", wire.Request{Op: "zoom", Route: &wire.Route{}, User: &wire.Point{}, Rules: &wire.Rules{}, Device: &wire.Device{}, Camera: &wire.Camera{}}, true},
		{"empty lists are left out", wire.Request{Op: "metrics", Points: []*wire.Point{}, Markers: []*wire.Marker{}, Samples: []*wire.Sample{}, Fixes: []*wire.Fix{}}, true},
		{"trace and fixes", wire.Request{Op: "timeline", Trace: &yes, Fixes: []*wire.Fix{{TS: num(0), Lat: num(1.5), Lon: num(-2e-7)}},
			StartAlongM: num(0), HorizonS: num(120), TickS: num(0.25), Cap: num(3)}, true},
		{"a speed per segment", wire.Request{Op: "metrics", Route: &wire.Route{SpeedMps: json.RawMessage(`[1,2.5]`)}}, true},
		{"marker fields", wire.Request{Op: "metrics", Markers: []*wire.Marker{{ID: str("m-1"), Lat: num(1), Lon: num(2), Priority: num(3)}}}, true},
		{"a band without an edge", wire.Request{Op: "zoom", Rules: &wire.Rules{Bands: []*wire.Band{{Zoom: num(15), PitchDeg: num(60)}},
			Turn: &wire.Turn{WithinM: num(150)}}}, true},
		{"a speed with spaces", wire.Request{Op: "metrics", Route: &wire.Route{SpeedMps: json.RawMessage(`[1, 2]`)}}, false},
		{"a raw id that is not JSON", wire.Request{Op: "metrics", ID: json.RawMessage(`{`)}, false},
		{"a marker id to escape", wire.Request{Op: "metrics", Markers: []*wire.Marker{{ID: str("a<b")}}}, false},
		{"an op to escape", wire.Request{Op: "caf\u00e9"}, false},
		{"a quote in an id", wire.Request{Op: "metrics", Markers: []*wire.Marker{{ID: str(`a"b`)}}}, false},
		{"a number JSON cannot hold", wire.Request{Op: "timeline", HorizonS: num(math.Inf(1))}, false},
		{"NaN in a marker", wire.Request{Op: "metrics", Markers: []*wire.Marker{{Lat: num(math.NaN())}}}, false},
	} {
		if got := fastMatches(t, &c.req); got != c.take {
			t.Errorf("%s: the hand encoder took it: %v, want %v", c.desc, got, c.take)
		}
	}
}

// TestFastRequestEncoderOnDefaultCorpus: every request of the default
// corpus that decodes is written back by the hand encoder exactly as
// encoding/json writes it.
func TestFastRequestEncoderOnDefaultCorpus(t *testing.T) {
	data, err := os.ReadFile("../fixtures/corpus/default.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	decoded, taken := 0, 0
	jsonl.EachLine(bytes.NewReader(data), 1<<24, func(_ int, line []byte, _ bool) error {
		var c struct {
			Request json.RawMessage `json:"request"`
		}
		if err := json.Unmarshal(line, &c); err != nil {
			t.Fatal(err)
		}
		var req wire.Request
		if wire.DecodeRequest(c.Request, &req) != nil {
			return nil // a wire_errors case
		}
		decoded++
		if fastMatches(t, &req) {
			taken++
		}
		return nil
	})
	if decoded == 0 || taken != decoded {
		t.Errorf("the hand encoder took %d of the %d requests that decode, want all", taken, decoded)
	}
}

// FuzzFastRequestEncoder: whatever request a line decodes to, the hand
// encoder writes it as encoding/json does, or leaves it to it.
func FuzzFastRequestEncoder(f *testing.F) {
	for _, s := range []string{
		`{"op":"timeline","id":1,"device":{"width_px":390,"height_px":844,"fov_y_deg":45},"route":{"points":[{"lat":1,"lon":2},null],"speed_mps":[13.9]},"rules":{"bands":[{"zoom":15,"pitch_deg":60}],"turn":null},"markers":[{"id":"a","lat":1,"lon":2,"priority":1},null],"horizon_s":120,"tick_s":0.25,"cap":3,"bucket_edges_s":[10,null],"trace":true}`,
		`{"op":"metrics","user":{"lat":1,"lon":2},"route":{"points":[],"speed_mps":  7},"markers":[{"id":"x<y","lat":1e-7,"lon":-0}]}`,
		`{"op":"zoom","rules":{"bands":null},"samples":[{"t_s":0,"speed_mps":1,"turn_dist_m":null},null]}`,
		`{"op":"timeline","fixes":[{"t_s":0,"lat":1,"lon":2}],"id":{"k":[1, 2]}}`,
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, line []byte) {
		var req wire.Request
		if wire.DecodeRequest(line, &req) != nil {
			return
		}
		fastMatches(t, &req)
	})
}

func must(b []byte, _ bool) []byte { return b }
