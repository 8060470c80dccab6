package viewport_test

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

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/internal/testtool"
	"github.com/viewspec/viewspec/viewport"
)

// dms returns degrees from degrees, minutes and seconds.
func dms(d, m, s float64) float64 { return d + m/60 + s/3600 }

// EPSG Guidance Note 7-2 (IOGP Publication 373-7-2), §1.3.3.2 Popular
// Visualisation Pseudo Mercator, worked example: latitude 24°22'54.433"N,
// longitude 100°20'00.000"W gives E = −11 169 055.58 m, N = 2 800 000.00 m.
// The note prints the result to the centimetre, so that is the tolerance.
func TestMercatorEPSGWorkedExample(t *testing.T) {
	p := orb.Point{-dms(100, 20, 0), dms(24, 22, 54.433)}
	got := viewport.ToMercator(p)
	const wantE, wantN = -11169055.58, 2800000.00 // EPSG GN 7-2
	if math.Abs(got.X-wantE) > 0.005 || math.Abs(got.Y-wantN) > 0.005 {
		t.Fatalf("ToMercator(%v) = (%.3f, %.3f), want (%.2f, %.2f) within 5 mm (EPSG GN 7-2)", p, got.X, got.Y, wantE, wantN)
	}
	// And back: the note's reverse example returns the same angles; 5 mm on
	// the ground is 4.5e-8° of longitude.
	back := got.LatLon()
	if math.Abs(back[0]-p[0]) > 1e-9 || math.Abs(back[1]-p[1]) > 1e-9 {
		t.Fatalf("LatLon(ToMercator(%v)) = %v", p, back)
	}
}

// Slippy-map zoom table (OpenStreetMap wiki "Zoom levels", 256-pixel tiles):
// ground metres per pixel on the equator, 156 543.03 at zoom 0, halving each
// level. The wiki prints the values rounded as below; the rows between 0 and
// 18 are from memory of that table and agree with halving.
func TestGroundMPerPxSlippyTable(t *testing.T) {
	table := []struct {
		zoom float64
		mpp  float64 // as printed, OpenStreetMap wiki "Zoom levels"
		tol  float64 // half a unit of the last printed digit
	}{
		{0, 156543.03, 0.005},
		{1, 78271.52, 0.005},
		{2, 39135.76, 0.005},
		{5, 4891.97, 0.005},
		{10, 152.87, 0.005},
		{12, 38.219, 0.0005},
		{15, 4.777, 0.0005},
		{16, 2.389, 0.0005},
		{17, 1.194, 0.0005},
		{18, 0.597, 0.0005},
		{19, 0.299, 0.0005},
	}
	for _, row := range table {
		got := viewport.GroundMPerPx(0, row.zoom, 256)
		if math.Abs(got-row.mpp) > row.tol {
			t.Errorf("GroundMPerPx(0°, zoom %v, 256 px) = %.6f, want %v (off by %.3g, tolerance %v; OSM wiki Zoom levels)",
				row.zoom, got, row.mpp, got-row.mpp, row.tol)
		}
		// 512-pixel tiles show the same ground with twice the pixels: one
		// zoom level apart (common practice).
		if got512 := viewport.GroundMPerPx(0, row.zoom-1, 512); math.Abs(got512-got) > 1e-9*got {
			t.Errorf("GroundMPerPx(zoom %v, 512 px) = %v, want zoom %v at 256 px = %v", row.zoom-1, got512, row.zoom, got)
		}
	}
	// At latitude φ the ground metres shrink by cos φ (same table's note).
	if got, want := viewport.GroundMPerPx(60, 0, 256), 156543.03*0.5; math.Abs(got-want) > 0.005 {
		t.Errorf("GroundMPerPx(60°, zoom 0) = %.4f, want %.4f (cos 60° = 1/2)", got, want)
	}
}

