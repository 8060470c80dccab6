// Package render draws what the map's screen sees, for people: the phone's
// heading-up screen as the reference computes it (ScreenSVG), a
// disagreement between the reference and another implementation on that
// screen (DisagreementSVG), one camera seen from above (CameraSVG), a whole
// drive as a self-contained HTML page with the map and the screen on one
// time slider (DriveHTML), and small line and bar charts for comparing rule
// sets.
//
// # The screen
//
// A screen picture draws the device at its pixel size: pixel (x, y) (origin
// top-left, y down, SPEC §2) at picture point (ox + x·k, oy + y·k), with k
// = 1 unless the screen's longer side exceeds 1280 px; the root states ox,
// oy and k (data-screen-origin-x, data-screen-origin-y, data-units-per-px)
// and the screen's size (data-width-px, data-height-px). Nothing on it is
// projected here: every pixel is the reference's (viewport.View.Project,
// ProjectMercator, Footprint, HorizonRowPx, FarRowPx, BindingEdge). Lines
// (streets, the route) are clipped on the ground before they are projected,
// to depths between the near limit (the depth of the ground seen just below
// the picture's bottom margin: depth is constant along a row) and the far
// limit k·f; depth is affine in the Mercator point, so the cut points are
// interpolated exactly. Markers are drawn at their pixels in one of four
// states: in view, outside the clear area, beyond the far limit (above the
// far-limit row), or behind the camera (no pixel: listed, not drawn); a
// marker off the screen is pinned to the margin around it, and one more
// than a screen's size away is counted and not drawn. Each marker's group
// carries its reference pixel (data-x, data-y) and state (data-state).
// Labels (a business's name where the data has one, else the id) are placed
// greedily where they overlap no other label or symbol, with a leader line
// when not beside their marker; a marker whose label finds no room keeps its
// name as a hover title.
//
// # The colour code
//
// One code for every picture, explained in each picture's legend. Colours
// are the Okabe–Ito set, which stays apart for the common colour-vision
// deficiencies, and no code is carried by colour alone:
//
//	early, earlier          bluish green #009e73, filled circle
//	mid                     orange #e69f00, filled square
//	late, later             vermillion #d55e00, filled triangle
//	never: crowded out      grey diamond, filled (in view at some tick, no slot)
//	never: never in view    grey diamond, hollow
//	the reference           blue #0072b2 (its pixel: a ring with a cross; the footprint's outline)
//	the other side          reddish purple #cc79a7 (its pixel: an ×; the compared rule set's dashed line)
//	ground in view          sky blue #56b4e9 fill
//	the deciding edge       black, thick and dashed
//	in view / not in view   filled / hollow slate dot (dashed outline: beyond the far limit)
//	shown (holds a slot)    a black halo
//	insets                  grey hatch; beyond the far limit: blue-grey hatch; sky: plain blue-grey
//
// In charts the first series is the reference's blue, solid, and the
// second the other side's purple, dashed; a bar with a Tone takes the
// bucket colours (a move to a later bucket in vermillion).
//
// # The picture frame
//
// Pictures are plan views, north up, in a local metric frame around the
// user: the Web Mercator plane (viewport.Mercator, metres, X east, Y north)
// mapped to picture units (SVG user units, x right, y down) by the affine
// map of a Frame,
//
//	x = OriginX + shortΔ(X − Center.X) · UnitsPerM
//	y = OriginY − (Y − Center.Y) · UnitsPerM
//
// where Center is the user's Mercator point (at the start of a drive),
// (OriginX, OriginY) is where the user is drawn and shortΔ takes the X
// difference the short way round the world, into [−πR, πR) (SPEC §1), so
// that ground across the antimeridian from the user is drawn beside it. Y
// is negated because picture y grows down while Mercator Y grows north.
// One picture unit spans 1/UnitsPerM Mercator metres, which is
// GroundScale/UnitsPerM ground metres (SPEC §1: Mercator metres × cos φ of
// the user's latitude); the scale bar is drawn in ground metres. Every
// picture states its frame on its root element (data-center-x-m,
// data-center-y-m, data-origin-x, data-origin-y, data-units-per-m,
// data-ground-scale), so a reader can map any Mercator point into it.
//
// Coordinates are written rounded to 1e-7 of a picture unit (far below
// anything a screen shows; tests compare within 1e-6).
//
// # What is drawn
//
// A camera picture (CameraSVG) shows the route as a polyline, the
// footprint (SPEC §2) as the polygon with id "footprint" (its vertices
// near-left, near-right, far-right, far-left, from
// viewport.Footprint.Mercator), the markers as symbols labelled with their
// ids where the labels fit, the user as an arrow turned to the heading, a
// north arrow, a scale bar of a round length in metres (1, 2 or 5 × 10ⁿ)
// and a legend. Markers are drawn by bucket (SPEC §5, in the colour code
// above) when buckets are given, and otherwise by whether the camera has
// them in view (a filled or a hollow slate dot). Markers outside the
// picture are counted in a note.
//
// A disagreement picture (DisagreementSVG) draws the screen of a request's
// camera with, for each point, the reference's pixel and the other
// implementation's joined by a line, and the edge of the in-view region
// that decides the reference's answer; `viewspec probe` writes one beside
// a project finding and `viewspec run --pictures` one for each of its
// worst failed project cases.
//
// A drive page (DriveHTML) records the drive timeline (SPEC §5) tick by tick
// with RecordDrive and draws the same kind of map for the whole drive (with
// the streets of WithStreets and the names of WithNames), beside it the
// screen view (svg#screen-view, its ids prefixed "screen-"), a slider
// (input#time) and a play button (button#play) that move the user, the
// footprint and the screen and highlight the markers shown at that tick,
// the readouts span#time-s (seconds, two decimals) and span#shown-count,
// zoom over time for one or two rule sets, under it the speed the rules
// were fed with their band edges and hysteresis bands (so that a zoom step
// can be read against the edge it crossed), pitch over time, each marker's
// intervals in view (an outline) and shown (filled) with the ticks where
// more markers are in view than the cap (svg#gantt-chart), and a table of
// the markers' timeline answers. Everything the page needs is inline: no
// scripts, styles, fonts or images are fetched. Its data is the JSON object
// in <script id="recording" type="application/json">:
//
//	{"tick_s", "horizon_s", "cap", "frame": {center_x_m, center_y_m,
//	 origin_x, origin_y, units_per_m, ground_scale},
//	 "markers": [{"id", "name", "style"}],
//	 "ticks": [{"t_s", "user": [x, y], "heading_deg", "zoom", "pitch_deg",
//	            "footprint": [[x, y] × 4] or null when empty,
//	            "shown": [marker ids, in slot order],
//	            "visible": [marker ids in view, in marker order],
//	            "speed_mps",
//	            "screen": {"route", "streets" (SVG paths), "footprint" (points),
//	                       "far_y", "horizon_y" (or null), "scale": [x0, x1, y, length_m],
//	                       "markers": [[index, x, y, state, pinned]]}}]}
//
// with user and footprint in picture units of the map's frame and the
// screen's data in picture units of the screen view (rounded to 0.01);
// state is 0 in view, 1 outside the clear area, 2 beyond the far limit.
//
// # Out of scope
//
// No base map or tiles are drawn; the screen view draws lines and points,
// not a rendered map style. A camera whose view wraps round the world
// (viewport.View.Wrapped, zoom 0–2) has no local frame and is refused.
package render
