package routes

import (
	"bufio"
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"os/exec"
	"strconv"
	"strings"
	"testing"

	"github.com/golang/geo/r3"
	"github.com/golang/geo/s2"
	"github.com/paulmach/orb"
	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/internal/testtool"
)

// Tolerance tiers for geodesic lengths, named for what they bound.
const (
	tolGeodCityM   = 1e-6 // pairs under 50 km: 1 µm (GeodesicDistM's documented practice)
	tolGeodShortM  = 1e-4 // pairs under 1,000 km: 0.1 mm (the project's requirement)
	tolGeodAnyM    = 5e-4 // any pair taking Vincenty's path: 0.5 mm (GeodesicDistM's documented bound)
	tolGeodKarneyM = 1e-6 // the antipodal fallback, on every pair: 1 µm (documented bound)
	tolAzimuthDeg  = 1e-7 // azimuths where well defined
)

// geodPair is one inverse problem with the category it was drawn for.
type geodPair struct {
	cat  string
	a, b orb.Point
}

// geodPairs draws a deterministic set of pairs covering every regime the fast path and the fallback
// must handle. Offsets are drawn log-uniformly so that metres and thousands of kilometres both occur.
func geodPairs() []geodPair {
	rng := rand.New(rand.NewPCG(20260101, 7))
	uni := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	logUni := func(lo, hi float64) float64 { return math.Exp(uni(math.Log(lo), math.Log(hi))) }
	sign := func() float64 {
		if rng.IntN(2) == 0 {
			return -1
		}
		return 1
	}
	wrap := func(lon float64) float64 { return math.Remainder(lon, 360) }
	clampLat := func(lat float64) float64 { return math.Max(-90, math.Min(90, lat)) }
	// A uniformly distributed point on the sphere.
	anyPoint := func() orb.Point {
		return orb.Point{uni(-180, 180), math.Asin(uni(-1, 1)) * radDeg}
	}
	// A point about dM metres from p in a random direction (a flat offset, good enough to land in a
	// distance class).
	near := func(p orb.Point, dM float64) orb.Point {
		az := uni(0, 2*math.Pi)
		dLat := dM * math.Cos(az) / 111_000
		lat := clampLat(p[1] + dLat)
		c := math.Max(math.Cos(lat*degRad), 1e-3)
		return orb.Point{wrap(p[0] + dM*math.Sin(az)/(111_000*c)), lat}
	}
	var out []geodPair
	add := func(cat string, n int, gen func() (orb.Point, orb.Point)) {
		for range n {
			a, b := gen()
			out = append(out, geodPair{cat, a, b})
		}
	}
	add("short <1km", 400, func() (orb.Point, orb.Point) {
		a := anyPoint()
		return a, near(a, logUni(1e-3, 1000))
	})
	add("city <50km", 400, func() (orb.Point, orb.Point) {
		a := anyPoint()
		return a, near(a, logUni(1000, 50_000))
	})
	add("continental", 400, func() (orb.Point, orb.Point) {
		a := orb.Point{uni(-180, 180), uni(-70, 70)}
		return a, near(a, logUni(50_000, 3_000_000))
	})
	add("equatorial", 300, func() (orb.Point, orb.Point) {
		lat1, lat2 := 0.0, 0.0
		if rng.IntN(2) == 0 {
			lat1, lat2 = uni(-1e-3, 1e-3), uni(-1e-3, 1e-3)
		}
		lon1 := uni(-180, 180)
		return orb.Point{lon1, lat1}, orb.Point{wrap(lon1 + sign()*logUni(1e-6, 180)), lat2}
	})
	add("meridional", 300, func() (orb.Point, orb.Point) {
		lon := uni(-180, 180)
		lon2 := lon
		if rng.IntN(3) == 0 {
			lon2 = wrap(lon + 180) // over a pole
		}
		return orb.Point{lon, uni(-90, 90)}, orb.Point{lon2, uni(-90, 90)}
	})
	add("near-polar", 300, func() (orb.Point, orb.Point) {
		s := sign()
		lat1 := s * (90 - logUni(1e-9, 1))
		if rng.IntN(5) == 0 {
			lat1 = s * 90
		}
		lat2 := s * (90 - logUni(1e-9, 5))
		if rng.IntN(3) == 0 {
			lat2 = -lat2 // pole to pole
		}
		return orb.Point{uni(-180, 180), lat1}, orb.Point{uni(-180, 180), lat2}
	})
	add("antimeridian", 300, func() (orb.Point, orb.Point) {
		return orb.Point{180 - logUni(1e-7, 10), uni(-80, 80)}, orb.Point{-180 + logUni(1e-7, 10), uni(-80, 80)}
	})
	add("nearly antipodal", 400, func() (orb.Point, orb.Point) {
		a := anyPoint()
		if rng.IntN(4) == 0 {
			a[1] = uni(-1, 1) // the equatorial antipodal region is the hardest
		}
		anti := orb.Point{wrap(a[0] + 180), -a[1]}
		switch rng.IntN(5) {
		case 0:
			return a, anti
		case 1:
			return a, orb.Point{wrap(anti[0] + sign()*logUni(1e-9, 2)), anti[1]}
		default:
			return a, orb.Point{wrap(anti[0] + sign()*logUni(1e-9, 6)), clampLat(anti[1] + sign()*logUni(1e-9, 6))}
		}
	})
	add("global", 400, func() (orb.Point, orb.Point) { return anyPoint(), anyPoint() })
	return out
}

