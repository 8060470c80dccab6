// Package timeline is the drive timeline of SPEC §5: a vehicle drives a
// route (package routes) at its segment speeds, the heading-up camera
// follows it tick by tick with the zoom and pitch a rule set gives (package
// rules), and markers come into view (viewport.Tracker) and are given one
// of cap slots by priority. Compute says, for each marker, when it was
// first visible and first shown, for how long, and its bucket (early, mid,
// late, never), with the decision margins of the bucket and of the first
// showing.
//
// Conventions: times are seconds from the start (t = k·tick), distances
// metres along the route, positions WGS84 [lon, lat] degrees, headings
// degrees clockwise from north. Motion is exact in time; the heading turns
// toward the current segment's bearing by at most max_turn_rate·tick.
package timeline
