package demo

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// Build is one simulated phone build of the fleet: its client version and
// the fault planted in it (FaultNone for the clean build).
type Build struct {
	Client string
	Fault  string
}

// The faults planted in the fleet's builds.
const (
	FaultNone   = "none"
	FaultLag    = "lag"    // every display 1 s after the moment it should start
	FaultNoCap  = "no-cap" // the cap ignored: every marker in view is displayed
	FaultInsets = "insets" // the left and right insets swapped
)

// Builds are the fleet's four builds, one clean and three faulty, in the
// order records cycle through them.
var Builds = []Build{
	{Client: "4.3", Fault: FaultNone},
	{Client: "4.2", Fault: FaultLag},
	{Client: "3.9", Fault: FaultNoCap},
	{Client: "4.0", Fault: FaultInsets},
}

// Fleet simulation constants.
const (
	fleetHorizonS    = 120.0
	fleetTickS       = 0.25
	fleetCap         = 4
	fleetFixEveryS   = 1.0  // fixes at 1 Hz
	fleetGPSNoiseM   = 3.0  // the GPS error's standard deviation, metres, each axis
	fleetRadiusM     = 2000 // candidates: businesses this near the user at request time
	fleetCandidates  = 200  // at most
	fleetStopChance  = 0.35 // a record with a stop at lights
	fleetLeaveChance = 0.15 // a record whose driver leaves the planned route
	fleetLagS        = 1.0
)

// fleetRecord is one drive-log line, as SPEC §9 lays it out.
type fleetRecord struct {
	RequestID    string            `json:"request_id"`
	Tags         map[string]string `json:"tags"`
	Device       map[string]any    `json:"device"`
	RulesRef     string            `json:"rules_ref"`
	Cap          int               `json:"cap"`
	HorizonS     float64           `json:"horizon_s"`
	TickS        float64           `json:"tick_s"`
	Trace        []fleetFix        `json:"trace"`
	Route        *fleetRoute       `json:"route,omitempty"`
	Candidates   []fleetCandidate  `json:"candidates"`
	Shown        []fleetShown      `json:"shown"`
	Predicted    []fleetPrediction `json:"predicted"`
	BucketEdgesS [2]float64        `json:"bucket_edges_s"`
}

type fleetFix struct {
	TS  float64 `json:"t_s"`
	Lat float64 `json:"lat"`
	Lon float64 `json:"lon"`
}

type fleetRoute struct {
	Points   []map[string]float64 `json:"points"`
	SpeedMps []float64            `json:"speed_mps"`
}

type fleetCandidate struct {
	ID       string  `json:"id"`
	Lat      float64 `json:"lat"`
	Lon      float64 `json:"lon"`
	Priority float64 `json:"priority"`
}

type fleetShown struct {
	ID          string       `json:"id"`
	FirstShownS float64      `json:"first_shown_s"`
	ShownS      float64      `json:"shown_s"`
	IntervalsS  [][2]float64 `json:"intervals_s"`
}

// ms3 rounds seconds to the millisecond a phone logs.
func ms3(s float64) float64 { return math.Round(s*1000) / 1000 }

type fleetPrediction struct {
	ID string     `json:"id"`
	P  [4]float64 `json:"p"`
}

