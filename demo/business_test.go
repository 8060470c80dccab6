package demo_test

import (
	"math"
	"testing"

	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/routes"
)

// Setback bounds of the brief: a business stands 10–60 m from the nearest street's centre line,
// measured as a WGS84 geodesic (routes.Snap). The generator draws 12–45 m in its flat frame.
const businessMinM, businessMaxM = 10.0, 60.0

// streetRoutes prepares every street as a route, for Snap.
func streetRoutes(t *testing.T, s *demo.Scenario) []*routes.Route {
	t.Helper()
	out := make([]*routes.Route, len(s.Streets))
	for i, st := range s.Streets {
		r, err := routes.New(st.Points, []float64{1})
		if err != nil {
			t.Fatalf("street %s: %v", st.Name, err)
		}
		out[i] = r
	}
	return out
}

func TestBusinessesStandBesideStreets(t *testing.T) {
	for _, seed := range testSeeds {
		s := demo.New(seed)
		rts := streetRoutes(t, s)
		for _, b := range s.Businesses {
			best, nearest := math.Inf(1), -1
			for i, r := range rts {
				if d := r.Snap(b.Point).DistM; d < best {
					best, nearest = d, i
				}
			}
			if best < businessMinM || best > businessMaxM {
				t.Errorf("New(%#x): %s %q is %.2f m from %s, want %g–%g m", seed, b.ID, b.Name, best,
					s.Streets[nearest].Name, businessMinM, businessMaxM)
			}
			if s.Streets[nearest].Name != b.Street {
				t.Errorf("New(%#x): %s %q is listed on %s but nearest %s (%.2f m)", seed, b.ID, b.Name, b.Street,
					s.Streets[nearest].Name, best)
			}
		}
	}
}

// Businesses stand on both sides of their streets (checked on the default town's Lantern Avenue
// with routes.Metrics' side of the road).
func TestBusinessesOnBothSides(t *testing.T) {
	s := demo.Default()
	var avenue demo.Street
	for _, st := range s.Streets {
		if st.Name == demo.MainAvenueName {
			avenue = st
		}
	}
	r, err := routes.New(avenue.Points, []float64{1})
	if err != nil {
		t.Fatal(err)
	}
	sides := map[routes.Side]int{}
	for _, b := range s.Businesses {
		if b.Street == demo.MainAvenueName {
			sides[r.Metrics(r.PlaceAt(0), b.Point).Side]++
		}
	}
	if sides[routes.Left] == 0 || sides[routes.Right] == 0 {
		t.Errorf("businesses on Lantern Avenue by side: %v, want some on each", sides)
	}
}

func TestBusinessFields(t *testing.T) {
	for _, seed := range testSeeds {
		s := demo.New(seed)
		ids, names := map[string]bool{}, map[string]bool{}
		streets := map[string]bool{}
		for _, st := range s.Streets {
			streets[st.Name] = true
		}
		cats := map[string]int{}
		for _, b := range s.Businesses {
			if ids[b.ID] {
				t.Errorf("New(%#x): duplicate id %s", seed, b.ID)
			}
			ids[b.ID] = true
			if names[b.Name] {
				t.Errorf("New(%#x): duplicate name %q", seed, b.Name)
			}
			names[b.Name] = true
			if b.Name == "" || b.Category == "" || !streets[b.Street] {
				t.Errorf("New(%#x): %s: name %q, category %q, street %q", seed, b.ID, b.Name, b.Category, b.Street)
			}
			if p := b.Priority; p < 0 || p > 10 || p != math.Trunc(p) {
				t.Errorf("New(%#x): %s priority %v, want a whole number in [0, 10]", seed, b.ID, p)
			}
			cats[b.Category]++
		}
		if len(cats) < 10 {
			t.Errorf("New(%#x): %d categories, want ≥ 10: %v", seed, len(cats), cats)
		}
		for _, c := range []string{"fuel", "café", "bakery", "pharmacy"} {
			if seed == demo.DefaultSeed && cats[c] == 0 {
				t.Errorf("default town: no %s", c)
			}
		}
		if ms := s.Markers(); len(ms) != len(s.Businesses) || ms[0] != s.Businesses[0].Marker {
			t.Errorf("New(%#x): Markers() does not mirror Businesses", seed)
		}
	}
}
