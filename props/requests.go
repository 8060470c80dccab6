package props

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"
	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// The request generators below draw wire requests for the differential
// prober. They are written so that rapid's shrinking (toward the first
// alternative of a choice, smaller counts and numbers nearer zero) lands on
// the simplest case that still fails: heading 0, pitch 0, an integral zoom,
// the user at the origin of lat and lon, a single point or marker, a
// two-vertex route. Edges are reached through labelled families drawn
// first, so a failing case says which family it came from.

// Family draws a family label from names, the first being the plain one
// shrinking aims for.
func Family(names ...string) *rapid.Generator[string] {
	return rapid.SampledFrom(names)
}

// zoomLevel draws an integral zoom and a fractional part that shrinks to
// zero.
func zoomLevel(t *rapid.T, lo, hi int) float64 {
	z := float64(rapid.IntRange(lo, hi).Draw(t, "zoom_int"))
	if rapid.Bool().Draw(t, "zoom_fractional") {
		z += rapid.Float64Range(0, 0.99).Draw(t, "zoom_frac")
	}
	return z
}

// CameraFamilies are the edge families of ProbeCamera.
var CameraFamilies = []string{"plain", "equator", "high_latitude", "antimeridian", "heading_cardinal",
	"pitch_zero", "far_cut", "tiny_screen", "huge_screen", "tile_512", "big_insets", "off_centre_anchor"}

// ProbeCamera draws a valid camera that does not wrap round the world, and
// its family.
func ProbeCamera() *rapid.Generator[LabelledCamera] {
	return rapid.Custom(func(t *rapid.T) LabelledCamera {
		fam := Family(CameraFamilies...).Draw(t, "camera_family")
		// Each of these is gated by a coin that shrinks to false, so that a
		// minimal case has the round value (0) wherever the bug allows.
		c := viewport.Camera{Zoom: zoomLevel(t, 12, 19)}
		if rapid.Bool().Draw(t, "away_from_origin") {
			c.LatDeg = rapid.Float64Range(-70, 70).Draw(t, "lat")
			c.LonDeg = rapid.Float64Range(-179, 179).Draw(t, "lon")
		}
		if rapid.Bool().Draw(t, "turned") {
			c.HeadingDeg = rapid.Float64Range(0, 359.999).Draw(t, "heading_deg")
		}
		if rapid.Bool().Draw(t, "tilted") {
			c.PitchDeg = rapid.Float64Range(0, 70).Draw(t, "pitch_deg")
		}
		d := viewport.NewDevice(float64(rapid.IntRange(320, 1280).Draw(t, "width_px")),
			float64(rapid.IntRange(480, 1280).Draw(t, "height_px")), rapid.Float64Range(30, 60).Draw(t, "fov_y_deg"))
		switch fam {
		case "equator":
			c.LatDeg = rapid.Float64Range(-0.01, 0.01).Draw(t, "equator_lat")
		case "high_latitude":
			c.LatDeg = rapid.Float64Range(80, viewport.MaxLatDeg).Draw(t, "high_lat") * float64(1-2*rapid.IntRange(0, 1).Draw(t, "south"))
		case "antimeridian":
			c.LonDeg = 180 - rapid.Float64Range(0, 0.01).Draw(t, "from_antimeridian")
		case "heading_cardinal":
			c.HeadingDeg = rapid.SampledFrom([]float64{0, 90, 180, 270, 359.999}).Draw(t, "cardinal")
		case "pitch_zero":
			c.PitchDeg = 0
		case "far_cut":
			c.PitchDeg = rapid.Float64Range(55, 85).Draw(t, "steep_pitch")
			d.FarRatio = rapid.Float64Range(1.2, 4).Draw(t, "far_ratio")
		case "tiny_screen":
			d.WidthPx, d.HeightPx = float64(rapid.IntRange(32, 120).Draw(t, "tiny_w")), float64(rapid.IntRange(32, 120).Draw(t, "tiny_h"))
		case "huge_screen":
			d.WidthPx, d.HeightPx = float64(rapid.IntRange(1920, 4096).Draw(t, "huge_w")), float64(rapid.IntRange(1080, 4096).Draw(t, "huge_h"))
		case "tile_512":
			d.TilePx = 512
		case "big_insets":
			f := rapid.Float64Range(0, 0.45)
			d.InsetTopPx = math.Round(f.Draw(t, "inset_top") * d.HeightPx)
			d.InsetBottomPx = math.Round(f.Draw(t, "inset_bottom") * d.HeightPx)
			d.InsetLeftPx = math.Round(f.Draw(t, "inset_left") * d.WidthPx)
			d.InsetRightPx = math.Round(f.Draw(t, "inset_right") * d.WidthPx)
		case "off_centre_anchor":
			d.AnchorX = rapid.Float64Range(0, 1).Draw(t, "anchor_x")
			d.AnchorY = rapid.Float64Range(0.4, 1).Draw(t, "anchor_y")
		}
		c.Device = d
		v, err := viewport.Prepare(c)
		if err != nil {
			t.Skipf("invalid draw: %v", err)
		}
		if v.Wrapped() {
			t.Skip("the view wraps round the world")
		}
		return LabelledCamera{Family: fam, Camera: c}
	})
}

