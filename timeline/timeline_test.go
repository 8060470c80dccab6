package timeline_test

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"
	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// oneBand is a rule set with a single band: zoom and pitch fixed, rates
// high enough never to bind, no turn override in reach.
func oneBand(zoom, pitchDeg float64) *rules.Set {
	return &rules.Set{
		Bands:         []rules.Band{{Zoom: zoom, PitchDeg: pitchDeg}},
		HysteresisKmh: 0, MaxZoomRatePerS: 100, MaxPitchRateDegPerS: 1000,
		Turn:    rules.Turn{WithinM: 0, MinAngleDeg: 30, Zoom: zoom},
		MinZoom: 0, MaxZoom: 30, MaxTurnRateDegPerS: 1000,
	}
}

// A straight drive north along the prime meridian at 20 m/s, pitch 0, zoom
// 16, a 400×800 px screen with the user at the centre: the footprint reaches
// 400 px ahead of and behind the user. Hand-computed: at zoom 16 a pixel is
// 2πR/(256·2^16) = 2.388657133911758 Mercator metres, so the far edge is
// 955.4628535647 Mercator metres ahead. The user's latitude at t is
// φ(t) = 20·t·θ/L (the route's arc θ, parametrised by angle over its
// WGS84 length L), and a marker at latitude φ_m on the route enters the view
// when R·ln tan(π/4 + φ(t)/2) + 955.4628535647 ≥ R·ln tan(π/4 + φ_m/2).
func TestTimelineStraightDriveWorked(t *testing.T) {
	const (
		speed  = 20.0
		farM   = 400 * 2 * math.Pi * viewport.EarthRadiusM / (256 * 65536)
		endLat = 0.2
	)
	r, err := routes.New([]orb.Point{{0, 0}, {0, endLat}}, []float64{speed})
	if err != nil {
		t.Fatal(err)
	}
	theta := endLat * math.Pi / 180
	L := r.LengthM()
	mercY := func(latRad float64) float64 { return viewport.EarthRadiusM * math.Log(math.Tan(math.Pi/4+latRad/2)) }
	// enterS is the time the marker at latRad enters across the far edge.
	enterS := func(latRad float64) float64 {
		y := mercY(latRad) - farM
		phi := 2*math.Atan(math.Exp(y/viewport.EarthRadiusM)) - math.Pi/2
		return phi / theta * L / speed
	}
	// leaveS is the time the marker at latRad leaves across the near edge.
	leaveS := func(latRad float64) float64 {
		y := mercY(latRad) + farM
		phi := 2*math.Atan(math.Exp(y/viewport.EarthRadiusM)) - math.Pi/2
		return phi / theta * L / speed
	}
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), oneBand(16, 0))
	// Markers on the route at latitudes whose entry times fall between
	// ticks, far from tick boundaries, plus one behind the start.
	entries := []float64{0, 3.1, 12.6, 40.3, 119.9, 200}
	var ms []timeline.Marker
	for i, e := range entries {
		// Invert enterS: the latitude entering at time e.
		phiUser := speed * e * theta / L
		y := mercY(phiUser) + farM
		lat := (2*math.Atan(math.Exp(y/viewport.EarthRadiusM)) - math.Pi/2) * 180 / math.Pi
		if e == 0 {
			lat = 0.001 // in view from the start: 111 m ahead
		}
		ms = append(ms, timeline.Marker{ID: fmt.Sprintf("m%d", i), Point: orb.Point{0, lat}, Priority: 1})
	}
	ms = append(ms, timeline.Marker{ID: "behind", Point: orb.Point{0, -0.01}}) // 1.1 km behind: never
	got, err := timeline.Compute(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range entries {
		o := got[i]
		if e > 120 {
			if o.Visible || o.Bucket != timeline.Never {
				t.Errorf("%s (enters at %.2f s, past the horizon): %+v, want never visible", ms[i].ID, e, o)
			}
			continue
		}
		// The first tick at or after the entry time.
		want := math.Ceil(enterS(ms[i].Point[1]*math.Pi/180)/0.25) * 0.25
		if e == 0 {
			want = 0
		}
		if !o.Visible || o.FirstVisibleS != want || o.FirstShownS != want {
			t.Errorf("%s: first visible %v, shown %v; want %v (hand-computed entry at %.4f s)", ms[i].ID, o.FirstVisibleS, o.FirstShownS, want, e)
		}
		wantBucket := timeline.Late
		switch {
		case want < 5:
			wantBucket = timeline.Early
		case want < 35:
			wantBucket = timeline.Mid
		}
		if o.Bucket != wantBucket {
			t.Errorf("%s: bucket %v, want %v", ms[i].ID, o.Bucket, wantBucket)
		}
		// Shown until it leaves across the near edge, 955.46 Mercator metres
		// behind the user (or the horizon), to within a tick.
		leave := leaveS(ms[i].Point[1] * math.Pi / 180)
		stay := math.Min(leave, 120.25) - want
		if math.Abs(o.ShownS-stay) > 0.25+1e-9 {
			t.Errorf("%s: shown %v s, want %.3f s within a tick", ms[i].ID, o.ShownS, stay)
		}
	}
	if b := got[len(got)-1]; b.Visible {
		t.Errorf("a marker 1.1 km behind the start was visible: %+v", b)
	}
}

