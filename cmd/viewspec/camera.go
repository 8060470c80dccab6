package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	jsonv2 "github.com/go-json-experiment/json"
	"github.com/go-json-experiment/json/jsontext"
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// defaultCamera is the command line's one default camera: a phone held
// upright in a car on the main street of Port Wren, an invented island town
// in the mid-Atlantic, heading north-east at a city zoom. Its device fields
// other than the screen size and field of view are SPEC §2's defaults
// (viewport.NewDevice: 256-px tiles, the user at the centre, no insets, far
// ratio 10): the ones a camera object gets on the wire, or in a --camera
// file, when it leaves them out.
func defaultCamera() viewport.Camera {
	return viewport.Camera{LatDeg: 44.9312, LonDeg: -31.1704, HeadingDeg: 30, PitchDeg: 50, Zoom: 16.5,
		Device: viewport.NewDevice(390, 844, 45)}
}

// cameraFlags binds a camera to command-line flags; --camera reads a JSON
// camera object (SPEC §6) from a file or stdin, and flags given explicitly
// override it. The defaults are one set whatever the source: see cameraHelp.
type cameraFlags struct {
	cam  viewport.Camera // the flags' values: the defaults until given
	tile int
	file string
	data []byte // the camera object read from file, for hints
	// atUser makes lat, lon and heading default to the place the command
	// passes to viewAt (metrics: the user, and the route's heading there)
	// instead of Port Wren.
	atUser bool
}

// cameraField ties a camera flag to its field in the wire's camera object.
type cameraField struct {
	flag  string                         // the flag's name
	path  string                         // the field's path in the camera object
	value func(cf *cameraFlags) float64  // the flag's value
	slot  func(w *wire.Camera) **float64 // the wire field (the device is made when missing)
}

// cameraFields lists every camera flag; the first eight are the fields a
// camera object must have (SPEC §6), the rest have SPEC §2's defaults.
var cameraFields = []cameraField{
	{"lat", "lat", func(cf *cameraFlags) float64 { return cf.cam.LatDeg }, func(w *wire.Camera) **float64 { return &w.Lat }},
	{"lon", "lon", func(cf *cameraFlags) float64 { return cf.cam.LonDeg }, func(w *wire.Camera) **float64 { return &w.Lon }},
	{"heading", "heading_deg", func(cf *cameraFlags) float64 { return cf.cam.HeadingDeg }, func(w *wire.Camera) **float64 { return &w.HeadingDeg }},
	{"pitch", "pitch_deg", func(cf *cameraFlags) float64 { return cf.cam.PitchDeg }, func(w *wire.Camera) **float64 { return &w.PitchDeg }},
	{"zoom", "zoom", func(cf *cameraFlags) float64 { return cf.cam.Zoom }, func(w *wire.Camera) **float64 { return &w.Zoom }},
	{"width", "device.width_px", func(cf *cameraFlags) float64 { return cf.cam.Device.WidthPx }, func(w *wire.Camera) **float64 { return &device(w).WidthPx }},
	{"height", "device.height_px", func(cf *cameraFlags) float64 { return cf.cam.Device.HeightPx }, func(w *wire.Camera) **float64 { return &device(w).HeightPx }},
	{"fov-y", "device.fov_y_deg", func(cf *cameraFlags) float64 { return cf.cam.Device.FovYDeg }, func(w *wire.Camera) **float64 { return &device(w).FovYDeg }},
	{"tile", "device.tile_px", func(cf *cameraFlags) float64 { return float64(cf.tile) }, func(w *wire.Camera) **float64 { return &device(w).TilePx }},
	{"anchor-x", "device.anchor_x", func(cf *cameraFlags) float64 { return cf.cam.Device.AnchorX }, func(w *wire.Camera) **float64 { return &device(w).AnchorX }},
	{"anchor-y", "device.anchor_y", func(cf *cameraFlags) float64 { return cf.cam.Device.AnchorY }, func(w *wire.Camera) **float64 { return &device(w).AnchorY }},
	{"inset-top", "device.inset_top_px", func(cf *cameraFlags) float64 { return cf.cam.Device.InsetTopPx }, func(w *wire.Camera) **float64 { return &device(w).InsetTopPx }},
	{"inset-right", "device.inset_right_px", func(cf *cameraFlags) float64 { return cf.cam.Device.InsetRightPx }, func(w *wire.Camera) **float64 { return &device(w).InsetRightPx }},
	{"inset-bottom", "device.inset_bottom_px", func(cf *cameraFlags) float64 { return cf.cam.Device.InsetBottomPx }, func(w *wire.Camera) **float64 { return &device(w).InsetBottomPx }},
	{"inset-left", "device.inset_left_px", func(cf *cameraFlags) float64 { return cf.cam.Device.InsetLeftPx }, func(w *wire.Camera) **float64 { return &device(w).InsetLeftPx }},
	{"far-ratio", "device.far_ratio", func(cf *cameraFlags) float64 { return cf.cam.Device.FarRatio }, func(w *wire.Camera) **float64 { return &device(w).FarRatio }},
}