// LabelledCamera is a camera and the family it was drawn from.
type LabelledCamera struct {
	Family string
	Camera viewport.Camera
}

// ProbeRequest draws a request of op (one of the reference's ops, hello
// aside) and its family.
func ProbeRequest(op string) *rapid.Generator[LabelledRequest] {
	switch op {
	case "project", "unproject", "footprint":
		return cameraRequest(op)
	case "metrics":
		return metricsRequest()
	case "zoom":
		return zoomRequest()
	case "timeline":
		return timelineRequest()
	}
	panic("props: no request generator for op " + op)
}

// LabelledRequest is a wire request and the family it was drawn from.
type LabelledRequest struct {
	Family  string
	Request *wire.Request
}

func ptr(v float64) *float64 { return &v }

func pointWire(p orb.Point) *wire.Point {
	return &wire.Point{Lat: ptr(p[1]), Lon: ptr(p[0])}
}

func cameraRequest(op string) *rapid.Generator[LabelledRequest] {
	return rapid.Custom(func(t *rapid.T) LabelledRequest {
		lc := ProbeCamera().Draw(t, "camera")
		req := &wire.Request{Op: op, Camera: wire.CameraOf(lc.Camera)}
		v, _ := viewport.Prepare(lc.Camera)
		d := lc.Camera.Device
		anchor := viewport.Pixel{X: d.AnchorX * d.WidthPx, Y: d.AnchorY * d.HeightPx}
		n := rapid.IntRange(1, 6).Draw(t, "count")
		for range n {
			// Offsets from the anchor pixel, shrinking to the anchor itself.
			px := viewport.Pixel{
				X: anchor.X + rapid.Float64Range(-1.2, 1.2).Draw(t, "dx_frac")*d.WidthPx,
				Y: anchor.Y + rapid.Float64Range(-1.2, 1.2).Draw(t, "dy_frac")*d.HeightPx,
			}
			switch op {
			case "unproject":
				req.Pixels = append(req.Pixels, &wire.Pixel{X: ptr(px.X), Y: ptr(px.Y)})
			case "project":
				p, ok := v.Unproject(px)
				if !ok || math.Abs(p[1]) >= viewport.MaxLatDeg {
					p = lc.Camera.User() // above the horizon: the user instead
				}
				req.Points = append(req.Points, pointWire(p))
			}
		}
		return LabelledRequest{Family: lc.Family, Request: req}
	})
}

// RouteFamilies are the route shapes of the metrics and timeline probes.
var RouteFamilies = []string{"straight", "zigzag", "loop", "u_turn", "repeated_vertices", "antimeridian"}

// probeRoute draws a route of a shape family, near a drawn place, and its
// speeds: vertices shrink to 2, steps to a short one, speeds to one.
func probeRoute(t *rapid.T) (string, []orb.Point, []float64) {
	fam := Family(RouteFamilies...).Draw(t, "route_family")
	lat0 := rapid.Float64Range(-60, 60).Draw(t, "route_lat")
	lon0 := rapid.Float64Range(-179, 179).Draw(t, "route_lon")
	if fam == "antimeridian" {
		lon0 = 180 - rapid.Float64Range(0.0005, 0.02).Draw(t, "route_from_antimeridian")
	}
	n := rapid.IntRange(2, 10).Draw(t, "vertices")
	step := rapid.Float64Range(0.0003, 0.01).Draw(t, "step_deg")
	dir := rapid.Float64Range(0, 2*math.Pi).Draw(t, "direction")
	pts := []orb.Point{{lon0, lat0}}
	for i := 1; i < n; i++ {
		switch fam {
		case "zigzag":
			dir += math.Pi / 2 * float64(1-2*(i%2))
		case "loop":
			dir += 2 * math.Pi / float64(n-1)
		case "u_turn":
			if i == n/2 {
				dir += math.Pi
			}
		}
		p := pts[len(pts)-1]
		if fam == "repeated_vertices" && rapid.Bool().Draw(t, "repeat") {
			pts = append(pts, p)
		}
		lon := p[0] + step*math.Sin(dir)/math.Cos(p[1]*math.Pi/180)
		if lon > 180 {
			lon -= 360
		} else if lon < -180 {
			lon += 360
		}
		pts = append(pts, orb.Point{lon, p[1] + step*math.Cos(dir)})
	}
	speeds := []float64{rapid.Float64Range(1, 40).Draw(t, "speed_mps")}
	if rapid.Bool().Draw(t, "per_segment_speeds") {
		speeds = make([]float64, len(pts)-1)
		for i := range speeds {
			speeds[i] = rapid.Float64Range(1, 40).Draw(t, "segment_speed_mps")
		}
	}
	return fam, pts, speeds
}

