// Package geofile reads the files people keep routes and markers in: a
// route from GeoJSON or GPX 1.1, markers from GeoJSON or CSV. Positions
// come out as WGS84 [lon, lat] degrees, speeds in m/s.
//
// A bad file is a *FileError naming the file, the line (GPX, CSV, and
// GeoJSON, where it is the line of the offending value), the feature
// index in a GeoJSON collection, the field, the value as written and
// what is wrong with it. Nothing is filled in, clamped or guessed: a
// reader never returns a NaN or infinite number or a position out of
// range, and never panics on any input (FuzzReadFiles). A UTF-8 byte
// order mark at the start of any file is skipped.
//
// ReadRoute reads:
//   - GeoJSON (RFC 7946): a LineString, a Feature with one, or a
//     FeatureCollection holding exactly one LineString feature, with
//     speeds in properties.speed_mps (one number, or one per segment).
//     Every position is an array of two or more finite numbers,
//     [lon, lat] and an altitude and further elements that are not used;
//     a null, a short array, a string or a number beyond the double
//     range (1e400) is an error naming the coordinate's index. A key
//     given twice in one object is an error.
//   - GPX 1.1 (gpx.xsd): the first track with points (all its segments in
//     order) or, without one, the first route with points. Elements are
//     judged by where they are: gpx is the root, wpt, rte, trk and
//     metadata sit in gpx, rtept in rte, trkseg in trk, trkpt in trkseg;
//     any of them elsewhere (an rte in a trkpt, a trkpt straight in a trk)
//     is an error naming its line. A point's time is its own time child
//     (at most one); a time elsewhere (metadata, a waypoint) is not read.
//     Extensions and elements of other namespaces are skipped whole.
//     Every point of the file is checked, those of unused tracks too.
//     Speeds come from the times when every chosen point has one: a
//     segment's WGS84 length over its time. Times must not go back, and
//     two points at one time must be at one position (else the speed
//     would be infinite); either is an error naming the later point's
//     line. A point repeated at the same position is a stop (or, at the
//     same time, a duplicate): a zero-length segment, which the route
//     drops with its speed; the route has no dwell, so the drive does not
//     include the time stopped.
//
// ReadMarkers reads:
//   - GeoJSON: a FeatureCollection of Point features with properties.id
//     (a non-empty string, or a whole number) and properties.priority
//     (a number; 0 when absent or null); other properties are not read.
//   - CSV: without a header line, the columns are id,lat,lon[,priority]
//     (latitude first, as people write a position). A first line naming
//     any of id, lat, lon, priority (case aside) is a header, and the
//     columns are read by its names, in any order: it must name id, lat
//     and lon, and may name priority; any other column is refused, not
//     ignored, so that a misspelt column is an error rather than a value
//     silently dropped. A line may leave out a trailing priority, and an
//     empty priority is 0. Lines starting with # are comments.
//
// Ids must be unique in a marker file.
package geofile
