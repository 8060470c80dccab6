package wire

import (
	"bytes"
	"encoding/json"
	"math"
	"strconv"
)

// Hand-written encoders for the camera ops' answers, the bulk of any
// stream, their margins, and every op's requests (what fixtures gen and
// the prober write): the same bytes as encoding/json writes for these
// types (TestFastEncodersMatch and the TestFastRequestEncoder tests hold
// them to it), several times faster.

// appendFloat appends f as encoding/json writes a float64: the shortest
// digits that read back to f, in plain notation from 1e-6 to 1e21 and in
// exponent notation outside, with a one-digit exponent written as such.
func appendFloat(b []byte, f float64) []byte {
	abs := math.Abs(f)
	format := byte('f')
	if abs != 0 && (abs < 1e-6 || abs >= 1e21) {
		format = 'e'
	}
	b = strconv.AppendFloat(b, f, format, -1, 64)
	if format == 'e' {
		// e-07 becomes e-7
		if n := len(b); n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
			b[n-2] = b[n-1]
			b = b[:n-1]
		}
	}
	return b
}

func appendHead(b []byte, h *Head) []byte {
	b = append(b, '{')
	if len(h.ID) > 0 {
		b = append(b, `"id":`...)
		if bytes.ContainsAny(h.ID, " \t\r\n") {
			// encoding/json writes a raw id compacted.
			var c bytes.Buffer
			json.Compact(&c, h.ID)
			b = append(b, c.Bytes()...)
		} else {
			b = append(b, h.ID...)
		}
		b = append(b, ',')
	}
	return b
}

func appendLatLon(b []byte, p *LatLon) []byte {
	b = append(b, `{"lat":`...)
	b = appendFloat(b, p.Lat)
	b = append(b, `,"lon":`...)
	b = appendFloat(b, p.Lon)
	return append(b, '}')
}

