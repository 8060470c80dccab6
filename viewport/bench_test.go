package viewport_test

import (
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/viewport"
)

var (
	benchCamera = viewport.Camera{LatDeg: 52.37, LonDeg: 4.89, HeadingDeg: 37, PitchDeg: 55, Zoom: 16.5,
		Device: viewport.NewDevice(390, 844, 45)}
	benchPoints = func() []orb.Point {
		pts := make([]orb.Point, 1024)
		for i := range pts {
			pts[i] = orb.Point{4.89 + float64(i%32)*1e-4, 52.37 + float64(i/32)*1e-4}
		}
		return pts
	}()
	sinkM  viewport.Mercator
	sinkSP viewport.ScreenPoint
	sinkB  bool
	sinkV  viewport.View
	sinkFP viewport.Footprint
)

// The floor for Project from degrees: the bare Mercator conversion.
func BenchmarkToMercator(b *testing.B) {
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		sinkM = viewport.ToMercator(benchPoints[i&1023])
	}
}

func BenchmarkProject(b *testing.B) {
	v, _ := viewport.Prepare(benchCamera)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		sinkSP = v.Project(benchPoints[i&1023])
	}
}

func BenchmarkProjectMercator(b *testing.B) {
	v, _ := viewport.Prepare(benchCamera)
	ms := make([]viewport.Mercator, len(benchPoints))
	for i, p := range benchPoints {
		ms[i] = viewport.ToMercator(p)
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		sinkSP = v.ProjectMercator(ms[i&1023])
	}
}

func BenchmarkInView(b *testing.B) {
	v, _ := viewport.Prepare(benchCamera)
	ms := make([]viewport.Mercator, len(benchPoints))
	for i, p := range benchPoints {
		ms[i] = viewport.ToMercator(p)
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		sinkB = v.InView(ms[i&1023])
	}
}

func BenchmarkPrepare(b *testing.B) {
	b.ReportAllocs()
	c := benchCamera
	for i := 0; i < b.N; i++ {
		c.HeadingDeg = float64(i % 360)
		sinkV, _ = viewport.Prepare(c)
	}
}

// A View placed again for a camera that moved but kept its device, pitch,
// zoom and heading, as at most ticks of a drive; against Prepare above.
func BenchmarkPlaceAgain(b *testing.B) {
	b.ReportAllocs()
	c := benchCamera
	var v viewport.View
	for i := 0; i < b.N; i++ {
		c.LatDeg = benchCamera.LatDeg + float64(i%1000)*1e-5
		if err := v.Place(c); err != nil {
			b.Fatal(err)
		}
	}
	sinkV = v
}

func BenchmarkFootprint(b *testing.B) {
	v, _ := viewport.Prepare(benchCamera)
	b.ReportAllocs()
	for b.Loop() {
		sinkFP = v.Footprint()
	}
}