// geodSolveBatch runs GeographicLib's GeodSolve once on all pairs and returns (azi1, azi2, s12) per pair.
func geodSolveBatch(t *testing.T, pairs []geodPair) [][3]float64 {
	t.Helper()
	bin := testtool.Need(t, "GeodSolve", "geographiclib-tools")
	var in bytes.Buffer
	// Plain decimals only: GeodSolve reads "1e-07" as a DMS string with a hemisphere letter and
	// answers for a different point. 'f' with precision -1 round-trips without an exponent.
	dec := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	for _, p := range pairs {
		fmt.Fprintf(&in, "%s %s %s %s\n", dec(p.a[1]), dec(p.a[0]), dec(p.b[1]), dec(p.b[0]))
	}
	cmd := exec.Command(bin, "-i", "-p", "10")
	cmd.Stdin = &in
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	outBytes, err := cmd.Output()
	if err != nil {
		t.Fatalf("GeodSolve -i -p 10: %v: %s", err, stderr.String())
	}
	var res [][3]float64
	sc := bufio.NewScanner(bytes.NewReader(outBytes))
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		if len(f) != 3 {
			t.Fatalf("GeodSolve line %d: %q: want 3 fields", len(res)+1, sc.Text())
		}
		var v [3]float64
		for i := range f {
			if v[i], err = strconv.ParseFloat(f[i], 64); err != nil {
				t.Fatalf("GeodSolve line %d: %v", len(res)+1, err)
			}
		}
		res = append(res, v)
	}
	if len(res) != len(pairs) {
		t.Fatalf("GeodSolve answered %d lines for %d pairs", len(res), len(pairs))
	}
	return res
}

func angleDiffDeg(a, b float64) float64 { return math.Abs(math.Remainder(a-b, 360)) }

