package check

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"
	"sync"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"

	jsonv2 "github.com/go-json-experiment/json"
	"github.com/valyala/fastjson"
	"go.yaml.in/yaml/v3"
)

// Tolerance bounds a difference: it passes when |got − want| ≤ Abs +
// Rel·|want|.
type Tolerance struct {
	Abs float64 `json:"abs" yaml:"abs"`
	Rel float64 `json:"rel" yaml:"rel"`
}

// Allowed returns the largest difference the tolerance allows at want.
func (t Tolerance) Allowed(want float64) float64 { return t.Abs + t.Rel*math.Abs(want) }

// Profile is a set of per-quantity tolerances. Quantities are compared in
// the units a user feels: pixels, ground metres (positions by their
// distance on the ground, not by degrees), seconds, zoom levels, degrees.
type Profile struct {
	Name string `json:"name" yaml:"name"`
	// PixelPx bounds screen positions (the distance between the pixels) and
	// the in-view decision: a disagreement on a point whose margin is within
	// it is borderline.
	PixelPx Tolerance `json:"pixel_px" yaml:"pixel_px"`
	// DepthPx bounds depths along the view axis.
	DepthPx Tolerance `json:"depth_px" yaml:"depth_px"`
	// GroundM bounds positions (unprojected points, footprint vertices) by
	// their ground distance, metres.
	GroundM Tolerance `json:"ground_m" yaml:"ground_m"`
	// DistM bounds distances (user, route, along, visible radius, view
	// distance), metres, and the side decision's borderline band.
	DistM Tolerance `json:"dist_m" yaml:"dist_m"`
	// AreaM2 bounds footprint areas.
	AreaM2 Tolerance `json:"area_m2" yaml:"area_m2"`
	// TimeS bounds times (eta, first visible and shown, shown seconds) and
	// the bucket decision's borderline band.
	TimeS Tolerance `json:"time_s" yaml:"time_s"`
	// Zoom and PitchDeg bound the zoom trace.
	Zoom     Tolerance `json:"zoom" yaml:"zoom"`
	PitchDeg Tolerance `json:"pitch_deg" yaml:"pitch_deg"`
}

// Profiles are the named tolerance profiles.
var Profiles = map[string]Profile{
	// strict: two implementations of the same formulas in double precision.
	// Pixels agree to a micro-pixel, positions to a micrometre, distances
	// to 0.1 mm (GeographicLib-level geodesics), times to a nanosecond.
	"strict": {
		Name:    "strict",
		PixelPx: Tolerance{1e-6, 1e-9}, DepthPx: Tolerance{1e-6, 1e-9},
		GroundM: Tolerance{1e-6, 0}, DistM: Tolerance{1e-4, 1e-9}, AreaM2: Tolerance{1e-6, 1e-9},
		// time_s: eta is an along-route distance over a speed; the reference
		// states its along-route positions within 0.1 µm under 1 km (SPEC
		// §4), which at 0.1 m/s is 1 µs. A nanosecond held an implementation
		// that is closer to the exact value than the reference to fail.
		TimeS: Tolerance{1e-6, 1e-9}, Zoom: Tolerance{1e-9, 0}, PitchDeg: Tolerance{1e-9, 0},
	},
	// field: what a user can see or feel — half a pixel, half a metre, a
	// metre or 0.1 % in distance, a tick (0.25 s) in time, a hundredth of a
	// zoom level, a tenth of a degree.
	"field": {
		Name:    "field",
		PixelPx: Tolerance{0.5, 0}, DepthPx: Tolerance{0.5, 1e-6},
		GroundM: Tolerance{0.5, 0}, DistM: Tolerance{1, 1e-3}, AreaM2: Tolerance{0, 1e-3},
		TimeS: Tolerance{0.25, 0}, Zoom: Tolerance{0.01, 0}, PitchDeg: Tolerance{0.1, 0},
	},
}

