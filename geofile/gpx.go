package geofile

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"strings"
	"time"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/spec"
)

// gpxParent gives, for each element of GPX 1.1 (the Topografix schema,
// gpx.xsd) that the reader places points by, the one element it may sit
// in; gpx itself is the root. One of these anywhere else (an rte inside a
// trkpt, a trkpt straight in a trk) is a misplaced element and an error,
// never a guess at what the file meant.
var gpxParent = map[string]string{
	"metadata": "gpx",
	"wpt":      "gpx",
	"rte":      "gpx",
	"trk":      "gpx",
	"rtept":    "rte",
	"trkseg":   "trk",
	"trkpt":    "trkseg",
}

// gpxPoint is a trkpt or rtept as read: its position, its time (zero when
// it has none) as parsed and as written, and the line of its start tag.
type gpxPoint struct {
	elem     string // "trkpt" or "rtept"
	p        orb.Point
	t        time.Time
	timeText string
	line     int
}

// gpxReader reads a GPX document as a walk over its elements, keeping the
// stack of open elements from the root, so that every element is judged
// by where it is: a point is read only in its schema place, its time only
// directly inside it.
type gpxReader struct {
	name  string
	dec   *xml.Decoder
	space string   // the root's namespace; an element in another is an extension's, and skipped
	stack []string // local names of the open elements, the root first
	pt    gpxPoint // the point being read, while a trkpt or rtept is open (points do not nest)
	// inTime: the open element is the time of the point being read, whose
	// text collects in timeText.
	inTime    bool
	timeText  []byte
	timeCount int          // time elements in the point being read
	trks      [][]gpxPoint // per trk, its segments' points joined in order
	rtes      [][]gpxPoint // per rte
}

// readGPX reads the points of the first track with points (all its
// segments in order) or, when no track has any, of the first route with
// points, of a GPX 1.1 document. Every point of the document is checked
// (lat and lon present and in range, at most one time, an RFC 3339 one);
// speeds come from the chosen points' times (gpxSpeeds).
func readGPX(name string, data []byte) (*RouteFile, error) {
	r := &gpxReader{name: name, dec: xml.NewDecoder(bytes.NewReader(data))}
	if err := r.walk(); err != nil {
		return nil, err
	}
	pts := firstNonEmpty(r.trks)
	if pts == nil {
		pts = firstNonEmpty(r.rtes)
	}
	if pts == nil {
		return nil, &FileError{File: name, Feature: -1, Msg: "no track or route points"}
	}
	rf := &RouteFile{Points: make([]orb.Point, len(pts))}
	for i, p := range pts {
		rf.Points[i] = p.p
	}
	speeds, err := gpxSpeeds(name, pts)
	if err != nil {
		return nil, err
	}
	rf.SpeedsMps = speeds
	return rf, nil
}

func firstNonEmpty(lists [][]gpxPoint) []gpxPoint {
	for _, l := range lists {
		if len(l) > 0 {
			return l
		}
	}
	return nil
}

// fail returns the error at line.
func (r *gpxReader) fail(line int, field, value, msg string) *FileError {
	return &FileError{File: r.name, Line: line, Feature: -1, Field: field, Value: value, Msg: msg}
}

// walk reads every token of the document.
func (r *gpxReader) walk() error {
	seenRoot := false
	for {
		line, _ := r.dec.InputPos() // where the next token starts
		tok, err := r.dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			line, _ := r.dec.InputPos()
			return r.fail(line, "", "", "malformed XML: "+err.Error())
		}
		switch t := tok.(type) {
		case xml.StartElement:
			if len(r.stack) == 0 {
				if seenRoot {
					return r.fail(line, "", "", fmt.Sprintf("malformed XML: a second root element <%s>", t.Name.Local))
				}
				if t.Name.Local != "gpx" {
					return r.fail(line, "", "", fmt.Sprintf("not a GPX document (the root element is <%s>, not <gpx>)", t.Name.Local))
				}
				seenRoot, r.space = true, t.Name.Space
				r.stack = append(r.stack, "gpx")
				continue
			}
			if err := r.start(t, line); err != nil {
				return err
			}
		case xml.EndElement:
			if err := r.end(); err != nil {
				return err
			}
		case xml.CharData:
			if r.inTime {
				r.timeText = append(r.timeText, t...)
			}
		}
	}
	if !seenRoot {
		return r.fail(0, "", "", "not a GPX document (no <gpx> element)")
	}
	return nil
}

// start handles the start tag t on line, below the root.
func (r *gpxReader) start(t xml.StartElement, line int) error {
	name, parent := t.Name.Local, r.stack[len(r.stack)-1]
	if t.Name.Space != r.space || name == "extensions" {
		// An extension's content is another schema's (Garmin's heart rate,
		// a speed of its own): nothing of it is read.
		return r.skip()
	}
	if r.inTime {
		return r.fail(line, r.pt.elem+".time", "", fmt.Sprintf("holds an element <%s>: a time is text only", name))
	}
	if name == "gpx" {
		return r.fail(line, "gpx", "", "misplaced: <gpx> is the root element, found inside <"+parent+">")
	}
	if want, ok := gpxParent[name]; ok && parent != want {
		return r.fail(line, name, "", fmt.Sprintf("misplaced inside <%s>: GPX 1.1 puts <%s> only in <%s>", parent, name, want))
	}
	switch name {
	case "trk":
		r.trks = append(r.trks, nil)
	case "rte":
		r.rtes = append(r.rtes, nil)
	case "trkpt", "rtept":
		p, err := r.point(t, line)
		if err != nil {
			return err
		}
		r.pt, r.timeCount = gpxPoint{elem: name, p: p, line: line}, 0
	case "time":
		if parent == "trkpt" || parent == "rtept" {
			if r.timeCount++; r.timeCount > 1 {
				return r.fail(line, parent+".time", "", "given twice in one point")
			}
			r.inTime, r.timeText = true, r.timeText[:0]
		}
	}
	r.stack = append(r.stack, name)
	return nil
}

