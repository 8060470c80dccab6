package routes

import (
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"
)

// Benchmarks in one file so that one run shows them side by side:
//
//	go test ./routes/ -run xxx -bench . -benchmem
//
// The Metrics benchmarks do all 200 markers per operation, so ns/op is the cost of one request's
// worth of markers (targets: ≤ 200 µs on a 500-vertex route, ≤ 1 ms on a 20,000-vertex one, and the
// index ≥ 8× faster than the direct scan), with zero allocations.

type metricsBench struct {
	r       *Route
	user    Place
	markers []orb.Point
}

func newMetricsBench(b *testing.B, nVertices int) metricsBench {
	b.Helper()
	rng := rand.New(rand.NewPCG(uint64(nVertices), 42))
	pts := cityRoute(rng, orb.Point{13.405, 52.52}, nVertices, 50)
	r, err := New(pts, []float64{13.9})
	if err != nil {
		b.Fatal(err)
	}
	// The user a tenth of the way along, a few metres off the road; markers beside the route.
	user := r.Snap(offsetPoint(r.PointAt(r.LengthM()/10), 90, 4))
	return metricsBench{r: r, user: user, markers: markersNear(rng, pts, 200)}
}

var sinkMetrics Metrics

func BenchmarkMetrics200x500(b *testing.B) {
	mb := newMetricsBench(b, 500)
	b.ReportAllocs()
	for b.Loop() {
		for _, q := range mb.markers {
			sinkMetrics = mb.r.Metrics(mb.user, q)
		}
	}
}

func BenchmarkMetrics200x500Naive(b *testing.B) {
	mb := newMetricsBench(b, 500)
	b.ReportAllocs()
	for b.Loop() {
		for _, q := range mb.markers {
			sinkMetrics = mb.r.metricsScan(mb.user, q)
		}
	}
}

func BenchmarkMetrics200x20000(b *testing.B) {
	mb := newMetricsBench(b, 20000)
	b.ReportAllocs()
	for b.Loop() {
		for _, q := range mb.markers {
			sinkMetrics = mb.r.Metrics(mb.user, q)
		}
	}
}

var sinkFloat float64

// BenchmarkGeodesic is one WGS84 inverse on a city-scale pair (the common case of Metrics).
func BenchmarkGeodesic(b *testing.B) {
	a, c := orb.Point{13.405, 52.52}, orb.Point{13.461, 52.497}
	b.ReportAllocs()
	for b.Loop() {
		sinkFloat = GeodesicDistM(a, c)
	}
}

// BenchmarkGeodesicContinental is one inverse across a continent.
func BenchmarkGeodesicContinental(b *testing.B) {
	a, c := orb.Point{-118.4, 33.95}, orb.Point{-73.78, 40.63}
	b.ReportAllocs()
	for b.Loop() {
		sinkFloat = GeodesicDistM(a, c)
	}
}

// BenchmarkGeodesicAntipodal is one inverse that takes the nearly-antipodal fallback.
func BenchmarkGeodesicAntipodal(b *testing.B) {
	a, c := orb.Point{0, 0.5}, orb.Point{179.7, -0.3}
	b.ReportAllocs()
	for b.Loop() {
		sinkFloat = GeodesicDistM(a, c)
	}
}

// BenchmarkAlongAfter is one tick of motion on a 500-vertex route.
func BenchmarkAlongAfter(b *testing.B) {
	mb := newMetricsBench(b, 500)
	dur := mb.r.DurationS()
	b.ReportAllocs()
	t := 0.0
	for b.Loop() {
		t += 0.25
		if t > dur {
			t = 0
		}
		sinkFloat = mb.r.AlongAfterS(100, t)
	}
}

// driveStep is one tick of a drive's route lookups: position, segment,
// point and next turn.
func driveStep(b *testing.B, walker bool) {
	mb := newMetricsBench(b, 500)
	r := mb.r
	dur := r.DurationS()
	turns := r.Turns(30)
	w := r.Walk(100)
	b.ReportAllocs()
	t := 0.0
	for b.Loop() {
		t += 0.25
		if t > dur {
			t = 0
		}
		if walker {
			along := w.AlongAfterS(t)
			sinkFloat = float64(w.SegmentAt(along)) + w.PointAt(along)[0]
			sinkFloat, _ = w.NextTurnDistM(turns, along)
		} else {
			along := r.AlongAfterS(100, t)
			sinkFloat = float64(r.SegmentAt(along)) + r.PointAt(along)[0]
			sinkFloat, _ = NextTurnDistM(turns, along)
		}
	}
}

// BenchmarkDriveStepWalker is driveStep with a Walker's remembered
// segments; BenchmarkDriveStepSearch searches afresh at every call.
func BenchmarkDriveStepWalker(b *testing.B) { driveStep(b, true) }
func BenchmarkDriveStepSearch(b *testing.B) { driveStep(b, false) }