// FleetRecord returns drive-log record i of the fleet (SPEC §9) as one JSON
// line without its newline: a drive through the town by one of the three
// tours from a random place, recorded at 1 Hz with GPS noise, sometimes
// stopping at lights or leaving the planned route; the candidates near the
// user; the display log of build Builds[i % 4], made by running the
// reference timeline with that build's fault; and a simple predictor's
// bucket probabilities. Records are independent: the same (seed, i) gives
// the same bytes.
func (s *Scenario) FleetRecord(i int) ([]byte, error) {
	r := newRNG(s.Seed, fmt.Sprintf("fleet/%d", i))
	build := Builds[i%len(Builds)]
	tour := s.Drives[r.intn(len(s.Drives))]
	route, err := tour.Route()
	if err != nil {
		return nil, err
	}
	dev := s.Devices[r.intn(len(s.Devices))]
	rs, _ := s.RuleSet(dev.Rules)

	// The drive actually made: along the tour from a random start, with
	// an optional stop, and optionally off the planned route from some
	// moment on, straight ahead.
	startM := r.between(0, math.Max(0, route.LengthM()-400))
	var stopAt, stopFor float64 = math.Inf(1), 0
	if r.float() < fleetStopChance {
		stopAt, stopFor = r.between(5, 80), r.between(10, 30)
	}
	leaveAt := math.Inf(1)
	if r.float() < fleetLeaveChance {
		leaveAt = r.between(20, 90)
	}
	walk := route.Walk(startM)
	truth := func(t float64) orb.Point {
		moving := t
		if t >= stopAt {
			moving = t - math.Min(t-stopAt, stopFor)
		}
		if moving > leaveAt {
			a := walk.AlongAfterS(leaveAt)
			p := walk.PointAt(a)
			speed := route.SpeedMpsAt(a)
			return offsetM(p, route.HeadingDegAt(a), speed*(moving-leaveAt))
		}
		return walk.PointAt(walk.AlongAfterS(moving))
	}
	var fixes []fleetFix
	var last orb.Point
	for k := 0; float64(k)*fleetFixEveryS <= fleetHorizonS; k++ {
		t := float64(k) * fleetFixEveryS
		p := truth(t)
		stopped := t > stopAt && t <= stopAt+stopFor
		if stopped && k > 0 {
			p = last // a phone at rest repeats its fix
		} else {
			p = offsetM(p, r.between(0, 360), math.Abs(gauss(r))*fleetGPSNoiseM)
		}
		last = p
		fixes = append(fixes, fleetFix{TS: t, Lat: p[1], Lon: p[0]})
	}

	// Candidates: the businesses nearest the user, at most 200 within 2 km.
	user := orb.Point{fixes[0].Lon, fixes[0].Lat}
	type near struct {
		b    *Business
		dist float64
	}
	var ns []near
	for j := range s.Businesses {
		b := &s.Businesses[j]
		if d := routes.GeodesicDistM(user, b.Point); d <= fleetRadiusM {
			ns = append(ns, near{b, d})
		}
	}
	sort.Slice(ns, func(a, b int) bool {
		if ns[a].dist != ns[b].dist {
			return ns[a].dist < ns[b].dist
		}
		return ns[a].b.ID < ns[b].b.ID
	})
	if len(ns) > fleetCandidates {
		ns = ns[:fleetCandidates]
	}
	rec := fleetRecord{
		RequestID: fmt.Sprintf("req-%06d", i),
		Tags:      map[string]string{"client": build.Client, "device": dev.Name, "tour": tour.Name},
		RulesRef:  rs.Name, Cap: fleetCap, HorizonS: fleetHorizonS, TickS: fleetTickS,
		BucketEdgesS: [2]float64{5, 35}, Trace: fixes,
	}
	rec.Device = deviceJSON(dev.Device)
	rec.Route = &fleetRoute{SpeedMps: tour.SpeedsMps}
	for _, p := range tour.Points {
		rec.Route.Points = append(rec.Route.Points, map[string]float64{"lat": p[1], "lon": p[0]})
	}
	ms := make([]timeline.Marker, len(ns))
	for j, n := range ns {
		ms[j] = n.b.Marker
		rec.Candidates = append(rec.Candidates, fleetCandidate{ID: n.b.ID, Lat: n.b.Point[1], Lon: n.b.Point[0], Priority: n.b.Priority})
	}

	// The build's display log: the reference timeline of the recorded
	// drive, with the build's fault.
	tfix := make([]timeline.Fix, len(fixes))
	for j, f := range fixes {
		tfix[j] = timeline.Fix{TS: f.TS, Point: orb.Point{f.Lon, f.Lat}}
	}
	rt, stops, err := timeline.Replay(tfix, "trace")
	if err != nil {
		return nil, err
	}
	d := timeline.NewDrive(rt, 0, dev.Device, rs.Set)
	d.Stops, d.Cap, d.HorizonS, d.TickS = stops, fleetCap, fleetHorizonS, fleetTickS
	switch build.Fault {
	case FaultNoCap:
		d.Cap = len(ms) + 1
	case FaultInsets:
		d.Device.InsetLeftPx, d.Device.InsetRightPx = d.Device.InsetRightPx, d.Device.InsetLeftPx
	}
	// The phone logs each display's intervals from the ticks it was on.
	ivs := make([][][2]float64, len(ms))
	d.OnTick = func(k int, _ *viewport.View, shown []int) {
		t := float64(k) * d.TickS
		for _, j := range shown {
			if n := len(ivs[j]); n > 0 && ivs[j][n-1][1] == t {
				ivs[j][n-1][1] = t + d.TickS
			} else {
				ivs[j] = append(ivs[j], [2]float64{t, t + d.TickS})
			}
		}
	}
	got, err := timeline.Compute(&d, ms)
	if err != nil {
		return nil, err
	}
	rec.Shown = []fleetShown{}
	for j, g := range got {
		if !g.Shown {
			continue
		}
		first, shown, iv := g.FirstShownS, g.ShownS, ivs[j]
		if build.Fault == FaultLag {
			// Each interval starts a second late; one shorter than that
			// never appears.
			var late [][2]float64
			shown = 0
			for _, x := range iv {
				if x[0]+fleetLagS < x[1] {
					late = append(late, [2]float64{x[0] + fleetLagS, x[1]})
					shown += x[1] - x[0] - fleetLagS
				}
			}
			if len(late) == 0 {
				continue
			}
			first, iv = late[0][0], late
		}
		for k := range iv {
			iv[k] = [2]float64{ms3(iv[k][0]), ms3(iv[k][1])}
		}
		rec.Shown = append(rec.Shown, fleetShown{ID: ms[j].ID, FirstShownS: ms3(first), ShownS: ms3(shown), IntervalsS: iv})
	}

	// A simple predictor: the time to reach each candidate at the current
	// speed, turned into bucket probabilities by how far it lies from each
	// bucket, with a chance of never that grows with its distance off the
	// road.
	speed := math.Max(route.SpeedMpsAt(startM), 1)
	place := route.PlaceAt(startM)
	for j, n := range ns {
		m := route.Metrics(place, n.b.Point)
		reach := n.dist / speed
		if m.Ahead {
			reach = m.AlongM / speed
		}
		w := [4]float64{
			math.Exp(-reach / 5),
			math.Exp(-math.Abs(reach-20) / 12),
			math.Exp(-math.Abs(reach-70) / 30),
			0.2 + m.RouteDistM/150,
		}
		if !m.Ahead {
			w[3] += 1
		}
		sum := w[0] + w[1] + w[2] + w[3]
		var p [4]float64
		for k := range w {
			p[k] = math.Round(w[k]/sum*1e6) / 1e6
		}
		p[3] = math.Round((1-p[0]-p[1]-p[2])*1e6) / 1e6
		rec.Predicted = append(rec.Predicted, fleetPrediction{ID: ms[j].ID, P: p})
	}
	return json.Marshal(rec)
}

