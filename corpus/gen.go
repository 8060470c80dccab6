package corpus

import (
	"encoding/json"
	"fmt"
	"hash/fnv"
	"io"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"

	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/wire"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/viewport"
)

// GenVersion names the generator; with the seed and count it fixes a
// corpus byte for byte. It changes whenever generation changes.
const GenVersion = "gen/1"

// family is a named edge-case family of one op: what it draws.
type family struct {
	name string
	draw func(rng *rand.Rand) (*wire.Request, error)
}

// opPlan is an op's share of a corpus and its families.
type opPlan struct {
	op       string
	weight   float64
	families []family
}

// plans lists every op's families. The draw functions return a request
// (without its id), or an error to draw again (an invalid draw that is not
// the family's point).
func plans() []opPlan {
	cam := cameraFamilies()
	return []opPlan{
		{"project", 0.25, withInvalid(cam, projectRequest)},
		{"unproject", 0.12, withInvalid(cam, unprojectRequest)},
		{"footprint", 0.20, withInvalid(cam, footprintRequest)},
		{"metrics", 0.20, metricsFamilies()},
		{"zoom", 0.11, zoomFamilies()},
		{"timeline", 0.12, timelineFamilies()},
	}
}

// Generate writes a corpus of about count cases (every family of every
// selected op gets its share, at least one case) drawn from seed to w, and
// returns the number written. The same seed, count, ops and GenVersion give
// the same bytes. Each case's expectation is the reference's answer.
func Generate(w io.Writer, seed uint64, count int, only map[string]bool) (int, error) {
	var total float64
	for _, p := range plans() {
		if only == nil || only[p.op] {
			total += p.weight
		}
	}
	n := 0
	var line []byte
	for _, p := range plans() {
		if only != nil && !only[p.op] {
			continue
		}
		per := max(1, int(math.Round(float64(count)*p.weight/total/float64(len(p.families)))))
		for _, fam := range p.families {
			for k := range per {
				c, err := genCase(seed, p.op, fam, k)
				if err != nil {
					return n, err
				}
				line, err = appendCase(line[:0], c)
				if err != nil {
					return n, err
				}
				if _, err := w.Write(line); err != nil {
					return n, err
				}
				n++
			}
		}
	}
	return n, nil
}

// caseRand is the random source of one case: the seed and a hash of the
// case's op, family and index, so a case does not depend on which other ops
// or how many cases were asked for.
func caseRand(seed uint64, op, fam string, k int) *rand.Rand {
	h := fnv.New64a()
	fmt.Fprintf(h, "%s/%s/%d", op, fam, k)
	return rand.New(rand.NewPCG(seed, h.Sum64()))
}

func genCase(seed uint64, op string, fam family, k int) (Case, error) {
	rng := caseRand(seed, op, fam.name, k)
	id := op + "/" + fam.name + "/" + fmt.Sprintf("%04d", k)
	for try := 0; ; try++ {
		req, err := fam.draw(rng)
		if err != nil {
			if try > 1000 {
				return Case{}, fmt.Errorf("case %s: no valid draw in 1000 tries: %v", id, err)
			}
			continue
		}
		req.Op = op
		req.ID = json.RawMessage(strconv.Quote(id))
		return buildCase(id, fam.name, req)
	}
}

// NewCase makes a corpus case of req (whose op must be set): the request
// with id as its id, the reference's answer to it and the margins apart.
func NewCase(id, fam string, req *wire.Request) (Case, error) {
	req.ID = json.RawMessage(strconv.Quote(id))
	return buildCase(id, fam, req)
}

