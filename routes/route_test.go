package routes

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os/exec"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/internal/testtool"
	"github.com/viewspec/viewspec/spec"
)

func TestNewRefusesInvalidInput(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	ok := []orb.Point{{0, 0}, {0.01, 0}, {0.02, 0}}
	cases := []struct {
		name   string
		points []orb.Point
		speeds []float64
		field  string
		value  string
		msg    string // the whole message
	}{
		{"no points", nil, []float64{10}, "points", "0 given",
			"points = 0 given: a route needs at least 2 distinct vertices"},
		{"one point", []orb.Point{{1, 2}}, []float64{10}, "points", "1 given",
			"points = 1 given: a route needs at least 2 distinct vertices"},
		{"all one position", []orb.Point{{1, 2}, {1, 2}, {1, 2}}, []float64{10}, "points", "3 given, 1 distinct",
			"points = 3 given, 1 distinct: a route needs at least 2 distinct vertices"},
		{"one position as -180 and 180", []orb.Point{{-180, 2}, {180, 2}}, []float64{10}, "points", "2 given, 1 distinct",
			"points = 2 given, 1 distinct: a route needs at least 2 distinct vertices"},
		{"latitude above 90", []orb.Point{{0, 0}, {0, 1}, {0, 2}, {0, 91}}, []float64{10}, "points[3].lat", "91",
			"points[3].lat = 91: latitude must be finite and within [-90, 90]"},
		{"latitude below -90", []orb.Point{{0, -90.5}, {0, 1}}, []float64{10}, "points[0].lat", "-90.5",
			"points[0].lat = -90.5: latitude must be finite and within [-90, 90]"},
		{"longitude beyond -180", []orb.Point{{0, 0}, {-180.25, 1}}, []float64{10}, "points[1].lon", "-180.25",
			"points[1].lon = -180.25: longitude must be finite and within [-180, 180]"},
		{"latitude NaN", []orb.Point{{0, 0}, {0, nan}}, []float64{10}, "points[1].lat", "NaN",
			"points[1].lat = NaN: latitude must be finite and within [-90, 90]"},
		{"longitude +Inf", []orb.Point{{inf, 0}, {0, 1}}, []float64{10}, "points[0].lon", "+Inf",
			"points[0].lon = +Inf: longitude must be finite and within [-180, 180]"},
		{"too many speeds", ok, []float64{1, 2, 3}, "speed_mps", "3 entries",
			"speed_mps = 3 entries: want 1 or 2 (one per segment as given)"},
		{"no speeds", ok, nil, "speed_mps", "0 entries",
			"speed_mps = 0 entries: want 1 or 2 (one per segment as given)"},
		{"speed zero", ok, []float64{0}, "speed_mps", "0", "speed_mps = 0: must be > 0 m/s"},
		{"speed negative on segment 1", ok, []float64{10, -1}, "speed_mps[1]", "-1",
			"speed_mps[1] = -1: must be > 0 m/s"},
		{"speed NaN", ok, []float64{nan}, "speed_mps", "NaN", "speed_mps = NaN: not a finite number"},
		{"speed +Inf on segment 0", ok, []float64{inf, 10}, "speed_mps[0]", "+Inf",
			"speed_mps[0] = +Inf: not a finite number"},
		{"consecutive antipodal vertices", []orb.Point{{0, 0}, {180, 0}}, []float64{10}, "points[1]", "[180, 0]",
			"points[1] = [180, 0]: less than 6 m from antipodal to points[0] [0, 0]: the great-circle arc between consecutive vertices is not determined"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := New(c.points, c.speeds)
			if err == nil {
				t.Fatalf("New(%v, %v) = %p, nil; want an error", c.points, c.speeds, r)
			}
			if r != nil {
				t.Errorf("New(%v, %v) = %p with error %v, want a nil Route", c.points, c.speeds, r, err)
			}
			var ie *spec.FieldError
			if !errors.As(err, &ie) {
				t.Fatalf("New(%v, %v): error %v is not a *spec.FieldError", c.points, c.speeds, err)
			}
			if ie.Field != c.field {
				t.Errorf("New(%v, %v): FieldError.Field = %q, want %q", c.points, c.speeds, ie.Field, c.field)
			}
			if ie.Value != c.value {
				t.Errorf("New(%v, %v): FieldError.Value = %q, want %q", c.points, c.speeds, ie.Value, c.value)
			}
			if got := err.Error(); got != c.msg {
				t.Errorf("New(%v, %v): error %q, want %q", c.points, c.speeds, got, c.msg)
			}
		})
	}
}

