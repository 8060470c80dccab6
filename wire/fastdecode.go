package wire

import (
	"encoding/json"
	"sync"
	"unicode/utf8"

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
	if !utf8.Valid(line) {
		return false
	}
	p := fastParsers.Get().(*fastjson.Parser)
	defer fastParsers.Put(p)
	v, err := p.ParseBytes(line)
	if err != nil {
		return false
	}
	o, err := v.Object()
	if err != nil {
		return false
	}
	var r Request
	ok, seen := true, 0
	o.Visit(func(k []byte, v *fastjson.Value) {
		if !ok {
			return
		}
		var bit int
		switch string(k) {
		case "op":
			bit = 1
			ok = v.Type() == fastjson.TypeString
			r.Op = string(v.GetStringBytes())
		case "id":
			bit = 2
			r.ID, ok = plainID(v)
		case "camera":
			bit = 4
			r.Camera, ok = fastCamera(v)
		case "points":
			bit = 8
			r.Points, ok = fastPairs(v, "lat", "lon", func(a, b *float64) *Point { return &Point{Lat: a, Lon: b} })
		case "pixels":
			bit = 16
			r.Pixels, ok = fastPairs(v, "x", "y", func(a, b *float64) *Pixel { return &Pixel{X: a, Y: b} })
		default:
			ok = false
		}
		if seen&bit != 0 {
			ok = false
		}
		seen |= bit
	})
	if !ok {
		return false
	}
	switch r.Op {
	case "project":
		ok = seen&16 == 0
	case "unproject":
		ok = seen&8 == 0
	case "footprint", "horizon":
		ok = seen&(8|16) == 0
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
	cameraKeys = []string{"lat", "lon", "heading_deg", "pitch_deg", "zoom"}
	deviceKeys = []string{"width_px", "height_px", "fov_y_deg", "tile_px", "anchor_x", "anchor_y",
		"inset_top_px", "inset_right_px", "inset_bottom_px", "inset_left_px", "far_ratio"}
)

// fastCamera reads a camera object and its device.
func fastCamera(v *fastjson.Value) (*Camera, bool) {
	if v.Type() != fastjson.TypeObject {
		return nil, false
	}
	c := new(Camera)
	dv := v.Get("device")
	if dv != nil {
		d, ok := FastDevice(dv)
		if !ok {
			return nil, false
		}
		c.Device = d
		// Read the rest without the device: fastFields refuses unknown
		// keys, so the camera's keys are checked here, the device once.
		o, _ := v.Object()
		ok, seen, devices := true, 0, 0
		dst := []**float64{&c.Lat, &c.Lon, &c.HeadingDeg, &c.PitchDeg, &c.Zoom}
		store := make([]float64, len(cameraKeys))
		o.Visit(func(k []byte, v *fastjson.Value) {
			if !ok {
				return
			}
			if string(k) == "device" {
				devices++
				return
			}
			i := 0
			for i < len(cameraKeys) && cameraKeys[i] != string(k) {
				i++
			}
			if i == len(cameraKeys) || seen&(1<<i) != 0 {
				ok = false
				return
			}
			seen |= 1 << i
			store[i], ok = fastwire.Float(v)
			*dst[i] = &store[i]
		})
		return c, ok && devices == 1
	}
	return c, fastwire.Fields(v, cameraKeys, []**float64{&c.Lat, &c.Lon, &c.HeadingDeg, &c.PitchDeg, &c.Zoom}, make([]float64, len(cameraKeys)))
}

// fastPairs reads an array of objects of two numbers (points or pixels).
func fastPairs[T any](v *fastjson.Value, a, b string, mk func(a, b *float64) *T) ([]*T, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*T, len(arr))
	names := []string{a, b}
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
	if v.Type() != fastjson.TypeObject {
		return nil, false
	}
	d := new(Device)
	return d, fastwire.Fields(v, deviceKeys, []**float64{&d.WidthPx, &d.HeightPx, &d.FovYDeg, &d.TilePx, &d.AnchorX, &d.AnchorY,
		&d.InsetTopPx, &d.InsetRightPx, &d.InsetBottomPx, &d.InsetLeftPx, &d.FarRatio}, make([]float64, len(deviceKeys)))
}

var fixKeys = []string{"t_s", "lat", "lon"}

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
		num := store[3*i : 3*i+3]
		o, err := e.Object()
		if err != nil {
			return nil, false
		}
		m := &all[i]
		ok, seen := true, 0
		o.Visit(func(k []byte, v *fastjson.Value) {
			if !ok {
				return
			}
			var bit int
			switch string(k) {
			case "id":
				bit = 1
				var id string
				if id, ok = fastwire.String(v); ok {
					m.ID = &id
				}
			case "lat":
				bit = 2
				num[0], ok = fastwire.Float(v)
				m.Lat = &num[0]
			case "lon":
				bit = 4
				num[1], ok = fastwire.Float(v)
				m.Lon = &num[1]
			case "priority":
				bit = 8
				num[2], ok = fastwire.Float(v)
				m.Priority = &num[2]
			default:
				ok = false
			}
			if seen&bit != 0 {
				ok = false
			}
			seen |= bit
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
	o, err := v.Object()
	if err != nil {
		return nil, false
	}
	r := new(Route)
	ok, seen := true, 0
	o.Visit(func(k []byte, v *fastjson.Value) {
		if !ok {
			return
		}
		var bit int
		switch string(k) {
		case "points":
			bit = 1
			r.Points, ok = fastPairs(v, "lat", "lon", func(a, b *float64) *Point { return &Point{Lat: a, Lon: b} })
		case "speed_mps":
			bit = 2
			r.SpeedMps, ok = fastSpeed(v)
		default:
			ok = false
		}
		if seen&bit != 0 {
			ok = false
		}
		seen |= bit
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