// skip passes over the element just started and all it holds.
func (r *gpxReader) skip() error {
	if err := r.dec.Skip(); err != nil {
		line, _ := r.dec.InputPos()
		return r.fail(line, "", "", "malformed XML: "+err.Error())
	}
	return nil
}

// end handles an end tag, which the decoder has checked closes the
// innermost open element.
func (r *gpxReader) end() error {
	if len(r.stack) == 0 { // kept as a guard: the decoder refuses an end tag with nothing open
		line, _ := r.dec.InputPos()
		return r.fail(line, "", "", "malformed XML: an end tag with no element open")
	}
	name := r.stack[len(r.stack)-1]
	r.stack = r.stack[:len(r.stack)-1]
	switch {
	case name == "time" && r.inTime:
		r.inTime = false
		text := strings.TrimSpace(string(r.timeText))
		ts, err := time.Parse(time.RFC3339Nano, text)
		if err != nil {
			return r.fail(r.pt.line, r.pt.elem+".time", fmt.Sprintf("%q", text), "not an RFC 3339 time (2026-03-01T08:00:00Z)")
		}
		r.pt.t, r.pt.timeText = ts, text
	case name == "trkpt":
		// The parent checks guarantee an open trk and trkseg around it.
		r.trks[len(r.trks)-1] = append(r.trks[len(r.trks)-1], r.pt)
	case name == "rtept":
		r.rtes[len(r.rtes)-1] = append(r.rtes[len(r.rtes)-1], r.pt)
	}
	return nil
}

// point reads the lat and lon attributes of a trkpt or rtept: each once,
// a finite number, together a WGS84 position.
func (r *gpxReader) point(t xml.StartElement, line int) (orb.Point, error) {
	elem := t.Name.Local
	var lonLat [2]float64
	var have [2]bool
	for _, a := range t.Attr {
		j := -1
		switch {
		case a.Name.Space != "":
		case a.Name.Local == "lon":
			j = 0
		case a.Name.Local == "lat":
			j = 1
		}
		if j < 0 {
			continue // another attribute, or one of another namespace
		}
		field := elem + "." + a.Name.Local
		if have[j] {
			return orb.Point{}, r.fail(line, field, "", "given twice")
		}
		v, why := parseFinite(strings.TrimSpace(a.Value))
		if why != "" {
			return orb.Point{}, r.fail(line, field, fmt.Sprintf("%q", a.Value), why)
		}
		lonLat[j], have[j] = v, true
	}
	if !have[1] {
		return orb.Point{}, r.fail(line, elem+".lat", "", "missing (required)")
	}
	if !have[0] {
		return orb.Point{}, r.fail(line, elem+".lon", "", "missing (required)")
	}
	p := orb.Point{lonLat[0], lonLat[1]}
	if fe := checkLonLat(p); fe != nil {
		return orb.Point{}, r.fail(line, elem+"."+fe.Field, fe.Value, fe.Reason)
	}
	return p, nil
}

// gpxSpeeds returns per-segment speeds (m/s) from the points' times when
// every point has one, or nil. A segment's speed is its WGS84 length over
// its time. Times must not go backwards, and two points at the same time
// must be at the same position (a distinct one would need an infinite
// speed); either is an error naming the later point's line.
//
// A segment of zero length is a stop when its time grows and a repeated
// point when it does not: it gets a speed of 1 m/s that nothing uses,
// since the route drops zero-length segments with their speeds. The route
// has no dwell, so the time spent stopped is not in the drive: the
// timeline goes on from the stop as if it had lasted no time.
func gpxSpeeds(name string, pts []gpxPoint) ([]float64, error) {
	for _, p := range pts {
		if p.timeText == "" {
			return nil, nil
		}
	}
	speeds := make([]float64, len(pts)-1)
	for i := range speeds {
		a, b := &pts[i], &pts[i+1]
		// Seconds from the Unix seconds and nanoseconds, not from
		// Time.Sub, which saturates at 292 years.
		dtS := float64(b.t.Unix()-a.t.Unix()) + float64(b.t.Nanosecond()-a.t.Nanosecond())*1e-9
		d := routes.GeodesicDistM(a.p, b.p)
		fail := func(msg string) error {
			return &FileError{File: name, Line: b.line, Feature: -1, Field: b.elem + ".time", Value: b.timeText, Msg: msg}
		}
		switch {
		case dtS < 0:
			return nil, fail(fmt.Sprintf("before the previous point's time %s (line %d): times must not go backwards", a.timeText, a.line))
		case d == 0:
			speeds[i] = 1 // a stop or a repeated point: dropped by the route
		case dtS == 0:
			return nil, fail(fmt.Sprintf("the same time as the previous point (line %d), %s m away: the speed would be infinite", a.line, spec.FormatNumber(math.Round(d*10)/10)))
		default:
			speeds[i] = d / dtS
		}
		if s := speeds[i]; !(s > 0 && s <= math.MaxFloat64) {
			return nil, fail(fmt.Sprintf("gives a speed of %s m/s from the previous point (line %d)", spec.FormatNumber(s), a.line))
		}
	}
	return speeds, nil
}