func TestValidateLatLon(t *testing.T) {
	for _, p := range []orb.Point{{180, -90}, {-180, 90}} {
		if err := ValidateLatLon("user", p); err != nil {
			t.Errorf("ValidateLatLon(\"user\", %v) = %v, want nil", p, err)
		}
	}
	cases := []struct {
		field string
		p     orb.Point
		want  string
	}{
		{"markers[2]", orb.Point{10, 91}, "markers[2].lat = 91: latitude must be finite and within [-90, 90]"},
		{"markers[0]", orb.Point{math.Inf(-1), 0}, "markers[0].lon = -Inf: longitude must be finite and within [-180, 180]"},
		// Latitude is reported first when both are bad.
		{"p", orb.Point{math.NaN(), math.NaN()}, "p.lat = NaN: latitude must be finite and within [-90, 90]"},
	}
	for _, c := range cases {
		if err := ValidateLatLon(c.field, c.p); err == nil || err.Error() != c.want {
			t.Errorf("ValidateLatLon(%q, %v) = %v, want error %q", c.field, c.p, err, c.want)
		}
	}
}

// TestPointsAreTheGivenVertices: the vertices a route gives back (Points,
// Segment) are ones given, to the bit (−0, ±180° and the poles included),
// in the order given, one for each segment end. The
// route keeps them only in their geodesic preparation, so this holds the
// preparation to the degrees it was given.
func TestPointsAreTheGivenVertices(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		coord := func(lim float64, label string) float64 {
			return rapid.OneOf(rapid.Float64Range(-lim, lim), rapid.SampledFrom([]float64{-lim, lim, 0, math.Copysign(0, -1)})).Draw(t, label)
		}
		pts := make([]orb.Point, rapid.IntRange(2, 12).Draw(t, "vertices"))
		for i := range pts {
			if i > 0 && rapid.IntRange(0, 4).Draw(t, "repeat") == 0 {
				pts[i] = pts[i-1]
				continue
			}
			pts[i] = orb.Point{coord(180, "lon"), coord(90, "lat")}
		}
		r, err := New(pts, []float64{10})
		if err != nil {
			t.Skip(err) // antipodal or a single distinct vertex
		}
		bits := func(p orb.Point) [2]uint64 { return [2]uint64{math.Float64bits(p[0]), math.Float64bits(p[1])} }
		got, j := r.Points(), 0
		for k, p := range got {
			for j < len(pts) && bits(pts[j]) != bits(p) {
				j++
			}
			if j == len(pts) {
				t.Fatalf("Points()[%d] = %v is not one of the vertices given after the one before: %v", k, p, pts)
			}
			if k < r.NumSegments() && bits(r.Segment(k).From) != bits(p) {
				t.Fatalf("Segment(%d).From = %v, Points()[%d] = %v", k, r.Segment(k).From, k, p)
			}
			if k > 0 && bits(r.Segment(k-1).To) != bits(p) {
				t.Fatalf("Segment(%d).To = %v, Points()[%d] = %v", k-1, r.Segment(k-1).To, k, p)
			}
			j++
		}
		if len(got) != r.NumSegments()+1 {
			t.Fatalf("%d points for %d segments", len(got), r.NumSegments())
		}
	})
}

func TestNewDropsZeroLengthSegments(t *testing.T) {
	a, b, c := orb.Point{10, 50}, orb.Point{10.01, 50}, orb.Point{10.01, 50.01}
	// The speeds of the zero-length segments (entries 0 and 2) are ignored, even when unusable.
	r, err := New([]orb.Point{a, a, b, b, c}, []float64{-5, 10, math.NaN(), 20})
	if err != nil {
		t.Fatalf("New(a, a, b, b, c): %v", err)
	}
	if got, want := r.Points(), []orb.Point{a, b, c}; !slices.Equal(got, want) {
		t.Errorf("New(a, a, b, b, c).Points() = %v, want %v", got, want)
	}
	if n := r.NumSegments(); n != 2 {
		t.Fatalf("New(a, a, b, b, c).NumSegments() = %d, want 2", n)
	}
	if got := r.Segment(0).SpeedMps; got != 10 {
		t.Errorf("Segment(0).SpeedMps = %v, want 10", got)
	}
	if got := r.Segment(1).SpeedMps; got != 20 {
		t.Errorf("Segment(1).SpeedMps = %v, want 20", got)
	}

	// Longitudes -180 and 180 are one point, and so is every longitude at a pole.
	pts := []orb.Point{{179.9, 0}, {180, 0}, {-180, 0}, {-179.9, 0}}
	r, err = New(pts, []float64{1, 2, 3})
	if err != nil {
		t.Fatalf("New(%v): %v", pts, err)
	}
	if n := r.NumSegments(); n != 2 {
		t.Errorf("New(%v).NumSegments() = %d, want 2", pts, n)
	}
	if s0, s1 := r.Segment(0).SpeedMps, r.Segment(1).SpeedMps; s0 != 1 || s1 != 3 {
		t.Errorf("New(%v) segment speeds = [%v %v], want [1 3]", pts, s0, s1)
	}
	pts = []orb.Point{{0, 89}, {0, 90}, {120, 90}, {120, 89}}
	r, err = New(pts, []float64{1, 2, 3})
	if err != nil {
		t.Fatalf("New(%v): %v", pts, err)
	}
	if n := r.NumSegments(); n != 2 {
		t.Errorf("New(%v).NumSegments() = %d, want 2", pts, n)
	}
}

