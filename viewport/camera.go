package viewport

import (
	"math"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/spec"
)

// Device describes the screen a camera draws on. Sizes are logical pixels.
// The zero value is not usable; start from NewDevice.
type Device struct {
	WidthPx, HeightPx float64
	// FovYDeg is the vertical field of view in degrees, in (0, 180).
	FovYDeg float64
	// TilePx is the side of a map tile in pixels, 256 or 512; it sets how
	// many pixels a zoom level has (one zoom level apart from each other).
	TilePx int
	// AnchorX and AnchorY place the user on the screen, as fractions of the
	// width and height measured from the top-left corner.
	AnchorX, AnchorY float64
	// Insets are screen edges covered by UI; the clear area is what is left.
	InsetTopPx, InsetRightPx, InsetBottomPx, InsetLeftPx float64
	// FarRatio k cuts the view at depth k·f, where f is the focal length in
	// pixels; it must exceed 1.
	FarRatio float64
}

// MaxScreenPx bounds screen sizes and insets, in logical pixels: far
// beyond any screen, and small enough that no intermediate overflows.
const MaxScreenPx = 100000

// NewDevice returns a device of width×height logical pixels with vertical
// field of view fovYDeg and the defaults: 256-pixel tiles, the user at the
// centre, no insets, far ratio 10.
func NewDevice(widthPx, heightPx, fovYDeg float64) Device {
	return Device{
		WidthPx: widthPx, HeightPx: heightPx, FovYDeg: fovYDeg,
		TilePx: 256, AnchorX: 0.5, AnchorY: 0.5, FarRatio: 10,
	}
}

// Camera is the map camera: the user's position, the heading that is up on
// the screen, the pitch away from straight down, the zoom level and the
// device.
type Camera struct {
	LatDeg, LonDeg float64
	HeadingDeg     float64
	PitchDeg       float64
	Zoom           float64
	Device         Device
}

// User returns the user's position as [lon, lat] degrees.
func (c Camera) User() orb.Point { return orb.Point{c.LonDeg, c.LatDeg} }

// Validate reports the first invalid field of c as a *FieldError, or nil.
// Field names are those of the wire (SPEC §6).
func (c Camera) Validate() error {
	if err := c.validateFields(); err != nil {
		return err
	}
	d := c.Device
	f := d.HeightPx / 2 / math.Tan(d.FovYDeg*(math.Pi/180)/2)
	sinP, cosP := math.Sincos(c.PitchDeg * (math.Pi / 180))
	return c.checkAnchor(f, sinP, cosP)
}

// checkAnchor reports an anchor pixel at or above the horizon, given the
// focal length f and the pitch's sine and cosine: the anchor row must have
// f·cos θ − b·sin θ > 0, where b = cy − y_A.
func (c *Camera) checkAnchor(f, sinP, cosP float64) error {
	d := c.Device
	b := d.HeightPx/2 - d.AnchorY*d.HeightPx
	if f*cosP-b*sinP <= 0 {
		return spec.Out("device.anchor_y", d.AnchorY,
			"the anchor pixel is at or above the horizon at pitch "+spec.FormatNumber(c.PitchDeg)+"°")
	}
	return nil
}

// attitudeOK reports whether the fields that place and turn the camera
// (lat, lon, heading, pitch, zoom) are within their ranges; false for NaN,
// whose every comparison is false, and for ±Inf, which fails its bound.
func (c *Camera) attitudeOK() bool {
	return c.LatDeg >= -90 && c.LatDeg <= 90 && c.LonDeg >= -180 && c.LonDeg <= 180 &&
		c.HeadingDeg >= 0 && c.HeadingDeg < 360 && c.PitchDeg >= 0 && c.PitchDeg < 90 &&
		c.Zoom >= 0 && c.Zoom <= 30
}

