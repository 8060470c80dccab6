package wire

import (
	"math"
	"strconv"
	"strings"

	jsonv2 "github.com/go-json-experiment/json"
	"github.com/go-json-experiment/json/jsontext"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/internal/fastwire"
	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// The conversions between wire objects and the geometry's values. Each
// Value method takes the object's path in the request ("camera",
// "points[2]") and returns the value, or a *spec.FieldError naming the
// first missing or invalid field under that path.

// Value returns the viewport camera of w, with the device's defaults filled
// in; ranges are checked by viewport.Prepare (see View).
func (w *Camera) Value(path string) (viewport.Camera, error) {
	var c viewport.Camera
	if w == nil {
		return c, spec.Absent(path)
	}
	for _, r := range [...]struct {
		name string
		p    *float64
		dst  *float64
	}{
		{"lat", w.Lat, &c.LatDeg}, {"lon", w.Lon, &c.LonDeg},
		{"heading_deg", w.HeadingDeg, &c.HeadingDeg}, {"pitch_deg", w.PitchDeg, &c.PitchDeg},
		{"zoom", w.Zoom, &c.Zoom},
	} {
		if r.p == nil {
			return c, spec.Absent(path + "." + r.name)
		}
		*r.dst = *r.p
	}
	d, err := w.Device.Value(path + ".device")
	if err != nil {
		return c, err
	}
	c.Device = d
	return c, nil
}

// View returns the prepared view of the camera at path.
func (w *Camera) View(path string) (viewport.View, error) {
	c, err := w.Value(path)
	if err != nil {
		return viewport.View{}, err
	}
	v, err := viewport.Prepare(c)
	if err != nil {
		return viewport.View{}, under(path+".", err)
	}
	return v, nil
}

// Value returns the viewport device of w with defaults filled in.
func (w *Device) Value(path string) (viewport.Device, error) {
	var d viewport.Device
	if w == nil {
		return d, spec.Absent(path)
	}
	for _, r := range [...]struct {
		name string
		p    *float64
	}{{"width_px", w.WidthPx}, {"height_px", w.HeightPx}, {"fov_y_deg", w.FovYDeg}} {
		if r.p == nil {
			return d, spec.Absent(path + "." + r.name)
		}
	}
	d = viewport.NewDevice(*w.WidthPx, *w.HeightPx, *w.FovYDeg)
	if w.TilePx != nil {
		t := *w.TilePx
		if t != 256 && t != 512 {
			return d, spec.Out(path+".tile_px", t, "tile size must be 256 or 512")
		}
		d.TilePx = int(t)
	}
	for _, o := range [...]struct {
		p   *float64
		dst *float64
	}{
		{w.AnchorX, &d.AnchorX}, {w.AnchorY, &d.AnchorY},
		{w.InsetTopPx, &d.InsetTopPx}, {w.InsetRightPx, &d.InsetRightPx},
		{w.InsetBottomPx, &d.InsetBottomPx}, {w.InsetLeftPx, &d.InsetLeftPx},
		{w.FarRatio, &d.FarRatio},
	} {
		if o.p != nil {
			*o.dst = *o.p
		}
	}
	return d, nil
}

// CameraOf returns the wire form of c, every device field spelled out.
func CameraOf(c viewport.Camera) *Camera {
	// One backing array for the sixteen numbers.
	vals := new([16]float64)
	n := 0
	f := func(v float64) *float64 {
		vals[n] = v
		n++
		return &vals[n-1]
	}
	d := c.Device
	return &Camera{
		Lat: f(c.LatDeg), Lon: f(c.LonDeg), HeadingDeg: f(c.HeadingDeg), PitchDeg: f(c.PitchDeg), Zoom: f(c.Zoom),
		Device: &Device{
			WidthPx: f(d.WidthPx), HeightPx: f(d.HeightPx), FovYDeg: f(d.FovYDeg), TilePx: f(float64(d.TilePx)),
			AnchorX: f(d.AnchorX), AnchorY: f(d.AnchorY),
			InsetTopPx: f(d.InsetTopPx), InsetRightPx: f(d.InsetRightPx),
			InsetBottomPx: f(d.InsetBottomPx), InsetLeftPx: f(d.InsetLeftPx),
			FarRatio: f(d.FarRatio),
		},
	}
}

// Value returns the [lon, lat] point of w, checking presence and range.
func (w *Point) Value(path string) (orb.Point, error) {
	if w == nil {
		return orb.Point{}, spec.Absent(path)
	}
	if w.Lat == nil {
		return orb.Point{}, spec.Absent(path + ".lat")
	}
	if w.Lon == nil {
		return orb.Point{}, spec.Absent(path + ".lon")
	}
	if err := spec.CheckLatLon(path, *w.Lat, *w.Lon); err != nil {
		return orb.Point{}, err
	}
	return orb.Point{*w.Lon, *w.Lat}, nil
}

// PointOf returns the wire form of p ([lon, lat] degrees).
func PointOf(p orb.Point) *Point {
	lat, lon := p[1], p[0]
	return &Point{Lat: &lat, Lon: &lon}
}

// MaxPixel is the largest |x| or |y| of a pixel to unproject: far off the
// screen a pixel still unprojects, but beyond 1e9 px the ground point's
// coordinates lose every digit.
const MaxPixel = 1e9

// Value returns the pixel of w, checking presence and range.
func (w *Pixel) Value(path string) (viewport.Pixel, error) {
	if w == nil {
		return viewport.Pixel{}, spec.Absent(path)
	}
	if w.X == nil {
		return viewport.Pixel{}, spec.Absent(path + ".x")
	}
	if w.Y == nil {
		return viewport.Pixel{}, spec.Absent(path + ".y")
	}
	if x := *w.X; !(x >= -MaxPixel && x <= MaxPixel) {
		return viewport.Pixel{}, spec.Out(path+".x", x, "pixel must be within [-1e9, 1e9]")
	}
	if y := *w.Y; !(y >= -MaxPixel && y <= MaxPixel) {
		return viewport.Pixel{}, spec.Out(path+".y", y, "pixel must be within [-1e9, 1e9]")
	}
	return viewport.Pixel{X: *w.X, Y: *w.Y}, nil
}

// Value returns the prepared route of w.
func (w *Route) Value(path string) (*routes.Route, error) {
	if w == nil {
		return nil, spec.Absent(path)
	}
	if w.Points == nil {
		return nil, spec.Absent(path + ".points")
	}
	pts := make([]orb.Point, len(w.Points))
	for i, pw := range w.Points {
		p, err := pw.Value(spec.Index(path+".points", i))
		if err != nil {
			return nil, err
		}
		pts[i] = p
	}
	speeds, err := w.speeds(path + ".speed_mps")
	if err != nil {
		return nil, err
	}
	r, err := routes.New(pts, speeds)
	if err != nil {
		return nil, under(path+".", err)
	}
	return r, nil
}

// RouteOf returns the wire form of a route's points and speeds (one for
// every segment, or one per segment).
func RouteOf(pts []orb.Point, speedsMps []float64) *Route {
	w := &Route{Points: make([]*Point, len(pts))}
	for i, p := range pts {
		w.Points[i] = PointOf(p)
	}
	if len(speedsMps) == 1 {
		w.SpeedMps = strconv.AppendFloat(nil, speedsMps[0], 'g', -1, 64)
	} else {
		b := []byte{'['}
		for i, s := range speedsMps {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendFloat(b, s) // as encoding/json writes it
		}
		w.SpeedMps = append(b, ']')
	}
	return w
}

// Markers returns the markers of a marker list: ids present and unique,
// positions valid, priorities 0 where absent.
func Markers(ws []*Marker, path string) ([]timeline.Marker, error) {
	if ws == nil {
		return nil, spec.Absent(path)
	}
	out := make([]timeline.Marker, len(ws))
	for i, w := range ws {
		// The usual marker is checked without naming its field; the name
		// is made only for the error.
		if w == nil || w.ID == nil || w.Lat == nil || w.Lon == nil || spec.CheckLatLon("", *w.Lat, *w.Lon) != nil {
			if w == nil {
				return nil, spec.Absent(spec.Index(path, i))
			}
			if w.ID == nil {
				return nil, spec.Absent(spec.Index(path, i) + ".id")
			}
			_, err := (&Point{Lat: w.Lat, Lon: w.Lon}).Value(spec.Index(path, i))
			return nil, err
		}
		m := timeline.Marker{ID: *w.ID, Point: orb.Point{*w.Lon, *w.Lat}}
		if w.Priority != nil {
			m.Priority = *w.Priority
		}
		out[i] = m
	}
	if err := timeline.CheckIDs(out, path); err != nil {
		return nil, err
	}
	return out, nil
}

// under returns err with prefix before its field path when it is a
// *spec.FieldError, and as an invalid value of the field prefix names
// otherwise.
func under(prefix string, err error) error {
	if fe, ok := err.(*spec.FieldError); ok {
		return fe.Under(prefix)
	}
	field := prefix
	if n := len(field); n > 0 && field[n-1] == '.' {
		field = field[:n-1]
	}
	return &spec.FieldError{Field: field, Reason: err.Error()}
}

// speeds reads speed_mps: one number, or an array of numbers. A number
// beyond the double range is invalid_value, as everywhere on the wire; a
// null entry is missing; anything else is bad_type.
func (w *Route) speeds(path string) ([]float64, error) {
	raw := jsontext.Value(w.SpeedMps)
	switch raw.Kind() {
	case 0, 'n':
		return nil, spec.Absent(path)
	case '0':
		v, err := number(raw, path)
		return []float64{v}, err
	case '[':
		if out, ok := plainNumbers(raw); ok {
			return out, nil
		}
		return numbersArray(raw, path)
	}
	return nil, &spec.FieldError{Kind: spec.BadType, Field: path, Reason: "expected a number or an array of numbers"}
}

// numbersArray reads a JSON array of numbers with the general decoder,
// naming the first item that is not one.
func numbersArray(raw jsontext.Value, path string) ([]float64, error) {
	var items []jsontext.Value
	if err := jsonv2.Unmarshal(raw, &items); err != nil {
		return nil, &spec.FieldError{Kind: spec.BadType, Field: path, Reason: "expected a number or an array of numbers"}
	}
	out := make([]float64, len(items))
	for i, it := range items {
		switch it.Kind() {
		case 'n':
			return nil, spec.Absent(spec.Index(path, i))
		case '0':
			v, err := number(it, spec.Index(path, i))
			if err != nil {
				return nil, err
			}
			out[i] = v
		default:
			return nil, &spec.FieldError{Kind: spec.BadType, Field: spec.Index(path, i), Reason: "expected a number"}
		}
	}
	return out, nil
}

// plainNumbers reads a compact array of finite JSON numbers without the
// general decoder (a route's speeds, one per segment); ok is false for
// anything else, which the general path reads and words the errors of.
func plainNumbers(raw []byte) (out []float64, ok bool) {
	if len(raw) < 2 || raw[0] != '[' || raw[len(raw)-1] != ']' {
		return nil, false
	}
	body := string(raw[1 : len(raw)-1])
	out = make([]float64, 0, strings.Count(body, ",")+1)
	for len(body) > 0 {
		item, rest, more := strings.Cut(body, ",")
		if !fastwire.IsNumber(item) || (more && rest == "") {
			return nil, false
		}
		v, err := strconv.ParseFloat(item, 64)
		if err != nil {
			return nil, false
		}
		out, body = append(out, v), rest
	}
	return out, true
}

// number reads a JSON number; one beyond the double range is an invalid
// value, not a wrong type.
func number(raw jsontext.Value, path string) (float64, error) {
	v, err := strconv.ParseFloat(string(raw), 64)
	if err != nil {
		return 0, &spec.FieldError{Field: path, Value: string(raw), Reason: "not a finite number"}
	}
	return v, nil
}

// Drive returns the drive a timeline request describes (apart from its
// markers), with the SPEC §5 defaults for what it leaves out, validated.
func (req *Request) Drive() (timeline.Drive, error) {
	var d timeline.Drive
	var r *routes.Route
	var stops []timeline.Stop
	var err error
	switch {
	case req.Fixes != nil && req.Route != nil:
		return d, &spec.FieldError{Field: "fixes", Reason: "give route or fixes, not both"}
	case req.Fixes != nil && (req.StartAlongM != nil || req.User != nil):
		return d, &spec.FieldError{Field: "fixes", Reason: "a drive along fixes starts at its first fix: give no start_along_m or user"}
	case req.Fixes != nil:
		fx, err := FixesValue(req.Fixes, "fixes")
		if err != nil {
			return d, err
		}
		if r, stops, err = timeline.Replay(fx, "fixes"); err != nil {
			return d, err
		}
	default:
		if r, err = req.Route.Value("route"); err != nil {
			return d, err
		}
	}
	return req.DriveOn(r, stops)
}

// DriveOn returns the drive a timeline request describes on the route r
// with the stops given, already built (from the request's route or fixes):
// the device, rules, start and timeline parameters, with the SPEC §5
// defaults, validated.
func (req *Request) DriveOn(r *routes.Route, stops []timeline.Stop) (timeline.Drive, error) {
	var d timeline.Drive
	dev, err := req.Device.Value("device")
	if err != nil {
		return d, err
	}
	// The device's values now, before the rules (SPEC §6: each input
	// wholly before the next); a camera looking straight down puts no
	// pitch-dependent limit on the anchor.
	if err := (viewport.Camera{Device: dev}).Validate(); err != nil {
		return d, err
	}
	rs, err := req.Rules.Value("rules")
	if err != nil {
		return d, err
	}
	start := 0.0
	switch {
	case req.StartAlongM != nil && req.User != nil:
		return d, &spec.FieldError{Field: "user", Reason: "give start_along_m or user, not both"}
	case req.StartAlongM != nil:
		start = *req.StartAlongM
	case req.User != nil:
		u, err := req.User.Value("user")
		if err != nil {
			return d, err
		}
		start = r.Snap(u).AlongM
	}
	d = timeline.NewDrive(r, start, dev, rs)
	d.Stops = stops
	if req.HorizonS != nil {
		d.HorizonS = *req.HorizonS
	}
	if req.TickS != nil {
		d.TickS = *req.TickS
	}
	if req.Cap != nil {
		c := *req.Cap
		if c != math.Trunc(c) || c < 1 || c > 1<<30 {
			return d, spec.Out("cap", c, "cap must be a whole number, at least 1")
		}
		d.Cap = int(c)
	}
	if req.BucketEdgesS != nil {
		if len(req.BucketEdgesS) != 2 {
			return d, &spec.FieldError{Field: "bucket_edges_s", Reason: "want 2 edges (early|mid and mid|late)"}
		}
		for i, e := range req.BucketEdgesS {
			if e == nil {
				return d, spec.Absent(spec.Index("bucket_edges_s", i))
			}
			d.BucketEdgesS[i] = *e
		}
	}
	if err := d.Validate(); err != nil {
		return d, err
	}
	return d, nil
}

// TimelineOf returns the wire lines of a timeline's results.
func TimelineOf(ms []timeline.Marker, got []timeline.Result) []MarkerTimeline {
	out := make([]MarkerTimeline, len(got))
	nums := make([]float64, 5*len(got))
	for i, g := range got {
		o := MarkerTimeline{ID: ms[i].ID, ShownS: g.ShownS, Bucket: g.Bucket.String()}
		n := nums[5*i : 5*i+5]
		if !math.IsInf(g.TurnMarginDeg, 0) {
			n[4] = g.TurnMarginDeg
			o.TurnMarginDeg = &n[4]
		}
		if g.Visible {
			n[0] = g.FirstVisibleS
			o.FirstVisibleS = &n[0]
		}
		if g.Shown {
			n[1], n[2], n[3] = g.FirstShownS, g.BucketMarginS, g.FirstShownMarginPx
			o.FirstShownS, o.BucketMarginS, o.FirstShownMarginPx = &n[1], &n[2], &n[3]
		}
		out[i] = o
	}
	return out
}

// FixesValue returns the recorded fixes of a drive, each checked for
// presence (t_s, lat, lon); path names the array ("fixes", "trace").
func FixesValue(ws []*Fix, path string) ([]timeline.Fix, error) {
	out := make([]timeline.Fix, len(ws))
	for i, w := range ws {
		switch {
		case w == nil:
			return nil, spec.Absent(spec.Index(path, i))
		case w.TS == nil:
			return nil, spec.Absent(spec.Index(path, i) + ".t_s")
		case w.Lat == nil:
			return nil, spec.Absent(spec.Index(path, i) + ".lat")
		case w.Lon == nil:
			return nil, spec.Absent(spec.Index(path, i) + ".lon")
		}
		out[i] = timeline.Fix{TS: *w.TS, Point: orb.Point{*w.Lon, *w.Lat}}
	}
	return out, nil
}
