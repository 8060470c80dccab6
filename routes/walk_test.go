package routes

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"
	"pgregory.net/rapid"
)

// A walker answers exactly as the Route methods it mirrors, whatever the
// order of its calls: mostly small steps forward in time, as in a drive,
// with jumps both ways, times before the start and beyond the end, and
// NaN.
func TestWalkerMatchesRoute(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		rng := rand.New(rand.NewPCG(rapid.Uint64().Draw(t, "seed"), 1))
		n := rapid.IntRange(2, 60).Draw(t, "vertices")
		pts := cityRoute(rng, orb.Point{rapid.Float64Range(-179, 179).Draw(t, "lon"), rapid.Float64Range(-70, 70).Draw(t, "lat")}, n, 90)
		speeds := make([]float64, n-1)
		for i := range speeds {
			speeds[i] = rapid.Float64Range(1, 40).Draw(t, "speed")
		}
		r, err := New(pts, speeds)
		if err != nil {
			t.Skip(err.Error())
		}
		turns := r.Turns(rapid.Float64Range(0, 60).Draw(t, "min_turn_deg"))
		start := rapid.Float64Range(0, r.LengthM()).Draw(t, "start")
		w := r.Walk(start)
		tS := 0.0
		for range rapid.IntRange(1, 200).Draw(t, "steps") {
			switch rapid.IntRange(0, 9).Draw(t, "move") {
			case 0:
				tS = rapid.Float64Range(-100, r.DurationS()+100).Draw(t, "jump")
			case 1:
				tS = math.NaN()
			default:
				if math.IsNaN(tS) {
					tS = 0
				}
				tS += rapid.Float64Range(0, 20).Draw(t, "dt")
			}
			along := w.AlongAfterS(tS)
			if want := r.AlongAfterS(start, tS); math.Float64bits(along) != math.Float64bits(want) {
				t.Fatalf("t = %v: AlongAfterS %v, route %v", tS, along, want)
			}
			// Positions also off the drive's: NaN, beyond the ends,
			// anywhere, and exactly at a vertex or a turn.
			at := along
			switch rapid.IntRange(0, 7).Draw(t, "off") {
			case 0:
				at = rapid.SampledFrom([]float64{math.NaN(), -5, r.LengthM() + 5, r.LengthM() * rng.Float64()}).Draw(t, "at")
			case 1:
				at = r.startM[rapid.IntRange(0, len(r.startM)-1).Draw(t, "vertex")]
			case 2:
				if len(turns) > 0 {
					at = turns[rapid.IntRange(0, len(turns)-1).Draw(t, "turn")]
				}
			}
			if got, want := w.SegmentAt(at), r.SegmentAt(at); got != want {
				t.Fatalf("along %v: SegmentAt %d, route %d", at, got, want)
			}
			if got, want := w.PointAt(at), r.PointAt(at); got != want {
				t.Fatalf("along %v: PointAt %v, route %v", at, got, want)
			}
			gd, gok := w.NextTurnDistM(turns, at)
			wd, wok := NextTurnDistM(turns, at)
			if gok != wok || math.Float64bits(gd) != math.Float64bits(wd) {
				t.Fatalf("along %v: NextTurnDistM %v %v, route %v %v", at, gd, gok, wd, wok)
			}
		}
	})
}

// Stepping a walker through a drive does not allocate.
func TestWalkerDoesNotAllocate(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	pts := cityRoute(rng, orb.Point{10, 50}, 100, 60)
	speeds := make([]float64, len(pts)-1)
	for i := range speeds {
		speeds[i] = 14
	}
	r, err := New(pts, speeds)
	if err != nil {
		t.Fatal(err)
	}
	turns := r.Turns(30)
	w := r.Walk(0)
	k := 0
	if a := testing.AllocsPerRun(100, func() {
		along := w.AlongAfterS(float64(k) * 0.25)
		_ = w.PointAt(along)
		_ = w.SegmentAt(along)
		_, _ = w.NextTurnDistM(turns, along)
		k++
	}); a != 0 {
		t.Errorf("%v allocations a step", a)
	}
}