// LoadProfile returns the named profile with the overrides of a YAML file
// (when file is not empty): `base: strict|field` and any of the quantities
// as {abs, rel}. A key the file format does not have, a value of the wrong
// kind, or a tolerance that is negative or not finite is an error naming
// the file, the line and the key.
func LoadProfile(name, file string) (Profile, error) {
	p, ok := Profiles[name]
	if !ok {
		return p, fmt.Errorf("unknown profile %q (known: field, strict)", name)
	}
	if file == "" {
		return p, nil
	}
	data, err := os.ReadFile(file)
	if err != nil {
		return p, err
	}
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		return p, fmt.Errorf("%s: %v", file, err)
	}
	if len(doc.Content) == 0 {
		return p, fmt.Errorf("%s: empty: want base and tolerances, e.g. pixel_px: {abs: 0.5, rel: 0}", file)
	}
	root := doc.Content[0]
	at := func(n *yaml.Node, format string, args ...any) error {
		return fmt.Errorf("%s:%d:%d: %s", file, n.Line, n.Column, fmt.Sprintf(format, args...))
	}
	if root.Kind != yaml.MappingNode {
		return p, at(root, "want a mapping of base and tolerances")
	}
	// The base first: the file's tolerances override it, whatever the order.
	for k := 0; k+1 < len(root.Content); k += 2 {
		if key, v := root.Content[k], root.Content[k+1]; key.Value == "base" {
			if p, ok = Profiles[v.Value]; !ok {
				return p, at(v, "base: unknown profile %q (known: field, strict)", v.Value)
			}
		}
	}
	q := p
	fields := q.tolerances()
	for k := 0; k+1 < len(root.Content); k += 2 {
		key, v := root.Content[k], root.Content[k+1]
		if key.Value == "base" {
			continue
		}
		tol, ok := fields[key.Value]
		if !ok {
			return p, at(key, "unknown key %q (known: base, %s)", key.Value, strings.Join(toleranceNames, ", "))
		}
		if err := readTolerance(v, tol); err != nil {
			return p, at(v, "%s: %v", key.Value, err)
		}
	}
	q.Name = p.Name + "+" + file
	return q, nil
}

// toleranceNames are the keys of a profile's tolerances, in file order.
var toleranceNames = []string{"pixel_px", "depth_px", "ground_m", "dist_m", "area_m2", "time_s", "zoom", "pitch_deg"}

// tolerances returns p's tolerances by key.
func (p *Profile) tolerances() map[string]*Tolerance {
	return map[string]*Tolerance{"pixel_px": &p.PixelPx, "depth_px": &p.DepthPx, "ground_m": &p.GroundM,
		"dist_m": &p.DistM, "area_m2": &p.AreaM2, "time_s": &p.TimeS, "zoom": &p.Zoom, "pitch_deg": &p.PitchDeg}
}

// readTolerance reads {abs, rel} from n over t: what n leaves out keeps
// t's value.
func readTolerance(n *yaml.Node, t *Tolerance) error {
	if n.Kind != yaml.MappingNode {
		return fmt.Errorf("want {abs: …, rel: …}, got %q", n.Value)
	}
	for k := 0; k+1 < len(n.Content); k += 2 {
		key, v := n.Content[k], n.Content[k+1]
		var dst *float64
		switch key.Value {
		case "abs":
			dst = &t.Abs
		case "rel":
			dst = &t.Rel
		default:
			return fmt.Errorf("line %d: unknown key %q (known: abs, rel)", key.Line, key.Value)
		}
		x, err := strconv.ParseFloat(v.Value, 64)
		if v.Kind != yaml.ScalarNode || (err != nil && !errors.Is(err, strconv.ErrRange)) {
			return fmt.Errorf("%s = %q: not a number", key.Value, v.Value)
		}
		if !(x >= 0) || math.IsInf(x, 0) {
			return fmt.Errorf("%s = %s: must be finite and non-negative", key.Value, spec.FormatNumber(x))
		}
		*dst = x
	}
	return nil
}

// Status is the outcome of one case.
type Status int

const (
	Pass Status = iota
	Borderline
	Fail
	Missing
	Skipped
)

var statusNames = [...]string{"pass", "borderline", "fail", "missing", "skipped"}

func (s Status) String() string { return statusNames[s] }

// MarshalText writes the status's name.
func (s Status) MarshalText() ([]byte, error) { return []byte(s.String()), nil }