// TestGeodesicAgainstGeodSolve checks GeodesicDistM, GeodesicInverse and the fallback on its own
// against a live GeographicLib (GeodSolve -i -p 10: lengths to 0.1 nm) on 3,200 pairs.
func TestGeodesicAgainstGeodSolve(t *testing.T) {
	pairs := geodPairs()
	if len(pairs) < 2000 {
		t.Fatalf("only %d pairs", len(pairs))
	}
	want := geodSolveBatch(t, pairs)
	type stat struct {
		n               int
		maxErr, maxKErr float64
		worst           string
	}
	stats := map[string]*stat{}
	var order []string
	for i, p := range pairs {
		st := stats[p.cat]
		if st == nil {
			st = &stat{}
			stats[p.cat] = st
			order = append(order, p.cat)
		}
		st.n++
		w := want[i]
		got := GeodesicDistM(p.a, p.b)
		d, az1, az2 := GeodesicInverse(p.a, p.b)
		if math.Abs(d-got) > 1e-6 {
			t.Errorf("GeodesicInverse(%v, %v) length %.17g differs from GeodesicDistM %.17g by more than 1 µm", p.a, p.b, d, got)
		}
		errM := math.Abs(got - w[2])
		tol := tolGeodAnyM
		switch {
		case w[2] < 50e3:
			tol = tolGeodCityM
		case w[2] < 1e6:
			tol = tolGeodShortM
		}
		if errM > tol {
			t.Errorf("%s: GeodesicDistM(%.17g, %.17g) = %.10f, want %.10f (GeodSolve) (off by %.3g mm, tolerance %.3g mm)",
				p.cat, p.a, p.b, got, w[2], errM*1e3, tol*1e3)
		}
		if errM > st.maxErr {
			st.maxErr = errM
			st.worst = fmt.Sprintf("%v %v", p.a, p.b)
		}
		ks, kaz1, kaz2 := karneyInverse(p.a[1], p.a[0], p.b[1], p.b[0])
		kErr := math.Abs(ks - w[2])
		if kErr > tolGeodKarneyM {
			t.Errorf("%s: karneyInverse(%.17g, %.17g) = %.10f, want %.10f (GeodSolve) (off by %.3g µm, tolerance %.3g µm)",
				p.cat, p.a, p.b, ks, w[2], kErr*1e6, tolGeodKarneyM*1e6)
		}
		st.maxKErr = math.Max(st.maxKErr, kErr)
		// Azimuths: well defined away from coincidence and from the antipodal region; at a pole
		// both conventions take the limit along the given meridian.
		if w[2] > 1e-3 && w[2] < 19_000_000 {
			// On short lines the inputs' own resolution (~1 nm) limits the azimuth: allow the
			// larger of tolAzimuthDeg and a 10 nm lateral offset at the far end.
			tolAz := math.Max(tolAzimuthDeg, 1e-8/w[2]*radDeg)
			if e1, e2 := angleDiffDeg(az1, w[0]), angleDiffDeg(az2, w[1]); e1 > tolAz || e2 > tolAz {
				t.Errorf("%s: GeodesicInverse(%.17g, %.17g) azimuths %.10f, %.10f, want %.10f, %.10f (GeodSolve)",
					p.cat, p.a, p.b, az1, az2, w[0], w[1])
			}
			if e1, e2 := angleDiffDeg(kaz1, w[0]), angleDiffDeg(kaz2, w[1]); e1 > tolAz || e2 > tolAz {
				t.Errorf("%s: karneyInverse(%.17g, %.17g) azimuths %.10f, %.10f, want %.10f, %.10f (GeodSolve)",
					p.cat, p.a, p.b, kaz1, kaz2, w[0], w[1])
			}
		}
		if az1 < 0 || az1 >= 360 || az2 < 0 || az2 >= 360 {
			t.Errorf("GeodesicInverse(%v, %v) azimuths %v, %v outside [0, 360)", p.a, p.b, az1, az2)
		}
	}
	for _, c := range order {
		st := stats[c]
		t.Logf("%-17s n=%3d  max |GeodesicDistM − GeodSolve| = %.3g mm (%s)  fallback alone: %.3g nm",
			c, st.n, st.maxErr*1e3, st.worst, st.maxKErr*1e9)
	}
}