// fastMarshal encodes the answers it knows by hand and reports false for
// the rest (and for anything it cannot write exactly as encoding/json
// would, such as a non-finite number).
func fastMarshal(v any) ([]byte, bool) {
	b := make([]byte, 0, 256)
	switch a := v.(type) {
	case *ProjectAnswer:
		b = appendHead(b, &a.Head)
		b = append(b, `"screen":`...)
		if a.Screen == nil {
			b = append(b, "null"...)
			break
		}
		b = append(b, '[')
		for i, s := range a.Screen {
			if i > 0 {
				b = append(b, ',')
			}
			if s == nil {
				b = append(b, "null"...)
				continue
			}
			if !finite(s.X) || !finite(s.Y) || !finite(s.Depth) || s.MarginPx != nil && !finite(*s.MarginPx) {
				return nil, false
			}
			b = append(b, `{"x":`...)
			b = appendFloat(b, s.X)
			b = append(b, `,"y":`...)
			b = appendFloat(b, s.Y)
			b = append(b, `,"depth":`...)
			b = appendFloat(b, s.Depth)
			b = append(b, `,"in_view":`...)
			b = strconv.AppendBool(b, s.InView)
			if s.MarginPx != nil {
				b = append(b, `,"margin_px":`...)
				b = appendFloat(b, *s.MarginPx)
			}
			b = append(b, '}')
		}
		b = append(b, ']')
	case *UnprojectAnswer:
		b = appendHead(b, &a.Head)
		b = append(b, `"points":`...)
		if a.Points == nil {
			b = append(b, "null"...)
			break
		}
		b = append(b, '[')
		for i, p := range a.Points {
			if i > 0 {
				b = append(b, ',')
			}
			if p == nil {
				b = append(b, "null"...)
				continue
			}
			if !finite(p.Lat) || !finite(p.Lon) {
				return nil, false
			}
			b = appendLatLon(b, p)
		}
		b = append(b, ']')
	case *FootprintAnswer:
		if !finite(a.AreaM2) || !finite(a.VisibleRadiusM) {
			return nil, false
		}
		b = appendHead(b, &a.Head)
		b = append(b, `"vertices":`...)
		if a.Vertices == nil {
			b = append(b, "null"...)
		} else {
			b = append(b, '[')
			for i := range a.Vertices {
				if i > 0 {
					b = append(b, ',')
				}
				if !finite(a.Vertices[i].Lat) || !finite(a.Vertices[i].Lon) {
					return nil, false
				}
				b = appendLatLon(b, &a.Vertices[i])
			}
			b = append(b, ']')
		}
		b = append(b, `,"area_m2":`...)
		b = appendFloat(b, a.AreaM2)
		b = append(b, `,"visible_radius_m":`...)
		b = appendFloat(b, a.VisibleRadiusM)
	case *Request:
		return fastRequest(a)
	case *Margins:
		return fastMargins(a)
	default:
		return nil, false
	}
	return append(b, '}'), true
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// appendOptNum appends *p as a number, or null.
func appendOptNum(b []byte, p *float64) ([]byte, bool) {
	if p == nil {
		return append(b, "null"...), true
	}
	if !finite(*p) {
		return b, false
	}
	return appendFloat(b, *p), true
}

// appendKeyNum appends ,"key":value (or "key":value when first) for a
// field without omitempty.
func appendKeyNum(b []byte, key string, p *float64, first bool) ([]byte, bool) {
	if !first {
		b = append(b, ',')
	}
	b = append(b, '"')
	b = append(b, key...)
	b = append(b, `":`...)
	return appendOptNum(b, p)
}

// appendCamera appends a camera object as encoding/json writes it.
func appendCamera(b []byte, c *Camera) ([]byte, bool) {
	ok := true
	b = append(b, '{')
	for i, f := range [...]struct {
		key string
		p   *float64
	}{{"lat", c.Lat}, {"lon", c.Lon}, {"heading_deg", c.HeadingDeg}, {"pitch_deg", c.PitchDeg}, {"zoom", c.Zoom}} {
		var good bool
		if b, good = appendKeyNum(b, f.key, f.p, i == 0); !good {
			ok = false
		}
	}
	b = append(b, `,"device":`...)
	b, good := appendDevice(b, c.Device)
	return append(b, '}'), ok && good
}

// appendDevice appends a device object, or null.
func appendDevice(b []byte, d *Device) ([]byte, bool) {
	if d == nil {
		return append(b, "null"...), true
	}
	ok := true
	b = append(b, '{')
	for i, f := range [...]struct {
		key  string
		p    *float64
		omit bool
	}{{"width_px", d.WidthPx, false}, {"height_px", d.HeightPx, false}, {"fov_y_deg", d.FovYDeg, false},
		{"tile_px", d.TilePx, true}, {"anchor_x", d.AnchorX, true}, {"anchor_y", d.AnchorY, true},
		{"inset_top_px", d.InsetTopPx, true}, {"inset_right_px", d.InsetRightPx, true},
		{"inset_bottom_px", d.InsetBottomPx, true}, {"inset_left_px", d.InsetLeftPx, true},
		{"far_ratio", d.FarRatio, true}} {
		if f.omit && f.p == nil {
			continue
		}
		var good bool
		if b, good = appendKeyNum(b, f.key, f.p, i == 0); !good {
			ok = false
		}
	}
	return append(b, '}'), ok
}

// fastRequest encodes a request by hand, every op's fields, and reports
// false for what it cannot write exactly as encoding/json would (a
// non-finite number, a raw value that is not compact JSON, a string that
// needs escaping), which then goes the slow way.
func fastRequest(r *Request) ([]byte, bool) {
	if !plainString(r.Op) {
		return nil, false
	}
	b := make([]byte, 0, 512)
	b = append(b, `{"op":"`...)
	b = append(b, r.Op...)
	b = append(b, '"')
	ok := true
	// good folds one part's verdict into ok.
	good := func(bb []byte, g bool) { b, ok = bb, ok && g }
	if len(r.ID) > 0 {
		b = append(b, `,"id":`...)
		good(appendRaw(b, r.ID))
	}
	if r.Camera != nil {
		b = append(b, `,"camera":`...)
		good(appendCamera(b, r.Camera))
	}
	if len(r.Points) > 0 {
		b = append(b, `,"points":`...)
		good(appendList(b, r.Points, appendPoint))
	}
	if len(r.Pixels) > 0 {
		b = append(b, `,"pixels":`...)
		good(appendList(b, r.Pixels, func(b []byte, p *Pixel) ([]byte, bool) {
			b = append(b, '{')
			b, g1 := appendKeyNum(b, "x", p.X, true)
			b, g2 := appendKeyNum(b, "y", p.Y, false)
			return append(b, '}'), g1 && g2
		}))
	}
	if r.Route != nil {
		b = append(b, `,"route":{`...)
		if r.Route.Points == nil {
			b = append(b, `"points":null`...)
		} else {
			b = append(b, `"points":`...)
			good(appendList(b, r.Route.Points, appendPoint))
		}
		b = append(b, `,"speed_mps":`...)
		if r.Route.SpeedMps == nil {
			b = append(b, "null"...)
		} else {
			good(appendRaw(b, r.Route.SpeedMps))
		}
		b = append(b, '}')
	}
	if r.User != nil {
		b = append(b, `,"user":`...)
		good(appendPoint(b, r.User))
	}
	if len(r.Markers) > 0 {
		b = append(b, `,"markers":`...)
		good(appendList(b, r.Markers, appendMarker))
	}
	if r.Rules != nil {
		b = append(b, `,"rules":`...)
		good(appendRules(b, r.Rules))
	}
	if len(r.Samples) > 0 {
		b = append(b, `,"samples":`...)
		good(appendList(b, r.Samples, func(b []byte, s *Sample) ([]byte, bool) {
			return appendNums(b, [...]string{"t_s", "speed_mps", "turn_dist_m"}, [...]*float64{s.TS, s.SpeedMps, s.TurnDistM})
		}))
	}
	if r.Device != nil {
		b = append(b, `,"device":`...)
		good(appendDevice(b, r.Device))
	}
	for _, f := range [...]struct {
		key string
		p   *float64
	}{{"start_along_m", r.StartAlongM}, {"horizon_s", r.HorizonS}, {"tick_s", r.TickS}, {"cap", r.Cap}} {
		if f.p != nil {
			good(appendKeyNum(b, f.key, f.p, false))
		}
	}
	if len(r.BucketEdgesS) > 0 {
		good(appendOptNums(b, "bucket_edges_s", r.BucketEdgesS, false))
	}
	if r.Trace != nil {
		b = append(b, `,"trace":`...)
		b = strconv.AppendBool(b, *r.Trace)
	}
	if len(r.Fixes) > 0 {
		b = append(b, `,"fixes":`...)
		good(appendList(b, r.Fixes, func(b []byte, f *Fix) ([]byte, bool) {
			return appendNums(b, [...]string{"t_s", "lat", "lon"}, [...]*float64{f.TS, f.Lat, f.Lon})
		}))
	}
	if !ok {
		return nil, false
	}
	return append(b, '}'), true
}

// plainString reports whether s is written as a JSON string by quoting it
// alone, with nothing to escape (encoding/json's escapes differ between
// its encoder settings; anything else goes the slow way).
func plainString(s string) bool {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c >= 0x7f || c == '"' || c == '\\' || c == '<' || c == '>' || c == '&' {
			return false
		}
	}
	return true
}