// Diff is one compared quantity that did not pass, or passed only as
// borderline.
type Diff struct {
	Path     string  `json:"path"`     // where in the answer, e.g. "screen[2].x"
	Quantity string  `json:"quantity"` // which tolerance applies, e.g. "pixel_px"
	Want     string  `json:"want"`
	Got      string  `json:"got"`
	Diff     float64 `json:"diff"`    // in the quantity's unit (0 for a discrete mismatch)
	Allowed  float64 `json:"allowed"` // the tolerance at want
	// Ratio orders the worst differences: Diff/Allowed, or +Inf for a
	// discrete mismatch outside the margin (null in JSON).
	Ratio      float64 `json:"ratio"`
	Borderline bool    `json:"borderline,omitempty"`
	Note       string  `json:"note,omitempty"`
}

// MarshalJSON writes d with each number that JSON cannot hold (the
// infinite ratio of a discrete mismatch outside its margin, a difference
// with an answer beyond the double range) as null.
func (d Diff) MarshalJSON() ([]byte, error) {
	type plain Diff
	fin := func(v float64) *float64 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil
		}
		return &v
	}
	return json.Marshal(struct {
		plain
		Diff    *float64 `json:"diff"`
		Allowed *float64 `json:"allowed"`
		Ratio   *float64 `json:"ratio"`
	}{plain(d), fin(d.Diff), fin(d.Allowed), fin(d.Ratio)})
}

// differ collects the differences of one case.
type differ struct {
	p          *Profile
	diffs      []Diff
	marginsRaw json.RawMessage
	margins    *wire.Margins
	request    json.RawMessage

	scratchA, scratchB []byte // raw number text, for sameNumbers
}

// m returns the case's margins, decoded on first use (only a discrete
// disagreement needs them).
func (k *differ) m() *wire.Margins {
	if k.margins == nil {
		k.margins = &wire.Margins{}
		jsonv2.Unmarshal(k.marginsRaw, k.margins, jsonOpts)
	}
	return k.margins
}

func fmtF(v float64) string { return spec.FormatNumber(v) }

// num compares a continuous quantity.
func (c *differ) num(path, q string, tol Tolerance, want, got float64) {
	d := math.Abs(got - want)
	allowed := tol.Allowed(want)
	if d <= allowed {
		return
	}
	if math.IsNaN(d) {
		d = math.Inf(1)
	}
	c.diffs = append(c.diffs, Diff{Path: path, Quantity: q, Want: fmtF(want), Got: fmtF(got), Diff: d, Allowed: allowed, Ratio: ratio(d, allowed)})
}

// dist records a difference already measured (a ground distance), when it
// is beyond the tolerance; show formats want and got only then.
func (c *differ) dist(path, q string, tol Tolerance, scale, d float64, show func() (want, got string)) {
	allowed := tol.Allowed(scale)
	if d <= allowed {
		return
	}
	want, got := show()
	c.diffs = append(c.diffs, Diff{Path: path, Quantity: q, Want: want, Got: got, Diff: d, Allowed: allowed, Ratio: ratio(d, allowed)})
}

// discrete records a mismatch of a decision; it is borderline when the
// reference's margin (in the quantity's unit) is within the tolerance.
func (c *differ) discrete(path, q string, tol Tolerance, want, got string, margin *float64) {
	allowed := tol.Allowed(0)
	d := Diff{Path: path, Quantity: q, Want: want, Got: got, Allowed: allowed, Ratio: math.Inf(1)}
	if margin != nil {
		d.Note = "reference margin " + fmtF(*margin)
		if math.Abs(*margin) <= allowed {
			d.Borderline, d.Ratio = true, 0
		}
	}
	c.diffs = append(c.diffs, d)
}

// choiceBorderline marks a marker's along_m, eta_s and side differences
// borderline when the reference's choice of its closest point was within
// dist_m's tolerance of another choice (SPEC §4, §7): a closest point that
// jumps across a tie moves all three at once.
func (c *differ) choiceBorderline(ds []Diff, margin *float64) {
	if margin == nil || math.Abs(*margin) > c.p.DistM.Allowed(0) {
		return
	}
	for i := range ds {
		ds[i].Borderline, ds[i].Ratio = true, 0
		ds[i].Note = strings.TrimPrefix(ds[i].Note+"; ", "; ") + "closest-point choice margin " + fmtF(*margin) + " m"
	}
}

