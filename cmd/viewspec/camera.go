package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// defaultCamera is the embedded default: a phone held upright in a car on the
// main street of Port Wren, an invented island town in the mid-Atlantic,
// heading north-east at a city zoom.
func defaultCamera() viewport.Camera {
	d := viewport.NewDevice(390, 844, 45)
	d.AnchorY = 0.75
	d.InsetTopPx = 60
	d.InsetBottomPx = 120
	return viewport.Camera{LatDeg: 44.9312, LonDeg: -31.1704, HeadingDeg: 30, PitchDeg: 50, Zoom: 16.5, Device: d}
}

// cameraFlags binds a camera to command-line flags; --camera reads a JSON
// camera object (SPEC §6) from a file or stdin, and flags given explicitly
// override it.
type cameraFlags struct {
	cam  viewport.Camera
	file string
	tile int
}

func (cf *cameraFlags) register(cmd *cobra.Command) {
	cf.cam = defaultCamera()
	cf.tile = cf.cam.Device.TilePx
	f := cmd.Flags()
	c, d := &cf.cam, &cf.cam.Device
	f.StringVar(&cf.file, "camera", "", "read the camera as a JSON object from `FILE` (- for stdin); flags override it")
	f.Float64Var(&c.LatDeg, "lat", c.LatDeg, "user latitude, WGS84 degrees")
	f.Float64Var(&c.LonDeg, "lon", c.LonDeg, "user longitude, WGS84 degrees")
	f.Float64Var(&c.HeadingDeg, "heading", c.HeadingDeg, "heading, degrees clockwise from true north, [0, 360)")
	f.Float64Var(&c.PitchDeg, "pitch", c.PitchDeg, "pitch, degrees from straight down, [0, 90)")
	f.Float64Var(&c.Zoom, "zoom", c.Zoom, "zoom level, [0, 30]")
	f.Float64Var(&d.WidthPx, "width", d.WidthPx, "screen width, logical pixels")
	f.Float64Var(&d.HeightPx, "height", d.HeightPx, "screen height, logical pixels")
	f.Float64Var(&d.FovYDeg, "fov-y", d.FovYDeg, "vertical field of view, degrees")
	f.IntVar(&cf.tile, "tile", cf.tile, "tile size in pixels, 256 or 512")
	f.Float64Var(&d.AnchorX, "anchor-x", d.AnchorX, "where the user appears, fraction of the width from the left")
	f.Float64Var(&d.AnchorY, "anchor-y", d.AnchorY, "where the user appears, fraction of the height from the top")
	f.Float64Var(&d.InsetTopPx, "inset-top", d.InsetTopPx, "screen pixels covered by UI at the top")
	f.Float64Var(&d.InsetRightPx, "inset-right", d.InsetRightPx, "screen pixels covered by UI at the right")
	f.Float64Var(&d.InsetBottomPx, "inset-bottom", d.InsetBottomPx, "screen pixels covered by UI at the bottom")
	f.Float64Var(&d.InsetLeftPx, "inset-left", d.InsetLeftPx, "screen pixels covered by UI at the left")
	f.Float64Var(&d.FarRatio, "far-ratio", d.FarRatio, "the view ends at depth far-ratio × focal length")
}

// cameraFields copies one flag's field from the flags' camera to another,
// by flag name, so that flags given explicitly override --camera.
var cameraFields = map[string]func(dst, src *viewport.Camera){
	"lat":          func(d, s *viewport.Camera) { d.LatDeg = s.LatDeg },
	"lon":          func(d, s *viewport.Camera) { d.LonDeg = s.LonDeg },
	"heading":      func(d, s *viewport.Camera) { d.HeadingDeg = s.HeadingDeg },
	"pitch":        func(d, s *viewport.Camera) { d.PitchDeg = s.PitchDeg },
	"zoom":         func(d, s *viewport.Camera) { d.Zoom = s.Zoom },
	"width":        func(d, s *viewport.Camera) { d.Device.WidthPx = s.Device.WidthPx },
	"height":       func(d, s *viewport.Camera) { d.Device.HeightPx = s.Device.HeightPx },
	"fov-y":        func(d, s *viewport.Camera) { d.Device.FovYDeg = s.Device.FovYDeg },
	"tile":         func(d, s *viewport.Camera) { d.Device.TilePx = s.Device.TilePx },
	"anchor-x":     func(d, s *viewport.Camera) { d.Device.AnchorX = s.Device.AnchorX },
	"anchor-y":     func(d, s *viewport.Camera) { d.Device.AnchorY = s.Device.AnchorY },
	"inset-top":    func(d, s *viewport.Camera) { d.Device.InsetTopPx = s.Device.InsetTopPx },
	"inset-right":  func(d, s *viewport.Camera) { d.Device.InsetRightPx = s.Device.InsetRightPx },
	"inset-bottom": func(d, s *viewport.Camera) { d.Device.InsetBottomPx = s.Device.InsetBottomPx },
	"inset-left":   func(d, s *viewport.Camera) { d.Device.InsetLeftPx = s.Device.InsetLeftPx },
	"far-ratio":    func(d, s *viewport.Camera) { d.Device.FarRatio = s.Device.FarRatio },
}

// view returns the camera the flags (and --camera) describe, prepared.
// Input errors exit with code 2.
func (cf *cameraFlags) view(cmd *cobra.Command) (viewport.View, error) {
	c := cf.cam
	c.Device.TilePx = cf.tile
	if cf.file != "" {
		base, err := cf.readFile(cmd)
		if err != nil {
			return viewport.View{}, &exitError{2, err}
		}
		for name, copyField := range cameraFields {
			if cmd.Flags().Changed(name) {
				copyField(&base, &c)
			}
		}
		c = base
	}
	v, err := viewport.Prepare(c)
	if err != nil {
		return viewport.View{}, &exitError{2, fmt.Errorf("invalid camera: %w", err)}
	}
	return v, nil
}

func (cf *cameraFlags) readFile(cmd *cobra.Command) (viewport.Camera, error) {
	var data []byte
	var err error
	name := cf.file
	if name == "-" {
		data, err = io.ReadAll(cmd.InOrStdin())
		name = "stdin"
	} else {
		data, err = os.ReadFile(name)
	}
	if err != nil {
		return viewport.Camera{}, err
	}
	var w wire.Camera
	dec := json.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&w); err != nil {
		return viewport.Camera{}, fmt.Errorf("%s: %v", name, describeJSONError(data, err))
	}
	c, err := w.Value("camera")
	if err != nil {
		return viewport.Camera{}, fmt.Errorf("%s: %v", name, err)
	}
	return c, nil
}

// describeJSONError adds the line and column to a JSON syntax error.
func describeJSONError(data []byte, err error) string {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	off := int64(-1)
	switch {
	case errors.As(err, &se):
		off = se.Offset - 1 // the offending byte itself
	case errors.As(err, &te):
		off = te.Offset
	}
	_, msg := wire.DecodeError(err)
	if off < 0 {
		return msg
	}
	line, col := 1, 1
	for _, b := range data[:min(int(off), len(data))] {
		if b == '\n' {
			line, col = line+1, 1
		} else {
			col++
		}
	}
	return fmt.Sprintf("line %d, column %d: %s", line, col, msg)
}