// With a cap of 2 and three markers in view, the two of highest priority
// (then smallest id) take the slots and keep them while visible.
func TestTimelineCapAndSlots(t *testing.T) {
	r, _ := routes.New([]orb.Point{{0, 0}, {0, 0.05}}, []float64{10})
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), oneBand(16, 0))
	d.Cap = 2
	d.HorizonS, d.BucketEdgesS = 10, [2]float64{5, 10}
	ms := []timeline.Marker{
		{ID: "b", Point: orb.Point{0, 0.002}, Priority: 5},
		{ID: "a", Point: orb.Point{0, 0.003}, Priority: 5},
		{ID: "c", Point: orb.Point{0, 0.001}, Priority: 1},
	}
	got, err := timeline.Compute(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	if !got[0].Shown || !got[1].Shown || got[2].Shown {
		t.Fatalf("shown = %v %v %v, want a and b, not c", got[0].Shown, got[1].Shown, got[2].Shown)
	}
	if !got[2].Visible || got[2].Bucket != timeline.Never {
		t.Fatalf("c: %+v, want visible but never shown", got[2])
	}
	// Same priority: the smaller id wins a single slot.
	d.Cap = 1
	got, _ = timeline.Compute(&d, ms)
	if !got[1].Shown || got[0].Shown {
		t.Fatalf("cap 1: a shown %v, b shown %v; want a", got[1].Shown, got[0].Shown)
	}
}

// Invalid drives are named errors.
func TestTimelineValidation(t *testing.T) {
	r, _ := routes.New([]orb.Point{{0, 0}, {0, 0.05}}, []float64{10})
	base := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), oneBand(16, 0))
	cases := []struct {
		mutate func(*timeline.Drive)
		want   string
	}{
		{func(d *timeline.Drive) { d.TickS = 0 }, "tick_s = 0"},
		{func(d *timeline.Drive) { d.TickS = 0.7 }, "tick_s = 0.7: tick must divide the horizon 120 s"},
		{func(d *timeline.Drive) { d.Cap = 0 }, "cap = 0"},
		{func(d *timeline.Drive) { d.BucketEdgesS = [2]float64{10, 10} }, "bucket_edges_s[1] = 10: bucket edges must increase"},
		{func(d *timeline.Drive) { d.BucketEdgesS = [2]float64{10, 130} }, "bucket_edges_s[1] = 130: bucket edge beyond the horizon 120 s"},
		{func(d *timeline.Drive) { d.HorizonS = -1 }, "horizon_s = -1"},
		{func(d *timeline.Drive) { d.StartAlongM = -1 }, "start_along_m = -1"},
		{func(d *timeline.Drive) { d.Device.WidthPx = 0 }, "device.width_px = 0"},
	}
	for _, c := range cases {
		d := base
		c.mutate(&d)
		if _, err := timeline.Compute(&d, nil); err == nil || !contains(err.Error(), c.want) {
			t.Errorf("Timeline = %v, want an error containing %q", err, c.want)
		}
	}
	d := base
	if _, err := timeline.Compute(&d, []timeline.Marker{{ID: "x"}, {ID: "x"}}); err == nil || !contains(err.Error(), `markers[1].id`) {
		t.Errorf("duplicate ids: %v", err)
	}
	ms := []timeline.Marker{{ID: "a"}, {ID: "x"}, {ID: "b"}, {ID: "x"}, {ID: "a"}}
	if _, err := timeline.Compute(&d, ms); err == nil || err.Error() != `markers[3].id = "x": duplicate id (first at markers[1])` {
		t.Errorf("duplicate ids apart: %v", err)
	}
}