func (c *differ) shape(path, msg string) {
	c.diffs = append(c.diffs, Diff{Path: path, Quantity: "shape", Want: "", Got: msg, Ratio: math.Inf(1)})
}

func ratio(d, allowed float64) float64 {
	if allowed == 0 {
		return math.Inf(1)
	}
	return d / allowed
}

// status is the case's outcome from its differences.
func (c *differ) status() Status {
	st := Pass
	for _, d := range c.diffs {
		if !d.Borderline {
			return Fail
		}
		st = Borderline
	}
	return st
}

// groundDistM is the distance in metres between two points on the mean
// sphere (R = 6 371 008.8 m, haversine): a measure of disagreement, within
// 0.5 % of the WGS84 geodesic, which is ample for a tolerance.
func groundDistM(lat1, lon1, lat2, lon2 float64) float64 {
	const r = 6371008.8
	p1, p2 := lat1*math.Pi/180, lat2*math.Pi/180
	dp, dl := p2-p1, math.Remainder(lon2-lon1, 360)*math.Pi/180
	a := math.Sin(dp/2)*math.Sin(dp/2) + math.Cos(p1)*math.Cos(p2)*math.Sin(dl/2)*math.Sin(dl/2)
	return 2 * r * math.Asin(math.Min(1, math.Sqrt(a)))
}

func at(field string, i int) string { return field + "[" + strconv.Itoa(i) + "]" }

func pair(a, b float64) string { return "(" + fmtF(a) + ", " + fmtF(b) + ")" }

// Compare compares an implementation's answer (raw JSON) with a case's
// expectation under profile p and returns the case's status and the
// differences behind it.
func Compare(c *corpus.Case, got json.RawMessage, p *Profile) (Status, []Diff) {
	k := &differ{p: p, marginsRaw: c.Margins, request: c.Request}
	pp := parsers.Get().(*parserPair)
	defer parsers.Put(pp)
	w, err := pp.want.ParseBytes(c.Expect)
	if err != nil {
		k.shape("", "the case's expectation is not JSON: "+err.Error())
		return k.status(), k.diffs
	}
	g, err := pp.got.ParseBytes(got)
	if err != nil || g.Type() != fastjson.TypeObject {
		k.shape("", "not a JSON object: "+spec.Excerpt(got, 80))
		return k.status(), k.diffs
	}
	wantErr, gotErr := w.Get("error"), g.Get("error")
	switch {
	case wantErr != nil && gotErr != nil:
		if wc, gc := str(wantErr, "code"), str(gotErr, "code"); wc != gc {
			k.discrete("error.code", "shape", Tolerance{}, wc, gc, nil)
		}
		return k.status(), k.diffs
	case wantErr != nil:
		k.discrete("error", "shape", Tolerance{}, "error "+str(wantErr, "code")+": "+str(wantErr, "message"), "an answer", nil)
		return k.status(), k.diffs
	case gotErr != nil:
		k.discrete("error", "shape", Tolerance{}, "an answer", "error "+str(gotErr, "code")+": "+str(gotErr, "message"), nil)
		return k.status(), k.diffs
	}
	switch c.Op {
	case "project":
		k.project(w, g)
	case "unproject":
		k.unproject(w, g)
	case "footprint":
		k.footprint(w, g)
	case "horizon":
		err = k.horizon(c.Expect, got)
	case "hello":
		// Implementations speak different ops; the spec they answer for
		// is what must agree.
		if ws, gs := str(w, "spec"), str(g, "spec"); ws != gs {
			k.discrete("spec", "shape", Tolerance{}, ws, gs, nil)
		}
	case "metrics":
		err = k.metrics(c.Expect, got)
	case "zoom":
		err = k.zoom(c.Expect, got)
	case "timeline":
		err = k.timeline(c.Expect, got)
	default:
		k.shape("op", "no comparison for op "+c.Op)
	}
	if err != nil {
		k.shape("", err.Error())
	}
	return k.status(), k.diffs
}

// parserPair parses an expectation and an answer; the camera ops, the bulk
// of a corpus, are compared on these parsed values directly, which is
// several times faster than decoding into structs.
type parserPair struct{ want, got fastjson.Parser }

