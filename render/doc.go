// Package render draws what the map's screen sees, for people: one camera
// seen from above as an SVG picture, a whole drive as a self-contained HTML
// page with a time slider, and small line and bar charts for comparing rule
// sets.
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
// viewport.Footprint.Mercator), the markers as symbols with their ids as
// labels, the user as an arrow turned to the heading, a north arrow, a scale
// bar of a round length in metres (1, 2 or 5 × 10ⁿ) and a legend. Markers
// are drawn by bucket (SPEC §5) when buckets are given:
//
//	early   green circle
//	mid     amber square
//	late    red triangle
//	never   grey hollow diamond
//
// and otherwise by whether the camera has them in view (a filled or a
// hollow slate dot). Markers outside the picture are counted in a note.
//
// A drive page (DriveHTML) records the drive timeline (SPEC §5) tick by tick
// with RecordDrive and draws the same kind of map for the whole drive, a
// slider (input#time) that moves the user and the footprint and highlights
// the markers shown at that tick, the readouts span#time-s (seconds, two
// decimals) and span#shown-count, zoom and pitch over time for one or two
// rule sets, and a table of the markers' timeline answers. Everything the
// page needs is inline: no scripts, styles, fonts or images are fetched.
// Its data is the JSON object in <script id="recording"
// type="application/json">:
//
//	{"tick_s", "horizon_s", "cap", "frame": {center_x_m, center_y_m,
//	 origin_x, origin_y, units_per_m, ground_scale},
//	 "ticks": [{"t_s", "user": [x, y], "heading_deg", "zoom", "pitch_deg",
//	            "footprint": [[x, y] × 4] or null when empty,
//	            "shown": [marker ids, in slot order]}]}
//
// with user and footprint in picture units of that frame.
//
// # Out of scope
//
// No base map or tiles are drawn, and nothing is drawn as the screen itself
// would (the pictures are plan views of the ground). A camera whose view
// wraps round the world (viewport.View.Wrapped, zoom 0–2) has no local
// frame and is refused.
package render