func device(w *wire.Camera) *wire.Device {
	if w.Device == nil {
		w.Device = &wire.Device{}
	}
	return w.Device
}

// cameraHelp is the paragraph every command with a camera adds to its help:
// where the camera comes from and which defaults apply.
func cameraHelp(atUser bool) string {
	first := `  - lat, lon, heading, pitch, zoom, width, height and fov-y: a file must
    give them (or flags must), as a camera object on the wire must; without
    --camera they default to a phone on the main street of Port Wren, an
    invented town, as the flags below show;`
	if atUser {
		first = `  - lat, lon and heading: unless a flag or the file gives them, the --user
    position and the route's heading where the user snaps to it;
  - pitch, zoom, width, height and fov-y: a file must give them (or flags
    must), as a camera object on the wire must; without --camera they
    default to a phone's, as the flags below show;`
	}
	return `

The camera comes from flags, or from --camera FILE (- for stdin): a JSON
camera object as on the wire (SPEC §6), bare or as the "camera" field of a
larger object, such as a request line or what footprint --json prints.
Flags given explicitly override the file. One set of defaults applies either
way:
` + first + `
  - tile, anchor-x, anchor-y, the insets and far-ratio: when neither the
    file nor a flag gives them, SPEC §2's defaults, the ones eval applies
    to the same object: 256-px tiles, the user at the centre (anchor 0.5,
    0.5), no insets, far ratio 10.`
}

func (cf *cameraFlags) register(cmd *cobra.Command) {
	cf.cam = defaultCamera()
	cf.tile = cf.cam.Device.TilePx
	c, d := &cf.cam, &cf.cam.Device
	latUse, lonUse, headingUse := "user latitude, WGS84 degrees", "user longitude, WGS84 degrees",
		"heading, degrees clockwise from true north, [0, 360)"
	if cf.atUser {
		// No number to show as the default: it is the user's place.
		c.LatDeg, c.LonDeg, c.HeadingDeg = 0, 0, 0
		latUse, lonUse = "camera latitude, WGS84 degrees (default: the --user latitude)",
			"camera longitude, WGS84 degrees (default: the --user longitude)"
		headingUse += " (default: the route's heading where the user snaps to it)"
	}
	cmd.Long += cameraHelp(cf.atUser)
	f := cmd.Flags()
	f.StringVar(&cf.file, "camera", "", "read the camera as a JSON object from `FILE` (- for stdin); flags override it")
	f.Float64Var(&c.LatDeg, "lat", c.LatDeg, latUse)
	f.Float64Var(&c.LonDeg, "lon", c.LonDeg, lonUse)
	f.Float64Var(&c.HeadingDeg, "heading", c.HeadingDeg, headingUse)
	f.Float64Var(&c.PitchDeg, "pitch", c.PitchDeg, "pitch, degrees from straight down, [0, 90)")
	f.Float64Var(&c.Zoom, "zoom", c.Zoom, "zoom level, [0, 30]")
	f.Float64Var(&d.WidthPx, "width", d.WidthPx, "screen width, logical pixels")
	f.Float64Var(&d.HeightPx, "height", d.HeightPx, "screen height, logical pixels")
	f.Float64Var(&d.FovYDeg, "fov-y", d.FovYDeg, "vertical field of view, degrees")
	f.IntVar(&cf.tile, "tile", cf.tile, "tile size in pixels, 256 or 512")
	f.Float64Var(&d.AnchorX, "anchor-x", d.AnchorX, "where the user appears, fraction of the width from the left")
	f.Float64Var(&d.AnchorY, "anchor-y", d.AnchorY, "where the user appears, fraction of the height from the top")
	f.Float64Var(&d.InsetTopPx, "inset-top", d.InsetTopPx, "screen pixels covered by UI at the top (default 0)")
	f.Float64Var(&d.InsetRightPx, "inset-right", d.InsetRightPx, "screen pixels covered by UI at the right (default 0)")
	f.Float64Var(&d.InsetBottomPx, "inset-bottom", d.InsetBottomPx, "screen pixels covered by UI at the bottom (default 0)")
	f.Float64Var(&d.InsetLeftPx, "inset-left", d.InsetLeftPx, "screen pixels covered by UI at the left (default 0)")
	f.Float64Var(&d.FarRatio, "far-ratio", d.FarRatio, "the view ends at depth far-ratio × focal length")
}

// given reports whether any camera input was given on the command line.
func (cf *cameraFlags) given(cmd *cobra.Command) bool {
	if cf.file != "" {
		return true
	}
	for _, f := range cameraFields {
		if cmd.Flags().Changed(f.flag) {
			return true
		}
	}
	return false
}

// cameraPlace is where a camera's lat, lon and heading default to when the
// command knows better than Port Wren (see cameraFlags.atUser).
type cameraPlace struct {
	LatDeg, LonDeg, HeadingDeg float64
}

// view returns the camera the flags (and --camera) describe, prepared.
// Input errors exit with code 2.
func (cf *cameraFlags) view(cmd *cobra.Command) (viewport.View, error) {
	return cf.viewAt(cmd, nil)
}

