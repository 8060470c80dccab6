package demo_test

import (
	"math"
	"testing"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/routes"
)

// onStreetM bounds how far a drive's vertex may lie from a street's centre line: the vertices are the
// streets' own, or points between two of them rounded to 1e-7° (≤ 1.1 cm in each of lat and lon).
const onStreetM = 0.02

func mustRoute(t *testing.T, d demo.Tour) *routes.Route {
	t.Helper()
	r, err := d.Route()
	if err != nil {
		t.Fatalf("drive %s: routes.New: %v", d.Name, err)
	}
	return r
}

func TestDrivesAreRoutes(t *testing.T) {
	for _, seed := range testSeeds {
		s := demo.New(seed)
		rts := streetRoutes(t, s)
		for _, d := range s.Drives {
			if len(d.SpeedsMps) != len(d.Points)-1 {
				t.Fatalf("New(%#x) %s: %d speeds for %d points", seed, d.Name, len(d.SpeedsMps), len(d.Points))
			}
			r := mustRoute(t, d)
			if r.NumSegments() != len(d.Points)-1 {
				t.Errorf("New(%#x) %s: %d segments for %d points (a zero-length segment)", seed, d.Name, r.NumSegments(), len(d.Points))
			}
			for i, p := range d.Points {
				best := math.Inf(1)
				for _, sr := range rts {
					best = min(best, sr.Snap(p).DistM)
				}
				if best > onStreetM {
					t.Errorf("New(%#x) %s: points[%d] %v is %.3f m off every street, want ≤ %g m", seed, d.Name, i, p, best, onStreetM)
				}
			}
		}
	}
}

// kmh returns a segment speed in km/h, as SPEC §3 converts it (one multiplication).
func kmh(mps float64) float64 { return mps * 3.6 }

func TestDriveSpeedRanges(t *testing.T) {
	for _, seed := range testSeeds {
		s := demo.New(seed)
		for _, c := range []struct {
			name   string
			lo, hi float64
		}{
			{demo.DriveTown, demo.TownMinKmh, demo.TownMaxKmh},
			{demo.DriveRing, demo.RingMinKmh, demo.RingMaxKmh},
		} {
			d, _ := s.Drive(c.name)
			for i, v := range d.SpeedsMps {
				if k := kmh(v); k < c.lo || k > c.hi {
					t.Errorf("New(%#x) %s: speed_mps[%d] = %v (%.2f km/h), want %g–%g km/h", seed, c.name, i, v, k, c.lo, c.hi)
				}
			}
		}
	}
}

// The expressway drive runs at 100–120 km/h up to its one sharp exit, a turn of at least 60° (by
// routes' Turns, Mercator headings), after which the speed is below 100 km/h and never rises.
func TestExpresswayExit(t *testing.T) {
	for _, seed := range testSeeds {
		s := demo.New(seed)
		d, _ := s.Drive(demo.DriveExpressway)
		r := mustRoute(t, d)
		exits := r.Turns(demo.ExitTurnMinDeg)
		if len(exits) != 1 {
			t.Fatalf("New(%#x): %d turns of ≥ %g°, want 1 (the exit): %v", seed, len(exits), demo.ExitTurnMinDeg, exits)
		}
		if tight := r.Turns(30); len(tight) != 1 || tight[0] != exits[0] {
			t.Errorf("New(%#x): turns of ≥ 30° at %v, want only the exit at %.1f m", seed, tight, exits[0])
		}
		x := r.SegmentAt(exits[0]) // the first segment after the exit
		turn := routes.HeadingChangeDeg(r.Segment(x-1).HeadingDeg, r.Segment(x).HeadingDeg)
		if turn < demo.ExitTurnMinDeg || turn > 90 {
			t.Errorf("New(%#x): the exit turns %.2f°, want %g–90°", seed, turn, demo.ExitTurnMinDeg)
		}
		if r.DurationS()-r.TimeBetweenS(exits[0], r.LengthM()) > 120 {
			t.Errorf("New(%#x): the exit comes %.1f s into the drive, after the 120 s default horizon",
				seed, r.DurationS()-r.TimeBetweenS(exits[0], r.LengthM()))
		}
		for i, v := range d.SpeedsMps {
			k := kmh(v)
			switch {
			case i < x && (k < demo.ExpresswayMinKmh || k > demo.ExpresswayMaxKmh):
				t.Errorf("New(%#x): speed_mps[%d] = %v (%.2f km/h) before the exit, want %g–%g km/h", seed, i, v, k,
					demo.ExpresswayMinKmh, demo.ExpresswayMaxKmh)
			case i >= x && k >= demo.ExpresswayMinKmh:
				t.Errorf("New(%#x): speed_mps[%d] = %v (%.2f km/h) after the exit, want < %g km/h", seed, i, v, k, demo.ExpresswayMinKmh)
			case i > x && v > d.SpeedsMps[i-1]:
				t.Errorf("New(%#x): speed_mps[%d] = %v rises after the exit (from %v)", seed, i, v, d.SpeedsMps[i-1])
			}
		}
	}
}

// The town drive turns only at junctions (points shared by an avenue and a cross street), and turns
// at least 3 times; the ring drive never turns by 25° or more (the lower of the two rule sets'
// thresholds).
func TestTownTurnsAtJunctions(t *testing.T) {
	for _, seed := range testSeeds {
		s := demo.New(seed)
		onAvenue := map[orb.Point]bool{}
		for _, st := range s.Streets {
			if st.Kind == demo.KindAvenue {
				for _, p := range st.Points {
					onAvenue[p] = true
				}
			}
		}
		junction := map[orb.Point]bool{}
		for _, st := range s.Streets {
			if st.Kind == demo.KindStreet {
				for _, p := range st.Points {
					if onAvenue[p] {
						junction[p] = true
					}
				}
			}
		}
		d, _ := s.Drive(demo.DriveTown)
		r := mustRoute(t, d)
		turns := r.Turns(25)
		if len(turns) < 3 {
			t.Errorf("New(%#x): the town drive turns %d times, want ≥ 3", seed, len(turns))
		}
		for _, at := range turns {
			if p := r.PointAt(at); !junction[p] {
				t.Errorf("New(%#x): the town drive turns at %.1f m, %v, not a junction", seed, at, p)
			}
		}
		ring, _ := s.Drive(demo.DriveRing)
		if tr := mustRoute(t, ring).Turns(25); len(tr) != 0 {
			t.Errorf("New(%#x): the ring drive turns by ≥ 25° at %v", seed, tr)
		}
	}
}