// TestGeodesicSpecialCases pins exact answers that need no reference: symmetry, zero length, and the
// meridian quadrant. Sources beside each value.
func TestGeodesicSpecialCases(t *testing.T) {
	// Meridian quadrant of WGS84, pole to equator: 10 001 965.729 m (GeographicLib documentation,
	// "Geodesics on an ellipsoid", from memory); pole to pole over a meridian is twice that.
	const quarterMeridianM = 10_001_965.729
	cases := []struct {
		name string
		a, b orb.Point
		want float64
		tol  float64
	}{
		{"same point", orb.Point{12.5, 41.9}, orb.Point{12.5, 41.9}, 0, 0},
		{"lon -180 and 180 are one point", orb.Point{-180, 10}, orb.Point{180, 10}, 0, 0},
		{"north pole at two longitudes", orb.Point{0, 90}, orb.Point{123, 90}, 0, 0},
		{"equator to pole", orb.Point{30, 0}, orb.Point{30, 90}, quarterMeridianM, 1e-3},
		{"pole to pole", orb.Point{0, 90}, orb.Point{77, -90}, 2 * quarterMeridianM, 2e-3},
		{"exactly antipodal on the equator (shortest goes over a pole)", orb.Point{0, 0}, orb.Point{180, 0}, 2 * quarterMeridianM, 2e-3},
		// One degree of longitude on the equator is a·π/180 (the equator is a circle of radius a).
		{"one degree along the equator", orb.Point{10, 0}, orb.Point{11, 0}, wgs84A * math.Pi / 180, 1e-9},
	}
	for _, c := range cases {
		got := GeodesicDistM(c.a, c.b)
		if math.Abs(got-c.want) > c.tol {
			t.Errorf("%s: GeodesicDistM(%v, %v) = %.6f, want %.6f (off by %.3g m, tolerance %.3g m)",
				c.name, c.a, c.b, got, c.want, math.Abs(got-c.want), c.tol)
		}
		if back := GeodesicDistM(c.b, c.a); back != got {
			t.Errorf("%s: GeodesicDistM is not symmetric: %.17g vs %.17g", c.name, got, back)
		}
	}
}

// TestGreatCircleAviationFormulary checks the spherical helper on the Aviation Formulary worked
// example (Ed Williams, "Aviation Formulary", from memory): LAX 33°57'N 118°24'W to JFK 40°38'N
// 73°47'W is 0.623585 rad, about 2144 nautical miles (1 nmi = 1 arc-minute on that sphere).
func TestGreatCircleAviationFormulary(t *testing.T) {
	lax := orb.Point{-(118 + 24.0/60), 33 + 57.0/60}
	jfk := orb.Point{-(73 + 47.0/60), 40 + 38.0/60}
	got := GreatCircleRad(lax, jfk)
	if math.Abs(got-0.623585) > 5e-7 {
		t.Errorf("GreatCircleRad(LAX, JFK) = %.7f rad, want 0.623585 (Aviation Formulary) (tolerance 5e-7 rad)", got)
	}
	if nmi := got * radDeg * 60; math.Abs(nmi-2144) > 0.5 {
		t.Errorf("GreatCircleRad(LAX, JFK) = %.2f nmi, want 2144 (Aviation Formulary) (tolerance 0.5 nmi)", nmi)
	}
	// golang/geo's s2 angle between the same two points, as an independent spherical route.
	pa := s2.PointFromLatLng(s2.LatLngFromDegrees(lax[1], lax[0]))
	pb := s2.PointFromLatLng(s2.LatLngFromDegrees(jfk[1], jfk[0]))
	if d := pa.Distance(pb).Radians(); math.Abs(d-got) > 1e-15 {
		t.Errorf("GreatCircleRad(LAX, JFK) = %.17g, s2 angle %.17g", got, d)
	}
}

// TestGreatCircleSpecialCases covers coincident, antipodal and antimeridian pairs.
func TestGreatCircleSpecialCases(t *testing.T) {
	cases := []struct {
		a, b orb.Point
		want float64
	}{
		{orb.Point{0, 0}, orb.Point{0, 0}, 0},
		{orb.Point{-180, 5}, orb.Point{180, 5}, 0},
		{orb.Point{0, 0}, orb.Point{180, 0}, math.Pi},
		{orb.Point{10, 90}, orb.Point{10, -90}, math.Pi},
		{orb.Point{179.5, 0}, orb.Point{-179.5, 0}, math.Pi / 180},
		{orb.Point{0, 0}, orb.Point{90, 0}, math.Pi / 2},
	}
	for _, c := range cases {
		if got := GreatCircleRad(c.a, c.b); math.Abs(got-c.want) > 1e-15 {
			t.Errorf("GreatCircleRad(%v, %v) = %.17g, want %.17g (tolerance 1e-15)", c.a, c.b, got, c.want)
		}
	}
}

