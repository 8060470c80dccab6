package spec_test

import (
	"errors"
	"math"
	"testing"

	"github.com/viewspec/viewspec/spec"
)

// The WGS84 defining constants (NIMA TR8350.2, table 3.1) and the Web
// Mercator latitude limit, atan(sinh π) in degrees (EPSG:3857; common
// practice, and recomputed here).
func TestConstants(t *testing.T) {
	if spec.WGS84SemiMajorM != 6378137 || spec.WGS84Flattening != 1/298.257223563 {
		t.Fatalf("WGS84 a = %v, f = %v", spec.WGS84SemiMajorM, spec.WGS84Flattening)
	}
	if got := math.Atan(math.Sinh(math.Pi)) * 180 / math.Pi; math.Abs(got-spec.MercatorMaxLatDeg) > 1e-12 {
		t.Fatalf("atan(sinh π) = %.15g°, MercatorMaxLatDeg %.15g°", got, spec.MercatorMaxLatDeg)
	}
	// R₁ = (2a + b)/3 with b = a(1 − f), to the 0.1 m it is quoted to.
	a := spec.WGS84SemiMajorM
	if r1 := (2*a + a*(1-spec.WGS84Flattening)) / 3; math.Abs(r1-spec.MeanEarthRadiusM) > 0.05 {
		t.Fatalf("(2a+b)/3 = %.4f m, MeanEarthRadiusM %.1f m", r1, spec.MeanEarthRadiusM)
	}
}

func TestCheckLatLon(t *testing.T) {
	for _, c := range []struct {
		desc     string
		lat, lon float64
		want     string // "" for no error
	}{
		{"corners are valid", -90, 180, ""},
		{"other corners", 90, -180, ""},
		{"latitude above", 91, 10, "markers[2].lat = 91: latitude must be finite and within [-90, 90]"},
		{"longitude -Inf", 0, math.Inf(-1), "markers[2].lon = -Inf: longitude must be finite and within [-180, 180]"},
		{"latitude first", math.NaN(), math.NaN(), "markers[2].lat = NaN: latitude must be finite and within [-90, 90]"},
		{"just beyond 180", 0, math.Nextafter(180, 181), "markers[2].lon = 180.00000000000003: longitude must be finite and within [-180, 180]"},
	} {
		err := spec.CheckLatLon("markers[2]", c.lat, c.lon)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s: CheckLatLon(%v, %v) = %v, want nil", c.desc, c.lat, c.lon, err)
		case c.want != "" && (err == nil || err.Error() != c.want):
			t.Errorf("%s: CheckLatLon(%v, %v) = %v, want %q", c.desc, c.lat, c.lon, err, c.want)
		}
		var fe *spec.FieldError
		if c.want != "" && !errors.As(err, &fe) {
			t.Errorf("%s: %T is not a *spec.FieldError", c.desc, err)
		}
	}
	if err := spec.CheckLatLon("", 95, 0); err == nil || err.Error() != "lat = 95: latitude must be finite and within [-90, 90]" {
		t.Errorf("at the top level: %v", err)
	}
}

func TestFieldErrorShape(t *testing.T) {
	for _, c := range []struct {
		err  *spec.FieldError
		want string
	}{
		{spec.Out("zoom", 31, "zoom must be within [0, 30]"), "zoom = 31: zoom must be within [0, 30]"},
		{spec.Absent("camera.device"), "camera.device: missing (required)"},
		{spec.Out("zoom", 31, "r").Under("camera."), "camera.zoom = 31: r"},
		{&spec.FieldError{Field: "speed_mps", Value: "3 entries", Reason: "want 1 or 2"}, "speed_mps = 3 entries: want 1 or 2"},
	} {
		if got := c.err.Error(); got != c.want {
			t.Errorf("Error() = %q, want %q", got, c.want)
		}
	}
	if spec.Absent("x").Kind != spec.Missing || spec.Out("x", 1, "r").Kind != spec.Invalid {
		t.Error("kinds: Absent is Missing, Out is Invalid")
	}
}

func TestFormatNumber(t *testing.T) {
	for v, want := range map[float64]string{0.1: "0.1", 31: "31", 1e21: "1e+21", math.NaN(): "NaN", math.Inf(1): "+Inf", math.Inf(-1): "-Inf"} {
		if got := spec.FormatNumber(v); got != want {
			t.Errorf("FormatNumber(%v) = %q, want %q", v, got, want)
		}
	}
	if got := spec.Excerpt([]byte("abcdef"), 3); got != "abc…" {
		t.Errorf("Excerpt = %q", got)
	}
}
