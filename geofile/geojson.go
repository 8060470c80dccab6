package geofile

import (
	"fmt"
	"math"
	"strconv"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
)

// gjReader reads GeoJSON (RFC 7946) from the tree of the file as written
// (jsonValue), so that every error names the file, the line of the
// offending value, the feature index in a collection (−1 otherwise) and
// the field's path inside the feature or the document
// ("geometry.coordinates[3][1]").
type gjReader struct {
	name string
	data []byte
}

// fail returns the error at value v (nil: no line).
func (r *gjReader) fail(v *jsonValue, feature int, field, value, msg string) *FileError {
	fe := &FileError{File: r.name, Feature: feature, Field: field, Value: value, Msg: msg}
	if v != nil {
		fe.Line = lineOf(r.data, v.start)
	}
	return fe
}

// written returns v as the file writes it, cut short for a message; ""
// for null, which the message says in words.
func (r *gjReader) written(v *jsonValue) string {
	if v.kind == jsonNull {
		return ""
	}
	return spec.Excerpt(r.data[v.start:v.end], 40)
}

func (r *gjReader) parse() (jsonValue, error) {
	doc, err := parseJSON(r.data)
	if err != nil {
		fe := &FileError{File: r.name, Feature: -1, Msg: "malformed JSON: " + err.Error()}
		if se, ok := err.(*jsonSyntaxError); ok {
			fe.Line = lineOf(r.data, se.off)
		}
		return jsonValue{}, fe
	}
	return doc, nil
}

// get returns the member key of object v, whose path is path, or nil when
// it is absent. A key given twice is an error: JSON leaves its meaning
// open (RFC 8259 §4), and taking either would be a guess.
func (r *gjReader) get(v *jsonValue, feature int, path, key string) (*jsonValue, error) {
	var found *jsonValue
	for i := range v.members {
		m := &v.members[i]
		if m.key != key {
			continue
		}
		if found != nil {
			return nil, r.fail(&m.val, feature, spec.Join(path, key), "", fmt.Sprintf("given twice (first on line %d)", lineOf(r.data, found.start)))
		}
		found = &m.val
	}
	return found, nil
}

// need returns the member key of object v, which must be there and not null.
func (r *gjReader) need(v *jsonValue, feature int, path, key string) (*jsonValue, error) {
	m, err := r.get(v, feature, path, key)
	switch {
	case err != nil:
		return nil, err
	case m == nil:
		return nil, r.fail(v, feature, spec.Join(path, key), "", "missing (required)")
	case m.kind == jsonNull:
		return nil, r.fail(m, feature, spec.Join(path, key), "", "null (required)")
	}
	return m, nil
}

// typeOf returns the "type" member of the object v at path, and its value.
func (r *gjReader) typeOf(v *jsonValue, feature int, path string) (string, *jsonValue, error) {
	if v.kind != jsonObject {
		return "", nil, r.fail(v, feature, path, "", "expected an object, got "+v.kind.article())
	}
	t, err := r.need(v, feature, path, "type")
	if err != nil {
		return "", nil, err
	}
	if t.kind != jsonString {
		return "", nil, r.fail(t, feature, spec.Join(path, "type"), r.written(t), "expected a string, got "+t.kind.article())
	}
	return t.text, t, nil
}

// features returns the features array of a FeatureCollection.
func (r *gjReader) features(doc *jsonValue) (*jsonValue, error) {
	fs, err := r.need(doc, -1, "", "features")
	if err != nil {
		return nil, err
	}
	if fs.kind != jsonArray {
		return nil, r.fail(fs, -1, "features", r.written(fs), "expected an array, got "+fs.kind.article())
	}
	return fs, nil
}

// feature checks that f (feature i of a collection, or −1) is a Feature
// object and returns its geometry (nil when null: RFC 7946 §3.2 allows an
// unlocated feature) and the geometry's type.
func (r *gjReader) feature(f *jsonValue, i int) (*jsonValue, string, error) {
	typ, tv, err := r.typeOf(f, i, "")
	if err != nil {
		return nil, "", err
	}
	if typ != "Feature" {
		return nil, "", r.fail(tv, i, "type", r.written(tv), `want "Feature"`)
	}
	g, err := r.get(f, i, "", "geometry")
	switch {
	case err != nil:
		return nil, "", err
	case g == nil:
		return nil, "", r.fail(f, i, "geometry", "", "missing (required; null for a feature without a place)")
	case g.kind == jsonNull:
		return nil, "", nil
	}
	gt, _, err := r.typeOf(g, i, "geometry")
	return g, gt, err
}

