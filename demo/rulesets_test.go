package demo_test

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/viewport"
)

// The embedded rule files are byte-for-byte copies of the fixtures' (go:embed cannot reach outside
// this folder). If this fails, copy them again: cp fixtures/rules/*.yaml demo/rules/
func TestRuleFilesAreCopies(t *testing.T) {
	s := demo.Default()
	for _, rs := range s.RuleSets {
		orig, err := os.ReadFile(filepath.Join("..", "fixtures", "rules", rs.File))
		if err != nil {
			t.Fatal(err)
		}
		copied, err := os.ReadFile(filepath.Join("rules", rs.File))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(copied, orig) {
			t.Errorf("demo/rules/%s differs from fixtures/rules/%s: copy it again", rs.File, rs.File)
		}
		if !bytes.Equal(rs.YAML, orig) {
			t.Errorf("the embedded %s differs from fixtures/rules/%s: rebuild", rs.File, rs.File)
		}
	}
}

func TestRuleSetsParse(t *testing.T) {
	s := demo.Default()
	for _, rs := range s.RuleSets {
		set, err := rules.Parse(rs.YAML, rs.File)
		if err != nil {
			t.Fatalf("rules.Parse(%s): %v", rs.File, err)
		}
		if err := rs.Set.Validate(); err != nil {
			t.Errorf("%s: Validate: %v", rs.File, err)
		}
		if len(set.Bands) != len(rs.Set.Bands) || set.MaxZoom != rs.Set.MaxZoom {
			t.Errorf("%s: the scenario's set differs from a fresh parse", rs.File)
		}
		for _, f := range rules.Lint(rs.YAML, rs.File) {
			t.Errorf("%s: lint: %v", rs.File, f)
		}
	}
}

// Every device is valid at every pitch its rule set reaches, and puts the user inside its clear area,
// in the lower half of the screen, at least 40 px above the bottom of the clear area.
func TestDevices(t *testing.T) {
	s := demo.Default()
	for _, d := range s.Devices {
		rs, ok := s.RuleSet(d.Rules)
		if !ok {
			t.Fatalf("%s: no rule set %q", d.Name, d.Rules)
		}
		for _, b := range rs.Set.Bands {
			c := viewport.Camera{LatDeg: demo.Origin[1], LonDeg: demo.Origin[0], HeadingDeg: demo.AvenueBearingDeg,
				PitchDeg: b.PitchDeg, Zoom: b.Zoom, Device: d.Device}
			v, err := viewport.Prepare(c)
			if err != nil {
				t.Fatalf("%s at pitch %g: %v", d.Name, b.PitchDeg, err)
			}
			sp := v.Project(c.User())
			left, top, right, bottom := v.ClearArea()
			if !sp.InView() || sp.X < left || sp.X > right || sp.Y < top || bottom-sp.Y < 40 || sp.Y < d.HeightPx/2 {
				t.Errorf("%s at pitch %g: the user at (%.1f, %.1f) px, clear area x %g–%g, y %g–%g", d.Name, b.PitchDeg,
					sp.X, sp.Y, left, right, top, bottom)
			}
		}
	}
	want := map[string][2]float64{
		demo.DevicePhonePortrait:  {390, 844},
		demo.DevicePhoneLandscape: {844, 390},
		demo.DeviceInCar:          {1280, 480},
	}
	for name, wh := range want {
		d, _ := s.Device(name)
		if d.WidthPx != wh[0] || d.HeightPx != wh[1] {
			t.Errorf("%s: %g × %g px, want %g × %g", name, d.WidthPx, d.HeightPx, wh[0], wh[1])
		}
	}
}