// appendRaw appends a raw JSON value as encoding/json writes a
// json.RawMessage: as it is when it is valid and compact; reported false
// otherwise (encoding/json compacts it, or fails).
func appendRaw(b, raw []byte) ([]byte, bool) {
	if bytes.ContainsAny(raw, " \t\r\n") || !json.Valid(raw) {
		return b, false
	}
	return append(b, raw...), true
}

// appendNums appends an object of numeric fields, none omitted when empty.
func appendNums(b []byte, keys [3]string, ps [3]*float64) ([]byte, bool) {
	b = append(b, '{')
	ok := true
	for i := range keys {
		var g bool
		b, g = appendKeyNum(b, keys[i], ps[i], i == 0)
		ok = ok && g
	}
	return append(b, '}'), ok
}

// appendPoint appends a point object.
func appendPoint(b []byte, p *Point) ([]byte, bool) {
	b = append(b, '{')
	b, g1 := appendKeyNum(b, "lat", p.Lat, true)
	b, g2 := appendKeyNum(b, "lon", p.Lon, false)
	return append(b, '}'), g1 && g2
}

// appendList appends […] for a list of objects, each written by one,
// null where an entry is nil.
func appendList[T any](b []byte, xs []*T, one func([]byte, *T) ([]byte, bool)) ([]byte, bool) {
	b = append(b, '[')
	ok := true
	for i, x := range xs {
		if i > 0 {
			b = append(b, ',')
		}
		if x == nil {
			b = append(b, "null"...)
			continue
		}
		var g bool
		b, g = one(b, x)
		ok = ok && g
	}
	return append(b, ']'), ok
}

// appendMarker appends a marker object.
func appendMarker(b []byte, m *Marker) ([]byte, bool) {
	b = append(b, `{"id":`...)
	switch {
	case m.ID == nil:
		b = append(b, "null"...)
	case !plainString(*m.ID):
		return b, false
	default:
		b = append(b, '"')
		b = append(b, *m.ID...)
		b = append(b, '"')
	}
	b, g1 := appendKeyNum(b, "lat", m.Lat, false)
	b, g2 := appendKeyNum(b, "lon", m.Lon, false)
	ok := g1 && g2
	if m.Priority != nil {
		var g bool
		b, g = appendKeyNum(b, "priority", m.Priority, false)
		ok = ok && g
	}
	return append(b, '}'), ok
}

