package viewport

import (
	"errors"
	"math"
)

// Place prepares v for camera c as Prepare does, keeping the terms whose
// inputs did not change since v was last placed. A moving view (a drive)
// is placed again at every tick, and between turns only its position
// changes: the trigonometry of the device, the pitch, the zoom and the
// heading is then skipped, and the numbers are the same, to the bit, as
// Prepare's (TestPlaceAgainIsPrepare holds it). On an error v is left
// unplaced.
func (v *View) Place(c Camera) error {
	if err := c.validateFields(); err != nil {
		v.focal = 0
		return err
	}
	return v.place(&c)
}

// Move places v, placed before, for a new position and attitude of the
// same device: Place with v's own device, which is known valid, so that
// only the five fields that change are checked. A drive moves its views
// at every tick. It is an error to move a view that is not placed (never
// placed, or left unplaced by an error); on an error v is left unplaced.
func (v *View) Move(latDeg, lonDeg, headingDeg, pitchDeg, zoom float64) error {
	if !(v.focal > 0) {
		return errNotPlaced
	}
	c := v.cam
	c.LatDeg, c.LonDeg, c.HeadingDeg, c.PitchDeg, c.Zoom = latDeg, lonDeg, headingDeg, pitchDeg, zoom
	if !c.attitudeOK() {
		v.focal = 0
		return c.validateFields() // names the field
	}
	return v.placeKnown(&c, true)
}

// errNotPlaced is Move's error for a view that is not placed.
var errNotPlaced = errors.New("viewport: Move needs a view placed with Place or Prepare")

// place prepares v for c, whose fields are known valid (validateFields):
// everything but the anchor's horizon check, which depends on the pitch and
// is made here. The drive timeline places the same two Views again and
// again, so the terms of the device, the pitch, the zoom and the heading
// are kept from the camera v was last placed for when those inputs are the
// same (bit for bit): the same numbers, without their trigonometry.
func (v *View) place(c *Camera) error {
	return v.placeKnown(c, v.focal > 0 && c.Device == v.cam.Device)
}

// placeKnown is place for a caller that knows whether c's device is the
// one v was last placed for (v placed, its device the same): a drive's
// always is, and comparing devices costs as much as the rest.
func (v *View) placeKnown(c *Camera, sameDevice bool) error {
	d := &c.Device
	old := &v.cam
	samePitch := sameDevice && math.Float64bits(c.PitchDeg) == math.Float64bits(old.PitchDeg)
	sameZoom := sameDevice && math.Float64bits(c.Zoom) == math.Float64bits(old.Zoom)
	sameHeading := sameDevice && math.Float64bits(c.HeadingDeg) == math.Float64bits(old.HeadingDeg)
	if !sameDevice {
		v.focal = d.HeightPx / 2 / math.Tan(d.FovYDeg*(math.Pi/180)/2)
		v.cx, v.cy = d.WidthPx/2, d.HeightPx/2
		v.left, v.right = d.InsetLeftPx, d.WidthPx-d.InsetRightPx
		v.top, v.bottom = d.InsetTopPx, d.HeightPx-d.InsetBottomPx
		v.leftC, v.rightC = v.left-v.cx, v.right-v.cx
		v.maxDepth = d.FarRatio * v.focal
	}
	if !samePitch {
		v.sinP, v.cosP = math.Sincos(c.PitchDeg * (math.Pi / 180))
		if err := c.checkAnchor(v.focal, v.sinP, v.cosP); err != nil {
			v.focal = 0 // nothing kept: v is not placed
			return err
		}
		v.fCosP = v.focal * v.cosP
		v.farRow = math.Inf(-1)
		if v.sinP > 0 {
			// y at v_far = (k−1)·f/sin θ, where depth = k·f:
			// y = cy − f·v·cos θ/(k·f) = cy − (k−1)·f·cos θ/(k·sin θ).
			v.farRow = v.cy - (d.FarRatio-1)*v.focal*v.cosP/(d.FarRatio*v.sinP)
		}
		// The anchor is below the horizon (checked above).
		v.uA, v.vA, _ = v.groundOfPixel(d.AnchorX*d.WidthPx, d.AnchorY*d.HeightPx)
	}
	if !sameZoom {
		v.scale = ScalePxPerM(c.Zoom, d.TilePx)
	}
	if !sameHeading {
		v.sinH, v.cosH = math.Sincos(c.HeadingDeg * (math.Pi / 180))
	}
	if !(samePitch && sameZoom && sameHeading) {
		v.sCosH, v.sSinH = v.scale*v.cosH, v.scale*v.sinH
		v.dX, v.dY = v.sinP*v.sSinH, v.sinP*v.sCosH
		v.xX, v.xY = v.focal*v.sCosH, -v.focal*v.sSinH
		v.yX, v.yY = -v.fCosP*v.sSinH, -v.fCosP*v.sCosH
	}
	v.cam = *c

	v.user = ToMercator(c.User())
	v.target = Mercator{
		X: v.user.X - (v.uA*v.cosH+v.vA*v.sinH)/v.scale,
		Y: v.user.Y - (-v.uA*v.sinH+v.vA*v.cosH)/v.scale,
	}
	if !(samePitch && sameZoom && sameHeading) {
		v.wrapped = v.reachesHalfWorld() // it does not depend on the position
	}
	return nil
}