var parsers = sync.Pool{New: func() any { return new(parserPair) }}

// str returns the string at key of v, or "".
func str(v *fastjson.Value, key string) string {
	return string(v.GetStringBytes(key))
}

// number reads the number at key of v; it records a shape difference and
// returns false when it is missing or not a number.
func (k *differ) number(path string, v *fastjson.Value, key string) (float64, bool) {
	x := v.Get(key)
	if x == nil || x.Type() != fastjson.TypeNumber {
		k.shape(path+"."+key, "missing or not a number")
		return 0, false
	}
	f, err := x.Float64()
	if err != nil {
		k.shape(path+"."+key, "not a finite number")
		return 0, false
	}
	return f, true
}

// array reads the array at key of v, recording a shape difference when it
// is missing or not an array.
func (k *differ) array(path string, v *fastjson.Value, key string) ([]*fastjson.Value, bool) {
	x := v.Get(key)
	if x == nil || x.Type() != fastjson.TypeArray {
		k.shape(path+key, "missing or not an array")
		return nil, false
	}
	a, _ := x.Array()
	return a, true
}

func isNull(v *fastjson.Value) bool { return v == nil || v.Type() == fastjson.TypeNull }

// sameNumbers reports whether a and b hold, at every key, numbers written
// with the same digits: then they are equal and need not be parsed (an
// implementation that agrees to the last bit usually writes the same
// shortest digits). Anything else, including a missing key, goes the long
// way.
func (k *differ) sameNumbers(a, b *fastjson.Value, keys ...string) bool {
	for _, key := range keys {
		x, y := a.Get(key), b.Get(key)
		if x == nil || y == nil || x.Type() != fastjson.TypeNumber || y.Type() != fastjson.TypeNumber {
			return false
		}
		k.scratchA = x.MarshalTo(k.scratchA[:0])
		k.scratchB = y.MarshalTo(k.scratchB[:0])
		if !bytes.Equal(k.scratchA, k.scratchB) {
			return false
		}
	}
	return true
}

// jsonOpts read answers the way SPEC §6 says: keys exactly, unknown keys
// ignored, and a repeated key is an error.
var jsonOpts = jsonv2.DefaultOptionsV2()

func decodeBoth[T any](want, got json.RawMessage) (w, g T, err error) {
	if err = jsonv2.Unmarshal(want, &w, jsonOpts); err != nil {
		return w, g, fmt.Errorf("expectation unreadable: %v", err)
	}
	if err = jsonv2.Unmarshal(got, &g, jsonOpts); err != nil {
		return w, g, fmt.Errorf("answer unreadable: %v", err)
	}
	return w, g, nil
}

func marginAt(ms []*float64, i int) *float64 {
	if i < len(ms) {
		return ms[i]
	}
	return nil
}

func (k *differ) project(w, g *fastjson.Value) {
	ws, ok1 := k.array("", w, "screen")
	gs, ok2 := k.array("", g, "screen")
	if !ok1 || !ok2 {
		return
	}
	if len(gs) != len(ws) {
		k.shape("screen", fmt.Sprintf("%d entries, want %d", len(gs), len(ws)))
		return
	}
	for i, wv := range ws {
		gv, path := gs[i], at("screen", i)
		switch wn, gn := isNull(wv), isNull(gv); {
		case wn && gn:
			continue
		case wn || gn:
			// Behind the camera plane or not: decided by the sign of depth.
			wantS, gotS, side := "null (behind the camera)", "a pixel", gv
			if gn {
				wantS, gotS, side = "a pixel", "null (behind the camera)", wv
			}
			var depth *float64
			if dv := side.Get("depth"); dv != nil {
				if d, err := dv.Float64(); err == nil {
					depth = &d
				}
			}
			k.discrete(path, "depth_px", k.p.DepthPx, wantS, gotS, depth)
			continue
		}
		if k.sameNumbers(wv, gv, "x", "y", "depth") {
			k.inView(path, i, wv, gv)
			continue
		}
		wx, ok1 := k.number(path, wv, "x")
		wy, ok2 := k.number(path, wv, "y")
		wd, ok3 := k.number(path, wv, "depth")
		gx, ok4 := k.number(path, gv, "x")
		gy, ok5 := k.number(path, gv, "y")
		gd, ok6 := k.number(path, gv, "depth")
		if !(ok1 && ok2 && ok3 && ok4 && ok5 && ok6) {
			continue
		}
		k.dist(path+".xy", "pixel_px", k.p.PixelPx, math.Hypot(wx, wy), math.Hypot(gx-wx, gy-wy),
			func() (string, string) { return pair(wx, wy), pair(gx, gy) })
		k.num(path+".depth", "depth_px", k.p.DepthPx, wd, gd)
		k.inView(path, i, wv, gv)
	}
}