func contains(s, sub string) bool {
	return len(sub) == 0 || (len(s) >= len(sub) && (s == sub || indexOf(s, sub) >= 0))
}

func indexOf(s, sub string) int {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return i
		}
	}
	return -1
}

// drawDrive draws a route, a rule set, a device and markers around the
// route for the timeline properties.
func drawDrive(t *rapid.T) (timeline.Drive, []timeline.Marker) {
	lat0 := rapid.Float64Range(-60, 60).Draw(t, "lat0")
	// Often right at the antimeridian, so that drives and views cross it.
	lon0 := rapid.OneOf(rapid.Float64Range(-179.9, 179.9), rapid.Float64Range(179.95, 179.999)).Draw(t, "lon0")
	n := rapid.IntRange(2, 8).Draw(t, "vertices")
	pts := []orb.Point{{lon0, lat0}}
	for i := 1; i < n; i++ {
		p := pts[i-1]
		step := rapid.Float64Range(0.001, 0.02).Draw(t, "step_deg")
		ang := rapid.Float64Range(0, 2*math.Pi).Draw(t, "dir")
		lon := p[0] + step*math.Sin(ang)
		if lon > 180 {
			lon -= 360
		}
		pts = append(pts, orb.Point{lon, p[1] + step*math.Cos(ang)})
	}
	speeds := make([]float64, n-1)
	for i := range speeds {
		speeds[i] = rapid.Float64Range(2, 40).Draw(t, "speed_mps")
	}
	r, err := routes.New(pts, speeds)
	if err != nil {
		t.Skip(err.Error())
	}
	zoom := rapid.Float64Range(14, 18).Draw(t, "zoom")
	pitch := rapid.SampledFrom([]float64{0, 30, 50, 65}).Draw(t, "pitch")
	rs := oneBand(zoom, pitch)
	if rapid.Bool().Draw(t, "two_bands") {
		// A slow band and a fast one, with hysteresis, rate limits and a
		// turn override, so that zoom and pitch move during the drive.
		edge := rapid.Float64Range(10, 100).Draw(t, "edge_kmh")
		rs.Bands = []rules.Band{
			{BelowKmh: rules.Edge(edge), Zoom: zoom, PitchDeg: pitch},
			{Zoom: zoom - rapid.Float64Range(0, 2).Draw(t, "zoom_drop"), PitchDeg: rapid.Float64Range(0, 70).Draw(t, "fast_pitch")},
		}
		rs.HysteresisKmh = rapid.Float64Range(0, 5).Draw(t, "hysteresis")
		rs.MaxZoomRatePerS = rapid.Float64Range(0.1, 2).Draw(t, "zoom_rate")
		rs.MaxPitchRateDegPerS = rapid.Float64Range(1, 30).Draw(t, "pitch_rate")
		rs.Turn = rules.Turn{WithinM: rapid.Float64Range(0, 300).Draw(t, "turn_within"), MinAngleDeg: 20, Zoom: zoom + 0.5}
	}
	rs.MaxTurnRateDegPerS = rapid.Float64Range(10, 200).Draw(t, "turn_rate")
	dev := viewport.NewDevice(rapid.Float64Range(200, 800).Draw(t, "w"), rapid.Float64Range(300, 900).Draw(t, "h"), 45)
	dev.AnchorY = rapid.Float64Range(0.5, 0.8).Draw(t, "anchor_y")
	d := timeline.NewDrive(r, 0, dev, rs)
	d.HorizonS, d.TickS = 30, 0.5
	d.BucketEdgesS = [2]float64{5, 20}
	d.Cap = rapid.IntRange(1, 5).Draw(t, "cap")
	nm := rapid.IntRange(0, 25).Draw(t, "markers")
	ms := make([]timeline.Marker, nm)
	for i := range ms {
		along := rapid.Float64Range(0, r.LengthM()).Draw(t, "along")
		p := r.PointAt(along)
		off := rapid.Float64Range(-0.003, 0.003)
		lon := p[0] + off.Draw(t, "dlon")
		if lon > 180 {
			lon -= 360
		} else if lon < -180 {
			lon += 360
		}
		ms[i] = timeline.Marker{
			ID:       fmt.Sprintf("m%02d", i),
			Point:    orb.Point{lon, p[1] + off.Draw(t, "dlat")},
			Priority: float64(rapid.IntRange(0, 3).Draw(t, "priority")),
		}
	}
	return d, ms
}

