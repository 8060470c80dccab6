package render

import (
	"math"
	"strconv"

	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// screenIDPrefix prefixes the ids of a page's screen view, so that they do
// not meet the map's.
const screenIDPrefix = "screen-"

// pageScreen is one tick of a page's screen view, in picture units of the
// screen layout (pixel (x, y) at (ox + x·k, oy + y·k)), rounded to 0.01.
type pageScreen struct {
	// Route and Streets are SVG paths, clipped on the ground at the near
	// and far limits and projected by the reference.
	Route   string `json:"route"`
	Streets string `json:"streets"`
	// Footprint is the projected footprint's points, "" when empty.
	Footprint string `json:"footprint"`
	// FarY and HorizonY are the rows' picture y, null off the screen.
	FarY     *float64 `json:"far_y"`
	HorizonY *float64 `json:"horizon_y"`
	// Markers are [marker index, x, y, state, pinned] for each marker
	// within a screen's size of the screen: state 0 in view, 1 outside
	// the clear area, 2 beyond the far limit; pinned 1 when (x, y) is
	// clamped into the margin.
	Markers [][5]float64 `json:"markers"`
	// Scale is the scale bar on the user's row: [x0, x1, y, length_m], or
	// null when none fits.
	Scale *[4]float64 `json:"scale"`
}

// stateCodes number the marker states in a page's screen data.
var stateCodes = map[string]float64{stateInView: 0, stateOutsideClear: 1, stateBeyondFar: 2}

// round2 rounds v to 0.01 of a picture unit (a hundredth of a pixel at
// the page's scale), enough for a screen and a third of the bytes of 1e-7.
func round2(v float64) float64 {
	r := math.Round(v*100) / 100
	if r == 0 {
		return 0
	}
	return r
}

// pathOf2 writes pixel polylines as an SVG path rounded to 0.01.
func (l *screenLayout) pathOf2(lines [][]viewport.Pixel, b []byte) []byte {
	for _, line := range lines {
		for j, p := range line {
			x, y := l.at(p.X, p.Y)
			if len(b) > 0 {
				b = append(b, ' ')
			}
			if j == 0 {
				b = append(b, 'M')
			} else {
				b = append(b, 'L')
			}
			b = strconv.AppendFloat(b, round2(x), 'f', -1, 64)
			b = append(b, ' ')
			b = strconv.AppendFloat(b, round2(y), 'f', -1, 64)
		}
	}
	return b
}

// screenTick returns the page's screen view of the view v: what ScreenSVG
// draws that changes from tick to tick.
func screenTick(v *viewport.View, streets []Street, route []Street, ms []viewport.Mercator) pageScreen {
	l := newScreenLayout(v)
	near, far := l.depthLimits()
	var ps pageScreen
	var b []byte
	for _, st := range route {
		b = l.pathOf2(l.screenLines(st.Points, near, far), b)
	}
	ps.Route = string(b)
	b = b[:0]
	for _, st := range streets {
		b = l.pathOf2(l.screenLines(st.Points, near, far), b)
	}
	ps.Streets = string(b)
	if fp := v.Footprint(); !fp.Empty {
		xy := make([][2]float64, 4)
		for i, m := range fp.Mercator {
			sp := v.ProjectMercator(m)
			x, y := l.at(sp.X, sp.Y)
			xy[i] = [2]float64{round2(x), round2(y)}
		}
		ps.Footprint = points(xy)
	}
	row := func(r float64, ok bool) *float64 {
		if !ok || !(r >= 0 && r <= l.h) {
			return nil
		}
		_, y := l.at(0, r)
		y = round2(y)
		return &y
	}
	ps.FarY = row(v.FarRowPx(), true)
	ps.HorizonY = row(v.HorizonRowPx())
	ps.Markers = [][5]float64{}
	for i, m := range ms {
		sp := v.ProjectMercator(m)
		st := markerState(v, sp)
		if st == stateBehind || sp.X < -l.w || sp.X > 2*l.w || sp.Y < -l.h || sp.Y > 2*l.h {
			continue
		}
		q, pinned := l.pinned(sp.Pixel())
		x, y := l.at(q.X, q.Y)
		pf := 0.0
		if pinned {
			pf = 1
		}
		ps.Markers = append(ps.Markers, [5]float64{float64(i), round2(x), round2(y), stateCodes[st], pf})
	}
	if px0, px1, r, lengthM := l.scaleGeom(); lengthM > 0 {
		x0, y := l.at(px0, r)
		x1, _ := l.at(px1, r)
		ps.Scale = &[4]float64{round2(x0), round2(x1), round2(y), lengthM}
	}
	return ps
}

// screenPanel writes the page's screen view (svg#screen-view) at tick 0:
// the device with its insets, clear area, rows, footprint, streets and
// route; an empty marker layer the page's script fills at every tick; the
// anchor and the user, the north arrow and the scale bar; and a legend
// under the device.
func (w *writer) screenPanel(v *viewport.View, first pageScreen, styles []markStyle) {
	l := newScreenLayout(v)
	l.prefix = screenIDPrefix
	items := screenLegendItems()
	items = append(items, streetItem, routeItem)
	for _, st := range resultStyles {
		items = append(items, markerItem(st))
	}
	items = append(items,
		legendItem{"legend-not-in-view", "faded: not in view at this tick", func(w *writer) {
			w.empty("circle", "r", "4.5", "fill", colSlate, "opacity", "0.35")
		}},
		shownItem, pinnedItem, northItem)
	sw, sh := l.w*l.k+2*screenGutter, l.h*l.k+2*screenGutter
	width := max(sw, 360)
	height := sh + 40 + float64(len(items)+1)*legendRow
	w.open("svg", append([]string{"id", "screen-view", "width", num(width), "height", num(height),
		"viewBox", "0 0 " + num(width) + " " + num(height)}, screenAttrs(&l)...)...)
	w.raw("\n")
	w.text("title", "The phone's screen, heading up, as the reference computes it")
	w.empty("rect", "x", "0", "y", "0", "width", num(width), "height", num(height), "fill", colPaper)
	w.screenDefs(&l)
	w.open("defs")
	for _, st := range resultStyles {
		w.open("g", "id", "sym-"+symKey(st))
		w.symbolStyled(st)
		w.close("g")
	}
	w.close("defs")
	w.screenBase(&l)
	w.empty("polygon", "id", l.id("footprint"), "points", first.Footprint, "fill", colFootprint, "fill-opacity", "0.16",
		"stroke", colReference, "stroke-width", "1.5", "stroke-linejoin", "round")
	w.empty("path", "id", l.id("streets"), "d", first.Streets, "fill", "none", "stroke", colStreet,
		"stroke-width", "3", "stroke-linejoin", "round", "stroke-linecap", "round")
	w.empty("path", "id", l.id("route"), "d", first.Route, "fill", "none", "stroke", colRoute,
		"stroke-width", "5", "stroke-linejoin", "round", "stroke-linecap", "round", "stroke-opacity", "0.75")
	x0, _ := l.at(0, 0)
	x1, _ := l.at(l.w, 0)
	for _, r := range []struct {
		id, name, dash string
		y              *float64
	}{{"far-row", "far limit (depth k·f)", "6 3", first.FarY}, {"horizon", "horizon", "", first.HorizonY}} {
		y, vis := 0.0, "hidden"
		if r.y != nil {
			y, vis = *r.y, "visible"
		}
		w.open("g", "id", l.id(r.id), "transform", "translate(0 "+num(y)+")", "visibility", vis)
		kv := []string{"x1", num(x0), "y1", "0", "x2", num(x1), "y2", "0", "stroke", colInk, "stroke-width", "1.2"}
		if r.dash != "" {
			kv = append(kv, "stroke-dasharray", r.dash)
		}
		w.empty("line", kv...)
		w.text("text", r.name, "x", num(x1-6), "y", "-4", "text-anchor", "end", "font-size", "10", "font-family", "sans-serif",
			"fill", colInk, "stroke", colPaper, "stroke-width", "3", "paint-order", "stroke")
		w.close("g")
	}
	w.close("g") // screen-ground
	w.screenFrameUI(&l)
	w.screenUser(&l)
	w.screenNorth(&l)
	w.open("g", "id", l.id("scale-bar"))
	w.empty("line", "id", l.id("scale-bar-line"), "x1", "0", "y1", "0", "x2", "0", "y2", "0", "stroke", colInk, "stroke-width", "2")
	w.text("text", "", "id", l.id("scale-bar-text"), "x", "0", "y", "0", "font-size", "10", "font-family", "sans-serif",
		"text-anchor", "end", "fill", colInk, "stroke", colPaper, "stroke-width", "3", "paint-order", "stroke")
	w.close("g")
	w.open("g", "id", l.id("markers"))
	w.close("g")
	w.legendAs("screen-legend", 16, sh+24, "Legend of the screen", items)
	w.close("svg")
}

// symKey names a style's symbol in a page's defs.
func symKey(st markStyle) string {
	switch st {
	case styleEarly:
		return "early"
	case styleMid:
		return "mid"
	case styleLate:
		return "late"
	case styleCrowded:
		return "crowded"
	}
	return "unseen"
}

// pageMarker is a marker as the page's script needs it.
type pageMarker struct {
	ID    string `json:"id"`
	Name  string `json:"name"`
	Style string `json:"style"` // its symbol: sym-<style>
}

// pageMarkers returns the page's marker list: id, label and the symbol of
// its timeline answer.
func pageMarkers(ms []timeline.Marker, res []timeline.Result, names map[string]string) []pageMarker {
	out := make([]pageMarker, len(ms))
	for i, m := range ms {
		out[i] = pageMarker{ID: m.ID, Name: nameOf(names, m.ID), Style: symKey(resultStyle(res[i]))}
	}
	return out
}
