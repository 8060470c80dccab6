package routes

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r3"
	"github.com/paulmach/orb"
	"pgregory.net/rapid"
)

// The boxes of the index are tight as well as sound: an arc's box holds
// every point of the arc and reaches past the arc's extent along each axis
// by no more than its bulge, 1 − cos(θ/2) (the most a minor arc leaves its
// chord, hand-derived: the arc's midpoint lies cos(θ/2) from the centre,
// its chord's midpoint on the same radius), and rounding it to float32
// widens it by at most one float32 step. A loose box costs only work, so
// the answers of the queries cannot show it; this test does.
func TestArcBoxTight(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, pts := range [][]orb.Point{
		cityRoute(rng, orb.Point{13.405, 52.52}, 300, 50),
		{{0, 0}, {60, 0}, {120, 30}, {-170, -40}, {10, 80}}, // long arcs, where the bulge is large
	} {
		r, err := New(pts, []float64{10})
		if err != nil {
			t.Fatal(err)
		}
		for i := range r.segs {
			sg := &r.segs[i]
			lo, hi := arcBox(sg)
			ext := [2]r3.Vector{{X: math.Inf(1), Y: math.Inf(1), Z: math.Inf(1)}, {X: math.Inf(-1), Y: math.Inf(-1), Z: math.Inf(-1)}}
			for k := 0; k <= 64; k++ {
				s := sg.theta * float64(k) / 64
				p := sg.a.Mul(math.Cos(s)).Add(sg.t.Mul(math.Sin(s)))
				ext[0] = r3.Vector{X: min(ext[0].X, p.X), Y: min(ext[0].Y, p.Y), Z: min(ext[0].Z, p.Z)}
				ext[1] = r3.Vector{X: max(ext[1].X, p.X), Y: max(ext[1].Y, p.Y), Z: max(ext[1].Z, p.Z)}
			}
			bulge := 1 - math.Cos(sg.theta/2)
			const round = 1e-12 // the points' own rounding
			for ax, get := range []func(r3.Vector) float64{func(v r3.Vector) float64 { return v.X }, func(v r3.Vector) float64 { return v.Y }, func(v r3.Vector) float64 { return v.Z }} {
				l, h, el, eh := get(lo), get(hi), get(ext[0]), get(ext[1])
				if l > el+round || h < eh-round {
					t.Fatalf("segment %d axis %d: box [%g, %g] misses the arc's extent [%g, %g]", i, ax, l, h, el, eh)
				}
				if el-l > bulge+boxPad+round || h-eh > bulge+boxPad+round {
					t.Fatalf("segment %d axis %d: box [%g, %g] reaches past the arc's extent [%g, %g] by more than the bulge %g", i, ax, l, h, el, eh, bulge)
				}
				b := toBox32(lo, hi)
				c, e := [3]float32{b.cx, b.cy, b.cz}[ax], [3]float32{b.ex, b.ey, b.ez}[ax]
				l32, h32 := float64(c)-float64(e), float64(c)+float64(e)
				step := 2 * float64(math.Nextafter32(float32(math.Max(math.Abs(l), math.Abs(h))), float32(math.Inf(1)))-float32(math.Max(math.Abs(l), math.Abs(h))))
				if l32 > l || h32 < h {
					t.Fatalf("segment %d axis %d: float32 box [%g, %g] does not hold [%g, %g]", i, ax, l32, h32, l, h)
				}
				if l-l32 > step || h32-h > step {
					t.Fatalf("segment %d axis %d: float32 box [%g, %g] wider than [%g, %g] by more than %g", i, ax, l32, h32, l, h, step)
				}
			}
		}
	}
}

// TestArcBulgeIsHalfAngle: arcBulge, found from cos θ and sin θ with a
// square root, is 1 − cos(θ/2) (the half-angle formulas, trigonometric
// identities) within 1e-15 over every arc angle the routes allow, so boxPad
// (1e-14) covers the difference with room to spare. The angles near π are
// where √((1 + cos θ)/2) alone is 2e-11 short (it was tried so).
func TestArcBulgeIsHalfAngle(t *testing.T) {
	// check reports through tb: the test's own, or rapid's, so that a
	// failing angle is shrunk.
	check := func(tb rapid.TB, theta float64) {
		tb.Helper()
		s, c := math.Sincos(theta)
		got, want := arcBulge(c, s), 1-math.Cos(theta/2)
		if d := math.Abs(got - want); !(d <= 1e-15) {
			tb.Fatalf("θ = %.17g: arcBulge %.17g, 1 − cos(θ/2) = %.17g, %.3g apart", theta, got, want, d)
		}
	}
	for _, theta := range []float64{5e-324, 1e-12, 1e-8, 1e-4, 0.1, 1, math.Pi / 2, math.Nextafter(math.Pi/2, 4), 3, maxArcRad} {
		check(t, theta)
	}
	rapid.Check(t, func(rt *rapid.T) {
		check(rt, rapid.Float64Range(0, maxArcRad).Draw(rt, "theta"))
	})
}