// The shown set never exceeds the cap and is always a subset of the visible
// set; the indexed search agrees with the naive one exactly.
func TestTimelineShownWithinCapAndVisible(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d, ms := drawDrive(t)
		merc := make([]viewport.Mercator, len(ms))
		for i, m := range ms {
			merc[i] = viewport.ToMercator(m.Point)
		}
		d.OnTick = func(k int, v *viewport.View, shown []int) {
			if len(shown) > d.Cap {
				t.Fatalf("tick %d: %d shown, cap %d", k, len(shown), d.Cap)
			}
			for _, i := range shown {
				if !v.InView(merc[i]) {
					t.Fatalf("tick %d: %s shown but not in view", k, ms[i].ID)
				}
			}
		}
		got, err := timeline.Compute(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		d.OnTick = nil
		naive, err := timeline.ComputeNaive(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		for i := range got {
			if g, n := got[i], naive[i]; g != n {
				t.Fatalf("%s: indexed %+v, naive %+v", ms[i].ID, got[i], naive[i])
			}
		}
	})
}

// At every tick, the indexed search (grid, quick test and safe distances)
// finds exactly the markers ProjectMercator puts in view, each once, also
// at ticks of 0.1 s where most answers are carried from earlier ticks.
func TestTimelineIndexedExact(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d, ms := drawDrive(t)
		d.TickS = rapid.SampledFrom([]float64{0.5, 0.25, 0.1}).Draw(t, "tick_s")
		want, err := timeline.Compute(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		got, k, i, err := timeline.ComputeChecked(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		if k >= 0 {
			t.Fatalf("tick %d: marker %d: found in view %s", k, i, "unlike ProjectMercator")
		}
		for j := range got {
			if got[j] != want[j] {
				t.Fatalf("%s: checked run %+v, plain run %+v", ms[j].ID, got[j], want[j])
			}
		}
	})
}

