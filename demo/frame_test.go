package demo

import (
	"math"
	"testing"

	"github.com/viewspec/viewspec/routes"
)

// Lengths in the local frame agree with WGS84 geodesics (routes.GeodesicDistM, Vincenty) within
// localFrameMaxErr: on every segment of every street, and from Origin to every vertex.
func TestLocalFrameLengths(t *testing.T) {
	for _, seed := range []uint64{DefaultSeed, 1, 2, 3} {
		s := New(seed)
		worst := 0.0
		check := func(a, b vec, what string) {
			want := routes.GeodesicDistM(lonLat(a), lonLat(b))
			got := b.sub(a).len()
			if want < 1 {
				return
			}
			rel := math.Abs(got-want) / want
			worst = max(worst, rel)
			if rel > localFrameMaxErr {
				t.Errorf("New(%#x) %s: local %.3f m, geodesic %.3f m (off by %.3f %%, tolerance %.1f %%)", seed, what,
					got, want, 100*rel, 100*localFrameMaxErr)
			}
		}
		for _, st := range s.Streets {
			for i := range st.Points {
				p := local(st.Points[i])
				check(vec{}, p, st.Name+" from Origin")
				if i > 0 {
					check(local(st.Points[i-1]), p, st.Name)
				}
			}
		}
		t.Logf("New(%#x): worst relative error %.4f %%", seed, 100*worst)
	}
}

// local inverts lonLat up to the rounding to 1e-7° (≤ 1.1 cm), and Origin is the local frame's 0.
func TestLocalRoundTrip(t *testing.T) {
	if p := lonLat(vec{}); p != Origin {
		t.Errorf("lonLat(0, 0) = %v, want Origin %v", p, Origin)
	}
	for _, v := range []vec{{1, 2}, {-5000, 3000}, {7000.123, -8000.456}} {
		if d := local(lonLat(v)).sub(v).len(); d > 0.012 {
			t.Errorf("local(lonLat(%v)) is %.4f m off, tolerance 1.2 cm", v, d)
		}
	}
}

// SplitMix64's first outputs for seed 0, from the reference implementation
// (https://prng.di.unimi.it/splitmix64.c, x = 0).
func TestSplitMix64(t *testing.T) {
	r := &rng{state: 0}
	for i, want := range []uint64{0xe220a8397b1dcdaf, 0x6e789e6aa1b965f4, 0x06c45d188009454f} {
		if got := r.next(); got != want {
			t.Errorf("output %d = %#x, want %#x", i, got, want)
		}
	}
}
