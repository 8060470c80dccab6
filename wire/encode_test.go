package wire

import (
	"bytes"
	"encoding/json"
	"math"
	"testing"

	"pgregory.net/rapid"
)

// v1 is encoding/json's line for v, the reference for the hand encoders.
func v1(t *rapid.T, v any) []byte {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		t.Fatal(err)
	}
	return bytes.TrimSuffix(buf.Bytes(), []byte{'\n'})
}

// A float drawn across every magnitude, including the edges of plain
// notation (1e-6, 1e21) and negative zero.
func anyFloat(t *rapid.T, label string) float64 {
	return rapid.OneOf(
		rapid.Float64(),
		rapid.SampledFrom([]float64{0, math.Copysign(0, -1), 1e-6, 9.999999999999999e-7, 1e21, 9.99999999999999e20, 1e-7, 123.456, -1e300, 5e-324}),
		rapid.Float64Range(-1e4, 1e4),
	).Filter(func(f float64) bool { return !math.IsNaN(f) && !math.IsInf(f, 0) }).Draw(t, label)
}

// The hand encoders write exactly what encoding/json writes.
func TestFastEncodersMatch(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		id := json.RawMessage(rapid.SampledFrom([]string{"", `"a"`, `7`, `{"k": [1, 2]}`, `"<&>"`}).Draw(t, "id"))
		var v any
		switch rapid.IntRange(0, 2).Draw(t, "op") {
		case 0:
			a := &ProjectAnswer{Head: Head{ID: id}}
			if rapid.Bool().Draw(t, "non_nil") {
				a.Screen = []*Screen{}
			}
			for range rapid.IntRange(0, 4).Draw(t, "n") {
				if rapid.Bool().Draw(t, "null") {
					a.Screen = append(a.Screen, nil)
					continue
				}
				s := &Screen{X: anyFloat(t, "x"), Y: anyFloat(t, "y"), Depth: anyFloat(t, "depth"), InView: rapid.Bool().Draw(t, "in")}
				if rapid.Bool().Draw(t, "margin") {
					m := anyFloat(t, "m")
					s.MarginPx = &m
				}
				a.Screen = append(a.Screen, s)
			}
			v = a
		case 1:
			a := &UnprojectAnswer{Head: Head{ID: id}}
			for range rapid.IntRange(0, 4).Draw(t, "n") {
				if rapid.Bool().Draw(t, "null") {
					a.Points = append(a.Points, nil)
					continue
				}
				a.Points = append(a.Points, &LatLon{Lat: anyFloat(t, "lat"), Lon: anyFloat(t, "lon")})
			}
			v = a
		case 2:
			a := &FootprintAnswer{Head: Head{ID: id}, AreaM2: anyFloat(t, "area"), VisibleRadiusM: anyFloat(t, "r")}
			if rapid.Bool().Draw(t, "vertices") {
				a.Vertices = []LatLon{}
				for range 4 {
					a.Vertices = append(a.Vertices, LatLon{Lat: anyFloat(t, "lat"), Lon: anyFloat(t, "lon")})
				}
			}
			v = a
		}
		got, ok := fastMarshal(v)
		if !ok {
			t.Fatalf("fastMarshal refused %#v", v)
		}
		if want := v1(t, v); !bytes.Equal(got, want) {
			t.Fatalf("fastMarshal:\n%s\nencoding/json:\n%s", got, want)
		}
	})
}