// TestLengthIsSumOfGeodesics: segment lengths are WGS84 geodesics (SPEC §4).
func TestLengthIsSumOfGeodesics(t *testing.T) {
	pts := []orb.Point{{-0.1276, 51.5072}, {2.3522, 48.8566}, {13.405, 52.52}, {13.405, 52.52}, {-3.7038, 40.4168}}
	r, err := New(pts, []float64{30})
	if err != nil {
		t.Fatalf("New(%v): %v", pts, err)
	}
	want := GeodesicDistM(pts[0], pts[1]) + GeodesicDistM(pts[1], pts[2]) + GeodesicDistM(pts[2], pts[4])
	if got := r.LengthM(); got != want {
		t.Errorf("LengthM() = %v, want %v (the sum of GeodesicDistM, exactly)", got, want)
	}
	near(t, "DurationS()", r.DurationS(), want/30, 1e-9)
	for i := range r.NumSegments() {
		sg := r.Segment(i)
		if want := GeodesicDistM(sg.From, sg.To); sg.LengthM != want {
			t.Errorf("Segment(%d).LengthM = %v, want %v (GeodesicDistM(%v, %v), exactly)", i, sg.LengthM, want, sg.From, sg.To)
		}
	}
}

func TestSegmentHeadings(t *testing.T) {
	cases := []struct {
		name string
		a, b orb.Point
		want float64
		tol  float64
	}{
		{"north", orb.Point{5, 10}, orb.Point{5, 11}, 0, 0},
		{"east", orb.Point{5, 10}, orb.Point{6, 10}, 90, 0},
		{"south", orb.Point{5, 10}, orb.Point{5, 9}, 180, 0},
		{"west", orb.Point{5, 10}, orb.Point{4, 10}, 270, 0},
		{"east across the antimeridian", orb.Point{179.5, 0}, orb.Point{-179.5, 0}, 90, 0},
		{"west across the antimeridian", orb.Point{-179.5, 0}, orb.Point{179.5, 0}, 270, 0},
		{"just west of north stays below 360", orb.Point{5, 10}, orb.Point{5 - 1e-12, 11}, 360 - 5.6e-11, 1e-11},
		// On the Mercator plane a 45° bearing needs Δx = Δy, i.e. Δλ = ln tan(π/4 + φ/2) at the
		// equator: ln tan(π/4 + 1°/2)/(π/180) degrees of longitude per degree of latitude.
		{"north-east on the Mercator plane", orb.Point{0, 0}, orb.Point{math.Log(math.Tan(math.Pi/4+0.5*degRad)) * radDeg, 1}, 45, 1e-12},
		// Beyond the Mercator clamp (85.0511°) a meridian segment has Δx = Δy = 0: the limit rule.
		{"beyond the clamp going south", orb.Point{20, 89.5}, orb.Point{20, 88}, 180, 0},
		{"beyond the clamp going north", orb.Point{20, 88}, orb.Point{20, 89.5}, 0, 0},
	}
	for _, c := range cases {
		r, err := New([]orb.Point{c.a, c.b}, []float64{1})
		if err != nil {
			t.Fatalf("%s: New(%v, %v): %v", c.name, c.a, c.b, err)
		}
		got := r.Segment(0).HeadingDeg
		if math.Abs(got-c.want) > c.tol || got < 0 || got >= 360 {
			t.Errorf("%s: heading of %v → %v = %.15g, want %.15g (off by %.3g°, tolerance %.3g°)",
				c.name, c.a, c.b, got, c.want, math.Abs(got-c.want), c.tol)
		}
	}
}