// inView compares the in-view decision of screen entry i.
func (k *differ) inView(path string, i int, wv, gv *fastjson.Value) {
	wi, gi := wv.GetBool("in_view"), gv.GetBool("in_view")
	if giv := gv.Get("in_view"); giv == nil || (giv.Type() != fastjson.TypeTrue && giv.Type() != fastjson.TypeFalse) {
		k.shape(path+".in_view", "missing or not a boolean")
	} else if wi != gi {
		k.discrete(path+".in_view", "pixel_px", k.p.PixelPx, fmt.Sprint(wi), fmt.Sprint(gi), marginAt(k.m().MarginPx, i))
	}
}

// latLon compares two positions by their ground distance.
func (k *differ) latLon(path string, w, g *fastjson.Value) {
	if k.sameNumbers(w, g, "lat", "lon") {
		return
	}
	wl, ok1 := k.number(path, w, "lat")
	wo, ok2 := k.number(path, w, "lon")
	gl, ok3 := k.number(path, g, "lat")
	go_, ok4 := k.number(path, g, "lon")
	if !(ok1 && ok2 && ok3 && ok4) {
		return
	}
	d := groundDistM(wl, wo, gl, go_)
	k.dist(path, "ground_m", k.p.GroundM, 0, d, func() (string, string) { return pair(wl, wo), pair(gl, go_) })
}

func (k *differ) unproject(w, g *fastjson.Value) {
	wp, ok1 := k.array("", w, "points")
	gp, ok2 := k.array("", g, "points")
	if !ok1 || !ok2 {
		return
	}
	if len(gp) != len(wp) {
		k.shape("points", fmt.Sprintf("%d entries, want %d", len(gp), len(wp)))
		return
	}
	for i, wv := range wp {
		gv, path := gp[i], at("points", i)
		switch wn, gn := isNull(wv), isNull(gv); {
		case wn && gn:
		case wn || gn:
			wantS, gotS := "null (at or above the horizon)", "a point"
			if gn {
				wantS, gotS = gotS, wantS
			}
			k.discrete(path, "pixel_px", k.p.PixelPx, wantS, gotS, marginAt(k.m().HorizonPx, i))
		default:
			k.unprojected(path, i, wv, gv)
		}
	}
}

// PixelResolutionPx is the pixel perturbation whose ground span widens
// ground_m for an unprojected point (SPEC §7): 1e-9 px, about 10⁴ ulp of
// a 1,000 px coordinate carried through the ray's few products.
const PixelResolutionPx = 1e-9

// unprojected compares an unprojected point. Its ground_m tolerance grows
// with the point's conditioning: D/h × PixelResolutionPx, D the expected
// point's ground distance from the camera's centre, h its pixel's distance
// below the horizon row (the reference's horizon_px margin). Near the
// horizon, D/h (m/px) is the ground span of a pixel (SPEC §7).
func (k *differ) unprojected(path string, i int, w, g *fastjson.Value) {
	if k.sameNumbers(w, g, "lat", "lon") {
		return
	}
	wl, ok1 := k.number(path, w, "lat")
	wo, ok2 := k.number(path, w, "lon")
	gl, ok3 := k.number(path, g, "lat")
	go_, ok4 := k.number(path, g, "lon")
	if !(ok1 && ok2 && ok3 && ok4) {
		return
	}
	d := groundDistM(wl, wo, gl, go_)
	tol := k.p.GroundM
	if d > tol.Allowed(0) {
		tol.Abs += k.conditioningM(i, wl, wo)
	}
	k.dist(path, "ground_m", tol, 0, d, func() (string, string) { return pair(wl, wo), pair(gl, go_) })
}