// viewAt is view with lat, lon and heading taken from at (when not nil)
// wherever neither a flag nor the file gives them. The camera is built as a
// wire camera object (the file's, or the defaults' required fields), the
// flags given explicitly are written over it, and the wire's own reading
// fills in SPEC §2's defaults: one path, one set of defaults.
func (cf *cameraFlags) viewAt(cmd *cobra.Command, at *cameraPlace) (viewport.View, error) {
	flags := cmd.Flags()
	if flags.Changed("tile") && cf.tile != 256 && cf.tile != 512 {
		return viewport.View{}, &exitError{2, fmt.Errorf("--tile %d: tile size must be 256 or 512", cf.tile)}
	}
	var w *wire.Camera
	if cf.file != "" {
		var err error
		if w, err = cf.readFile(cmd); err != nil {
			return viewport.View{}, &exitError{2, err}
		}
	} else {
		d := defaultCamera()
		w = &wire.Camera{Lat: &d.LatDeg, Lon: &d.LonDeg, HeadingDeg: &d.HeadingDeg, PitchDeg: &d.PitchDeg, Zoom: &d.Zoom,
			Device: &wire.Device{WidthPx: &d.Device.WidthPx, HeightPx: &d.Device.HeightPx, FovYDeg: &d.Device.FovYDeg}}
	}
	if at != nil {
		for _, p := range [...]struct {
			slot **float64
			v    float64
		}{{&w.Lat, at.LatDeg}, {&w.Lon, at.LonDeg}, {&w.HeadingDeg, at.HeadingDeg}} {
			if *p.slot == nil || cf.file == "" {
				v := p.v
				*p.slot = &v
			}
		}
	}
	for _, f := range cameraFields {
		if flags.Changed(f.flag) {
			v := f.value(cf)
			*f.slot(w) = &v
		}
	}
	c, err := w.Value("camera")
	if err != nil {
		// Only a file can leave a field out or give a bad tile size.
		return viewport.View{}, &exitError{2, fmt.Errorf("%s: %v", cf.fileName(), cf.withHint(err))}
	}
	v, err := viewport.Prepare(c)
	if err != nil {
		return viewport.View{}, &exitError{2, fmt.Errorf("invalid camera: %w", err)}
	}
	return v, nil
}

// withHint adds to a missing field's error the flags that could give it,
// and the keys of the file that look like it ("heading" for heading_deg:
// fields carry their units).
func (cf *cameraFlags) withHint(err error) error {
	var fe *spec.FieldError
	if !errors.As(err, &fe) || fe.Kind != spec.Missing {
		return err
	}
	path := strings.TrimPrefix(fe.Field, "camera.")
	if obj, name := cf.data, path; obj != nil {
		if dev, ok := strings.CutPrefix(path, "device."); ok {
			var f struct {
				Device json.RawMessage `json:"device"`
			}
			wire.Unmarshal(obj, &f)
			obj, name = f.Device, dev
		}
		if near := wire.NearKeys(obj, name); len(near) > 0 {
			err = fmt.Errorf("%w (the file has %q: keys are matched exactly and carry their units)", err, near[0])
		}
	}
	if path == "device" {
		return fmt.Errorf("%w; give it in the file, or give --width, --height and --fov-y", err)
	}
	for _, f := range cameraFields {
		if f.path == path {
			return fmt.Errorf("%w; give it in the file or with --%s", err, f.flag)
		}
	}
	return err
}

func (cf *cameraFlags) fileName() string {
	if cf.file == "-" {
		return "stdin"
	}
	return cf.file
}

func (cf *cameraFlags) readFile(cmd *cobra.Command) (*wire.Camera, error) {
	var data []byte
	var err error
	if cf.file == "-" {
		data, err = io.ReadAll(cmd.InOrStdin())
	} else {
		data, err = os.ReadFile(cf.file)
	}
	if err != nil {
		return nil, err
	}
	// A camera object, bare or as the "camera" field of a larger object (a
	// request line, what footprint --json prints). Either way the whole
	// file is decoded, so that an error's line and column are the file's.
	var fields map[string]json.RawMessage
	inner := false
	if wire.Unmarshal(data, &fields) == nil {
		_, inner = fields["camera"]
	}
	cf.data = data
	if inner {
		cf.data = fields["camera"]
	}
	var w wire.Camera
	var dst any = &w
	if inner {
		dst = &struct {
			Camera *wire.Camera `json:"camera"`
		}{&w}
	}
	if err := wire.Unmarshal(data, dst); err != nil {
		return nil, fmt.Errorf("%s: %v", cf.fileName(), describeJSONError(data, err))
	}
	return &w, nil
}

// describeJSONError adds the line and column to a JSON syntax error.
func describeJSONError(data []byte, err error) string {
	var se *jsontext.SyntacticError
	var te *jsonv2.SemanticError
	off := int64(-1)
	switch {
	case errors.As(err, &se):
		off = se.ByteOffset
	case errors.As(err, &te):
		off = te.ByteOffset
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
