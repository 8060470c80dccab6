package viewport_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/viewport"
)

func validCamera() viewport.Camera {
	return viewport.Camera{LatDeg: 48.1, LonDeg: 11.5, HeadingDeg: 30, PitchDeg: 45, Zoom: 16,
		Device: viewport.NewDevice(390, 844, 45)}
}

// Every invalid field of SPEC §2 gets a *FieldError naming the field and the
// value, never a number.
func TestCameraValidate(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name      string
		mutate    func(*viewport.Camera)
		wantField string
		wantValue string
	}{
		{"lat NaN", func(c *viewport.Camera) { c.LatDeg = nan }, "lat", "NaN"},
		{"lat 90.5", func(c *viewport.Camera) { c.LatDeg = 90.5 }, "lat", "90.5"},
		{"lat -Inf", func(c *viewport.Camera) { c.LatDeg = -inf }, "lat", "-Inf"},
		{"lon 180.01", func(c *viewport.Camera) { c.LonDeg = 180.01 }, "lon", "180.01"},
		{"heading 360", func(c *viewport.Camera) { c.HeadingDeg = 360 }, "heading_deg", "360"},
		{"heading -1", func(c *viewport.Camera) { c.HeadingDeg = -1 }, "heading_deg", "-1"},
		{"pitch 95", func(c *viewport.Camera) { c.PitchDeg = 95 }, "pitch_deg", "95"},
		{"pitch 90", func(c *viewport.Camera) { c.PitchDeg = 90 }, "pitch_deg", "90"},
		{"pitch -0.1", func(c *viewport.Camera) { c.PitchDeg = -0.1 }, "pitch_deg", "-0.1"},
		{"zoom 30.5", func(c *viewport.Camera) { c.Zoom = 30.5 }, "zoom", "30.5"},
		{"zoom -1", func(c *viewport.Camera) { c.Zoom = -1 }, "zoom", "-1"},
		{"zoom +Inf", func(c *viewport.Camera) { c.Zoom = inf }, "zoom", "+Inf"},
		{"width 0", func(c *viewport.Camera) { c.Device.WidthPx = 0 }, "device.width_px", "0"},
		{"height -5", func(c *viewport.Camera) { c.Device.HeightPx = -5 }, "device.height_px", "-5"},
		{"height 0", func(c *viewport.Camera) { c.Device.HeightPx = 0 }, "device.height_px", "0"},
		{"fov 0", func(c *viewport.Camera) { c.Device.FovYDeg = 0 }, "device.fov_y_deg", "0"},
		{"fov 180", func(c *viewport.Camera) { c.Device.FovYDeg = 180 }, "device.fov_y_deg", "180"},
		{"tile 300", func(c *viewport.Camera) { c.Device.TilePx = 300 }, "device.tile_px", "300"},
		{"anchor_x 1.5", func(c *viewport.Camera) { c.Device.AnchorX = 1.5 }, "device.anchor_x", "1.5"},
		{"inset NaN", func(c *viewport.Camera) { c.Device.InsetLeftPx = nan }, "device.inset_left_px", "NaN"},
		{"inset negative", func(c *viewport.Camera) { c.Device.InsetTopPx = -1 }, "device.inset_top_px", "-1"},
		{"width 1e308", func(c *viewport.Camera) { c.Device.WidthPx = 1e308 }, "device.width_px", "1e+308"},
		{"height above the bound", func(c *viewport.Camera) { c.Device.HeightPx = 100001 }, "device.height_px", "100001"},
		{"insets cover the width", func(c *viewport.Camera) { c.Device.InsetLeftPx, c.Device.InsetRightPx = 200, 190 },
			"device.inset_left_px+inset_right_px", "390"},
		{"insets cover the height", func(c *viewport.Camera) { c.Device.InsetTopPx, c.Device.InsetBottomPx = 500, 400 },
			"device.inset_top_px+inset_bottom_px", "900"},
		{"insets exactly the height", func(c *viewport.Camera) { c.Device.InsetTopPx, c.Device.InsetBottomPx = 444, 400 },
			"device.inset_top_px+inset_bottom_px", "844"},
		// Latitude and longitude at their closed ends are valid: the field
		// named is the one that is not.
		{"zoom 31 at lat 90, lon 180", func(c *viewport.Camera) { c.LatDeg, c.LonDeg, c.Zoom = 90, 180, 31 }, "zoom", "31"},
		{"zoom 31 at lat -90, lon -180", func(c *viewport.Camera) { c.LatDeg, c.LonDeg, c.Zoom = -90, -180, 31 }, "zoom", "31"},
		{"far ratio 1", func(c *viewport.Camera) { c.Device.FarRatio = 1 }, "device.far_ratio", "1"},
		// At pitch 80° with a 45° field of view the horizon lies at
		// y = cy − f·cot 80° ≈ 422 − 1019·0.176 ≈ 242 px; an anchor at the top
		// of the screen is above it.
		{"anchor above the horizon", func(c *viewport.Camera) { c.PitchDeg = 80; c.Device.AnchorY = 0 }, "device.anchor_y", "0"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c := validCamera()
			tc.mutate(&c)
			err := c.Validate()
			var fe *spec.FieldError
			if !errors.As(err, &fe) {
				t.Fatalf("Validate() = %v, want a *FieldError", err)
			}
			if fe.Field != tc.wantField {
				t.Errorf("field = %q, want %q (%v)", fe.Field, tc.wantField, err)
			}
			if !strings.Contains(err.Error(), tc.wantField+" = "+tc.wantValue+":") {
				t.Errorf("message %q does not name %s = %s", err, tc.wantField, tc.wantValue)
			}
			if _, perr := viewport.Prepare(c); perr == nil {
				t.Errorf("Prepare accepted an invalid camera")
			}
		})
	}
	if err := validCamera().Validate(); err != nil {
		t.Fatalf("valid camera rejected: %v", err)
	}
}