// The same at the scale of the world: zoom 0.5 to 8, markers anywhere
// between 75° S and 75° N, drives at the antimeridian that turn and change
// zoom and pitch quickly, so that views reach across half the world (and
// wrap), copies of markers a world apart meet the footprint, and safe
// distances run into their cap.
func TestTimelineIndexedExactWorld(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		lat0 := rapid.Float64Range(-60, 60).Draw(t, "lat0")
		pts := []orb.Point{{rapid.Float64Range(179, 180).Draw(t, "lon0"), lat0}}
		for i := range rapid.IntRange(1, 4).Draw(t, "segments") {
			p := pts[i]
			ang := rapid.Float64Range(0, 2*math.Pi).Draw(t, "dir")
			step := rapid.Float64Range(0.5, 5).Draw(t, "step_deg")
			lon := p[0] + step*math.Sin(ang)
			if lon > 180 {
				lon -= 360
			} else if lon < -180 {
				lon += 360
			}
			pts = append(pts, orb.Point{lon, max(-70, min(70, p[1]+step*math.Cos(ang)))})
		}
		r, err := routes.New(pts, []float64{rapid.Float64Range(1000, 20000).Draw(t, "speed_mps")})
		if err != nil {
			t.Skip(err.Error())
		}
		zoom := rapid.Float64Range(0.5, 8).Draw(t, "zoom")
		rs := oneBand(zoom, rapid.SampledFrom([]float64{0, 40, 60}).Draw(t, "pitch"))
		rs.Bands = []rules.Band{
			{BelowKmh: rules.Edge(rapid.Float64Range(3600, 72000).Draw(t, "edge_kmh")), Zoom: zoom, PitchDeg: rs.Bands[0].PitchDeg},
			{Zoom: max(0, zoom-rapid.Float64Range(0, 3).Draw(t, "zoom_drop")), PitchDeg: rapid.Float64Range(0, 70).Draw(t, "fast_pitch")},
		}
		rs.MaxZoomRatePerS, rs.MaxPitchRateDegPerS = 1, 20
		rs.MaxTurnRateDegPerS = rapid.Float64Range(10, 200).Draw(t, "turn_rate")
		dev := viewport.NewDevice(rapid.Float64Range(200, 2000).Draw(t, "w"), rapid.Float64Range(300, 900).Draw(t, "h"), 45)
		dev.AnchorY = rapid.Float64Range(0.5, 0.8).Draw(t, "anchor_y")
		d := timeline.NewDrive(r, 0, dev, rs)
		d.HorizonS, d.TickS, d.BucketEdgesS = 20, rapid.SampledFrom([]float64{0.5, 0.25}).Draw(t, "tick_s"), [2]float64{5, 10}
		d.Cap = rapid.IntRange(1, 5).Draw(t, "cap")
		ms := make([]timeline.Marker, rapid.IntRange(1, 40).Draw(t, "markers"))
		for i := range ms {
			ms[i] = timeline.Marker{ID: fmt.Sprintf("w%02d", i),
				Point: orb.Point{rapid.Float64Range(-180, 180).Draw(t, "lon"), rapid.Float64Range(-75, 75).Draw(t, "lat")}}
		}
		got, k, i, err := timeline.ComputeChecked(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		if k >= 0 {
			t.Fatalf("tick %d: marker %d: found in view %s", k, i, "unlike ProjectMercator")
		}
		naive, err := timeline.ComputeNaive(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		for j := range got {
			if got[j] != naive[j] {
				t.Fatalf("%s: indexed %+v, naive %+v", ms[j].ID, got[j], naive[j])
			}
		}
	})
}

// Doubling the cap never lowers any marker's shown time; the answer does
// not depend on the order the markers are given in.
func TestTimelineCapMonotoneAndOrderFree(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d, ms := drawDrive(t)
		a, err := timeline.Compute(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		d2 := d
		d2.Cap *= 2
		b, err := timeline.Compute(&d2, ms)
		if err != nil {
			t.Fatal(err)
		}
		for i := range a {
			if b[i].ShownS < a[i].ShownS {
				t.Fatalf("%s: shown %v s with cap %d, %v s with cap %d", ms[i].ID, a[i].ShownS, d.Cap, b[i].ShownS, d2.Cap)
			}
		}
		perm := rapid.Permutation(func() []int {
			idx := make([]int, len(ms))
			for i := range idx {
				idx[i] = i
			}
			return idx
		}()).Draw(t, "order")
		shuffled := make([]timeline.Marker, len(ms))
		for j, i := range perm {
			shuffled[j] = ms[i]
		}
		c, err := timeline.Compute(&d, shuffled)
		if err != nil {
			t.Fatal(err)
		}
		for j, i := range perm {
			if c[j] != a[i] {
				t.Fatalf("%s: %+v in the given order, %+v shuffled", ms[i].ID, a[i], c[j])
			}
		}
	})
}

