package viewport_test

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/internal/testtool"
	"github.com/viewspec/viewspec/viewport"
)

// The footprint's ground metres (Mercator metres × cos φ_U) against
// GeographicLib's GeodSolve (Debian package geographiclib-tools), run live:
// the relative error stays within GroundScale's stated bound,
// 0.674 % + tan|φ|·D/(2·6.3e6 m), for distances D from the user to the
// footprint's vertices.
func TestGroundScaleBoundAgainstGeodSolve(t *testing.T) {
	geod := testtool.Need(t, "GeodSolve", "geographiclib-tools")
	rng := rand.New(rand.NewPCG(7, 11))
	type pair struct {
		user, vertex [2]float64 // lat, lon
		estM, latDeg float64
	}
	var pairs []pair
	for len(pairs) < 2000 {
		c := viewport.Camera{
			LatDeg:     (rng.Float64()*2 - 1) * 70,
			LonDeg:     (rng.Float64()*2 - 1) * 180,
			HeadingDeg: rng.Float64() * 360,
			PitchDeg:   rng.Float64() * 70,
			Zoom:       12 + rng.Float64()*8,
			Device:     viewport.NewDevice(200+rng.Float64()*1800, 200+rng.Float64()*1800, 30+rng.Float64()*40),
		}
		v := mustPrepare(t, c)
		fp := v.Footprint()
		if fp.Empty || fp.VisibleRadiusM > 10000 {
			continue
		}
		u := v.UserMercator()
		g := viewport.GroundScale(c.LatDeg)
		for i, m := range fp.Mercator {
			est := math.Hypot(m.X-u.X, m.Y-u.Y) * g
			pairs = append(pairs, pair{
				user:   [2]float64{c.LatDeg, c.LonDeg},
				vertex: [2]float64{fp.Vertices[i][1], fp.Vertices[i][0]},
				estM:   est, latDeg: c.LatDeg,
			})
		}
	}
	var in bytes.Buffer
	for _, p := range pairs {
		fmt.Fprintf(&in, "%.15f %.15f %.15f %.15f\n", p.user[0], p.user[1], p.vertex[0], p.vertex[1])
	}
	out := runTool(t, geod, in.Bytes(), "-i", "-p", "9")
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if len(lines) != len(pairs) {
		t.Fatalf("GeodSolve returned %d lines for %d pairs", len(lines), len(pairs))
	}
	worst := 0.0
	for i, line := range lines {
		f := strings.Fields(line)
		s12, err := strconv.ParseFloat(f[2], 64)
		if err != nil {
			t.Fatalf("GeodSolve line %q: %v", line, err)
		}
		p := pairs[i]
		rel := math.Abs(p.estM/s12 - 1)
		worst = math.Max(worst, rel)
		bound := 0.00674 + math.Tan(math.Abs(p.latDeg)*math.Pi/180)*s12/(2*6.3e6) + 1e-5
		if rel > bound {
			t.Errorf("user %v → vertex %v: ground metres %.3f, geodesic %.3f: relative error %.4f%% beyond the bound %.4f%%",
				p.user, p.vertex, p.estM, s12, 100*rel, 100*bound)
		}
	}
	t.Logf("worst relative error of ground metres over %d user→vertex distances (≤ 10 km, |φ| ≤ 70°): %.3f%%", len(pairs), 100*worst)
}
