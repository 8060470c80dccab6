package geofile_test

import (
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/geofile"
	"github.com/viewspec/viewspec/routes"
)

// GPX elements are judged by where they are (gpx.xsd): a structural
// element out of its place is an error naming its line, and nothing it
// holds is read.
func TestReadGPXStructureErrors(t *testing.T) {
	checkErrors(t, "ReadRoute", readRoute, []errorCase{
		// Used to panic: index out of range [-1] (a time closing with no
		// point read), or a nil dereference (cur reset by </rte>).
		{"rte inside trkpt (reported panic)", "a.gpx", `<gpx><trk><trkpt lat="1" lon="1"><rte><time>2020-01-01T00:00:00Z</time></rte></trkpt></trk></gpx>`, "a.gpx:1: trkpt: misplaced inside <trk>: GPX 1.1 puts <trkpt> only in <trkseg>"},
		{"rte inside trkpt, within a trkseg", "b.gpx", "<gpx><trk><trkseg>\n<trkpt lat=\"1\" lon=\"1\">\n<rte><time>2020-01-01T00:00:00Z</time></rte></trkpt></trkseg></trk></gpx>", "b.gpx:3: rte: misplaced inside <trkpt>: GPX 1.1 puts <rte> only in <gpx>"},
		{"trkpt outside trkseg", "c.gpx", "<gpx><trk>\n<trkpt lat=\"1\" lon=\"1\"/></trk></gpx>", "c.gpx:2: trkpt: misplaced inside <trk>: GPX 1.1 puts <trkpt> only in <trkseg>"},
		{"trkpt in a route", "d.gpx", `<gpx><rte><trkpt lat="1" lon="1"/></rte></gpx>`, "d.gpx:1: trkpt: misplaced inside <rte>: GPX 1.1 puts <trkpt> only in <trkseg>"},
		{"rtept in a track segment", "e.gpx", `<gpx><trk><trkseg><rtept lat="1" lon="1"/></trkseg></trk></gpx>`, "e.gpx:1: rtept: misplaced inside <trkseg>: GPX 1.1 puts <rtept> only in <rte>"},
		{"nested trk", "f.gpx", `<gpx><trk><trk><trkseg><trkpt lat="1" lon="1"/></trkseg></trk></trk></gpx>`, "f.gpx:1: trk: misplaced inside <trk>: GPX 1.1 puts <trk> only in <gpx>"},
		{"trkpt inside trkpt", "g.gpx", `<gpx><trk><trkseg><trkpt lat="1" lon="1"><trkpt lat="2" lon="2"/></trkpt></trkseg></trk></gpx>`, "g.gpx:1: trkpt: misplaced inside <trkpt>: GPX 1.1 puts <trkpt> only in <trkseg>"},
		{"trkpt behind an unknown element", "h.gpx", `<gpx><trk><trkseg><desc><trkpt lat="1" lon="1"/></desc></trkseg></trk></gpx>`, "h.gpx:1: trkpt: misplaced inside <desc>: GPX 1.1 puts <trkpt> only in <trkseg>"},
		{"wpt inside a track", "i.gpx", `<gpx><trk><wpt lat="1" lon="1"/></trk></gpx>`, "i.gpx:1: wpt: misplaced inside <trk>: GPX 1.1 puts <wpt> only in <gpx>"},
		{"gpx inside gpx", "j.gpx", `<gpx><gpx/></gpx>`, "j.gpx:1: gpx: misplaced: <gpx> is the root element, found inside <gpx>"},
		{"a second root", "k.gpx", "<gpx></gpx>\n<gpx/>", "k.gpx:2: malformed XML: a second root element <gpx>"},
		{"an element inside a time", "l.gpx", `<gpx><trk><trkseg><trkpt lat="1" lon="1"><time><b>2020-01-01T00:00:00Z</b></time></trkpt></trkseg></trk></gpx>`, "l.gpx:1: trkpt.time: holds an element <b>: a time is text only"},
		{"two times in a point", "m.gpx", "<gpx><trk><trkseg><trkpt lat=\"1\" lon=\"1\">\n<time>2020-01-01T00:00:00Z</time>\n<time>2020-01-01T00:00:01Z</time></trkpt></trkseg></trk></gpx>", "m.gpx:3: trkpt.time: given twice in one point"},
		{"an empty time", "n.gpx", `<gpx><trk><trkseg><trkpt lat="1" lon="1"><time/></trkpt></trkseg></trk></gpx>`, `n.gpx:1: trkpt.time = "": not an RFC 3339 time (2026-03-01T08:00:00Z)`},
		{"a point without attributes", "o.gpx", `<gpx><trk><trkseg><trkpt/></trkseg></trk></gpx>`, "o.gpx:1: trkpt.lat: missing (required)"},
		{"lat given twice", "p.gpx", `<gpx><rte><rtept lat="1" lat="2" lon="1"/></rte></gpx>`, "p.gpx:1: rtept.lat: given twice"},
		{"lat beyond the double range", "q.gpx", `<gpx><rte><rtept lat="1e400" lon="1"/></rte></gpx>`, `q.gpx:1: rtept.lat = "1e400": not a finite number`},
		{"longitude out of range", "r.gpx", `<gpx><rte><rtept lat="1" lon="181"/></rte></gpx>`, "r.gpx:1: rtept.lon = 181: longitude must be finite and within [-180, 180]"},
		{"only empty elements", "s.gpx", `<gpx><trk/><rte/><trk><trkseg/></trk></gpx>`, "s.gpx: no track or route points"},
		{"no elements at all", "t.gpx", `<!-- nothing -->`, "t.gpx: not a GPX document (no <gpx> element)"},
		{"a bad point in a track that is not used is still an error", "u.gpx", `<gpx><trk><trkseg><trkpt lat="1" lon="1"/></trkseg></trk><trk><trkseg><trkpt lat="91" lon="1"/></trkseg></trk></gpx>`, "u.gpx:1: trkpt.lat = 91: latitude must be finite and within [-90, 90]"},
	})
}