// TestHeadingAgainstRhumbSolve checks segment headings against GeographicLib's RhumbSolve on a
// sphere (-e 6378137 0): a rhumb line's azimuth is constant and is exactly the bearing of the
// straight line on the Mercator plane, with Δλ the short way. Latitudes stay inside the Mercator
// clamp, where the two agree by definition.
func TestHeadingAgainstRhumbSolve(t *testing.T) {
	bin := testtool.Need(t, "RhumbSolve", "geographiclib-tools")
	rng := rand.New(rand.NewPCG(3, 14))
	type pair struct{ a, b orb.Point }
	var pairs []pair
	for i := range 600 {
		a := orb.Point{360*rng.Float64() - 180, 170*rng.Float64() - 85}
		var b orb.Point
		switch i % 3 {
		case 0: // anywhere
			b = orb.Point{360*rng.Float64() - 180, 170*rng.Float64() - 85}
		case 1: // near, distances log-uniform from 1 m to 100 km
			b = offsetPoint(a, 360*rng.Float64(), math.Exp(rng.Float64()*math.Log(1e5)))
			b[1] = math.Max(-85, math.Min(85, b[1]))
		default: // across the antimeridian
			a[0] = 180 - 5*rng.Float64()
			b = orb.Point{-180 + 5*rng.Float64(), 170*rng.Float64() - 85}
		}
		if math.Abs(math.Remainder(b[0]-a[0], 360)) > 179.999 || a == b {
			continue // two shortest rhumb lines, or none
		}
		pairs = append(pairs, pair{a, b})
	}
	dec := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	var in bytes.Buffer
	for _, p := range pairs {
		fmt.Fprintf(&in, "%s %s %s %s\n", dec(p.a[1]), dec(p.a[0]), dec(p.b[1]), dec(p.b[0]))
	}
	cmd := exec.Command(bin, "-i", "-e", "6378137", "0", "-p", "9")
	cmd.Stdin = &in
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("RhumbSolve -i -e 6378137 0 -p 9: %v", err)
	}
	sc := bufio.NewScanner(bytes.NewReader(out))
	i := 0
	for ; sc.Scan(); i++ {
		f := strings.Fields(sc.Text())
		if len(f) != 3 {
			t.Fatalf("RhumbSolve line %d: %q: want 3 fields", i+1, sc.Text())
		}
		want, err := strconv.ParseFloat(f[0], 64)
		if err != nil {
			t.Fatalf("RhumbSolve line %d: azimuth %q: %v", i+1, f[0], err)
		}
		got := mercatorHeadingDeg(pairs[i].a, pairs[i].b)
		// Near-coincident pairs: the inputs' own resolution limits the bearing (10 nm lateral).
		tol := math.Max(1e-9, 1e-8/GeodesicDistM(pairs[i].a, pairs[i].b)*radDeg)
		if d := angleDiffDeg(got, want); d > tol || got < 0 || got >= 360 {
			t.Errorf("heading %v → %v = %.12f, want %.12f (RhumbSolve on the sphere) (off by %.3g°, tolerance %.3g°)",
				pairs[i].a, pairs[i].b, got, want, d, tol)
		}
	}
	if i != len(pairs) {
		t.Fatalf("RhumbSolve answered %d lines for %d pairs", i, len(pairs))
	}
}

// TestNewNearlyCoincidentVertices: distinct vertices closer than the unit sphere resolves
// (lon differing by 1e-13° down to 1e-17°, ~1e-8 m down to ~1e-12 m) are either kept as a tiny
// segment or dropped as zero-length, never refused, and queries on them give finite answers.
func TestNewNearlyCoincidentVertices(t *testing.T) {
	for _, d := range []float64{1e-13, 1e-14, 1e-15, 1e-16, 1e-17} {
		for _, base := range []orb.Point{{10, 50}, {-179.9, -89.99}, {0, 0}, {123.456, 12.5}} {
			pts := []orb.Point{base, {base[0] + d, base[1]}, {base[0] + d, base[1] + 0.001}}
			r, err := New(pts, []float64{10})
			if err != nil {
				t.Fatalf("New(%v): %v", pts, err)
			}
			m := r.Metrics(r.PlaceAt(0), orb.Point{base[0] + 0.0005, base[1] + 0.0005})
			for _, v := range []float64{m.RouteDistM, m.AlongM, m.EtaS, m.CrossTrackM, r.LengthM()} {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("non-finite answer on %v: %+v (LengthM %v)", pts, m, r.LengthM())
				}
			}
		}
	}
}

// New prepares each vertex for the geodesic from the sine and cosine of its
// latitude that unitVec found (prepUnit); the prepared point is prepLatLon's
// to the bit, the poles (which prepLatLon treats apart) included.
func TestPrepUnitIsPrepLatLon(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		lat := rapid.OneOf(rapid.Float64Range(-90, 90), rapid.SampledFrom([]float64{-90, 90, 0, math.Copysign(0, -1), 89.99999999, -1e-300})).Draw(t, "lat")
		lon := rapid.Float64Range(-180, 180).Draw(t, "lon")
		p := orb.Point{lon, lat}
		_, s, c := unitVec(p)
		got, want := prepUnit(p, s, c), prepLatLon(lat, lon)
		same := func(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }
		if !same(got.latDeg, want.latDeg) || !same(got.lonDeg, want.lonDeg) || !same(got.sinU, want.sinU) || !same(got.cosU, want.cosU) {
			t.Fatalf("prepUnit(%v) = %+v, prepLatLon gives %+v", p, got, want)
		}
	})
}
