package render

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// CameraFrame returns the frame CameraSVG draws v in: centred on the user,
// fitted to the footprint and the user (or at the scale of WithSpanM), in
// the map area of WithMapSize. It fails for a view that wraps round the
// world.
func CameraFrame(v *viewport.View, opts ...Option) (Frame, error) {
	s, err := newSettings(opts)
	if err != nil {
		return Frame{}, err
	}
	a, _, err := cameraArea(v, &s)
	return a.frame, err
}

func cameraArea(v *viewport.View, s *settings) (mapArea, viewport.Footprint, error) {
	if v.Wrapped() {
		return mapArea{}, viewport.Footprint{}, errWrapped
	}
	fp := v.Footprint()
	user := v.UserMercator()
	pts := []viewport.Mercator{user}
	if !fp.Empty {
		pts = append(pts, fp.Mercator[:]...)
	}
	g := viewport.GroundScale(v.Camera().LatDeg)
	f := fitFrame(user, g, pts, s.mapW, s.mapH, mapPad, s.spanGroundM)
	return mapArea{w: s.mapW, h: s.mapH, frame: f}, fp, nil
}

// checkPoints reports the first point outside [−90, 90] latitude or
// [−180, 180] longitude (NaN included), naming it what[i].
func checkPoints(what string, n int, at func(i int) orb.Point) error {
	for i := range n {
		p := at(i)
		if !(p[1] >= -90 && p[1] <= 90 && p[0] >= -180 && p[0] <= 180) {
			return fmt.Errorf("render: %s[%d] = [%g, %g] (lon, lat): out of range", what, i, p[0], p[1])
		}
	}
	return nil
}

// CameraSVG returns an SVG picture (UTF-8 XML) of the camera v seen from
// above, north up, in the frame of CameraFrame: the route (a polyline of
// [lon, lat] degree points; may be empty), the footprint as the polygon
// #footprint, the markers labelled with their ids, the user's arrow on the
// heading, a north arrow, a scale bar in metres and a legend. Markers are
// drawn by their bucket in buckets (by id) when buckets is not nil, else by
// whether v has them in view. Markers outside the map area are counted in a
// note instead of drawn.
func CameraSVG(v *viewport.View, route []orb.Point, markers []timeline.Marker, buckets map[string]timeline.Bucket, opts ...Option) ([]byte, error) {
	s, err := newSettings(opts)
	if err != nil {
		return nil, err
	}
	if err := checkPoints("route", len(route), func(i int) orb.Point { return route[i] }); err != nil {
		return nil, err
	}
	if err := checkPoints("markers", len(markers), func(i int) orb.Point { return markers[i].Point }); err != nil {
		return nil, err
	}
	a, fp, err := cameraArea(v, &s)
	if err != nil {
		return nil, err
	}
	cam := v.Camera()
	title := s.title
	if title == "" {
		title = fmt.Sprintf("Camera at %s, heading %g°, pitch %g°, zoom %g", latLonText(cam.User()), cam.HeadingDeg, cam.PitchDeg, cam.Zoom)
	}

	// Styles and the legend.
	styleOf := func(i int) markStyle {
		if v.Project(markers[i].Point).InView() {
			return styleIn
		}
		return styleOut
	}
	items := []legendItem{footprintItem}
	if len(route) >= 2 {
		items = append(items, routeItem)
	}
	items = append(items, userItem)
	if buckets != nil {
		styleOf = func(i int) markStyle {
			if b, ok := buckets[markers[i].ID]; ok {
				return bucketStyle(b)
			}
			return styleNoneBk
		}
		for _, st := range bucketStyles {
			items = append(items, markerItem(st))
		}
		for _, m := range markers {
			if _, ok := buckets[m.ID]; !ok {
				items = append(items, markerItem(styleNoneBk))
				break
			}
		}
	} else if len(markers) > 0 {
		items = append(items, markerItem(styleIn), markerItem(styleOut))
	}

	var w writer
	width := a.w + panelW
	legendH := 30 + float64(len(items)+1)*legendRow
	height := max(a.h, legendH+150)
	w.raw(`<?xml version="1.0" encoding="UTF-8"?>` + "\n")
	w.open("svg", append([]string{"xmlns", svgNS, "width", num(width), "height", num(height),
		"viewBox", "0 0 " + num(width) + " " + num(height), "id", "camera"}, frameAttrs(a.frame)...)...)
	w.raw("\n")
	w.text("title", title)
	w.empty("rect", "x", "0", "y", "0", "width", num(width), "height", num(height), "fill", colPaper)
	w.openMap(&a)
	w.route(&a, route)
	w.footprint(&a, &fp)
	outside := w.markers(&a, markers, styleOf, nil, nil)
	ux, uy := a.frame.Point(v.UserMercator())
	w.user(ux, uy, cam.HeadingDeg)
	w.close("g")
	w.northArrow(&a)
	w.scaleBar(&a)

	w.legend(a.w+20, 30, "Legend", items)
	lines := []string{
		"user " + latLonText(cam.User()),
		fmt.Sprintf("heading %g°, pitch %g°, zoom %g", cam.HeadingDeg, cam.PitchDeg, cam.Zoom),
	}
	if fp.Empty {
		lines = append(lines, "footprint empty: nothing in view")
	} else {
		lines = append(lines, fmt.Sprintf("footprint %s, reaching %s", areaText(fp.AreaM2), lengthText(fp.VisibleRadiusM)))
	}
	if len(markers) > 0 {
		lines = append(lines, fmt.Sprintf("%d of %d markers outside the picture", outside, len(markers)))
	}
	w.caption(a.w+20, legendH+30, lines)
	w.close("svg")
	return w.b.Bytes(), nil
}

// caption writes #caption: lines of text from (x0, y0) down.
func (w *writer) caption(x0, y0 float64, lines []string) {
	w.open("g", "id", "caption", "font-size", "11", "font-family", "sans-serif", "fill", colInk)
	for i, l := range lines {
		w.text("text", l, "x", num(x0), "y", num(y0+float64(i)*16))
	}
	w.close("g")
}

// latLonText writes p ([lon, lat] degrees) as "44.93120° N, 31.17040° W".
func latLonText(p orb.Point) string {
	ns, ew := "N", "E"
	if p[1] < 0 {
		ns = "S"
	}
	if p[0] < 0 {
		ew = "W"
	}
	return fmt.Sprintf("%.5f° %s, %.5f° %s", math.Abs(p[1]), ns, math.Abs(p[0]), ew)
}

// lengthText writes a ground length in m or km.
func lengthText(m float64) string {
	if m >= 1000 {
		return fmt.Sprintf("%.2f km", m/1000)
	}
	return fmt.Sprintf("%.0f m", m)
}

// areaText writes a ground area in m² or km².
func areaText(m2 float64) string {
	if m2 >= 1e6 {
		return fmt.Sprintf("%.2f km²", m2/1e6)
	}
	return fmt.Sprintf("%.0f m²", m2)
}
