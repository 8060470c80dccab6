package render

import (
	"strconv"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// Layout of a map picture, picture units: the map area is w×h at the
// top-left, the legend panel to its right.
const (
	defaultMapW = 640.0
	defaultMapH = 640.0
	panelW      = 330.0
	mapPad      = 28.0 // room around fitted content inside the map area
	legendRow   = 22.0
)

// mapArea is a map picture's geometry: the map area's size and its frame.
type mapArea struct {
	w, h  float64
	frame Frame
}

// inside reports whether the picture point (x, y) lies in the map area.
func (a *mapArea) inside(x, y float64) bool {
	return x >= 0 && x <= a.w && y >= 0 && y <= a.h
}

// frameAttrs are the root element's data attributes stating the frame.
func frameAttrs(f Frame) []string {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	return []string{
		"data-center-x-m", g(f.Center.X), "data-center-y-m", g(f.Center.Y),
		"data-origin-x", g(f.OriginX), "data-origin-y", g(f.OriginY),
		"data-units-per-m", g(f.UnitsPerM), "data-ground-scale", g(f.GroundScale),
	}
}

// openMap writes the map area's background and opens its clipped group.
func (w *writer) openMap(a *mapArea) {
	w.open("defs")
	w.open("clipPath", "id", "map-clip")
	w.empty("rect", "x", "0", "y", "0", "width", num(a.w), "height", num(a.h))
	w.close("clipPath")
	w.close("defs")
	w.empty("rect", "id", "map-area", "x", "0", "y", "0", "width", num(a.w), "height", num(a.h),
		"fill", "#f7f6f2", "stroke", colGrid)
	w.open("g", "id", "map", "clip-path", "url(#map-clip)")
	w.raw("\n")
}

// route writes the route as the polyline #route.
func (w *writer) route(a *mapArea, pts []orb.Point) {
	if len(pts) < 2 {
		return
	}
	xy := make([][2]float64, len(pts))
	for i, p := range pts {
		xy[i][0], xy[i][1] = a.frame.Point(viewport.ToMercator(p))
	}
	w.empty("polyline", "id", "route", "points", points(xy), "fill", "none", "stroke", colRoute,
		"stroke-width", "4", "stroke-linejoin", "round", "stroke-linecap", "round", "stroke-opacity", "0.7")
}

// footprintPoints returns the picture points of a footprint's vertices.
func footprintPoints(f Frame, fp *viewport.Footprint) [][2]float64 {
	xy := make([][2]float64, 4)
	for i, m := range fp.Mercator {
		xy[i][0], xy[i][1] = f.Point(m)
	}
	return xy
}

// footprint writes the polygon #footprint (empty points and the class
// "empty" when nothing is in view).
func (w *writer) footprint(a *mapArea, fp *viewport.Footprint) {
	pts, class := "", "empty"
	if !fp.Empty {
		pts, class = points(footprintPoints(a.frame, fp)), "footprint"
	}
	w.empty("polygon", "id", "footprint", "class", class, "points", pts,
		"fill", colFootprint, "fill-opacity", "0.22", "stroke", colReference, "stroke-width", "2", "stroke-linejoin", "round")
}

// markers writes each marker inside the map area as a group with its
// symbol, a hover title and a label (its name in names, or its id) where
// one fits without covering another label or symbol, styled by styleOf,
// and returns how many lie outside the map area. With shown not nil (a
// page), each marker also gets a halo that the page's style shows while
// the marker is shown, and the markers in shown start with the class
// "shown".
func (w *writer) markers(a *mapArea, ms []timeline.Marker, styleOf func(i int) markStyle, shown map[string]bool, names map[string]string) (outside int) {
	w.open("g", "id", "markers")
	w.raw("\n")
	type at struct {
		i    int
		x, y float64
	}
	var in []at
	var lb labeller
	for i, m := range ms {
		x, y := a.frame.Point(viewport.ToMercator(m.Point))
		if !a.inside(x, y) {
			outside++
			continue
		}
		in = append(in, at{i, x, y})
		lb.block(box{x - markR, y - markR, x + markR, y + markR})
	}
	lb.block(box{a.w - 46, 16, a.w - 10, 52})     // the north arrow
	lb.block(box{0, a.h - 40, 22 + 0.3*a.w, a.h}) // the scale bar
	spots := make(map[int]labelSpot, len(in))
	for _, p := range in {
		if s, ok := lb.place(nameOf(names, ms[p.i].ID), p.x, p.y, box{0, 0, a.w, a.h}); ok {
			spots[p.i] = s
		}
	}
	for _, p := range in {
		m := ms[p.i]
		s := styleOf(p.i)
		class := "marker " + s.class
		if shown[m.ID] {
			class += " shown"
		}
		w.open("g", "class", class, "data-id", m.ID, "transform", "translate("+num(p.x)+" "+num(p.y)+")")
		w.text("title", hoverText(names, m.ID, s.label))
		if shown != nil {
			w.empty("circle", "class", "halo", "r", "11", "fill", "none", "stroke", colUser, "stroke-width", "2.5")
		}
		w.symbolStyled(s)
		if sp, ok := spots[p.i]; ok {
			w.label(nameOf(names, m.ID), sp)
		}
		w.close("g")
	}
	w.close("g")
	return outside
}

// streets writes the streets as polylines in #streets, each with its name
// as a hover title.
func (w *writer) streets(a *mapArea, sts []Street) {
	if len(sts) == 0 {
		return
	}
	w.open("g", "id", "streets")
	for _, st := range sts {
		if len(st.Points) < 2 {
			continue
		}
		xy := make([][2]float64, len(st.Points))
		for i, p := range st.Points {
			xy[i][0], xy[i][1] = a.frame.Point(viewport.ToMercator(p))
		}
		w.open("polyline", "class", "street", "data-name", st.Name, "points", points(xy), "fill", "none", "stroke", colStreet,
			"stroke-width", "3", "stroke-linejoin", "round", "stroke-linecap", "round")
		w.text("title", st.Name)
		w.close("polyline")
	}
	w.close("g")
}

// userPath is the user's arrow, pointing up (north) before it is turned.
const userPath = "M0,-11 L8,8 L0,3 L-8,8 Z"

// userTransform places the user's arrow at (x, y), turned by the heading:
// SVG's rotate turns clockwise on a y-down picture, as headings turn from
// north.
func userTransform(x, y, headingDeg float64) string {
	return "translate(" + num(x) + " " + num(y) + ") rotate(" + num(headingDeg) + ")"
}

// user writes the user's arrow as #user.
func (w *writer) user(x, y, headingDeg float64) {
	w.open("g", "id", "user", "transform", userTransform(x, y, headingDeg))
	w.empty("path", "d", userPath, "fill", colUser, "stroke", colPaper, "stroke-width", "2", "stroke-linejoin", "round")
	w.close("g")
}

// northArrow writes #north-arrow in the map area's top-right corner.
func (w *writer) northArrow(a *mapArea) {
	w.open("g", "id", "north-arrow", "transform", "translate("+num(a.w-28)+" 34)")
	w.empty("circle", "r", "17", "fill", colPaper, "fill-opacity", "0.85", "stroke", colGrid)
	w.empty("path", "d", "M0,-13 L6,6 L0,2 L-6,6 Z", "fill", colInk)
	w.text("text", "N", "x", "0", "y", "15", "font-size", "9", "font-family", "sans-serif",
		"text-anchor", "middle", "font-weight", "bold", "fill", colInk)
	w.close("g")
}

// scaleBar writes #scale-bar in the map area's bottom-left corner: a round
// ground length (RoundLengthM) no longer than 30 % of the map's width,
// drawn at the frame's scale. Its group states the length in
// data-length-m and its line #scale-bar-line runs from x1 to x2.
func (w *writer) scaleBar(a *mapArea) {
	perM := a.frame.UnitsPerGroundM()
	lengthM := RoundLengthM(0.3 * a.w / perM)
	x0, y0 := 16.0, a.h-18
	x1 := x0 + lengthM*perM
	w.open("g", "id", "scale-bar", "data-length-m", strconv.FormatFloat(lengthM, 'g', -1, 64))
	w.empty("rect", "x", num(x0-6), "y", num(y0-20), "width", num(x1-x0+12), "height", "28",
		"fill", colPaper, "fill-opacity", "0.85")
	w.empty("line", "id", "scale-bar-line", "x1", num(x0), "y1", num(y0), "x2", num(x1), "y2", num(y0),
		"stroke", colInk, "stroke-width", "2")
	for _, x := range [2]float64{x0, x1} {
		w.empty("line", "x1", num(x), "y1", num(y0-5), "x2", num(x), "y2", num(y0+3), "stroke", colInk, "stroke-width", "2")
	}
	w.text("text", lengthLabel(lengthM), "x", num((x0+x1)/2), "y", num(y0-7), "font-size", "11",
		"font-family", "sans-serif", "text-anchor", "middle", "fill", colInk)
	w.close("g")
}

// legendItem is one legend row: a sample drawn by draw at the row's
// origin, and its text.
type legendItem struct {
	class string
	text  string
	draw  func(w *writer)
}

func markerItem(s markStyle) legendItem {
	return legendItem{"legend-" + s.class, s.label, func(w *writer) { w.symbol(s.shape, s.fill, s.stroke) }}
}

var (
	footprintItem = legendItem{"legend-footprint", "footprint (ground in view)", func(w *writer) {
		w.empty("polygon", "points", "-7,6 7,6 10,-6 -10,-6", "fill", colFootprint, "fill-opacity", "0.3",
			"stroke", colReference, "stroke-width", "2")
	}}
	routeItem = legendItem{"legend-route", "route", func(w *writer) {
		w.empty("line", "x1", "-10", "y1", "0", "x2", "10", "y2", "0", "stroke", colRoute, "stroke-width", "4", "stroke-opacity", "0.7")
	}}
	userItem = legendItem{"legend-user", "user, arrow on the heading", func(w *writer) {
		w.empty("path", "d", userPath, "transform", "scale(0.8)", "fill", colUser)
	}}
)

// legend writes #legend at (x0, y0) with a title and one row per item.
func (w *writer) legend(x0, y0 float64, title string, items []legendItem) {
	w.legendAs("legend", x0, y0, title, items)
}

// legendAs writes a legend as legend does, with the element id id.
func (w *writer) legendAs(id string, x0, y0 float64, title string, items []legendItem) {
	w.open("g", "id", id, "transform", "translate("+num(x0)+" "+num(y0)+")")
	w.text("text", title, "x", "0", "y", "0", "font-size", "13", "font-weight", "bold", "font-family", "sans-serif", "fill", colInk)
	for i, it := range items {
		y := 22 + float64(i)*legendRow
		w.open("g", "class", "legend-item "+it.class, "transform", "translate(12 "+num(y)+")")
		it.draw(w)
		w.text("text", it.text, "x", "20", "y", "4", "font-size", "11", "font-family", "sans-serif", "fill", colInk)
		w.close("g")
	}
	w.close("g")
}