// appendBand appends a band object (below_kmh left out when absent).
func appendBand(b []byte, bd *Band) ([]byte, bool) {
	b = append(b, '{')
	first, ok := true, true
	if bd.BelowKmh != nil {
		b, ok = appendKeyNum(b, "below_kmh", bd.BelowKmh, true)
		first = false
	}
	b, g1 := appendKeyNum(b, "zoom", bd.Zoom, first)
	b, g2 := appendKeyNum(b, "pitch_deg", bd.PitchDeg, false)
	return append(b, '}'), ok && g1 && g2
}

// appendRules appends a rules object.
func appendRules(b []byte, w *Rules) ([]byte, bool) {
	b = append(b, `{"bands":`...)
	ok := true
	if w.Bands == nil {
		b = append(b, "null"...)
	} else {
		b, ok = appendList(b, w.Bands, appendBand)
	}
	for _, f := range [...]struct {
		key string
		p   *float64
	}{{"hysteresis_kmh", w.HysteresisKmh}, {"max_zoom_rate_per_s", w.MaxZoomRatePerS}, {"max_pitch_rate_deg_per_s", w.MaxPitchRateDegPerS}} {
		var g bool
		b, g = appendKeyNum(b, f.key, f.p, false)
		ok = ok && g
	}
	b = append(b, `,"turn":`...)
	if t := w.Turn; t == nil {
		b = append(b, "null"...)
	} else {
		var g bool
		b, g = appendNums(b, [...]string{"within_m", "min_angle_deg", "zoom"}, [...]*float64{t.WithinM, t.MinAngleDeg, t.Zoom})
		ok = ok && g
	}
	for _, f := range [...]struct {
		key string
		p   *float64
	}{{"min_zoom", w.MinZoom}, {"max_zoom", w.MaxZoom}, {"max_turn_rate_deg_per_s", w.MaxTurnRateDegPerS}} {
		var g bool
		b, g = appendKeyNum(b, f.key, f.p, false)
		ok = ok && g
	}
	return append(b, '}'), ok
}

// appendOptNums appends "key":[…] for a slice of optional numbers.
func appendOptNums(b []byte, key string, ps []*float64, first bool) ([]byte, bool) {
	if !first {
		b = append(b, ',')
	}
	b = append(b, '"')
	b = append(b, key...)
	b = append(b, `":[`...)
	for i, p := range ps {
		if i > 0 {
			b = append(b, ',')
		}
		var good bool
		if b, good = appendOptNum(b, p); !good {
			return b, false
		}
	}
	return append(b, ']'), true
}

// fastMargins encodes Margins by hand.
func fastMargins(m *Margins) ([]byte, bool) {
	b := make([]byte, 0, 128)
	b = append(b, '{')
	first, ok := true, true
	for _, f := range [...]struct {
		key string
		ps  []*float64
	}{{"margin_px", m.MarginPx}, {"horizon_px", m.HorizonPx}} {
		if len(f.ps) == 0 {
			continue
		}
		var good bool
		b, good = appendOptNums(b, f.key, f.ps, first)
		ok, first = ok && good, false
	}
	if m.EmptyPx != nil {
		var good bool
		b, good = appendKeyNum(b, "empty_px", m.EmptyPx, first)
		ok, first = ok && good, false
	}
	for _, f := range [...]struct {
		key string
		ps  []*float64
	}{{"side_margin_m", m.SideMarginM}, {"choice_margin_m", m.ChoiceMarginM}, {"bucket_margin_s", m.BucketMarginS}, {"first_shown_margin_px", m.FirstShownMarginPx},
		{"turn_margin_deg", m.TurnMarginDeg}} {
		if len(f.ps) == 0 {
			continue
		}
		var good bool
		b, good = appendOptNums(b, f.key, f.ps, first)
		ok, first = ok && good, false
	}
	return append(b, '}'), ok
}

// AppendString appends s as a JSON string, as encoding/json writes it
// (which escapes <, > and & too).
func AppendString(b []byte, s string) []byte {
	if !plainString(s) {
		q, _ := json.Marshal(s)
		return append(b, q...)
	}
	b = append(b, '"')
	b = append(b, s...)
	return append(b, '"')
}