// Special cases of the plane: the latitude clamp, the poles, the
// antimeridian, NaN-free answers for every finite input.
func TestMercatorSpecialCases(t *testing.T) {
	piR := math.Pi * viewport.EarthRadiusM
	cases := []struct {
		name string
		p    orb.Point
		want viewport.Mercator
		tol  float64
	}{
		{"origin", orb.Point{0, 0}, viewport.Mercator{0, 0}, 0},
		{"antimeridian east", orb.Point{180, 0}, viewport.Mercator{piR, 0}, 1e-8}, // an ulp of πR is 3.7e-9 m
		{"antimeridian west", orb.Point{-180, 0}, viewport.Mercator{-piR, 0}, 1e-8},
		// At the clamp latitude the world is square: y = πR (definition of
		// 85.0511287798066° in EPSG:3857, common practice).
		{"clamp north", orb.Point{0, viewport.MaxLatDeg}, viewport.Mercator{0, piR}, 1e-6},
		{"north pole clamps", orb.Point{0, 90}, viewport.Mercator{0, piR}, 1e-6},
		{"south pole clamps", orb.Point{0, -90}, viewport.Mercator{0, -piR}, 1e-6},
	}
	for _, c := range cases {
		got := viewport.ToMercator(c.p)
		if math.Abs(got.X-c.want.X) > c.tol || math.Abs(got.Y-c.want.Y) > c.tol {
			t.Errorf("%s: ToMercator(%v) = %+v, want %+v within %v m", c.name, c.p, got, c.want, c.tol)
		}
	}
	if got := (viewport.Mercator{X: piR, Y: 0}).LatLon(); got[0] != -180 {
		t.Errorf("LatLon(πR, 0) longitude = %v, want -180 (wrapped into [-180, 180))", got[0])
	}
	if got := (viewport.Mercator{X: 3 * piR, Y: 0}).LatLon(); math.Abs(got[0]-(-180)) > 1e-9 {
		t.Errorf("LatLon(3πR, 0) longitude = %v, want -180", got[0])
	}
}

// PROJ's cs2cs (Debian package proj-bin), run live on 1,000 random points,
// agrees with ToMercator within 1 mm and with LatLon within 1e-9°.
func TestMercatorAgainstPROJ(t *testing.T) {
	cs2cs := testtool.Need(t, "cs2cs", "proj-bin")
	rng := rand.New(rand.NewPCG(1, 2))
	pts := make([]orb.Point, 1000)
	for i := range pts {
		lat := (rng.Float64()*2 - 1) * 85
		switch i % 10 {
		case 0:
			lat = (rng.Float64()*2 - 1) * viewport.MaxLatDeg // up to the clamp
		case 1:
			lat = (rng.Float64()*2 - 1) * 1e-3 // the equator
		}
		lon := (rng.Float64()*2 - 1) * 180
		if i%10 == 2 {
			lon = math.Copysign(180-rng.Float64()*1e-3, lon) // the antimeridian
		}
		pts[i] = orb.Point{lon, lat}
	}
	var in bytes.Buffer
	for _, p := range pts {
		// EPSG:4326 axis order is latitude, longitude.
		fmt.Fprintf(&in, "%.15f %.15f\n", p[1], p[0])
	}
	out := runTool(t, cs2cs, in.Bytes(), "-f", "%.6f", "EPSG:4326", "EPSG:3857")
	rows := parseRows(t, out, len(pts))
	worst := 0.0
	for i, r := range rows {
		got := viewport.ToMercator(pts[i])
		d := math.Hypot(got.X-r[0], got.Y-r[1])
		worst = math.Max(worst, d)
		if d > 1e-3 {
			t.Errorf("ToMercator(%v) = (%.6f, %.6f), cs2cs says (%.6f, %.6f): off by %.3g m, tolerance 1 mm", pts[i], got.X, got.Y, r[0], r[1], d)
		}
	}
	t.Logf("worst difference from PROJ over %d points: %.3g m", len(pts), worst)

	// Inverse: Mercator metres back to degrees.
	in.Reset()
	for _, p := range pts {
		m := viewport.ToMercator(p)
		fmt.Fprintf(&in, "%.6f %.6f\n", m.X, m.Y)
	}
	out = runTool(t, cs2cs, in.Bytes(), "-f", "%.12f", "EPSG:3857", "EPSG:4326")
	rows = parseRows(t, out, len(pts))
	for i, r := range rows {
		m := viewport.ToMercator(pts[i])
		m.X, _ = strconv.ParseFloat(fmt.Sprintf("%.6f", m.X), 64)
		m.Y, _ = strconv.ParseFloat(fmt.Sprintf("%.6f", m.Y), 64)
		got := m.LatLon()
		// cs2cs prints latitude, longitude; 1e-9° is 0.1 mm.
		if math.Abs(got[1]-r[0]) > 1e-9 || math.Abs(got[0]-r[1]) > 1e-9 && math.Abs(math.Abs(got[0])-180) > 1e-9 {
			t.Errorf("LatLon(%+v) = %v, cs2cs says lat %.12f lon %.12f", m, got, r[0], r[1])
		}
	}
}