// conditioningM is the ground span of PixelResolutionPx at pixel i of an
// unproject request whose expected point is (lat, lon); 0 when the
// request or the margin is not at hand.
func (k *differ) conditioningM(i int, lat, lon float64) float64 {
	h := marginAt(k.m().HorizonPx, i)
	if h == nil || *h <= 0 {
		return 0
	}
	var p fastjson.Parser
	r, err := p.ParseBytes(k.request)
	if err != nil {
		return 0
	}
	cam := r.Get("camera")
	if cam == nil {
		return 0
	}
	cl, ok1 := cam.Get("lat").Float64()
	co, ok2 := cam.Get("lon").Float64()
	if ok1 != nil || ok2 != nil {
		return 0
	}
	return groundDistM(cl, co, lat, lon) / *h * PixelResolutionPx
}

func (k *differ) footprint(w, g *fastjson.Value) {
	wv, ok1 := k.array("", w, "vertices")
	gv, ok2 := k.array("", g, "vertices")
	if !ok1 || !ok2 {
		return
	}
	if len(gv) != len(wv) {
		if len(gv) == 0 || len(wv) == 0 {
			k.discrete("vertices", "pixel_px", k.p.PixelPx, fmt.Sprintf("%d vertices", len(wv)), fmt.Sprintf("%d vertices", len(gv)), k.m().EmptyPx)
		} else {
			k.shape("vertices", fmt.Sprintf("%d vertices, want %d", len(gv), len(wv)))
		}
		return
	}
	for i := range wv {
		k.latLon(at("vertices", i), wv[i], gv[i])
	}
	wa, ok1 := k.number("", w, "area_m2")
	ga, ok2 := k.number("", g, "area_m2")
	if ok1 && ok2 {
		k.num("area_m2", "area_m2", k.p.AreaM2, wa, ga)
	}
	wr, ok1 := k.number("", w, "visible_radius_m")
	gr, ok2 := k.number("", g, "visible_radius_m")
	if ok1 && ok2 {
		k.num("visible_radius_m", "dist_m", k.p.DistM, wr, gr)
	}
}

func (k *differ) optNum(path, q string, tol Tolerance, w, g *float64, margin *float64) {
	switch {
	case w == nil && g == nil:
	case w == nil || g == nil:
		show := func(p *float64) string {
			if p == nil {
				return "null"
			}
			return fmtF(*p)
		}
		k.discrete(path, q, tol, show(w), show(g), margin)
	default:
		k.num(path, q, tol, *w, *g)
	}
}

func rawNum(r json.RawMessage) *float64 {
	var p *float64
	if len(r) > 0 {
		json.Unmarshal(r, &p)
	}
	return p
}

func (k *differ) metrics(want, got json.RawMessage) error {
	w, g, err := decodeBoth[wire.MetricsAnswer](want, got)
	if err != nil {
		return err
	}
	if len(g.Markers) != len(w.Markers) {
		k.shape("markers", fmt.Sprintf("%d entries, want %d", len(g.Markers), len(w.Markers)))
		return nil
	}
	for i, wm := range w.Markers {
		gm, path := g.Markers[i], at("markers", i)
		if gm.ID != wm.ID {
			k.shape(path+".id", fmt.Sprintf("%q, want %q", gm.ID, wm.ID))
			continue
		}
		k.num(path+".user_dist_m", "dist_m", k.p.DistM, wm.UserDistM, gm.UserDistM)
		k.num(path+".route_dist_m", "dist_m", k.p.DistM, wm.RouteDistM, gm.RouteDistM)
		chosen := len(k.diffs)
		k.optNum(path+".along_m", "dist_m", k.p.DistM, wm.AlongM, gm.AlongM, nil)
		k.optNum(path+".eta_s", "time_s", k.p.TimeS, wm.EtaS, gm.EtaS, nil)
		if wm.Side != gm.Side {
			k.discrete(path+".side", "dist_m", k.p.DistM, wm.Side, gm.Side, marginAt(k.m().SideMarginM, i))
		}
		if len(k.diffs) > chosen {
			k.choiceBorderline(k.diffs[chosen:], marginAt(k.m().ChoiceMarginM, i))
		}
		if len(wm.ViewDistM) > 0 {
			k.optNum(path+".view_dist_m", "dist_m", k.p.DistM, rawNum(wm.ViewDistM), rawNum(gm.ViewDistM), nil)
		}
	}
	return nil
}

