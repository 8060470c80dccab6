package wire

import (
	"bytes"
	"encoding/json"
	"os"
	"reflect"
	"testing"

	"github.com/viewspec/viewspec/internal/jsonl"
)

// sameRequest holds the fast camera decoder to the general one: when the
// fast path takes a line, the general decoder gives the same request.
func sameRequest(t *testing.T, line []byte) bool {
	t.Helper()
	var fast, gen Request
	if !decodeCameraFast(line, &fast) {
		return false
	}
	if err := decodeRequest(line, &gen); err != nil {
		t.Fatalf("decodeCameraFast(%s) took a line the general decoder refuses: %v", line, err)
	}
	if !reflect.DeepEqual(fast, gen) {
		f, _ := json.Marshal(fast)
		g, _ := json.Marshal(gen)
		t.Fatalf("decodeCameraFast(%s) = %s, the general decoder's %s", line, f, g)
	}
	return true
}

// TestFastCameraDecoderOnDefaultCorpus: on every request of the default
// corpus, the fast path either declines or reads what the general decoder
// reads; it takes the camera families' requests.
func TestFastCameraDecoderOnDefaultCorpus(t *testing.T) {
	data, err := os.ReadFile("../fixtures/corpus/default.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	taken, camera := 0, 0
	jsonl.EachLine(bytes.NewReader(data), 1<<24, func(_ int, line []byte, _ bool) error {
		var c struct {
			Op      string          `json:"op"`
			Request json.RawMessage `json:"request"`
		}
		if err := json.Unmarshal(line, &c); err != nil {
			t.Fatal(err)
		}
		switch c.Op {
		case "project", "unproject", "footprint", "horizon":
			camera++
		}
		if sameRequest(t, c.Request) {
			taken++
		}
		return nil
	})
	if taken < camera*3/4 {
		t.Errorf("the fast path took %d of %d camera requests, want most", taken, camera)
	}
}

// FuzzFastCameraDecoder: whatever the line, the fast path declines or
// agrees with the general decoder.
func FuzzFastCameraDecoder(f *testing.F) {
	for _, s := range []string{
		`{"op":"project","id":1,"camera":{"lat":1,"lon":2,"heading_deg":3,"pitch_deg":4,"zoom":5,"device":{"width_px":6,"height_px":7,"fov_y_deg":8}},"points":[{"lat":1,"lon":2}]}`,
		`{"op":"unproject","id":"a","camera":{"lat":1e2,"lon":-0,"heading_deg":3.5,"pitch_deg":4,"zoom":5,"device":{"width_px":6,"height_px":7,"fov_y_deg":8,"inset_top_px":1}},"pixels":[{"x":1,"y":2},{"x":3,"y":4}]}`,
		`{"op":"footprint","id":"a\u0041","camera":{"lat":1,"lat":2}}`,
		`{"op":"horizon","id":01,"camera":{"lat":1}}`,
		`{"op":"project","points":[{"lat":1e999,"lon":2}]}`,
		`{"op":"project","points":[],"points":[]}`,
		`{"op":"project","id":null,"points":[null]}`,
		`{"op":"horizon","id":"\0","camera":{"lat":1}}`,
		`{"op":"horizon","id":"\ud800","camera":{"lat":1}}`,
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, line []byte) { sameRequest(t, line) })
}