// buildCase answers req with the reference and splits the margins off.
func buildCase(id, fam string, req *wire.Request) (Case, error) {
	c := Case{ID: id, Family: fam, Op: req.Op}
	var err error
	if c.Request, err = wire.Marshal(req); err != nil {
		return c, err
	}
	ans, m, aerr := reference.Answer(req)
	var margins any = struct{}{}
	if aerr != nil {
		ans = wire.ErrorAnswer{Head: wire.Head{ID: req.ID}, Error: wire.ErrorBody{Code: wire.Code(aerr), Message: aerr.Error()}}
	} else {
		margins = m
	}
	if c.Expect, err = wire.Marshal(ans); err != nil {
		return c, err
	}
	if c.Margins, err = wire.Marshal(margins); err != nil {
		return c, err
	}
	return c, nil
}

// CaseLine returns c as one corpus line, newline included.
func CaseLine(c Case) ([]byte, error) { return appendCase(nil, c) }

// appendCase writes the line by hand: its raw parts are already compact
// JSON from marshal, and re-encoding them would scan every byte again.
func appendCase(b []byte, c Case) ([]byte, error) {
	b = append(b, `{"id":`...)
	b = wire.AppendString(b, c.ID)
	b = append(b, `,"family":`...)
	b = wire.AppendString(b, c.Family)
	b = append(b, `,"op":`...)
	b = wire.AppendString(b, c.Op)
	b = append(b, `,"request":`...)
	b = append(b, c.Request...)
	b = append(b, `,"expect":`...)
	b = append(b, c.Expect...)
	b = append(b, `,"margins":`...)
	b = append(b, c.Margins...)
	return append(b, "}\n"...), nil
}

// ---- camera families (project, unproject, footprint) ----

func uniform(rng *rand.Rand, lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }

// logUniform draws from [lo, hi] uniformly in the logarithm.
func logUniform(rng *rand.Rand, lo, hi float64) float64 {
	return math.Exp(uniform(rng, math.Log(lo), math.Log(hi)))
}

