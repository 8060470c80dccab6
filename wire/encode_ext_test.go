package wire_test

import (
	"bytes"
	"encoding/json"
	"testing"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/props"
	"github.com/viewspec/viewspec/wire"
)

// The hand encoder writes the prober's camera requests exactly as
// encoding/json does.
func TestFastRequestEncoderMatches(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		op := rapid.SampledFrom([]string{"project", "unproject", "footprint"}).Draw(t, "op")
		req := props.ProbeRequest(op).Draw(t, "request").Request
		if req == nil {
			t.Skip("a wire_errors request is raw JSON, not encoded")
		}
		req.ID = json.RawMessage(rapid.SampledFrom([]string{"", `"x"`, `12`}).Draw(t, "id"))
		got, ok := wire.FastMarshal(req)
		if !ok {
			t.Fatalf("refused %+v", req)
		}
		var buf bytes.Buffer
		enc := json.NewEncoder(&buf)
		enc.SetEscapeHTML(false)
		enc.Encode(req)
		if want := bytes.TrimSuffix(buf.Bytes(), []byte{'\n'}); !bytes.Equal(got, want) {
			t.Fatalf("hand:\n%s\nencoding/json:\n%s", got, want)
		}
	})
}