// nearRoute draws a point around the route, within spanDeg.
func nearRoute(t *rapid.T, r *routes.Route, spanDeg float64) orb.Point {
	p := r.PointAt(rapid.Float64Range(0, 1).Draw(t, "along_frac") * r.LengthM())
	lon := p[0] + rapid.Float64Range(-spanDeg, spanDeg).Draw(t, "dlon")
	if lon > 180 {
		lon -= 360
	} else if lon < -180 {
		lon += 360
	}
	return orb.Point{lon, math.Max(-89, math.Min(89, p[1]+rapid.Float64Range(-spanDeg, spanDeg).Draw(t, "dlat")))}
}

func metricsRequest() *rapid.Generator[LabelledRequest] {
	return rapid.Custom(func(t *rapid.T) LabelledRequest {
		fam, pts, speeds := probeRoute(t)
		r, err := routes.New(pts, speeds)
		if err != nil {
			t.Skipf("invalid route: %v", err)
		}
		user := r.PointAt(rapid.Float64Range(0, 1).Draw(t, "user_frac") * r.LengthM())
		req := &wire.Request{Op: "metrics", Route: wire.RouteOf(pts, speeds), User: pointWire(user)}
		n := rapid.IntRange(1, 6).Draw(t, "markers")
		for i := range n {
			id := fmt.Sprintf("m%d", i)
			p := nearRoute(t, r, 0.004)
			req.Markers = append(req.Markers, &wire.Marker{ID: &id, Lat: ptr(p[1]), Lon: ptr(p[0])})
		}
		if rapid.Bool().Draw(t, "with_camera") {
			lc := ProbeCamera().Draw(t, "camera")
			lc.Camera.LatDeg, lc.Camera.LonDeg = user[1], user[0]
			if _, err := viewport.Prepare(lc.Camera); err != nil {
				t.Skipf("invalid camera: %v", err)
			}
			req.Camera = wire.CameraOf(lc.Camera)
		}
		return LabelledRequest{Family: fam, Request: req}
	})
}

// ProbeRules draws a valid rule set of 1 to 4 bands; one band at zoom 16,
// pitch 0, shrinking aims for.
func ProbeRules() *rapid.Generator[*rules.Set] {
	return rapid.Custom(func(t *rapid.T) *rules.Set {
		n := rapid.IntRange(1, 4).Draw(t, "bands")
		rs := &rules.Set{
			HysteresisKmh:       rapid.Float64Range(0, 8).Draw(t, "hysteresis_kmh"),
			MaxZoomRatePerS:     rapid.Float64Range(0.1, 3).Draw(t, "max_zoom_rate_per_s"),
			MaxPitchRateDegPerS: rapid.Float64Range(1, 40).Draw(t, "max_pitch_rate_deg_per_s"),
			MinZoom:             10, MaxZoom: 20,
			MaxTurnRateDegPerS: rapid.Float64Range(10, 180).Draw(t, "max_turn_rate_deg_per_s"),
		}
		edge := 0.0
		zoom := 16 + rapid.Float64Range(0, 2.5).Draw(t, "zoom_top")
		pitch := rapid.Float64Range(0, 60).Draw(t, "pitch_first")
		for i := range n {
			b := rules.Band{Zoom: zoom, PitchDeg: pitch}
			if i < n-1 {
				edge += rapid.Float64Range(5, 50).Draw(t, "band_width_kmh")
				b.BelowKmh = rules.Edge(edge)
			}
			rs.Bands = append(rs.Bands, b)
			zoom = math.Max(10, zoom-rapid.Float64Range(0, 1.5).Draw(t, "zoom_step"))
			pitch = math.Min(80, pitch+rapid.Float64Range(0, 10).Draw(t, "pitch_step"))
		}
		rs.Turn = rules.Turn{
			WithinM:     rapid.Float64Range(0, 400).Draw(t, "turn_within_m"),
			MinAngleDeg: rapid.Float64Range(10, 90).Draw(t, "turn_min_angle_deg"),
			Zoom:        rapid.Float64Range(12, 19).Draw(t, "turn_zoom"),
		}
		return rs
	})
}