// deviceJSON spells out a device as the wire's device object.
func deviceJSON(d viewport.Device) map[string]any {
	return map[string]any{
		"width_px": d.WidthPx, "height_px": d.HeightPx, "fov_y_deg": d.FovYDeg, "tile_px": d.TilePx,
		"anchor_x": d.AnchorX, "anchor_y": d.AnchorY, "inset_top_px": d.InsetTopPx, "inset_right_px": d.InsetRightPx,
		"inset_bottom_px": d.InsetBottomPx, "inset_left_px": d.InsetLeftPx, "far_ratio": d.FarRatio,
	}
}

// gauss returns a standard normal draw (Box–Muller).
func gauss(r *rng) float64 {
	u := math.Max(r.float(), 1e-300)
	return math.Sqrt(-2*math.Log(u)) * math.Cos(2*math.Pi*r.float())
}

// offsetM returns the point distM metres from p on bearing bearingDeg, on
// the local plane (exact enough for metres in a town).
func offsetM(p orb.Point, bearingDeg, distM float64) orb.Point {
	const mPerDeg = 6371008.8 * math.Pi / 180
	b := bearingDeg * math.Pi / 180
	dn, de := distM*math.Cos(b), distM*math.Sin(b)
	return orb.Point{p[0] + de/(mPerDeg*math.Cos(p[1]*math.Pi/180)), p[1] + dn/mPerDeg}
}