// baseCamera draws an ordinary camera: a phone-sized device in portrait or
// landscape, a city or road zoom, a moderate tilt.
func baseCamera(rng *rand.Rand) viewport.Camera {
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

func cameraFamilies() []family {
	mk := func(name string, tweak func(rng *rand.Rand, c *viewport.Camera)) family {
		return family{name: name, draw: func(rng *rand.Rand) (*wire.Request, error) {
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
	return []family{
		mk("random", func(*rand.Rand, *viewport.Camera) {}),
		mk("equator", func(rng *rand.Rand, c *viewport.Camera) { c.LatDeg = uniform(rng, -0.01, 0.01) }),
		mk("high_latitude", func(rng *rand.Rand, c *viewport.Camera) {
			c.LatDeg = math.Copysign(uniform(rng, 80, 85.05), uniform(rng, -1, 1))
		}),
		mk("antimeridian", func(rng *rand.Rand, c *viewport.Camera) {
			c.LonDeg = math.Copysign(180-logUniform(rng, 1e-7, 0.01), uniform(rng, -1, 1))
		}),
		mk("heading_cardinal", func(rng *rand.Rand, c *viewport.Camera) {
			c.HeadingDeg = []float64{0, 90, 180, 270, 359.999}[rng.IntN(5)]
		}),
		mk("pitch_zero", func(rng *rand.Rand, c *viewport.Camera) { c.PitchDeg = 0 }),
		mk("far_cut", func(rng *rand.Rand, c *viewport.Camera) {
			c.PitchDeg = uniform(rng, 55, 85)
			c.Device.FarRatio = uniform(rng, 1.2, 4)
		}),
		mk("tiny_screen", func(rng *rand.Rand, c *viewport.Camera) {
			c.Device.WidthPx, c.Device.HeightPx = math.Round(uniform(rng, 32, 120)), math.Round(uniform(rng, 32, 120))
		}),
		mk("huge_screen", func(rng *rand.Rand, c *viewport.Camera) {
			c.Device.WidthPx, c.Device.HeightPx = math.Round(uniform(rng, 1920, 4096)), math.Round(uniform(rng, 1080, 4096))
			c.Zoom = uniform(rng, 15, 20)
		}),
		mk("tile_512", func(rng *rand.Rand, c *viewport.Camera) { c.Device.TilePx = 512 }),
		mk("big_insets", func(rng *rand.Rand, c *viewport.Camera) {
			d := &c.Device
			d.InsetTopPx = math.Round(uniform(rng, 0, 0.45) * d.HeightPx)
			d.InsetBottomPx = math.Round(uniform(rng, 0, 0.45) * d.HeightPx)
			d.InsetLeftPx = math.Round(uniform(rng, 0, 0.45) * d.WidthPx)
			d.InsetRightPx = math.Round(uniform(rng, 0, 0.45) * d.WidthPx)
		}),
		mk("off_centre_anchor", func(rng *rand.Rand, c *viewport.Camera) {
			c.Device.AnchorX, c.Device.AnchorY = uniform(rng, 0, 1), uniform(rng, 0.4, 1)
		}),
	}
}

// withInvalid adds the op's requests to the camera families, and a family
// of invalid cameras that must be refused.
func withInvalid(cams []family, fill func(rng *rand.Rand, req *wire.Request) error) []family {
	out := make([]family, 0, len(cams)+1)
	for _, f := range cams {
		out = append(out, family{name: f.name, draw: func(rng *rand.Rand) (*wire.Request, error) {
			req, err := f.draw(rng)
			if err != nil {
				return nil, err
			}
			return req, fill(rng, req)
		}})
	}
	out = append(out, family{name: "invalid_camera", draw: func(rng *rand.Rand) (*wire.Request, error) {
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
func groundNear(rng *rand.Rand, req *wire.Request, n int) []*wire.Point {
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

func projectRequest(rng *rand.Rand, req *wire.Request) error {
	req.Points = groundNear(rng, req, 1+rng.IntN(6))
	return nil
}

func unprojectRequest(rng *rand.Rand, req *wire.Request) error {
	c, _ := req.Camera.Value("camera")
	n := 1 + rng.IntN(6)
	for range n {
		x := uniform(rng, -0.1, 1.1) * c.Device.WidthPx
		y := uniform(rng, -0.1, 1.1) * c.Device.HeightPx
		req.Pixels = append(req.Pixels, &wire.Pixel{X: &x, Y: &y})
	}
	return nil
}

func footprintRequest(*rand.Rand, *wire.Request) error { return nil }

// ---- metrics ----

// routeDraw draws a route of a given shape near a random place, with
// speeds.
func routeDraw(rng *rand.Rand, shape string) ([]orb.Point, []float64) {
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
func nearRoute(rng *rand.Rand, r *routes.Route, spanDeg float64) orb.Point {
	p := r.PointAt(uniform(rng, 0, r.LengthM()))
	lon := p[0] + uniform(rng, -spanDeg, spanDeg)
	if lon > 180 {
		lon -= 360
	} else if lon < -180 {
		lon += 360
	}
	return orb.Point{lon, math.Max(-89, math.Min(89, p[1]+uniform(rng, -spanDeg, spanDeg)))}
}

func metricsFamilies() []family {
	mk := func(name, shape string, markers func(rng *rand.Rand, r *routes.Route, user routes.Place) []orb.Point, camera bool) family {
		return family{name: name, draw: func(rng *rand.Rand) (*wire.Request, error) {
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
	around := func(n int) func(*rand.Rand, *routes.Route, routes.Place) []orb.Point {
		return func(rng *rand.Rand, r *routes.Route, _ routes.Place) []orb.Point {
			out := make([]orb.Point, 1+rng.IntN(n))
			for i := range out {
				out[i] = nearRoute(rng, r, 0.003)
			}
			return out
		}
	}
	return []family{
		mk("straight", "straight", around(6), false),
		mk("zigzag", "zigzag", around(6), false),
		mk("loop", "loop", around(6), false),
		mk("u_turn", "u_turn", around(6), false),
		mk("repeated_vertices", "repeated_vertices", around(6), false),
		mk("antimeridian", "antimeridian", around(6), false),
		mk("behind_user", "straight", func(rng *rand.Rand, r *routes.Route, u routes.Place) []orb.Point {
			p := r.PointAt(u.AlongM * uniform(rng, 0, 0.9))
			return []orb.Point{p, {p[0] + 0.0005, p[1]}}
		}, false),
		mk("past_end", "straight", func(rng *rand.Rand, r *routes.Route, u routes.Place) []orb.Point {
			end := r.PointAt(r.LengthM())
			prev := r.PointAt(r.LengthM() * 0.99)
			return []orb.Point{{end[0] + (end[0]-prev[0])*uniform(rng, 1, 20), end[1] + (end[1]-prev[1])*uniform(rng, 1, 20)}}
		}, false),
		mk("on_route", "zigzag", func(rng *rand.Rand, r *routes.Route, u routes.Place) []orb.Point {
			return []orb.Point{r.PointAt(uniform(rng, u.AlongM, r.LengthM()))}
		}, false),
		mk("with_camera", "straight", around(6), true),
	}
}

// ---- zoom ----

// drawRules draws a valid rule set of 1 to 4 bands.
func drawRules(rng *rand.Rand) *rules.Set {
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

func zoomFamilies() []family {
	mk := func(name string, speedAt func(rng *rand.Rand, rs *rules.Set, i int) (float64, *float64)) family {
		return family{name: name, draw: func(rng *rand.Rand) (*wire.Request, error) {
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
	return []family{
		mk("random", func(rng *rand.Rand, rs *rules.Set, i int) (float64, *float64) {
			return uniform(rng, 0, 40), nil
		}),
		mk("hysteresis_edge", func(rng *rand.Rand, rs *rules.Set, i int) (float64, *float64) {
			if len(rs.Bands) < 2 {
				return uniform(rng, 0, 30), nil
			}
			e := *rs.Bands[0].BelowKmh
			return (e + uniform(rng, -1.5, 1.5)*(rs.HysteresisKmh+1)) / 3.6, nil
		}),
		mk("turn_override", func(rng *rand.Rand, rs *rules.Set, i int) (float64, *float64) {
			d := uniform(rng, 0, 2*rs.Turn.WithinM)
			return uniform(rng, 10, 35), &d
		}),
		mk("speed_ramp", func(rng *rand.Rand, rs *rules.Set, i int) (float64, *float64) {
			return float64(i) * uniform(rng, 0.5, 3), nil
		}),
	}
}

// ---- timeline ----

func timelineFamilies() []family {
	mk := func(name string, shape string, tweak func(rng *rand.Rand, req *wire.Request, r *routes.Route)) family {
		return family{name: name, draw: func(rng *rand.Rand) (*wire.Request, error) {
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
	return []family{
		mk("straight", "straight", func(*rand.Rand, *wire.Request, *routes.Route) {}),
		mk("zigzag_turns", "zigzag", func(*rand.Rand, *wire.Request, *routes.Route) {}),
		mk("cap_contention", "straight", func(rng *rand.Rand, req *wire.Request, r *routes.Route) {
			c := 1.0
			req.Cap = &c
			for i := range 10 {
				pr := 1.0
				req.Markers = append(req.Markers, markerWire(fmt.Sprintf("c%02d", i), nearRoute(rng, r, 0.002), &pr))
			}
		}),
		mk("bucket_edges", "straight", func(rng *rand.Rand, req *wire.Request, r *routes.Route) {
			e := []float64{2, 10}
			req.BucketEdgesS = e
		}),
		mk("start_mid_route", "u_turn", func(rng *rand.Rand, req *wire.Request, r *routes.Route) {
			s := uniform(rng, 0, r.LengthM())
			req.StartAlongM = &s
		}),
	}
}

// Families returns the op/family names a corpus may hold, sorted.
func Families() []string {
	var out []string
	for _, p := range plans() {
		for _, f := range p.families {
			out = append(out, p.op+"/"+f.name)
		}
	}
	slices.Sort(out)
	return out
}
