package wire

import (
	"encoding/json"
	"strconv"
	"sync"
	"unicode/utf8"

	"github.com/valyala/fastjson"
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
		if !isJSONNumber(s) {
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

// fastNumber returns a finite JSON number as the general decoder reads it
// (strconv.ParseFloat, correctly rounded).
func fastNumber(v *fastjson.Value) (*float64, bool) {
	if v.Type() != fastjson.TypeNumber {
		return nil, false
	}
	s := v.String()
	if !isJSONNumber(s) {
		return nil, false
	}
	f, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return nil, false
	}
	return &f, true
}

// isJSONNumber reports whether s is a number by the JSON grammar
// (RFC 8259 §6): -?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?.
func isJSONNumber(s string) bool {
	i := 0
	if i < len(s) && s[i] == '-' {
		i++
	}
	digits := func() int {
		n := 0
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			n++
		}
		return n
	}
	switch {
	case i < len(s) && s[i] == '0':
		i++
	case digits() == 0:
		return false
	}
	if i < len(s) && s[i] == '.' {
		i++
		if digits() == 0 {
			return false
		}
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		if digits() == 0 {
			return false
		}
	}
	return i == len(s)
}

// fastFields sets the numbers of an object whose keys are all among
// names, each once; dst[i] receives names[i].
func fastFields(v *fastjson.Value, names []string, dst []**float64) bool {
	o, err := v.Object()
	if err != nil {
		return false
	}
	ok, seen := true, 0
	o.Visit(func(k []byte, v *fastjson.Value) {
		if !ok {
			return
		}
		i := 0
		for i < len(names) && names[i] != string(k) {
			i++
		}
		if i == len(names) || seen&(1<<i) != 0 {
			ok = false
			return
		}
		seen |= 1 << i
		*dst[i], ok = fastNumber(v)
	})
	return ok
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
		if dv.Type() != fastjson.TypeObject {
			return nil, false
		}
		d := new(Device)
		if !fastFields(dv, deviceKeys, []**float64{&d.WidthPx, &d.HeightPx, &d.FovYDeg, &d.TilePx, &d.AnchorX, &d.AnchorY,
			&d.InsetTopPx, &d.InsetRightPx, &d.InsetBottomPx, &d.InsetLeftPx, &d.FarRatio}) {
			return nil, false
		}
		c.Device = d
		// Read the rest without the device: fastFields refuses unknown
		// keys, so the camera's keys are checked here, the device once.
		o, _ := v.Object()
		ok, seen, devices := true, 0, 0
		dst := []**float64{&c.Lat, &c.Lon, &c.HeadingDeg, &c.PitchDeg, &c.Zoom}
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
			*dst[i], ok = fastNumber(v)
		})
		return c, ok && devices == 1
	}
	return c, fastFields(v, cameraKeys, []**float64{&c.Lat, &c.Lon, &c.HeadingDeg, &c.PitchDeg, &c.Zoom})
}

// fastPairs reads an array of objects of two numbers (points or pixels).
func fastPairs[T any](v *fastjson.Value, a, b string, mk func(a, b *float64) *T) ([]*T, bool) {
	arr, err := v.Array()
	if err != nil {
		return nil, false
	}
	out := make([]*T, len(arr))
	names := []string{a, b}
	for i, e := range arr {
		var x, y *float64
		if !fastFields(e, names, []**float64{&x, &y}) {
			return nil, false
		}
		out[i] = mk(x, y)
	}
	return out, true
}