// ZoomFamilies are the sample families of the zoom probe.
var ZoomFamilies = []string{"random", "hysteresis_edge", "turn_override", "speed_ramp"}

func zoomRequest() *rapid.Generator[LabelledRequest] {
	return rapid.Custom(func(t *rapid.T) LabelledRequest {
		fam := Family(ZoomFamilies...).Draw(t, "zoom_family")
		rs := ProbeRules().Draw(t, "rules")
		req := &wire.Request{Op: "zoom", Rules: wire.RulesOf(rs)}
		n := rapid.IntRange(1, 30).Draw(t, "samples")
		ts := 0.0
		for i := range n {
			if i > 0 {
				ts += rapid.Float64Range(0.05, 3).Draw(t, "dt_s")
			}
			var speed float64
			var turn *float64
			switch fam {
			case "random":
				speed = rapid.Float64Range(0, 45).Draw(t, "speed_mps")
			case "hysteresis_edge":
				e := 30.0
				if rs.Bands[0].BelowKmh != nil {
					e = *rs.Bands[0].BelowKmh
				}
				speed = math.Max(0, (e+rapid.Float64Range(-1.5, 1.5).Draw(t, "edge_offset")*(rs.HysteresisKmh+1))/3.6)
			case "turn_override":
				speed = rapid.Float64Range(0, 45).Draw(t, "speed_mps")
				turn = ptr(rapid.Float64Range(0, 2*rs.Turn.WithinM+1).Draw(t, "turn_dist_m"))
			case "speed_ramp":
				speed = float64(i) * rapid.Float64Range(0, 3).Draw(t, "ramp")
			}
			req.Samples = append(req.Samples, &wire.Sample{TS: ptr(ts), SpeedMps: ptr(speed), TurnDistM: turn})
		}
		return LabelledRequest{Family: fam, Request: req}
	})
}

func timelineRequest() *rapid.Generator[LabelledRequest] {
	return rapid.Custom(func(t *rapid.T) LabelledRequest {
		fam, pts, speeds := probeRoute(t)
		r, err := routes.New(pts, speeds)
		if err != nil {
			t.Skipf("invalid route: %v", err)
		}
		d := viewport.NewDevice(float64(rapid.IntRange(320, 1280).Draw(t, "width_px")),
			float64(rapid.IntRange(480, 1280).Draw(t, "height_px")), 45)
		d.AnchorY = rapid.Float64Range(0.5, 0.85).Draw(t, "anchor_y")
		horizon := float64(rapid.IntRange(1, 20).Draw(t, "horizon_s"))
		tick := rapid.SampledFrom([]float64{0.25, 0.5, 1}).Draw(t, "tick_s")
		capN := float64(rapid.IntRange(1, 6).Draw(t, "cap"))
		e1 := rapid.Float64Range(0, horizon/2).Draw(t, "edge1")
		e2 := rapid.Float64Range(e1+0.01, horizon).Draw(t, "edge2")
		req := &wire.Request{Op: "timeline", Route: wire.RouteOf(pts, speeds), Rules: wire.RulesOf(ProbeRules().Draw(t, "rules")),
			Device:   wire.CameraOf(viewport.Camera{Device: d}).Device,
			HorizonS: &horizon, TickS: &tick, Cap: &capN, BucketEdgesS: []float64{e1, e2}}
		if rapid.Bool().Draw(t, "mid_start") {
			req.StartAlongM = ptr(rapid.Float64Range(0, 1).Draw(t, "start_frac") * r.LengthM())
		}
		n := rapid.IntRange(1, 10).Draw(t, "markers")
		for i := range n {
			id := fmt.Sprintf("m%d", i)
			p := nearRoute(t, r, 0.004)
			req.Markers = append(req.Markers, &wire.Marker{ID: &id, Lat: ptr(p[1]), Lon: ptr(p[0]),
				Priority: ptr(float64(rapid.IntRange(0, 3).Draw(t, "priority")))})
		}
		// Every draw is a valid drive by construction (edges within the
		// horizon, the start on the route); a camera that turns invalid on
		// the way (the anchor above the horizon at a pitch the rules reach)
		// is an error both sides must give.
		return LabelledRequest{Family: fam, Request: req}
	})
}
