package wire

import (
	"encoding/json"

	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
)

// SpecVersion names the version of the geometry the wire speaks for.
const SpecVersion = spec.Version

// Request is one line of the wire: an op, an optional id echoed in the
// answer, and the op's inputs. Fields an op does not use are ignored.
type Request struct {
	Op     string          `json:"op"`
	ID     json.RawMessage `json:"id,omitempty"`
	Camera *Camera         `json:"camera,omitempty"`
	Points []*Point        `json:"points,omitempty"`
	Pixels []*Pixel        `json:"pixels,omitempty"`

	// metrics (and timeline)
	Route   *Route    `json:"route,omitempty"`
	User    *Point    `json:"user,omitempty"`
	Markers []*Marker `json:"markers,omitempty"`

	// zoom (and timeline)
	Rules   *Rules    `json:"rules,omitempty"`
	Samples []*Sample `json:"samples,omitempty"`

	// timeline
	Device       *Device    `json:"device,omitempty"`
	StartAlongM  *float64   `json:"start_along_m,omitempty"`
	HorizonS     *float64   `json:"horizon_s,omitempty"`
	TickS        *float64   `json:"tick_s,omitempty"`
	Cap          *float64   `json:"cap,omitempty"`
	BucketEdgesS []*float64 `json:"bucket_edges_s,omitempty"`
	// Trace asks the reference for its state at every tick (SPEC §5), for
	// finding where a timeline parts from it.
	Trace *bool `json:"trace,omitempty"`
	// Fixes, instead of a route, drive the timeline through recorded
	// positions (SPEC §5).
	Fixes []*Fix `json:"fixes,omitempty"`

	// opEmpty is set by DecodeRequest when the line's op is "" (see
	// OpGiven).
	opEmpty bool
}

// Fix is one recorded position: seconds after the drive's start, and
// where.
type Fix struct {
	TS  *float64 `json:"t_s"`
	Lat *float64 `json:"lat"`
	Lon *float64 `json:"lon"`
}

// Sample is one sample of the zoom op: a time, a speed and the
// distance to the next turn (null or absent when there is none).
type Sample struct {
	TS        *float64 `json:"t_s"`
	SpeedMps  *float64 `json:"speed_mps"`
	TurnDistM *float64 `json:"turn_dist_m"`
}

// ZoomAnswer answers op zoom: the zoom and pitch at each sample.
type ZoomAnswer struct {
	Head
	Zoom     []float64 `json:"zoom"`
	PitchDeg []float64 `json:"pitch_deg"`
}

// MarkerTimeline is one marker's line of the drive timeline (SPEC §5):
// first_visible_s and first_shown_s are null when never. The reference
// adds its decision margins: bucket_margin_s (seconds from the first-shown
// time to the nearest bucket edge or the horizon) and first_shown_margin_px
// (how near, in pixels, the first showing came to going the other way).
type MarkerTimeline struct {
	ID                 string   `json:"id"`
	FirstVisibleS      *float64 `json:"first_visible_s"`
	FirstShownS        *float64 `json:"first_shown_s"`
	ShownS             float64  `json:"shown_s"`
	Bucket             string   `json:"bucket"`
	BucketMarginS      *float64 `json:"bucket_margin_s,omitempty"`
	FirstShownMarginPx *float64 `json:"first_shown_margin_px,omitempty"`
	// TurnMarginDeg is present when the drive limited a turn before the
	// marker's outcome was decided: how near that turn came to going the
	// other way round (SPEC §3), degrees.
	TurnMarginDeg *float64 `json:"turn_margin_deg,omitempty"`
}

// TimelineAnswer answers op timeline: one line per marker, in the order
// given.
type TimelineAnswer struct {
	Head
	Markers []MarkerTimeline `json:"markers"`
	// Ticks is the reference's per-tick trace, when the request asked for
	// it.
	Ticks []timeline.Tick `json:"ticks,omitempty"`
}

// Point is a geographic point, WGS84 degrees. Fields are pointers so that
// a missing one is told from a zero.
type Point struct {
	Lat *float64 `json:"lat"`
	Lon *float64 `json:"lon"`
}

// Pixel is a screen pixel: origin top-left, x right, y down.
type Pixel struct {
	X *float64 `json:"x"`
	Y *float64 `json:"y"`
}

// Camera is the camera object of SPEC §6.
type Camera struct {
	Lat        *float64 `json:"lat"`
	Lon        *float64 `json:"lon"`
	HeadingDeg *float64 `json:"heading_deg"`
	PitchDeg   *float64 `json:"pitch_deg"`
	Zoom       *float64 `json:"zoom"`
	Device     *Device  `json:"device"`
}

