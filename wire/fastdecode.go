package wire

import (
	"encoding/json"
	"sync"

	"github.com/valyala/fastjson"

	"github.com/viewspec/viewspec/internal/fastwire"
)

// decodeCameraFast reads the bulk of a corpus, camera requests (project,
// unproject, footprint, horizon) of the usual shape, without reflection:
// every key one the op reads, spelt exactly and given once, every number
// a finite JSON number, the id a number or a plain string. It reports
// false for anything else, which the general decoder then reads, so that
// both give the same request (a test holds them together on the default
// corpus and under fuzzing).
func decodeCameraFast(line []byte, req *Request) bool {
	if !fastwire.Plain(line) {
		return false
	}
	p := fastParsers.Get().(*fastjson.Parser)
	defer fastParsers.Put(p)
	v, err := p.ParseBytes(line)
	if err != nil {
		return false
	}
	var r Request
	seen := 0
	ok := fastwire.Object(v, requestKeys, func(i int, v *fastjson.Value) bool {
		seen |= 1 << i
		var ok bool
		switch i {
		case 0:
			r.Op, ok = fastwire.String(v)
		case 1:
			r.ID, ok = plainID(v)
		case 2:
			r.Camera, ok = fastCamera(v)
		case 3:
			r.Points, ok = fastPairs(v, pointKeys, func(a, b *float64) *Point { return &Point{Lat: a, Lon: b} })
		case 4:
			r.Pixels, ok = fastPairs(v, pixelKeys, func(a, b *float64) *Pixel { return &Pixel{X: a, Y: b} })
		}
		return ok
	})
	if !ok {
		return false
	}
	switch r.Op {
	case "project":
		ok = seen&(1<<4) == 0
	case "unproject":
		ok = seen&(1<<3) == 0
	case "footprint", "horizon":
		ok = seen&(1<<3|1<<4) == 0
	default:
		ok = false
	}
	if ok {
		*req = r
	}
	return ok
}

var fastParsers = sync.Pool{New: func() any { return new(fastjson.Parser) }}

// plainID returns the raw id when it is a number or a string without
// escapes or control characters, whose raw text the parser keeps as is.
func plainID(v *fastjson.Value) (json.RawMessage, bool) {
	switch v.Type() {
	case fastjson.TypeNumber:
		s := v.String()
		if !fastwire.IsNumber(s) {
			return nil, false
		}
		return json.RawMessage(s), true
	case fastjson.TypeString:
		b := v.GetStringBytes()
		for _, c := range b {
			if c < 0x20 || c == '\\' || c == '"' {
				return nil, false
			}
		}
		id := make(json.RawMessage, 0, len(b)+2)
		id = append(id, '"')
		id = append(id, b...)
		return append(id, '"'), true
	}
	return nil, false
}

var (
	requestKeys = []string{"op", "id", "camera", "points", "pixels"}
	pointKeys   = []string{"lat", "lon"}
	pixelKeys   = []string{"x", "y"}
	cameraKeys  = []string{"lat", "lon", "heading_deg", "pitch_deg", "zoom", "device"}
	deviceKeys  = []string{"width_px", "height_px", "fov_y_deg", "tile_px", "anchor_x", "anchor_y",
		"inset_top_px", "inset_right_px", "inset_bottom_px", "inset_left_px", "far_ratio"}
)

// fastCamera reads a camera object and its device.
func fastCamera(v *fastjson.Value) (*Camera, bool) {
	c := new(Camera)
	dst := []**float64{&c.Lat, &c.Lon, &c.HeadingDeg, &c.PitchDeg, &c.Zoom}
	store := make([]float64, len(cameraKeys)-1)
	ok := fastwire.Object(v, cameraKeys, func(i int, v *fastjson.Value) bool {
		if i == len(cameraKeys)-1 {
			var ok bool
			c.Device, ok = FastDevice(v)
			return ok
		}
		var ok bool
		store[i], ok = fastwire.Float(v)
		*dst[i] = &store[i]
		return ok
	})
	return c, ok
}

