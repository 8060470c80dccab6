package routes

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"
)

// Benchmarks of preparing a route:
//
//	go test ./routes/ -run xxx -bench 'New|BuildTree' -benchmem -count 5
//
// The routes are the tangled city drives of the Metrics benchmarks (newMetricsBench). Targets: New
// on 20,000 vertices ≤ 15 ms, and ≤ 55× New on 500 in the same run (the index build is O(n log n),
// the rest of New O(n)). BenchmarkBuildTree measures the index alone, the selection build against
// the sort-based one it replaced (buildTreeSort), in the same run.

var benchNewSizes = []int{100, 500, 5000, 20000}

// benchRoutePts returns the n vertices of newMetricsBench's route.
func benchRoutePts(n int) []orb.Point {
	rng := rand.New(rand.NewPCG(uint64(n), 42))
	return cityRoute(rng, orb.Point{13.405, 52.52}, n, 50)
}

var sinkRoute *Route

func BenchmarkNew(b *testing.B) {
	for _, n := range benchNewSizes {
		pts := benchRoutePts(n)
		b.Run(fmt.Sprintf("vertices=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				r, err := New(pts, []float64{13.9})
				if err != nil {
					b.Fatal(err)
				}
				sinkRoute = r
			}
		})
	}
}

var sinkItems []item

func BenchmarkBuildTree(b *testing.B) {
	for _, n := range benchNewSizes {
		r, err := New(benchRoutePts(n), []float64{13.9})
		if err != nil {
			b.Fatal(err)
		}
		for _, bc := range []struct {
			name  string
			build func([]segment) ([]node, int32, []item)
		}{{"select", buildTree}, {"sort", buildTreeSort}} {
			b.Run(fmt.Sprintf("vertices=%d/%s", n, bc.name), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					_, _, sinkItems = bc.build(r.segs)
				}
			})
		}
	}
}