// What the structure allows is read, and what it does not place is left
// alone: a time outside a point, waypoints, extensions, elements of other
// namespaces.
func TestReadGPXStructure(t *testing.T) {
	for _, c := range []struct {
		desc, data string
		points     []orb.Point
		speeds     int // number of speeds; 0 for none
	}{
		{"a time outside the points is not a point's time", `<gpx><metadata><time>2020-01-01T00:00:00Z</time></metadata><trk><time>junk</time><trkseg><trkpt lat="1" lon="1"/><trkpt lat="2" lon="2"/></trkseg></trk></gpx>`,
			[]orb.Point{{1, 1}, {2, 2}}, 0},
		{"waypoints are not route points", `<gpx><wpt lat="5" lon="5"><time>2020-01-01T00:00:00Z</time></wpt><rte><rtept lat="1" lon="1"/><rtept lat="2" lon="2"/></rte></gpx>`,
			[]orb.Point{{1, 1}, {2, 2}}, 0},
		{"extensions and other namespaces are skipped whole", `<gpx xmlns="http://www.topografix.com/GPX/1/1" xmlns:x="urn:x"><trk><trkseg>
<trkpt lat="1" lon="1"><time>2020-01-01T00:00:00Z</time><extensions><trkpt/><rte/><time>x</time></extensions><x:rte><x:time>y</x:time></x:rte></trkpt>
<trkpt lat="1" lon="1.001" x:lat="junk"><time>2020-01-01T00:00:10Z</time></trkpt></trkseg></trk></gpx>`,
			[]orb.Point{{1, 1}, {1.001, 1}}, 1},
		{"an empty track is passed over for the next", `<gpx><trk/><trk><trkseg><trkpt lat="3" lon="3"/></trkseg></trk><trk><trkseg><trkpt lat="4" lon="4"/></trkseg></trk></gpx>`,
			[]orb.Point{{3, 3}}, 0},
		{"a byte order mark before the XML", "\ufeff<?xml version=\"1.0\"?><gpx><rte><rtept lat=\"1\" lon=\"1\"/><rtept lat=\"2\" lon=\"2\"/></rte></gpx>",
			[]orb.Point{{1, 1}, {2, 2}}, 0},
	} {
		rf, err := geofile.ReadRoute("s.gpx", []byte(c.data))
		if err != nil {
			t.Errorf("%s: ReadRoute = %v, want no error", c.desc, err)
			continue
		}
		if len(rf.Points) != len(c.points) || len(rf.SpeedsMps) != c.speeds {
			t.Errorf("%s: ReadRoute = points %v, %d speeds; want %v, %d speeds", c.desc, rf.Points, len(rf.SpeedsMps), c.points, c.speeds)
			continue
		}
		for i := range c.points {
			if rf.Points[i] != c.points[i] {
				t.Errorf("%s: ReadRoute points[%d] = %v, want %v", c.desc, i, rf.Points[i], c.points[i])
			}
		}
	}
}