func (k *differ) horizon(want, got json.RawMessage) error {
	w, g, err := decodeBoth[wire.HorizonAnswer](want, got)
	if err != nil {
		return err
	}
	k.optNum("horizon_row_px", "pixel_px", k.p.PixelPx, w.HorizonRowPx, g.HorizonRowPx, nil)
	k.optNum("far_row_px", "pixel_px", k.p.PixelPx, w.FarRowPx, g.FarRowPx, nil)
	return nil
}

func (k *differ) zoom(want, got json.RawMessage) error {
	w, g, err := decodeBoth[wire.ZoomAnswer](want, got)
	if err != nil {
		return err
	}
	if len(g.Zoom) != len(w.Zoom) || len(g.PitchDeg) != len(w.PitchDeg) {
		k.shape("zoom", fmt.Sprintf("%d zooms and %d pitches, want %d and %d", len(g.Zoom), len(g.PitchDeg), len(w.Zoom), len(w.PitchDeg)))
		return nil
	}
	for i := range w.Zoom {
		k.num(at("zoom", i), "zoom", k.p.Zoom, w.Zoom[i], g.Zoom[i])
		k.num(at("pitch_deg", i), "pitch_deg", k.p.PitchDeg, w.PitchDeg[i], g.PitchDeg[i])
	}
	return nil
}

func (k *differ) timeline(want, got json.RawMessage) error {
	w, g, err := decodeBoth[wire.TimelineAnswer](want, got)
	if err != nil {
		return err
	}
	if len(g.Markers) != len(w.Markers) {
		k.shape("markers", fmt.Sprintf("%d entries, want %d", len(g.Markers), len(w.Markers)))
		return nil
	}
	for i, wm := range w.Markers {
		gm, path := g.Markers[i], at("markers", i)
		if gm.ID != wm.ID {
			k.shape(path+".id", fmt.Sprintf("%q, want %q", gm.ID, wm.ID))
			continue
		}
		// A first-shown tick decided by less than the pixel tolerance may
		// differ by a tick: borderline.
		px := marginAt(k.m().FirstShownMarginPx, i)
		pxBorder := px != nil && math.Abs(*px) <= k.p.PixelPx.Allowed(0)
		// A drive that came within the angle tolerance of turning the map
		// the other way at a U-turn (SPEC §3) may give any outcome after it.
		turn := marginAt(k.m().TurnMarginDeg, i)
		turnBorder := turn != nil && *turn <= k.p.PitchDeg.Allowed(0)
		before := len(k.diffs)
		k.optNum(path+".first_visible_s", "time_s", k.p.TimeS, wm.FirstVisibleS, gm.FirstVisibleS, nil)
		k.optNum(path+".first_shown_s", "time_s", k.p.TimeS, wm.FirstShownS, gm.FirstShownS, nil)
		k.num(path+".shown_s", "time_s", k.p.TimeS, wm.ShownS, gm.ShownS)
		if wm.Bucket != gm.Bucket {
			bm := marginAt(k.m().BucketMarginS, i)
			k.discrete(path+".bucket", "time_s", k.p.TimeS, wm.Bucket, gm.Bucket, bm)
		}
		for j := before; j < len(k.diffs); j++ {
			switch {
			case pxBorder:
				k.diffs[j].Borderline, k.diffs[j].Ratio = true, 0
				k.diffs[j].Note = strings.TrimPrefix(k.diffs[j].Note+"; ", "; ") + "first shown with a margin of " + fmtF(*px) + " px"
			case turnBorder:
				k.diffs[j].Borderline, k.diffs[j].Ratio = true, 0
				k.diffs[j].Note = strings.TrimPrefix(k.diffs[j].Note+"; ", "; ") + "after a U-turn decided by " + fmtF(*turn) + "°"
			}
		}
	}
	return nil
}