func TestGeodesicZeroAllocs(t *testing.T) {
	a, b := orb.Point{2.35, 48.85}, orb.Point{-0.12, 51.5}
	anti := orb.Point{-177.6, -48.8}
	if n := testing.AllocsPerRun(100, func() { _ = GeodesicDistM(a, b); _ = GeodesicDistM(a, anti) }); n != 0 {
		t.Errorf("GeodesicDistM allocates %v times per call, want 0", n)
	}
}

// TestLocalDistAgainstVincenty: the midpoint-metric distance used for short cross-track distances
// agrees with the geodesic (Vincenty, itself checked against GeodSolve above) within 0.1 µm up to
// localMaxM, at every latitude and bearing, the poles included.
func TestLocalDistAgainstVincenty(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	worst := 0.0
	for i := range 20000 {
		lat := math.Asin(2*rng.Float64()-1) * radDeg
		switch i % 10 {
		case 0:
			lat = math.Copysign(90-math.Exp(-20*rng.Float64()), lat) // near a pole
		case 1:
			lat = math.Copysign(90, lat)
		}
		a := orb.Point{360*rng.Float64() - 180, lat}
		b := offsetPoint(a, 360*rng.Float64(), math.Exp(math.Log(1e-3)+rng.Float64()*(math.Log(localMaxM)-math.Log(1e-3))))
		va, _, _ := unitVec(a)
		vb, _, _ := unitVec(b)
		delta := math.Atan2(va.Cross(vb).Norm(), va.Dot(vb))
		want := GeodesicDistM(a, b)
		if want > localMaxM {
			continue
		}
		got := localDistM(va, vb, delta)
		if d := math.Abs(got - want); d > 1e-7 {
			t.Errorf("localDistM(%.17g, %.17g) = %.12f, Vincenty %.12f (off by %.3g µm, tolerance 0.1 µm)", a, b, got, want, d*1e6)
		} else if d > worst {
			worst = d
		}
	}
	t.Logf("worst |localDistM − Vincenty| below %d m: %.3g µm", localMaxM, worst*1e6)
}

// TestLocalDistAcrossAPole: two points at one latitude on opposite meridians, built so that their
// midpoint is exactly the pole, where the local metric has no direction (M = N there). Expected:
// GeodSolve (GeographicLib, Debian geographiclib-tools), WGS84, `GeodSolve -i -p 12` on the two
// points.
func TestLocalDistAcrossAPole(t *testing.T) {
	cases := []struct{ lat, lon, want float64 }{
		{89.9999, 0, 22.3387959126},
		{-89.9995, 0, 111.6939795596},
		{89.996, 45, 893.5518364594},
		{-89.9961, -30, 871.2130405479},
	}
	for _, c := range cases {
		s, co := math.Sincos(c.lat * degRad)
		sl, cl := math.Sincos(c.lon * degRad)
		p := r3.Vector{X: co * cl, Y: co * sl, Z: s}
		q := r3.Vector{X: -p.X, Y: -p.Y, Z: s} // the same latitude, 180° of longitude away
		delta := math.Atan2(p.Cross(q).Norm(), p.Dot(q))
		near(t, fmt.Sprintf("localDistM across the pole at latitude %v", c.lat), localDistM(p, q, delta), c.want, 1e-7)
	}
}

// TestPrepVecAgainstReducedLatitude: a position prepared from its unit vector has the reduced
// latitude U of its geodetic latitude φ, tan U = (1 − f) tan φ (the definition, computed here
// with math.Atan), like one prepared from its degrees.
func TestPrepVecAgainstReducedLatitude(t *testing.T) {
	for _, p := range []orb.Point{{0, 0}, {12, 45.3}, {-100, -12.7}, {170, 89.9999}, {33, -67}, {5, 90}, {-5, -90}} {
		v, _, _ := unitVec(p)
		got := prepVec(v, p)
		u := math.Atan((1 - wgs84F) * math.Tan(p[1]*degRad))
		if math.Abs(p[1]) == 90 {
			u = math.Copysign(math.Pi/2, p[1])
		}
		if math.Abs(got.sinU-math.Sin(u)) > 1e-15 || math.Abs(got.cosU-math.Cos(u)) > 1e-15 {
			t.Errorf("prepVec(%v): sin U, cos U = %.17g, %.17g, want %.17g, %.17g (tan U = (1 − f) tan φ)", p, got.sinU, got.cosU, math.Sin(u), math.Cos(u))
		}
		if want := prepLatLon(p[1], p[0]); math.Abs(got.sinU-want.sinU) > 1e-15 || math.Abs(got.cosU-want.cosU) > 1e-15 {
			t.Errorf("prepVec(%v) = %+v, prepLatLon %+v", p, got, want)
		}
	}
}

