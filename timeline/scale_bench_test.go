package timeline_test

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/timeline"
)

// How the timeline grows, one dimension at a time from the 200-marker,
// 500-vertex, 120 s at 0.25 s drive of BenchmarkTimeline (markers, route
// size, horizon and tick, how much the road turns), and the whole request
// a server makes per user (snap, metrics for every marker, the timeline)
// on a prepared route:
//
//	go test ./timeline -run '^$' -bench 'Scale|WholeRequest' -cpu 1
//
// Targets: the whole request ≤ 0.5 ms and the timeline alone ≤ 0.25 ms at
// 200 markers, per core.

// scaleDrive is benchDrive's road and rules with n vertices (about 30 m
// apart) and m markers within 300 m of it.
func scaleDrive(b *testing.B, nVertices, nMarkers int) (timeline.Drive, []timeline.Marker) {
	d, _ := benchDrive(b)
	rng := rand.New(rand.NewPCG(uint64(nVertices), uint64(nMarkers)))
	r := windingRoad(b, rng, nVertices)
	// Markers within the first 4 km (a 120 s drive at 90 km/h is 3 km),
	// so that every size of route sees the same density of markers.
	reach := min(r.LengthM(), 4000)
	ms := make([]timeline.Marker, nMarkers)
	for i := range ms {
		ms[i] = timeline.Marker{ID: fmt.Sprintf("shop-%04d", i),
			Point: pointNear(rng, r, reach), Priority: float64(rng.IntN(4))}
	}
	nd := timeline.NewDrive(r, 0, d.Device, d.Rules)
	return nd, ms
}

func runTimeline(b *testing.B, d *timeline.Drive, ms []timeline.Marker) {
	b.ReportAllocs()
	for b.Loop() {
		if _, err := timeline.Compute(d, ms); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkScaleMarkers(b *testing.B) {
	for _, m := range []int{50, 200, 1000, 5000} {
		d, ms := scaleDrive(b, 500, m)
		b.Run(fmt.Sprintf("markers=%d", m), func(b *testing.B) { runTimeline(b, &d, ms) })
	}
}

func BenchmarkScaleRoute(b *testing.B) {
	for _, n := range []int{100, 500, 2000, 5000, 20000} {
		d, ms := scaleDrive(b, n, 200)
		b.Run(fmt.Sprintf("vertices=%d", n), func(b *testing.B) { runTimeline(b, &d, ms) })
	}
}

func BenchmarkScaleHorizonTick(b *testing.B) {
	// One tick after t = 0: the fixed cost of a request (checking it, the
	// markers' Mercator points, every marker tested at the first view).
	d, ms := scaleDrive(b, 5000, 200)
	d.HorizonS, d.TickS, d.BucketEdgesS = 0.25, 0.25, [2]float64{0.1, 0.2}
	b.Run("horizon=0.25s/tick=0.25s", func(b *testing.B) { runTimeline(b, &d, ms) })
	for _, h := range []float64{120, 600} {
		for _, tick := range []float64{0.25, 0.1} {
			d, ms := scaleDrive(b, 5000, 200)
			d.HorizonS, d.TickS = h, tick
			b.Run(fmt.Sprintf("horizon=%gs/tick=%gs", h, tick), func(b *testing.B) { runTimeline(b, &d, ms) })
		}
	}
}

// BenchmarkScaleTurning: BenchmarkTimeline's drive on roads that turn
// less at each vertex (0 is straight): a turn of the map moves the far
// corners of a footprint that reaches 11 km by up to a kilometre, and the
// markers near its edges are tested again.
func BenchmarkScaleTurning(b *testing.B) {
	for _, turn := range []float64{0.3, 0.1, 0} {
		d, ms := benchDrive(b)
		rng := rand.New(rand.NewPCG(3, 5))
		d.Route = turningRoad(b, rng, 500, turn)
		for i := range ms {
			ms[i].Point = pointNear(rng, d.Route, d.Route.LengthM())
		}
		b.Run(fmt.Sprintf("turn=%grad", turn), func(b *testing.B) { runTimeline(b, &d, ms) })
	}
}

var sinkMetrics routes.Metrics

// BenchmarkWholeRequest is what a server does for one user on a prepared
// route: snap the user, the metrics of 200 markers, the 120 s timeline.
func BenchmarkWholeRequest(b *testing.B) {
	d, ms := benchDrive(b)
	user := orb.Point{-31.1697, 44.9312}
	b.ReportAllocs()
	for b.Loop() {
		u := d.Route.Snap(user)
		for i := range ms {
			sinkMetrics = d.Route.Metrics(u, ms[i].Point)
		}
		if _, err := timeline.Compute(&d, ms); err != nil {
			b.Fatal(err)
		}
	}
}