// position reads a GeoJSON position (RFC 7946 §3.1.1), element index of
// the array at path (or the value at path itself when index < 0):
// [lon, lat], or with an altitude and further elements, which must be
// finite numbers and are not used. Nothing is filled in: a null, a short
// array or an element that is not a finite number is an error naming
// its index.
func (r *gjReader) position(v *jsonValue, feature int, path string, index int) (orb.Point, error) {
	// at returns the path of the position (j < 0) or of its element j,
	// built only for a message, never on the way.
	at := func(j int) string {
		p := path
		if index >= 0 {
			p = spec.Index(p, index)
		}
		if j >= 0 {
			p = spec.Index(p, j)
		}
		return p
	}
	switch {
	case v.kind != jsonArray:
		return orb.Point{}, r.fail(v, feature, at(-1), r.written(v), "expected a position [lon, lat], got "+v.kind.article())
	case len(v.elems) < 2:
		return orb.Point{}, r.fail(v, feature, at(-1), r.written(v), countOf(len(v.elems), "number")+": want [lon, lat] or [lon, lat, altitude]")
	}
	var lonLat [2]float64
	for j := range v.elems {
		e := &v.elems[j]
		if e.kind != jsonNumber {
			return orb.Point{}, r.fail(e, feature, at(j), r.written(e), "expected a number, got "+e.kind.article())
		}
		x, why := parseFinite(e.text)
		if why != "" {
			return orb.Point{}, r.fail(e, feature, at(j), e.text, why)
		}
		if j < 2 {
			lonLat[j] = x
		}
	}
	p := orb.Point{lonLat[0], lonLat[1]}
	if fe := checkLonLat(p); fe != nil {
		j := 0 // a position is [lon, lat]
		if fe.Field == "lat" {
			j = 1
		}
		return orb.Point{}, r.fail(&v.elems[j], feature, at(j), v.elems[j].text, fe.Reason)
	}
	return p, nil
}

// countOf writes n things: "1 number", "0 numbers".
func countOf(n int, thing string) string {
	if n == 1 {
		return "1 " + thing
	}
	return strconv.Itoa(n) + " " + thing + "s"
}

// lineString reads the coordinates of the LineString object g, whose path
// is path: two or more positions (RFC 7946 §3.1.4).
func (r *gjReader) lineString(g *jsonValue, feature int, path string) ([]orb.Point, error) {
	cs, err := r.need(g, feature, path, "coordinates")
	if err != nil {
		return nil, err
	}
	path = spec.Join(path, "coordinates")
	if cs.kind != jsonArray {
		return nil, r.fail(cs, feature, path, r.written(cs), "expected an array of positions, got "+cs.kind.article())
	}
	if len(cs.elems) < 2 {
		return nil, r.fail(cs, feature, path, r.written(cs), countOf(len(cs.elems), "position")+": a LineString has two or more")
	}
	pts := make([]orb.Point, len(cs.elems))
	for i := range cs.elems {
		if pts[i], err = r.position(&cs.elems[i], feature, path, i); err != nil {
			return nil, err
		}
	}
	return pts, nil
}

func readGeoJSONRoute(name string, data []byte) (*RouteFile, error) {
	r := &gjReader{name: name, data: data}
	doc, err := r.parse()
	if err != nil {
		return nil, err
	}
	typ, tv, err := r.typeOf(&doc, -1, "")
	if err != nil {
		return nil, err
	}
	feat, index := &doc, -1
	switch typ {
	case "LineString":
		pts, err := r.lineString(&doc, -1, "")
		if err != nil {
			return nil, err
		}
		return &RouteFile{Points: pts}, nil
	case "Feature":
	case "FeatureCollection":
		fs, err := r.features(&doc)
		if err != nil {
			return nil, err
		}
		feat = nil
		for i := range fs.elems {
			_, gt, err := r.feature(&fs.elems[i], i)
			if err != nil {
				return nil, err
			}
			if gt == "LineString" {
				if feat != nil {
					return nil, r.fail(&fs.elems[i], i, "geometry", "", fmt.Sprintf("a second LineString (the first is feature %d); a route file holds one", index))
				}
				feat, index = &fs.elems[i], i
			}
		}
		if feat == nil {
			return nil, &FileError{File: name, Feature: -1, Msg: "no LineString feature"}
		}
	default:
		return nil, r.fail(tv, -1, "type", r.written(tv), "want LineString, Feature or FeatureCollection")
	}
	g, gt, err := r.feature(feat, index)
	switch {
	case err != nil:
		return nil, err
	case g == nil:
		return nil, r.fail(feat, index, "geometry", "", "null: want a LineString")
	case gt != "LineString":
		gtv, _ := r.get(g, index, "geometry", "type")
		return nil, r.fail(gtv, index, "geometry.type", r.written(gtv), "want LineString")
	}
	pts, err := r.lineString(g, index, "geometry")
	if err != nil {
		return nil, err
	}
	speeds, err := r.speeds(feat, index)
	if err != nil {
		return nil, err
	}
	return &RouteFile{Points: pts, SpeedsMps: speeds}, nil
}

// properties returns the properties object of feature f, or nil when it
// is absent or null.
func (r *gjReader) properties(f *jsonValue, feature int) (*jsonValue, error) {
	props, err := r.get(f, feature, "", "properties")
	if err != nil || props == nil || props.kind == jsonNull {
		return nil, err
	}
	if props.kind != jsonObject {
		return nil, r.fail(props, feature, "properties", r.written(props), "expected an object, got "+props.kind.article())
	}
	return props, nil
}

