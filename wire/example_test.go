package wire_test

import (
	"os"
	"strings"

	"github.com/viewspec/viewspec/reference"
)

// Serve speaks the wire: one request a line in, one answer a line out.
func ExampleServe() {
	in := strings.NewReader(`{"op":"hello","id":1}
{"op":"project","id":2,"camera":{"lat":0,"lon":0,"heading_deg":0,"pitch_deg":0,"zoom":0,"device":{"width_px":256,"height_px":256,"fov_y_deg":90}},"points":[{"lat":0,"lon":45}]}
{"op":"project","id":3,"camera":{"lat":0,"lon":0,"heading_deg":0,"pitch_deg":90,"zoom":0,"device":{"width_px":256,"height_px":256,"fov_y_deg":90}},"points":[]}
`)
	reference.Serve(in, os.Stdout)
	// Output:
	// {"id":1,"spec":"viewspec/1","ops":["footprint","hello","horizon","metrics","project","timeline","unproject","zoom"]}
	// {"id":2,"screen":[{"x":160,"y":128,"depth":128,"in_view":true,"margin_px":96}]}
	// {"id":3,"error":{"code":"invalid_value","message":"line 3: camera.pitch_deg = 90: pitch must be within [0, 90)"}}
}