// A marker on the route ahead, inside the footprint at t = 0, is early when
// the cap allows every marker a slot; on a straight drive, markers farther
// behind the user than the footprint's near edge are never visible.
func TestTimelineEarlyAndBehind(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		lat0 := rapid.Float64Range(-60, 60).Draw(t, "lat0")
		dir := rapid.Float64Range(0, 2*math.Pi).Draw(t, "dir")
		length := rapid.Float64Range(0.02, 0.1).Draw(t, "length_deg")
		end := orb.Point{length * math.Sin(dir), lat0 + length*math.Cos(dir)}
		r, err := routes.New([]orb.Point{{0, lat0}, end}, []float64{rapid.Float64Range(5, 40).Draw(t, "speed")})
		if err != nil {
			t.Skip(err.Error())
		}
		rs := oneBand(rapid.Float64Range(15, 18).Draw(t, "zoom"), rapid.SampledFrom([]float64{0, 40, 60}).Draw(t, "pitch"))
		start := rapid.Float64Range(0.3, 0.5).Draw(t, "start_frac") * r.LengthM()
		d := timeline.NewDrive(r, start, viewport.NewDevice(390, 844, 45), rs)
		d.HorizonS, d.TickS, d.BucketEdgesS = 20, 0.5, [2]float64{5, 10}
		// The camera at t = 0, as the timeline builds it.
		p0 := r.PointAt(start)
		v, err := viewport.Prepare(viewport.Camera{LatDeg: p0[1], LonDeg: p0[0], HeadingDeg: r.HeadingDegAt(start),
			PitchDeg: rs.Bands[0].PitchDeg, Zoom: rs.Bands[0].Zoom, Device: d.Device})
		if err != nil {
			t.Fatal(err)
		}
		fp := v.Footprint()
		u := v.UserMercator()
		// Ahead: a point of the route between the user and the far edge.
		aheadM := rapid.Float64Range(1, 0.9*fp.VisibleRadiusM).Draw(t, "ahead_m")
		ahead := r.PointAt(start + aheadM)
		// Behind: beyond the near edge (its distance behind the user along
		// the heading, in ground metres) by 1 m to 1 km.
		h := r.HeadingDegAt(start) * math.Pi / 180
		nearBehindM := -((fp.Mercator[0].X-u.X)*math.Sin(h) + (fp.Mercator[0].Y-u.Y)*math.Cos(h)) * viewport.GroundScale(p0[1])
		behindM := nearBehindM + rapid.Float64Range(1, 1000).Draw(t, "beyond_m")
		if behindM >= start*0.999 {
			t.Skip("not enough route behind the user")
		}
		behind := r.PointAt(start - behindM*1.01)
		ms := []timeline.Marker{{ID: "ahead", Point: ahead}, {ID: "behind", Point: behind}}
		if !v.Project(ahead).InView() {
			t.Skip("ahead marker outside the clear area at t = 0")
		}
		got, err := timeline.Compute(&d, ms)
		if err != nil {
			t.Fatal(err)
		}
		if got[0].Bucket != timeline.Early || got[0].FirstShownS != 0 {
			t.Fatalf("ahead marker: %+v, want early at t = 0", got[0])
		}
		if got[1].Visible {
			t.Fatalf("marker %.1f m behind (near edge %.1f m behind): %+v, want never visible", behindM, nearBehindM, got[1])
		}
	})
}

func TestBucketNames(t *testing.T) {
	names := []string{}
	for _, b := range []timeline.Bucket{timeline.Never, timeline.Early, timeline.Mid, timeline.Late} {
		names = append(names, b.String())
	}
	if !slices.Equal(names, []string{"never", "early", "mid", "late"}) {
		t.Fatal(names)
	}
}

// One request must not run for minutes (1e7 ticks × 20,000 markers took
// 119 s): beyond MaxMarkerTicks marker-ticks the timeline is refused, at
// once, naming the markers and the ticks.
func TestTimelineWorkLimit(t *testing.T) {
	r, err := routes.New([]orb.Point{{0, 0}, {0, 1}}, []float64{10})
	if err != nil {
		t.Fatal(err)
	}
	d := timeline.NewDrive(r, 0, viewport.NewDevice(390, 844, 45), oneBand(16, 45))
	d.HorizonS, d.TickS = 1e6, 0.1 // 1e7 ticks
	ms := make([]timeline.Marker, 20000)
	for i := range ms {
		ms[i] = timeline.Marker{ID: fmt.Sprint(i), Point: orb.Point{0, float64(i) * 1e-5}}
	}
	start := time.Now()
	_, err = timeline.Compute(&d, ms)
	var fe *spec.FieldError
	if !errors.As(err, &fe) || fe.Field != "markers" || !strings.Contains(fe.Error(), "20000 markers × 10000001 ticks") {
		t.Fatalf("Compute(20,000 markers, 1e7 ticks) error = %v, want the work limit on markers", err)
	}
	if el := time.Since(start); el > time.Second {
		t.Errorf("refused after %v, want at once", el)
	}
	// At the boundary: 400,001 ticks × 250 markers is over 1e8 and refused;
	// × 249 is within it and computed (a straight drive, quickly).
	d.HorizonS, d.TickS = 1e5, 0.25
	if _, err := timeline.Compute(&d, ms[:250]); !errors.As(err, &fe) || fe.Field != "markers" {
		t.Fatalf("250 markers × 400,001 ticks: error %v, want the work limit", err)
	}
	if _, err := timeline.Compute(&d, ms[:249]); err != nil {
		t.Fatalf("249 markers × 400,001 ticks: %v, want it computed", err)
	}
}