// TestPairDistMAgainstVincenty: pairDistM, which takes the local metric under localMaxM and
// Vincenty beyond, agrees with GeodesicDistM (checked against GeodSolve above) within 0.1 µm
// on pairs from 1 mm to 100 km apart, on both sides of localMaxM, and under localMaxM is
// localDistM's answer (its documentation).
func TestPairDistMAgainstVincenty(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for range 400 {
		a := orb.Point{360*rng.Float64() - 180, math.Asin(2*rng.Float64()-1) * radDeg}
		b := offsetPoint(a, 360*rng.Float64(), math.Exp(math.Log(1e-3)+rng.Float64()*(math.Log(1e5)-math.Log(1e-3))))
		av, _, _ := unitVec(a)
		bv, _, _ := unitVec(b)
		ap, bp := prepLatLon(a[1], a[0]), prepLatLon(b[1], b[0])
		got := pairDistM(av, &ap, bv, &bp)
		near(t, fmt.Sprintf("pairDistM(%.17g, %.17g)", a, b), got, GeodesicDistM(a, b), 1e-7)
		// Under localMaxM it is the local metric's own answer, to the bit.
		if delta := math.Atan2(av.Cross(bv).Norm(), av.Dot(bv)); delta*wgs84A < localMaxM {
			if want := localDistM(av, bv, delta); got != want {
				t.Errorf("pairDistM(%.17g, %.17g) = %.17g, want localDistM's %.17g (under %d m)", a, b, got, want, localMaxM)
			}
		}
	}
}

// TestVincentyConvergesOutsideTheGuard: the fast path answers (ok) every pair outside the antipodal
// guard band (its documented contract: the fallback is for the band and for non-convergence,
// which does not happen outside it), on the 3,200 pairs of geodPairs.
func TestVincentyConvergesOutsideTheGuard(t *testing.T) {
	for _, p := range geodPairs() {
		p1, p2 := prepLatLon(p.a[1], p.a[0]), prepLatLon(p.b[1], p.b[0])
		cosSig := p1.sinU*p2.sinU + p1.cosU*p2.cosU*math.Cos(math.Remainder(p.b[0]-p.a[0], 360)*degRad)
		if cosSig < vincentyAntipodalCos+1e-9 {
			continue // inside the band, or too near its edge to say
		}
		for _, wantAz := range []bool{false, true} {
			if _, _, _, ok := vincenty(&p1, &p2, wantAz); !ok {
				t.Errorf("%s: vincenty(%v, %v, %v) not ok outside the guard band (cos σ = %.6f)", p.cat, p.a, p.b, wantAz, cosSig)
			}
		}
	}
}

// remainder360 is math.Remainder(d, 360) to the bit, on every kind of
// float: within ±180 (where it returns d), at ±180 itself (ties go to the
// even quotient, 0), just beyond, far beyond, ±0, ±Inf and NaN.
func TestRemainder360IsRemainder(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d := rapid.OneOf(
			rapid.Float64Range(-720, 720),
			rapid.Float64(),
			rapid.SampledFrom([]float64{180, -180, math.Nextafter(180, 181), math.Nextafter(-180, -181), math.Nextafter(180, 0),
				540, -540, 0, math.Copysign(0, -1), math.Inf(1), math.Inf(-1), math.NaN(), 5e-324, 1e300}),
		).Draw(t, "d")
		got, want := remainder360(d), math.Remainder(d, 360)
		if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
			t.Fatalf("remainder360(%v) = %v, math.Remainder gives %v", d, got, want)
		}
	})
}