// fastPairs reads an array of objects of two numbers (points or pixels).
func fastPairs[T any](v *fastjson.Value, names []string, mk func(a, b *float64) *T) ([]*T, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*T, len(arr))
	store := make([]float64, 2*len(arr))
	for i, e := range arr {
		var x, y *float64
		if !fastwire.Fields(e, names, []**float64{&x, &y}, store[2*i:2*i+2]) {
			return nil, false
		}
		out[i] = mk(x, y)
	}
	return out, true
}

// The pieces below read wire objects for the hand-written readers of other
// packages (drive-log records), under the rules of decodeCameraFast: each
// returns false for anything the general decoder should read instead.

// FastDevice reads a device object.
func FastDevice(v *fastjson.Value) (*Device, bool) {
	d := new(Device)
	return d, fastwire.Fields(v, deviceKeys, []**float64{&d.WidthPx, &d.HeightPx, &d.FovYDeg, &d.TilePx, &d.AnchorX, &d.AnchorY,
		&d.InsetTopPx, &d.InsetRightPx, &d.InsetBottomPx, &d.InsetLeftPx, &d.FarRatio}, make([]float64, len(deviceKeys)))
}

var (
	fixKeys    = []string{"t_s", "lat", "lon"}
	markerKeys = []string{"id", "lat", "lon", "priority"}
	routeKeys  = []string{"points", "speed_mps"}
)

// FastFixes reads an array of fixes.
func FastFixes(v *fastjson.Value) ([]*Fix, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*Fix, len(arr))
	all := make([]Fix, len(arr))
	store := make([]float64, 3*len(arr))
	for i, e := range arr {
		f := &all[i]
		if !fastwire.Fields(e, fixKeys, []**float64{&f.TS, &f.Lat, &f.Lon}, store[3*i:3*i+3]) {
			return nil, false
		}
		out[i] = f
	}
	return out, true
}

// FastMarkers reads an array of markers: id (a string), lat, lon and
// priority.
func FastMarkers(v *fastjson.Value) ([]*Marker, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*Marker, len(arr))
	all := make([]Marker, len(arr))
	store := make([]float64, 3*len(arr))
	for i, e := range arr {
		m := &all[i]
		num := store[3*i : 3*i+3]
		ok := fastwire.Object(e, markerKeys, func(k int, v *fastjson.Value) bool {
			if k == 0 {
				id, ok := fastwire.String(v)
				m.ID = &id
				return ok
			}
			var ok bool
			num[k-1], ok = fastwire.Float(v)
			switch k {
			case 1:
				m.Lat = &num[0]
			case 2:
				m.Lon = &num[1]
			default:
				m.Priority = &num[2]
			}
			return ok
		})
		if !ok {
			return nil, false
		}
		out[i] = m
	}
	return out, true
}

// FastRoute reads a route: its points, and a speed that is a number or an
// array of numbers (kept as compact JSON, as the general decoder keeps it
// raw; Route.Value reads either the same).
func FastRoute(v *fastjson.Value) (*Route, bool) {
	r := new(Route)
	ok := fastwire.Object(v, routeKeys, func(i int, v *fastjson.Value) bool {
		var ok bool
		if i == 0 {
			r.Points, ok = fastPairs(v, pointKeys, func(a, b *float64) *Point { return &Point{Lat: a, Lon: b} })
		} else {
			r.SpeedMps, ok = fastSpeed(v)
		}
		return ok
	})
	return r, ok
}

// fastSpeed returns a number, or an array of numbers, as compact JSON.
func fastSpeed(v *fastjson.Value) (json.RawMessage, bool) {
	switch v.Type() {
	case fastjson.TypeNumber:
		s := v.String()
		return json.RawMessage(s), fastwire.IsNumber(s)
	case fastjson.TypeArray:
		arr, _ := v.Array()
		out := json.RawMessage{'['}
		for i, e := range arr {
			if e.Type() != fastjson.TypeNumber || !fastwire.IsNumber(e.String()) {
				return nil, false
			}
			if i > 0 {
				out = append(out, ',')
			}
			out = append(out, e.String()...)
		}
		return append(out, ']'), true
	}
	return nil, false
}