// validateFields checks every field's own range (no trigonometry), with a
// fast path: one pass of comparisons, and the table below only to name the
// first failure.
func (c *Camera) validateFields() error {
	d := &c.Device
	// Each comparison is false for NaN, so NaN fails here too; ±Inf fails
	// its bound or the explicit finiteness tests.
	if c.attitudeOK() &&
		d.WidthPx > 0 && d.WidthPx <= MaxScreenPx && d.HeightPx > 0 && d.HeightPx <= MaxScreenPx &&
		d.FovYDeg > 0 && d.FovYDeg < 180 && (d.TilePx == 256 || d.TilePx == 512) &&
		d.AnchorX >= 0 && d.AnchorX <= 1 && d.AnchorY >= 0 && d.AnchorY <= 1 &&
		d.InsetTopPx >= 0 && d.InsetTopPx <= MaxScreenPx && d.InsetRightPx >= 0 && d.InsetRightPx <= MaxScreenPx &&
		d.InsetBottomPx >= 0 && d.InsetBottomPx <= MaxScreenPx && d.InsetLeftPx >= 0 && d.InsetLeftPx <= MaxScreenPx &&
		d.FarRatio > 1 && d.FarRatio <= math.MaxFloat64 &&
		d.WidthPx-d.InsetLeftPx-d.InsetRightPx > 0 && d.HeightPx-d.InsetTopPx-d.InsetBottomPx > 0 {
		return nil
	}
	type check struct {
		field string
		v     float64
		ok    bool
		why   string
	}
	checks := [...]check{
		{"lat", c.LatDeg, finite(c.LatDeg) && math.Abs(c.LatDeg) <= 90, "latitude must be finite and within [-90, 90]"},
		{"lon", c.LonDeg, finite(c.LonDeg) && math.Abs(c.LonDeg) <= 180, "longitude must be finite and within [-180, 180]"},
		{"heading_deg", c.HeadingDeg, finite(c.HeadingDeg) && c.HeadingDeg >= 0 && c.HeadingDeg < 360, "heading must be within [0, 360)"},
		{"pitch_deg", c.PitchDeg, finite(c.PitchDeg) && c.PitchDeg >= 0 && c.PitchDeg < 90, "pitch must be within [0, 90)"},
		{"zoom", c.Zoom, finite(c.Zoom) && c.Zoom >= 0 && c.Zoom <= 30, "zoom must be within [0, 30]"},
		{"device.width_px", d.WidthPx, d.WidthPx > 0 && d.WidthPx <= MaxScreenPx, "width must be positive and at most 100000"},
		{"device.height_px", d.HeightPx, d.HeightPx > 0 && d.HeightPx <= MaxScreenPx, "height must be positive and at most 100000"},
		{"device.fov_y_deg", d.FovYDeg, finite(d.FovYDeg) && d.FovYDeg > 0 && d.FovYDeg < 180, "vertical field of view must be within (0, 180)"},
		{"device.tile_px", float64(d.TilePx), d.TilePx == 256 || d.TilePx == 512, "tile size must be 256 or 512"},
		{"device.anchor_x", d.AnchorX, finite(d.AnchorX) && d.AnchorX >= 0 && d.AnchorX <= 1, "anchor must be a fraction of the width within [0, 1]"},
		{"device.anchor_y", d.AnchorY, finite(d.AnchorY) && d.AnchorY >= 0 && d.AnchorY <= 1, "anchor must be a fraction of the height within [0, 1]"},
		{"device.inset_top_px", d.InsetTopPx, d.InsetTopPx >= 0 && d.InsetTopPx <= MaxScreenPx, "inset must be within [0, 100000]"},
		{"device.inset_right_px", d.InsetRightPx, d.InsetRightPx >= 0 && d.InsetRightPx <= MaxScreenPx, "inset must be within [0, 100000]"},
		{"device.inset_bottom_px", d.InsetBottomPx, d.InsetBottomPx >= 0 && d.InsetBottomPx <= MaxScreenPx, "inset must be within [0, 100000]"},
		{"device.inset_left_px", d.InsetLeftPx, d.InsetLeftPx >= 0 && d.InsetLeftPx <= MaxScreenPx, "inset must be within [0, 100000]"},
		{"device.far_ratio", d.FarRatio, finite(d.FarRatio) && d.FarRatio > 1, "far ratio must be finite and greater than 1"},
	}
	for _, k := range checks {
		if !k.ok {
			return spec.Out(k.field, k.v, k.why)
		}
	}
	if w := d.WidthPx - d.InsetLeftPx - d.InsetRightPx; !(w > 0) {
		return spec.Out("device.inset_left_px+inset_right_px", d.InsetLeftPx+d.InsetRightPx,
			"insets leave no clear area (they must sum to less than width_px "+spec.FormatNumber(d.WidthPx)+")")
	}
	return spec.Out("device.inset_top_px+inset_bottom_px", d.InsetTopPx+d.InsetBottomPx,
		"insets leave no clear area (they must sum to less than height_px "+spec.FormatNumber(d.HeightPx)+")")
}