// Times must increase along a track: a time going back, or two distinct
// positions at one time (an infinite speed), is an error naming the later
// point's line and its time as written, not the speed it would give.
func TestReadGPXTimesErrors(t *testing.T) {
	checkErrors(t, "ReadRoute", readRoute, []errorCase{
		// Used to give "speed_mps[0] = NaN", a field the file does not have,
		// and only when the route was built.
		{"equal times at distinct points", "a.gpx", "<gpx><trk><trkseg>\n<trkpt lat=\"0\" lon=\"0\"><time>2026-01-01T00:00:00Z</time></trkpt>\n<trkpt lat=\"0\" lon=\"0.001\"><time>2026-01-01T00:00:00Z</time></trkpt>\n</trkseg></trk></gpx>",
			"a.gpx:3: trkpt.time = 2026-01-01T00:00:00Z: the same time as the previous point (line 2), 111.3 m away: the speed would be infinite"},
		{"a time going back", "b.gpx", "<gpx><trk><trkseg>\n<trkpt lat=\"0\" lon=\"0\"><time>2026-01-01T00:00:10Z</time></trkpt>\n<trkpt lat=\"0\" lon=\"0.001\"><time>2026-01-01T00:00:00Z</time></trkpt>\n</trkseg></trk></gpx>",
			"b.gpx:3: trkpt.time = 2026-01-01T00:00:00Z: before the previous point's time 2026-01-01T00:00:10Z (line 2): times must not go backwards"},
		{"a time going back at the same position", "c.gpx", "<gpx><rte>\n<rtept lat=\"0\" lon=\"0\"><time>2026-01-01T00:00:10Z</time></rtept>\n<rtept lat=\"0\" lon=\"0\"><time>2026-01-01T00:00:09.5Z</time></rtept>\n</rte></gpx>",
			"c.gpx:3: rtept.time = 2026-01-01T00:00:09.5Z: before the previous point's time 2026-01-01T00:00:10Z (line 2): times must not go backwards"},
		{"a time going back across segments", "d.gpx", "<gpx><trk><trkseg>\n<trkpt lat=\"0\" lon=\"0\"><time>2026-01-01T00:00:10Z</time></trkpt></trkseg><trkseg>\n<trkpt lat=\"0\" lon=\"0.001\"><time>2026-01-01T00:00:05Z</time></trkpt>\n</trkseg></trk></gpx>",
			"d.gpx:3: trkpt.time = 2026-01-01T00:00:05Z: before the previous point's time 2026-01-01T00:00:10Z (line 2): times must not go backwards"},
	})
}

// A repeated point (same position, same time) and a stop (same position,
// later time) are zero-length segments: they read, with a speed of 1 m/s
// that the route drops with the segment, and the route builds; the
// speeds around them are the moving ones.
func TestReadGPXStops(t *testing.T) {
	data := `<gpx><trk><trkseg>
<trkpt lat="0" lon="0"><time>2026-01-01T00:00:00Z</time></trkpt>
<trkpt lat="0" lon="0"><time>2026-01-01T00:00:00Z</time></trkpt>
<trkpt lat="0" lon="0.001"><time>2026-01-01T00:00:10Z</time></trkpt>
<trkpt lat="0" lon="0.001"><time>2026-01-01T00:01:10Z</time></trkpt>
<trkpt lat="0" lon="0.002"><time>2026-01-01T00:01:20Z</time></trkpt>
</trkseg></trk></gpx>`
	rf, err := geofile.ReadRoute("stops.gpx", []byte(data))
	if err != nil {
		t.Fatalf("ReadRoute(stops.gpx) = %v, want no error", err)
	}
	// 0.001° of longitude on the WGS84 equator is a·π/180·0.001 = 111.319491 m
	// (a = 6 378 137 m): 11.1319491 m/s over 10 s.
	want := []float64{1, 11.1319491, 1, 11.1319491}
	if len(rf.SpeedsMps) != len(want) {
		t.Fatalf("ReadRoute(stops.gpx) speeds = %v, want %v", rf.SpeedsMps, want)
	}
	for i := range want {
		if abs(rf.SpeedsMps[i]-want[i]) > 1e-6 {
			t.Errorf("ReadRoute(stops.gpx) speeds[%d] = %.9g, want %.9g (tolerance 1e-6)", i, rf.SpeedsMps[i], want[i])
		}
	}
	if _, err := routes.New(rf.Points, rf.SpeedsMps); err != nil {
		t.Errorf("routes.New(stops.gpx) = %v, want a route", err)
	}
}

// Regression: a segment longer than 292 years in time got its speed from
// time.Time.Sub, which saturates there, so the speed was silently too high.
func TestReadGPXLongTimes(t *testing.T) {
	data := `<gpx><trk><trkseg>
<trkpt lat="0" lon="0"><time>2000-01-01T00:00:00Z</time></trkpt>
<trkpt lat="0" lon="0.001"><time>2400-01-01T00:00:00Z</time></trkpt>
</trkseg></trk></gpx>`
	rf, err := geofile.ReadRoute("slow.gpx", []byte(data))
	if err != nil {
		t.Fatalf("ReadRoute(slow.gpx) = %v, want no error", err)
	}
	// Hand-computed: 400 Gregorian years are 146 097 days = 12 622 780 800 s
	// (Python's datetime agrees); 111.319491 m over them is 8.818936e-9 m/s.
	want := 111.31949079327357 / 12622780800
	if len(rf.SpeedsMps) != 1 || abs(rf.SpeedsMps[0]-want) > want*1e-8 {
		t.Fatalf("ReadRoute(slow.gpx) speeds = %v, want [%.6g] (relative tolerance 1e-8)", rf.SpeedsMps, want)
	}
}