func runTool(t *testing.T, path string, stdin []byte, args ...string) []byte {
	t.Helper()
	cmd := exec.Command(path, args...)
	cmd.Stdin = bytes.NewReader(stdin)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("%s %s: %v\n%s", path, strings.Join(args, " "), err, stderr.String())
	}
	return out
}

// parseRows reads n lines of at least two numbers each.
func parseRows(t *testing.T, out []byte, n int) [][2]float64 {
	t.Helper()
	var rows [][2]float64
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		if len(f) < 2 {
			t.Fatalf("unexpected output line %q", sc.Text())
		}
		a, err1 := strconv.ParseFloat(f[0], 64)
		b, err2 := strconv.ParseFloat(f[1], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("unexpected output line %q", sc.Text())
		}
		rows = append(rows, [2]float64{a, b})
	}
	if len(rows) != n {
		t.Fatalf("got %d rows, want %d", len(rows), n)
	}
	return rows
}

// Longitudes come back wrapped into [−180, 180), and X differences the
// short way round into [−πR, πR) (SPEC §1). Hand-computed: X = R·λ, so
// 190° is −170°, −190° is 170°, 370° is 10°, and a difference of πR is −πR.
// A longitude already in range comes back unchanged to its last digits
// (1e-9° is not taken through 180° and back).
func TestWrapsAtTheAntimeridian(t *testing.T) {
	R := viewport.EarthRadiusM
	for _, c := range []struct{ lonDeg, want float64 }{
		{190, -170}, {-190, 170}, {370, 10}, {10, 10}, {-179.5, -179.5}, {1e-9, 1e-9},
	} {
		m := viewport.Mercator{X: R * c.lonDeg * math.Pi / 180}
		tol := 1e-9 * math.Abs(c.want) // relative: the rounding of R·λ and back
		if got := m.LatLon()[0]; math.Abs(got-c.want) > tol {
			t.Errorf("Mercator{X: R·%v°}.LatLon() lon = %.17g, want %v (off by %.3g°, tolerance %.3g°)", c.lonDeg, got, c.want, got-c.want, tol)
		}
	}
	// In range, ShortDXM is exact: dx itself, not dx taken round the world
	// and back (which would keep only the digits a sum with πR keeps).
	for _, dx := range []float64{1e-3, -1e-3, 12345.678} {
		if got := viewport.ShortDXM(dx); got != dx {
			t.Errorf("ShortDXM(%v) = %.17g, want %v exactly", dx, got, dx)
		}
	}
	half := math.Pi * R
	for _, c := range []struct{ dx, want float64 }{
		{half, -half}, {-half, -half}, {math.Nextafter(half, 0), math.Nextafter(half, 0)}, {1.5 * half, -0.5 * half}, {-1.5 * half, 0.5 * half},
		{3 * half, -half}, {-3 * half, -half}, // a whole turn from ±πR: wrapped to −πR, never +πR
	} {
		if got := viewport.ShortDXM(c.dx); math.Abs(got-c.want) > 1e-6 {
			t.Errorf("ShortDXM(%.17g) = %.17g, want %.17g (off by %.3g m, tolerance 1 µm)", c.dx, got, c.want, got-c.want)
		}
	}
}
