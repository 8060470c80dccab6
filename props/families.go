package props

import (
	"fmt"
	"math"
	"slices"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// Source is the randomness a family draws from: a seeded *rand.Rand
// (math/rand/v2) when the corpus is generated, or rapid's draws when the
// prober draws a case (RapidSource), which rapid then shrinks toward 0.
type Source interface {
	Float64() float64 // in [0, 1)
	IntN(n int) int   // in [0, n)
}

// Family is a named edge-case family of one op: Draw returns a request
// without its op and id, or an error to draw again (an invalid draw that
// is not the family's point). A family of requests that break the wire's
// own rules (wrong JSON types) has Raw instead: the request line as JSON,
// with its op but without an id.
type Family struct {
	Name string
	Draw func(rng Source) (*wire.Request, error)
	Raw  func(rng Source) ([]byte, error)
}

// Plan is an op's share of a corpus and its families; the first family is
// the plain one.
type Plan struct {
	Op       string
	Weight   float64
	Families []Family
}

// Plans lists every op's families, the one place they are defined: corpus
// generation and the prober both draw from them.
func Plans() []Plan {
	cam := cameraFamilies()
	plans := []Plan{
		{"project", 0.25, withInvalid(cam, projectRequest)},
		{"unproject", 0.12, withInvalid(cam, unprojectRequest)},
		{"footprint", 0.15, withInvalid(cam, footprintRequest)},
		{"horizon", 0.05, withInvalid(cam, horizonRequest)},
		{"metrics", 0.20, metricsFamilies()},
		{"zoom", 0.11, zoomFamilies()},
		{"timeline", 0.12, timelineFamilies()},
	}
	for i := range plans {
		p := &plans[i]
		p.Families = append(p.Families, wireErrors(p.Op, p.Families[0]))
	}
	return append(plans, Plan{"hello", 0.005, helloFamilies()})
}

// ---- camera families (project, unproject, footprint) ----

func uniform(rng Source, lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }

// logUniform draws from [lo, hi] uniformly in the logarithm.
func logUniform(rng Source, lo, hi float64) float64 {
	return math.Exp(uniform(rng, math.Log(lo), math.Log(hi)))
}

// baseCamera draws an ordinary camera: a phone-sized device in portrait or
// landscape, a city or road zoom, a moderate tilt.
func baseCamera(rng Source) viewport.Camera {
	w, h := uniform(rng, 320, 430), uniform(rng, 640, 932)
	if rng.IntN(4) == 0 {
		w, h = h, w
	}
	d := viewport.NewDevice(math.Round(w), math.Round(h), uniform(rng, 30, 60))
	return viewport.Camera{
		LatDeg: uniform(rng, -70, 70), LonDeg: uniform(rng, -179, 179),
		HeadingDeg: uniform(rng, 0, 360), PitchDeg: uniform(rng, 0, 65),
		Zoom: uniform(rng, 12, 19), Device: d,
	}
}

func cameraFamilies() []Family {
	mk := func(name string, tweak func(rng Source, c *viewport.Camera)) Family {
		return Family{Name: name, Draw: func(rng Source) (*wire.Request, error) {
			c := baseCamera(rng)
			tweak(rng, &c)
			v, err := viewport.Prepare(c)
			if err != nil {
				return nil, err
			}
			if v.Wrapped() {
				return nil, fmt.Errorf("view wraps round the world")
			}
			return &wire.Request{Camera: wire.CameraOf(c)}, nil
		}}
	}
	return []Family{
		mk("random", func(Source, *viewport.Camera) {}),
		mk("equator", func(rng Source, c *viewport.Camera) { c.LatDeg = uniform(rng, -0.01, 0.01) }),
		mk("high_latitude", func(rng Source, c *viewport.Camera) {
			c.LatDeg = math.Copysign(uniform(rng, 80, 85.05), uniform(rng, -1, 1))
		}),
		mk("antimeridian", func(rng Source, c *viewport.Camera) {
			c.LonDeg = math.Copysign(180-logUniform(rng, 1e-7, 0.01), uniform(rng, -1, 1))
		}),
		mk("heading_cardinal", func(rng Source, c *viewport.Camera) {
			c.HeadingDeg = []float64{0, 90, 180, 270, 359.999}[rng.IntN(5)]
		}),
		mk("pitch_zero", func(rng Source, c *viewport.Camera) { c.PitchDeg = 0 }),
		mk("far_cut", func(rng Source, c *viewport.Camera) {
			c.PitchDeg = uniform(rng, 55, 85)
			c.Device.FarRatio = uniform(rng, 1.2, 4)
		}),
		mk("tiny_screen", func(rng Source, c *viewport.Camera) {
			c.Device.WidthPx, c.Device.HeightPx = math.Round(uniform(rng, 32, 120)), math.Round(uniform(rng, 32, 120))
		}),
		mk("huge_screen", func(rng Source, c *viewport.Camera) {
			c.Device.WidthPx, c.Device.HeightPx = math.Round(uniform(rng, 1920, 4096)), math.Round(uniform(rng, 1080, 4096))
			c.Zoom = uniform(rng, 15, 20)
		}),
		mk("tile_512", func(rng Source, c *viewport.Camera) { c.Device.TilePx = 512 }),
		mk("big_insets", func(rng Source, c *viewport.Camera) {
			d := &c.Device
			d.InsetTopPx = math.Round(uniform(rng, 0, 0.45) * d.HeightPx)
			d.InsetBottomPx = math.Round(uniform(rng, 0, 0.45) * d.HeightPx)
			d.InsetLeftPx = math.Round(uniform(rng, 0, 0.45) * d.WidthPx)
			d.InsetRightPx = math.Round(uniform(rng, 0, 0.45) * d.WidthPx)
		}),
		mk("off_centre_anchor", func(rng Source, c *viewport.Camera) {
			c.Device.AnchorX, c.Device.AnchorY = uniform(rng, 0, 1), uniform(rng, 0.4, 1)
		}),
	}
}

// withInvalid adds the op's requests to the camera families, and a Family
// of invalid cameras that must be refused.
func withInvalid(cams []Family, fill func(rng Source, req *wire.Request) error) []Family {
	out := make([]Family, 0, len(cams)+1)
	for _, f := range cams {
		out = append(out, Family{Name: f.Name, Draw: func(rng Source) (*wire.Request, error) {
			req, err := f.Draw(rng)
			if err != nil {
				return nil, err
			}
			return req, fill(rng, req)
		}})
	}
	out = append(out, Family{Name: "invalid_camera", Draw: func(rng Source) (*wire.Request, error) {
		c := baseCamera(rng)
		switch rng.IntN(8) {
		case 0:
			c.PitchDeg = uniform(rng, 90, 120)
		case 1:
			c.LatDeg = uniform(rng, 90.001, 100)
		case 2:
			c.Zoom = uniform(rng, 30.01, 40)
		case 3:
			c.Device.WidthPx = 0
		case 4:
			c.Device.FovYDeg = 180
		case 5:
			c.Device.InsetTopPx, c.Device.InsetBottomPx = c.Device.HeightPx/2, c.Device.HeightPx/2
		case 6:
			c.Device.FarRatio = uniform(rng, 0, 1)
		case 7:
			c.HeadingDeg = 360
		}
		req := &wire.Request{Camera: wire.CameraOf(c)}
		return req, fill(rng, req)
	}})
	return out
}

// groundNear draws ground points around the view: unprojected pixels on and
// off the screen (some exactly on the clear area's edges), and a few far
// behind the camera.
func groundNear(rng Source, req *wire.Request, n int) []*wire.Point {
	c, err := req.Camera.Value("camera")
	if err != nil {
		return nil
	}
	v, err := viewport.Prepare(c)
	pts := make([]*wire.Point, 0, n)
	add := func(p orb.Point) {
		lat, lon := p[1], p[0]
		pts = append(pts, &wire.Point{Lat: &lat, Lon: &lon})
	}
	for len(pts) < n {
		if err != nil {
			add(orb.Point{uniform(rng, -180, 180), uniform(rng, -90, 90)})
			continue
		}
		d := c.Device
		l, t, r, b := v.ClearArea()
		px := viewport.Pixel{X: uniform(rng, -0.2, 1.2) * d.WidthPx, Y: uniform(rng, -0.2, 1.2) * d.HeightPx}
		switch rng.IntN(6) {
		case 0: // on an edge of the clear area
			if rng.IntN(2) == 0 {
				px.X = []float64{l, r}[rng.IntN(2)]
			} else {
				px.Y = []float64{t, b}[rng.IntN(2)]
			}
		case 1: // behind the user
			u := v.UserMercator()
			m := viewport.Mercator{X: u.X - uniform(rng, 100, 20000)*math.Sin(c.HeadingDeg*math.Pi/180),
				Y: u.Y - uniform(rng, 100, 20000)*math.Cos(c.HeadingDeg*math.Pi/180)}
			if p := m.LatLon(); math.Abs(p[1]) <= 90 {
				add(p)
			}
			continue
		}
		if p, ok := v.Unproject(px); ok && math.Abs(p[1]) < viewport.MaxLatDeg {
			add(p)
		}
	}
	return pts
}

func projectRequest(rng Source, req *wire.Request) error {
	req.Points = groundNear(rng, req, 1+rng.IntN(6))
	return nil
}

func unprojectRequest(rng Source, req *wire.Request) error {
	c, _ := req.Camera.Value("camera")
	n := 1 + rng.IntN(6)
	for range n {
		x := uniform(rng, -0.1, 1.1) * c.Device.WidthPx
		y := uniform(rng, -0.1, 1.1) * c.Device.HeightPx
		req.Pixels = append(req.Pixels, &wire.Pixel{X: &x, Y: &y})
	}
	return nil
}

func footprintRequest(Source, *wire.Request) error { return nil }

func horizonRequest(Source, *wire.Request) error { return nil }

// ---- metrics ----

// routeDraw draws a route of a given shape near a random place, with
// speeds.
func routeDraw(rng Source, shape string) ([]orb.Point, []float64) {
	lat0, lon0 := uniform(rng, -65, 65), uniform(rng, -179, 179)
	if shape == "antimeridian" {
		lon0 = 180 - uniform(rng, 0.001, 0.02)
	}
	step := logUniform(rng, 0.0003, 0.01)
	dir := uniform(rng, 0, 2*math.Pi)
	var pts []orb.Point
	n := 2 + rng.IntN(12)
	p := orb.Point{lon0, lat0}
	for i := range n {
		pts = append(pts, p)
		switch shape {
		case "zigzag":
			dir += math.Pi / 2 * float64(1-2*(i%2))
		case "loop":
			dir += 2 * math.Pi / float64(n-1)
		case "u_turn":
			if i == n/2 {
				dir += math.Pi
			}
		case "repeated_vertices":
			if rng.IntN(3) == 0 {
				pts = append(pts, p)
			}
		}
		lon := p[0] + step*math.Sin(dir)/math.Cos(p[1]*math.Pi/180)
		if lon > 180 {
			lon -= 360
		} else if lon < -180 {
			lon += 360
		}
		p = orb.Point{lon, p[1] + step*math.Cos(dir)}
	}
	var speeds []float64
	if rng.IntN(2) == 0 {
		speeds = []float64{uniform(rng, 3, 35)}
	} else {
		for range len(pts) - 1 {
			speeds = append(speeds, math.Round(uniform(rng, 3, 35)*10)/10)
		}
	}
	return pts, speeds
}

func markerWire(id string, p orb.Point, priority *float64) *wire.Marker {
	lat, lon := p[1], p[0]
	return &wire.Marker{ID: &id, Lat: &lat, Lon: &lon, Priority: priority}
}

// nearRoute draws a point within about spanDeg of the route.
func nearRoute(rng Source, r *routes.Route, spanDeg float64) orb.Point {
	p := r.PointAt(uniform(rng, 0, r.LengthM()))
	lon := p[0] + uniform(rng, -spanDeg, spanDeg)
	if lon > 180 {
		lon -= 360
	} else if lon < -180 {
		lon += 360
	}
	return orb.Point{lon, math.Max(-89, math.Min(89, p[1]+uniform(rng, -spanDeg, spanDeg)))}
}

func metricsFamilies() []Family {
	mk := func(name, shape string, markers func(rng Source, r *routes.Route, user routes.Place) []orb.Point, camera bool) Family {
		return Family{Name: name, Draw: func(rng Source) (*wire.Request, error) {
			pts, speeds := routeDraw(rng, shape)
			r, err := routes.New(pts, speeds)
			if err != nil {
				return nil, err
			}
			userAlong := uniform(rng, 0, 0.7) * r.LengthM()
			user := r.PointAt(userAlong)
			place := r.Snap(user)
			req := &wire.Request{Route: wire.RouteOf(pts, speeds), User: wire.PointOf(user)}
			for i, p := range markers(rng, r, place) {
				req.Markers = append(req.Markers, markerWire(fmt.Sprintf("m%d", i), p, nil))
			}
			if camera {
				c := baseCamera(rng)
				c.LatDeg, c.LonDeg, c.HeadingDeg = user[1], user[0], r.HeadingDegAt(place.AlongM)
				if _, err := viewport.Prepare(c); err != nil {
					return nil, err
				}
				req.Camera = wire.CameraOf(c)
			}
			return req, nil
		}}
	}
	around := func(n int) func(Source, *routes.Route, routes.Place) []orb.Point {
		return func(rng Source, r *routes.Route, _ routes.Place) []orb.Point {
			out := make([]orb.Point, 1+rng.IntN(n))
			for i := range out {
				out[i] = nearRoute(rng, r, 0.003)
			}
			return out
		}
	}
	return []Family{
		mk("straight", "straight", around(6), false),
		mk("zigzag", "zigzag", around(6), false),
		mk("loop", "loop", around(6), false),
		mk("u_turn", "u_turn", around(6), false),
		mk("repeated_vertices", "repeated_vertices", around(6), false),
		mk("antimeridian", "antimeridian", around(6), false),
		mk("behind_user", "straight", func(rng Source, r *routes.Route, u routes.Place) []orb.Point {
			p := r.PointAt(u.AlongM * uniform(rng, 0, 0.9))
			return []orb.Point{p, {p[0] + 0.0005, p[1]}}
		}, false),
		mk("past_end", "straight", func(rng Source, r *routes.Route, u routes.Place) []orb.Point {
			end := r.PointAt(r.LengthM())
			prev := r.PointAt(r.LengthM() * 0.99)
			return []orb.Point{{end[0] + (end[0]-prev[0])*uniform(rng, 1, 20), end[1] + (end[1]-prev[1])*uniform(rng, 1, 20)}}
		}, false),
		mk("on_route", "zigzag", func(rng Source, r *routes.Route, u routes.Place) []orb.Point {
			return []orb.Point{r.PointAt(uniform(rng, u.AlongM, r.LengthM()))}
		}, false),
		mk("with_camera", "straight", around(6), true),
	}
}

// ---- zoom ----

// drawRules draws a valid rule set of 1 to 4 bands.
func drawRules(rng Source) *rules.Set {
	n := 1 + rng.IntN(4)
	rs := &rules.Set{
		HysteresisKmh: math.Round(uniform(rng, 0, 6)), MaxZoomRatePerS: uniform(rng, 0.2, 2),
		MaxPitchRateDegPerS: uniform(rng, 2, 30), MinZoom: 10, MaxZoom: 19.5,
		MaxTurnRateDegPerS: uniform(rng, 20, 120),
	}
	edge, zoom, pitch := 0.0, uniform(rng, 16.5, 18.5), uniform(rng, 30, 50)
	for i := range n {
		b := rules.Band{Zoom: math.Round(zoom*4) / 4, PitchDeg: math.Round(pitch)}
		if i < n-1 {
			edge += math.Round(uniform(rng, 20, 40))
			b.BelowKmh = rules.Edge(edge)
		}
		rs.Bands = append(rs.Bands, b)
		zoom -= uniform(rng, 0.5, 1.25)
		pitch = math.Min(75, pitch+uniform(rng, 3, 10))
	}
	rs.Turn = rules.Turn{WithinM: math.Round(uniform(rng, 50, 300)), MinAngleDeg: math.Round(uniform(rng, 20, 60)),
		Zoom: rs.Bands[0].Zoom}
	return rs
}

func zoomFamilies() []Family {
	mk := func(name string, speedAt func(rng Source, rs *rules.Set, i int) (float64, *float64)) Family {
		return Family{Name: name, Draw: func(rng Source) (*wire.Request, error) {
			rs := drawRules(rng)
			req := &wire.Request{Rules: wire.RulesOf(rs)}
			t := 0.0
			for i := range 5 + rng.IntN(30) {
				t += []float64{0.25, 0.5, 1, uniform(rng, 0.05, 3)}[rng.IntN(4)]
				speed, turn := speedAt(rng, rs, i)
				ts, sp := t, speed
				req.Samples = append(req.Samples, &wire.Sample{TS: &ts, SpeedMps: &sp, TurnDistM: turn})
			}
			return req, nil
		}}
	}
	return []Family{
		mk("random", func(rng Source, rs *rules.Set, i int) (float64, *float64) {
			return uniform(rng, 0, 40), nil
		}),
		mk("hysteresis_edge", func(rng Source, rs *rules.Set, i int) (float64, *float64) {
			if len(rs.Bands) < 2 {
				return uniform(rng, 0, 30), nil
			}
			e := *rs.Bands[0].BelowKmh
			return (e + uniform(rng, -1.5, 1.5)*(rs.HysteresisKmh+1)) / 3.6, nil
		}),
		mk("turn_override", func(rng Source, rs *rules.Set, i int) (float64, *float64) {
			d := uniform(rng, 0, 2*rs.Turn.WithinM)
			return uniform(rng, 10, 35), &d
		}),
		mk("speed_ramp", func(rng Source, rs *rules.Set, i int) (float64, *float64) {
			return float64(i) * uniform(rng, 0.5, 3), nil
		}),
	}
}

// ---- timeline ----

func timelineFamilies() []Family {
	mk := func(name string, shape string, tweak func(rng Source, req *wire.Request, r *routes.Route)) Family {
		return Family{Name: name, Draw: func(rng Source) (*wire.Request, error) {
			pts, speeds := routeDraw(rng, shape)
			r, err := routes.New(pts, speeds)
			if err != nil {
				return nil, err
			}
			d := viewport.NewDevice(390, 844, 45)
			d.AnchorY = 0.75
			horizon, tick := 40.0, 0.25
			req := &wire.Request{Route: wire.RouteOf(pts, speeds), Rules: wire.RulesOf(drawRules(rng)),
				Device: wire.CameraOf(viewport.Camera{Device: d}).Device, HorizonS: &horizon, TickS: &tick}
			n := 1 + rng.IntN(12)
			for i := range n {
				pr := float64(rng.IntN(4))
				req.Markers = append(req.Markers, markerWire(fmt.Sprintf("m%02d", i), nearRoute(rng, r, 0.004), &pr))
			}
			tweak(rng, req, r)
			dr, err := req.Drive()
			if err != nil {
				return nil, err
			}
			_ = dr
			return req, nil
		}}
	}
	return []Family{
		mk("straight", "straight", func(Source, *wire.Request, *routes.Route) {}),
		mk("zigzag_turns", "zigzag", func(Source, *wire.Request, *routes.Route) {}),
		mk("cap_contention", "straight", func(rng Source, req *wire.Request, r *routes.Route) {
			c := 1.0
			req.Cap = &c
			for i := range 10 {
				pr := 1.0
				req.Markers = append(req.Markers, markerWire(fmt.Sprintf("c%02d", i), nearRoute(rng, r, 0.002), &pr))
			}
		}),
		mk("bucket_edges", "straight", func(rng Source, req *wire.Request, r *routes.Route) {
			e1, e2 := 2.0, 10.0
			req.BucketEdgesS = []*float64{&e1, &e2}
		}),
		mk("start_mid_route", "u_turn", func(rng Source, req *wire.Request, r *routes.Route) {
			s := uniform(rng, 0, r.LengthM())
			req.StartAlongM = &s
		}),
	}
}

// Families returns the op/Family names a corpus may hold, sorted.
func Families() []string {
	var out []string
	for _, p := range Plans() {
		for _, f := range p.Families {
			out = append(out, p.Op+"/"+f.Name)
		}
	}
	slices.Sort(out)
	return out
}