// speeds reads properties.speed_mps of feature f: one number, or an array
// of numbers; nil when it is absent or null. Values must be finite; the
// route itself checks them further (> 0, one per segment).
func (r *gjReader) speeds(f *jsonValue, feature int) ([]float64, error) {
	props, err := r.properties(f, feature)
	if err != nil || props == nil {
		return nil, err
	}
	sp, err := r.get(props, feature, "properties", "speed_mps")
	if err != nil || sp == nil || sp.kind == jsonNull {
		return nil, err
	}
	one := func(v *jsonValue, field string) (float64, error) {
		if v.kind != jsonNumber {
			return 0, r.fail(v, feature, field, r.written(v), "expected a number, got "+v.kind.article())
		}
		x, why := parseFinite(v.text)
		if why != "" {
			return 0, r.fail(v, feature, field, v.text, why)
		}
		return x, nil
	}
	if sp.kind != jsonArray {
		if sp.kind != jsonNumber {
			return nil, r.fail(sp, feature, "properties.speed_mps", r.written(sp), "expected a number or an array of numbers, got "+sp.kind.article())
		}
		x, err := one(sp, "properties.speed_mps")
		if err != nil {
			return nil, err
		}
		return []float64{x}, nil
	}
	out := make([]float64, len(sp.elems))
	for i := range sp.elems {
		if out[i], err = one(&sp.elems[i], spec.Index("properties.speed_mps", i)); err != nil {
			return nil, err
		}
	}
	return out, nil
}

func readGeoJSONMarkers(name string, data []byte) ([]timeline.Marker, error) {
	r := &gjReader{name: name, data: data}
	doc, err := r.parse()
	if err != nil {
		return nil, err
	}
	typ, tv, err := r.typeOf(&doc, -1, "")
	if err != nil {
		return nil, err
	}
	if typ != "FeatureCollection" {
		return nil, r.fail(tv, -1, "type", r.written(tv), "want FeatureCollection")
	}
	fs, err := r.features(&doc)
	if err != nil {
		return nil, err
	}
	seen := map[string]int{}
	ms := make([]timeline.Marker, 0, len(fs.elems))
	for i := range fs.elems {
		m, idv, err := r.marker(&fs.elems[i], i)
		if err != nil {
			return nil, err
		}
		if j, dup := seen[m.ID]; dup {
			return nil, r.fail(idv, i, "properties.id", "", fmt.Sprintf("duplicate id %q (first at feature %d)", m.ID, j))
		}
		seen[m.ID] = i
		ms = append(ms, m)
	}
	return ms, nil
}

// marker reads feature i of a marker collection: a Point, properties.id
// (a non-empty string, or a whole number within ±2⁵³ written as its
// shortest decimal) and properties.priority (a finite number; 0 when
// absent or null). It returns the id's value too, for a later message.
func (r *gjReader) marker(f *jsonValue, i int) (timeline.Marker, *jsonValue, error) {
	var m timeline.Marker
	g, gt, err := r.feature(f, i)
	switch {
	case err != nil:
		return m, nil, err
	case g == nil:
		gv, _ := r.get(f, i, "", "geometry")
		return m, nil, r.fail(gv, i, "geometry", "", "null: a marker needs a Point")
	case gt != "Point":
		gtv, _ := r.get(g, i, "geometry", "type")
		return m, nil, r.fail(gtv, i, "geometry.type", r.written(gtv), "want Point")
	}
	cs, err := r.need(g, i, "geometry", "coordinates")
	if err != nil {
		return m, nil, err
	}
	if m.Point, err = r.position(cs, i, "geometry.coordinates", -1); err != nil {
		return m, nil, err
	}
	props, err := r.properties(f, i)
	if err != nil {
		return m, nil, err
	}
	if props == nil {
		return m, nil, r.fail(f, i, "properties.id", "", "missing (required)")
	}
	id, err := r.need(props, i, "properties", "id")
	if err != nil {
		return m, nil, err
	}
	switch id.kind {
	case jsonString:
		if id.text == "" {
			return m, nil, r.fail(id, i, "properties.id", "", "empty")
		}
		m.ID = id.text
	case jsonNumber:
		x, why := parseFinite(id.text)
		if why == "" && (x != math.Trunc(x) || math.Abs(x) > 1<<53) {
			why = "a numeric id must be a whole number within ±2^53"
		}
		if why != "" {
			return m, nil, r.fail(id, i, "properties.id", id.text, why)
		}
		m.ID = strconv.FormatFloat(x, 'f', -1, 64)
	default:
		return m, nil, r.fail(id, i, "properties.id", r.written(id), "expected a string or a number, got "+id.kind.article())
	}
	pr, err := r.get(props, i, "properties", "priority")
	if err != nil {
		return m, nil, err
	}
	if pr != nil && pr.kind != jsonNull {
		if pr.kind != jsonNumber {
			return m, nil, r.fail(pr, i, "properties.priority", r.written(pr), "expected a number, got "+pr.kind.article())
		}
		var why string
		if m.Priority, why = parseFinite(pr.text); why != "" {
			return m, nil, r.fail(pr, i, "properties.priority", pr.text, why)
		}
	}
	return m, id, nil
}