// Device is the device object of SPEC §2: width_px, height_px and
// fov_y_deg are required; the rest default to 256-px tiles, the anchor at the
// centre, no insets and far ratio 10.
type Device struct {
	WidthPx       *float64 `json:"width_px"`
	HeightPx      *float64 `json:"height_px"`
	FovYDeg       *float64 `json:"fov_y_deg"`
	TilePx        *float64 `json:"tile_px,omitempty"`
	AnchorX       *float64 `json:"anchor_x,omitempty"`
	AnchorY       *float64 `json:"anchor_y,omitempty"`
	InsetTopPx    *float64 `json:"inset_top_px,omitempty"`
	InsetRightPx  *float64 `json:"inset_right_px,omitempty"`
	InsetBottomPx *float64 `json:"inset_bottom_px,omitempty"`
	InsetLeftPx   *float64 `json:"inset_left_px,omitempty"`
	FarRatio      *float64 `json:"far_ratio,omitempty"`
}

// Head is the part every answer shares: the request's id, echoed.
type Head struct {
	ID json.RawMessage `json:"id,omitempty"`
}

// ErrorAnswer is the answer to a line that could not be answered; the
// stream goes on after it.
type ErrorAnswer struct {
	Head
	Error ErrorBody `json:"error"`
}

// ErrorBody says what was wrong: a code from the list below and a message
// naming the line and the field.
type ErrorBody struct {
	Code    string `json:"code"`
	Message string `json:"message"`
}

// Error codes on the wire.
const (
	CodeMalformed   = "malformed_json" // the line is not a JSON object
	CodeBadType     = "bad_type"       // a field has the wrong JSON type
	CodeMissing     = "missing_field"  // a required field is absent or null
	CodeInvalid     = "invalid_value"  // a value is out of its range
	CodeUnknownOp   = "unknown_op"     // op is not one this implementation speaks
	CodeLineTooLong = "line_too_long"  // the line exceeds the reader's limit
)

// HelloAnswer answers op hello.
type HelloAnswer struct {
	Head
	Spec string   `json:"spec"`
	Ops  []string `json:"ops"`
}

// Screen is one projected point. The reference adds margin_px, the
// signed distance in pixels to the nearest clear-area edge or far row,
// positive inside.
type Screen struct {
	X        float64  `json:"x"`
	Y        float64  `json:"y"`
	Depth    float64  `json:"depth"`
	InView   bool     `json:"in_view"`
	MarginPx *float64 `json:"margin_px,omitempty"`
}

// ProjectAnswer answers op project: one entry per point, null for a point at
// or behind the camera plane.
type ProjectAnswer struct {
	Head
	Screen []*Screen `json:"screen"`
}

// LatLon is a geographic point in an answer.
type LatLon struct {
	Lat float64 `json:"lat"`
	Lon float64 `json:"lon"`
}

// UnprojectAnswer answers op unproject: one entry per pixel, null for a
// pixel at or above the horizon.
type UnprojectAnswer struct {
	Head
	Points []*LatLon `json:"points"`
}

// FootprintAnswer answers op footprint: the vertices near-left, near-right,
// far-right, far-left (none when the clear area lies wholly beyond the far
// limit), the area in square metres and the visible radius in metres.
type FootprintAnswer struct {
	Head
	Vertices       []LatLon `json:"vertices"`
	AreaM2         float64  `json:"area_m2"`
	VisibleRadiusM float64  `json:"visible_radius_m"`
}

// Route is a route on the wire: at least two points and either one
// speed for every segment or one per segment as given (entries of
// zero-length segments are ignored), in m/s.
type Route struct {
	Points   []*Point        `json:"points"`
	SpeedMps json.RawMessage `json:"speed_mps"`
}

// Marker is a marker on the wire: an id (a string, compared byte by
// byte), a position and, for the timeline, a priority (higher first).
type Marker struct {
	ID       *string  `json:"id"`
	Lat      *float64 `json:"lat"`
	Lon      *float64 `json:"lon"`
	Priority *float64 `json:"priority,omitempty"`
}

// MarkerMetrics is one marker's metrics (SPEC §4). along_m and eta_s
// are null when the route ends before the marker's nearest stretch;
// view_dist_m is present only when the request has a camera, null when its
// footprint is empty. The reference adds side_margin_m: how far in metres
// the side decision is from flipping.
type MarkerMetrics struct {
	ID         string   `json:"id"`
	UserDistM  float64  `json:"user_dist_m"`
	RouteDistM float64  `json:"route_dist_m"`
	AlongM     *float64 `json:"along_m"`
	EtaS       *float64 `json:"eta_s"`
	Side       string   `json:"side"`
	// ViewDistM is a number, null (a camera with an empty footprint) or
	// absent (no camera).
	ViewDistM   json.RawMessage `json:"view_dist_m,omitempty"`
	SideMarginM *float64        `json:"side_margin_m,omitempty"`
}

// MetricsAnswer answers op metrics: one entry per marker, in the order
// given.
type MetricsAnswer struct {
	Head
	Markers []MarkerMetrics `json:"markers"`
}

// HorizonAnswer answers op horizon: the screen row (y, pixels, down) of
// the horizon, above which no ground is seen, and of the far limit, above
// which ground lies beyond k·f; each null at pitch 0, where neither row
// exists.
type HorizonAnswer struct {
	Head
	HorizonRowPx *float64 `json:"horizon_row_px"`
	FarRowPx     *float64 `json:"far_row_px"`
}
