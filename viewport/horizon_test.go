package viewport_test

import (
	"math"
	"testing"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/props"
	"github.com/viewspec/viewspec/viewport"
)

// The horizon row is cy − f·cot θ and the far row cy − (k−1)·f·cos θ/(k·sin θ)
// (SPEC §2). Hand-computed on a 400 × 800 px screen with a 60° vertical field
// of view: f = 400/tan 30° = 400·√3, so cot θ·f and the far row come out
// round.
func TestHorizonAndFarRows(t *testing.T) {
	for _, c := range []struct {
		desc            string
		pitchDeg, far   float64
		horizon, farRow float64
		hasHorizon      bool
	}{
		// θ = 60°: f·cot θ = 400√3/√3 = 400, so the horizon is row 0; far row
		// 400 − 9·400√3·½/(10·(√3/2)) = 400 − 360 = 40.
		{"pitch 60, far ratio 10", 60, 10, 0, 40, true},
		// θ = 30°: f·cot θ = 400√3·√3 = 1200, horizon at −800; far row
		// 400 − 1·400√3·(√3/2)/(2·½) = 400 − 600 = −200.
		{"pitch 30, far ratio 2", 30, 2, -800, -200, true},
		// θ = 0: no horizon on any row; every depth is f, so no far row.
		{"straight down", 0, 10, 0, math.Inf(-1), false},
	} {
		d := viewport.NewDevice(400, 800, 60)
		d.FarRatio = c.far
		v, err := viewport.Prepare(viewport.Camera{LatDeg: 10, LonDeg: 20, PitchDeg: c.pitchDeg, Zoom: 15, Device: d})
		if err != nil {
			t.Fatalf("%s: %v", c.desc, err)
		}
		row, ok := v.HorizonRowPx()
		if ok != c.hasHorizon || (ok && math.Abs(row-c.horizon) > 1e-9) {
			t.Errorf("%s: HorizonRowPx() = %v, %v, want %v, %v", c.desc, row, ok, c.horizon, c.hasHorizon)
		}
		if got := v.FarRowPx(); got != c.farRow && math.Abs(got-c.farRow) > 1e-9 {
			t.Errorf("%s: FarRowPx() = %v, want %v", c.desc, got, c.farRow)
		}
	}
}

// A pixel a little below the horizon row sees ground and one on it does
// not; the ground seen on the far row, where it is on the screen, lies at
// depth k·f.
func TestHorizonRowSeparatesGround(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		c.PitchDeg = rapid.Float64Range(1, 85).Draw(t, "pitch_deg")
		v, err := viewport.Prepare(c)
		if err != nil {
			t.Skip(err.Error())
		}
		row, ok := v.HorizonRowPx()
		if !ok {
			t.Fatalf("no horizon at pitch %v", c.PitchDeg)
		}
		x := rapid.Float64Range(0, c.Device.WidthPx).Draw(t, "x")
		if _, ok := v.UnprojectMercator(viewport.Pixel{X: x, Y: row - 1e-6*math.Max(1, math.Abs(row))}); ok {
			t.Fatalf("a pixel just above the horizon row %v unprojects to ground", row)
		}
		if _, ok := v.UnprojectMercator(viewport.Pixel{X: x, Y: row + 1}); !ok {
			t.Fatalf("a pixel 1 px below the horizon row %v sees no ground", row)
		}
		far := v.FarRowPx()
		if far < 0 {
			return // the far row is above the screen; Wrapped speaks of the screen only
		}
		m, ok := v.UnprojectMercator(viewport.Pixel{X: x, Y: far})
		if !ok {
			t.Fatalf("the far row %v sees no ground", far)
		}
		if v.Wrapped() || math.Abs(m.LatLon()[1]) >= 85 {
			return // the ground point does not come back the same way (SPEC §1)
		}
		want := c.Device.FarRatio * v.FocalPx()
		if got := v.ProjectMercator(m).DepthPx; math.Abs(got-want) > 1e-6*want {
			t.Fatalf("depth on the far row = %v px, want k·f = %v px", got, want)
		}
	})
}
