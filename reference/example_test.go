package reference_test

import (
	"os"
	"strings"

	"github.com/viewspec/viewspec/reference"
)

// The reference answers a stream of wire requests, one answer line for
// each, in order; a bad line gets an error and the stream goes on. At zoom
// 0 the world is 256 px wide, so 45° east lands 32 px right of the centre.
func ExampleServe() {
	in := strings.NewReader(`{"op":"project","id":1,"camera":{"lat":0,"lon":0,"heading_deg":0,"pitch_deg":0,"zoom":0,"device":{"width_px":256,"height_px":256,"fov_y_deg":90}},"points":[{"lat":0,"lon":45}]}
{"op":"warp","id":2}
`)
	reference.Serve(in, os.Stdout)
	// Output:
	// {"id":1,"screen":[{"x":160,"y":128,"depth":128,"in_view":true,"margin_px":96}]}
	// {"id":2,"error":{"code":"unknown_op","message":"line 2: op: unknown op \"warp\" (known: footprint, hello, horizon, metrics, project, timeline, unproject, zoom)"}}
}