// A stop pauses the motion (SPEC §5): during it the user stands where the
// motion had brought them, and afterwards the drive goes on as if the stop
// had been cut out of time. Positions are compared exactly (the same
// arithmetic at the same moving time).
func TestTimelineStopsPauseTheMotion(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d, _ := drawDrive(t)
		var stops []timeline.Stop
		at := 0.0
		for range rapid.IntRange(1, 4).Draw(t, "stops") {
			at += float64(rapid.IntRange(0, 40).Draw(t, "gap_ticks")) * d.TickS
			st := timeline.Stop{AtS: at, ForS: float64(rapid.IntRange(1, 40).Draw(t, "stop_ticks")) * d.TickS}
			stops = append(stops, st)
			at += st.ForS
		}
		plain := map[float64]orb.Point{}
		d.OnTick = func(k int, v *viewport.View, _ []int) {
			plain[float64(k)*d.TickS] = orb.Point{v.Camera().LonDeg, v.Camera().LatDeg}
		}
		if _, err := timeline.Compute(&d, nil); err != nil {
			t.Fatal(err)
		}
		d.Stops = stops
		d.OnTick = func(k int, v *viewport.View, _ []int) {
			tS := float64(k) * d.TickS
			moving := tS
			for _, st := range stops {
				moving -= max(0, min(tS, st.AtS+st.ForS)-st.AtS)
			}
			// Whole ticks: the moving time is itself a tick's time.
			want, ok := plain[math.Round(moving/d.TickS)*d.TickS]
			got := orb.Point{v.Camera().LonDeg, v.Camera().LatDeg}
			if ok && got != want {
				t.Fatalf("t = %g s (moving %g s): at %v, want %v", tS, moving, got, want)
			}
		}
		if _, err := timeline.Compute(&d, nil); err != nil {
			t.Fatal(err)
		}
	})
	r, _ := routes.New([]orb.Point{{0, 0}, {0, 0.05}}, []float64{10})
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), oneBand(16, 0))
	for _, c := range []struct {
		stops []timeline.Stop
		want  string
	}{
		{[]timeline.Stop{{AtS: -1, ForS: 1}}, "stops[0].at_s = -1"},
		{[]timeline.Stop{{AtS: 0, ForS: 0}}, "stops[0].for_s = 0"},
		{[]timeline.Stop{{AtS: 0, ForS: 5}, {AtS: 4, ForS: 1}}, "stops[1].at_s = 4"},
	} {
		d.Stops = c.stops
		if _, err := timeline.Compute(&d, nil); err == nil || !contains(err.Error(), c.want) {
			t.Errorf("stops %v: %v, want an error containing %q", c.stops, err, c.want)
		}
	}
}

// A cap far above the number of markers (the wire allows up to 2³⁰) costs
// nothing: the slots are sized by the markers, not by the cap, and every
// visible marker is shown as it comes into view.
func TestTimelineHugeCap(t *testing.T) {
	r, _ := routes.New([]orb.Point{{0, 0}, {0, 0.05}}, []float64{10})
	d := timeline.NewDrive(r, 0, viewport.NewDevice(400, 800, 60), oneBand(16, 0))
	d.Cap = 1 << 30
	ms := []timeline.Marker{{ID: "a", Point: orb.Point{0, 0.001}}, {ID: "b", Point: orb.Point{0.0001, 0.002}}, {ID: "c", Point: orb.Point{0, 0.2}}}
	got, err := timeline.Compute(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	for i, g := range got {
		if g.Visible != g.Shown || g.Visible && g.FirstShownS != g.FirstVisibleS {
			t.Errorf("marker %s: %+v: with room for all, shown exactly when visible", ms[i].ID, g)
		}
	}
}
