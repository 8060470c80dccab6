package props

import (
	"math"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/viewport"
)

// LogUniform draws from [lo, hi] (0 < lo < hi) uniformly in the logarithm,
// so that every order of magnitude is drawn as often.
func LogUniform(lo, hi float64) *rapid.Generator[float64] {
	return rapid.Custom(func(t *rapid.T) float64 {
		e := rapid.Float64Range(math.Log(lo), math.Log(hi)).Draw(t, "log")
		return math.Max(lo, math.Min(hi, math.Exp(e)))
	})
}

// LatDeg draws latitudes in degrees, biased toward the equator, the
// Mercator limit and the poles.
func LatDeg() *rapid.Generator[float64] {
	return rapid.OneOf(
		rapid.Float64Range(-80, 80),
		rapid.SampledFrom([]float64{0, 89.999, -89.999, 90, -90, viewport.MaxLatDeg, -viewport.MaxLatDeg}),
		rapid.Float64Range(80, 90),
		rapid.Float64Range(-90, -80),
	)
}

// LonDeg draws longitudes in degrees, biased toward the antimeridian and the
// prime meridian.
func LonDeg() *rapid.Generator[float64] {
	return rapid.OneOf(
		rapid.Float64Range(-180, 180),
		rapid.SampledFrom([]float64{-180, 180, 0, 179.9999, -179.9999}),
		rapid.Float64Range(179, 180),
		rapid.Float64Range(-180, -179),
	)
}

// HeadingDeg draws headings in [0, 360), biased toward the cardinal
// directions and the wrap at 360.
func HeadingDeg() *rapid.Generator[float64] {
	return rapid.OneOf(
		rapid.Float64Range(0, 359.999999),
		rapid.SampledFrom([]float64{0, 90, 180, 270, 359.999}),
	)
}

// PitchDeg draws pitches in [0, 90), biased toward 0 and near-vertical.
func PitchDeg() *rapid.Generator[float64] {
	return rapid.OneOf(
		rapid.Float64Range(0, 75),
		rapid.SampledFrom([]float64{0, 45, 60}),
		rapid.Float64Range(75, 89.9),
	)
}

// Zoom draws zoom levels in [0, 22], integral about half the time.
func Zoom() *rapid.Generator[float64] {
	return rapid.OneOf(
		rapid.Float64Range(0, 22),
		rapid.Map(rapid.IntRange(0, 22), func(z int) float64 { return float64(z) }),
		rapid.Float64Range(12, 19),
	)
}

// Device draws a valid device at the given pitch: screens from 32 to 4096
// pixels a side, 256- and 512-pixel tiles, insets up to most of the screen,
// off-centre anchors (kept below the horizon), far ratios from just above 1.
func Device(pitchDeg float64) *rapid.Generator[viewport.Device] {
	return rapid.Custom(func(t *rapid.T) viewport.Device {
		w := LogUniform(32, 4096).Draw(t, "width_px")
		h := LogUniform(32, 4096).Draw(t, "height_px")
		d := viewport.NewDevice(w, h, rapid.OneOf(
			rapid.Float64Range(10, 120),
			rapid.SampledFrom([]float64{30, 45, 60, 90}),
		).Draw(t, "fov_y_deg"))
		d.TilePx = rapid.SampledFrom([]int{256, 512}).Draw(t, "tile_px")
		if rapid.Bool().Draw(t, "insets") {
			fr := rapid.Float64Range(0, 0.45)
			d.InsetTopPx = fr.Draw(t, "inset_top") * h
			d.InsetBottomPx = fr.Draw(t, "inset_bottom") * h
			d.InsetLeftPx = fr.Draw(t, "inset_left") * w
			d.InsetRightPx = fr.Draw(t, "inset_right") * w
		}
		if rapid.Bool().Draw(t, "off_centre") {
			d.AnchorX = rapid.Float64Range(0, 1).Draw(t, "anchor_x")
			// Keep the anchor row below the horizon: b < f·cot θ.
			d.AnchorY = rapid.Float64Range(0.5, 1).Draw(t, "anchor_y")
			if pitchDeg < 45 {
				d.AnchorY = rapid.Float64Range(0, 1).Draw(t, "anchor_y_any")
			}
		}
		d.FarRatio = rapid.OneOf(
			rapid.Just(10.0),
			LogUniform(1.01, 100),
		).Draw(t, "far_ratio")
		return d
	})
}

// Camera draws a valid camera (one that passes Validate).
func Camera() *rapid.Generator[viewport.Camera] {
	return rapid.Custom(func(t *rapid.T) viewport.Camera {
		c := viewport.Camera{
			LatDeg:     LatDeg().Draw(t, "lat"),
			LonDeg:     LonDeg().Draw(t, "lon"),
			HeadingDeg: HeadingDeg().Draw(t, "heading_deg"),
			PitchDeg:   PitchDeg().Draw(t, "pitch_deg"),
			Zoom:       Zoom().Draw(t, "zoom"),
		}
		c.Device = Device(c.PitchDeg).Draw(t, "device")
		if err := c.Validate(); err != nil {
			// Only a high anchor at a steep pitch can fail; such draws are
			// rejected and rapid draws again.
			t.Skipf("invalid draw: %v", err)
		}
		return c
	})
}