// Boundary values that are valid: the closed ends of every interval.
func TestCameraValidateBoundaries(t *testing.T) {
	for _, mutate := range []func(*viewport.Camera){
		func(c *viewport.Camera) { c.LatDeg = 90 },
		func(c *viewport.Camera) { c.LatDeg = -90 },
		func(c *viewport.Camera) { c.LonDeg = -180 },
		func(c *viewport.Camera) { c.LonDeg = 180 },
		func(c *viewport.Camera) { c.HeadingDeg = 0 },
		func(c *viewport.Camera) { c.HeadingDeg = math.Nextafter(360, 0) },
		func(c *viewport.Camera) { c.PitchDeg = 0 },
		func(c *viewport.Camera) { c.PitchDeg = 89.999 },
		func(c *viewport.Camera) { c.Zoom = 0 },
		func(c *viewport.Camera) { c.Zoom = 30 },
		func(c *viewport.Camera) { c.Device.TilePx = 512 },
		func(c *viewport.Camera) { c.Device.AnchorX, c.Device.AnchorY = 0, 1 },
		func(c *viewport.Camera) { c.Device.FarRatio = 1.0000001 },
		func(c *viewport.Camera) {
			c.Device.WidthPx, c.Device.HeightPx = viewport.MaxScreenPx, viewport.MaxScreenPx
		},
		func(c *viewport.Camera) { c.PitchDeg, c.Device.AnchorX, c.Device.AnchorY = 0, 1, 0 },
		func(c *viewport.Camera) { // a clear area of 1 × 1 px at the bottom right
			c.PitchDeg, c.Device.WidthPx, c.Device.HeightPx = 0, viewport.MaxScreenPx, viewport.MaxScreenPx
			c.Device.InsetTopPx, c.Device.InsetLeftPx = viewport.MaxScreenPx-1, viewport.MaxScreenPx-1
		},
	} {
		c := validCamera()
		mutate(&c)
		if err := c.Validate(); err != nil {
			t.Errorf("Validate(%+v) = %v, want nil", c, err)
		}
	}
}

// The anchor must lie below the horizon (SPEC §2), found from the focal
// length f = (H/2)/tan(fov_y/2). Hand-computed for H = 800, fov_y 60°
// (f = 400√3) at pitch 61°: y_horizon = cy − f·cot θ = 400 − 400√3/tan 61°
// ≈ 15.97, so anchor_y 0 (y = 0) is above it and refused, anchor_y 0.05
// (y = 40) below it and taken.
func TestCameraValidateAnchorAgainstHorizon(t *testing.T) {
	c := viewport.Camera{PitchDeg: 61, Zoom: 16, Device: viewport.NewDevice(400, 800, 60)}
	if y := 400 - 400*math.Sqrt(3)/math.Tan(61*math.Pi/180); !(y > 0 && y < 40) {
		t.Fatalf("y_horizon = %v, want between the two anchors", y)
	}
	c.Device.AnchorY = 0
	if err := c.Validate(); err == nil || !strings.Contains(err.Error(), "device.anchor_y") {
		t.Errorf("Validate(anchor_y 0, above the horizon at 15.97) = %v, want an error naming device.anchor_y", err)
	}
	c.Device.AnchorY = 0.05
	if err := c.Validate(); err != nil {
		t.Errorf("Validate(anchor_y 0.05, below the horizon at 15.97) = %v, want nil", err)
	}
}

// With every field at a closed end of its range and the last one (the far
// ratio) out of range, the error names the far ratio: no bound of an
// earlier field is taken as open.
func TestCameraValidateEveryFieldAtItsEnds(t *testing.T) {
	low := viewport.Camera{LatDeg: -90, LonDeg: -180, HeadingDeg: 0, PitchDeg: 0, Zoom: 0, Device: viewport.NewDevice(1, 1, 45)}
	low.Device.AnchorX, low.Device.AnchorY = 0, 0
	high := viewport.Camera{LatDeg: 90, LonDeg: 180, HeadingDeg: math.Nextafter(360, 0), PitchDeg: 0, Zoom: 30,
		Device: viewport.NewDevice(viewport.MaxScreenPx, viewport.MaxScreenPx, 45)}
	high.Device.TilePx, high.Device.AnchorX, high.Device.AnchorY = 512, 1, 1
	high.Device.InsetTopPx, high.Device.InsetRightPx = viewport.MaxScreenPx/2, viewport.MaxScreenPx/2-1
	for _, c := range []viewport.Camera{low, high} {
		if err := c.Validate(); err != nil {
			t.Fatalf("Validate(%+v) = %v, want nil", c, err)
		}
		c.Device.FarRatio = 1
		var fe *spec.FieldError
		if err := c.Validate(); !errors.As(err, &fe) || fe.Field != "device.far_ratio" {
			t.Errorf("Validate(%+v with far ratio 1) = %v, want an error naming device.far_ratio", c, err)
		}
	}
	// Insets of 100000 px are within their own range; they leave no clear
	// area, which is checked after every field.
	c := high
	c.Device.InsetTopPx, c.Device.InsetRightPx, c.Device.InsetBottomPx, c.Device.InsetLeftPx = viewport.MaxScreenPx, viewport.MaxScreenPx, viewport.MaxScreenPx, viewport.MaxScreenPx
	c.Device.FarRatio = 1
	var fe *spec.FieldError
	if err := c.Validate(); !errors.As(err, &fe) || fe.Field != "device.far_ratio" {
		t.Errorf("Validate(insets of 100000 px, far ratio 1) = %v, want an error naming device.far_ratio", err)
	}
}
