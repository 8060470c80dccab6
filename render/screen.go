package render

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// Street is a named line on the ground ([lon, lat] degree vertices), drawn
// under the route for orientation.
type Street struct {
	Name   string
	Points []orb.Point
}

// Scene is what a screen picture draws besides the camera: the route, the
// streets and the markers, with optional names, buckets and the markers
// shown.
type Scene struct {
	// Route is a polyline of [lon, lat] degree points; may be empty.
	Route []orb.Point
	// Streets are drawn under the route; may be empty.
	Streets []Street
	// Markers are drawn where the reference projects them.
	Markers []timeline.Marker
	// Names labels markers by id (a business name); a marker without a
	// name is labelled with its id.
	Names map[string]string
	// Buckets, when not nil, draws each marker by its bucket (SPEC §5)
	// rather than by its in-view state.
	Buckets map[string]timeline.Bucket
	// Shown lists the ids of markers holding a slot; they get a halo.
	Shown []string
}

// Layout of a screen picture, picture units.
const (
	screenGutter   = 44.0   // around the device, where markers off the screen are pinned
	screenMaxUnits = 1280.0 // the device's longer side is drawn at most this long
	pinInset       = 12.0   // pinned markers sit this far inside the gutter's outer edge
)

// screenLayout places a view's screen in a picture: pixel (x, y) is drawn
// at (ox + x·k, oy + y·k).
type screenLayout struct {
	v      *viewport.View
	prefix string  // put before every element id, so that a page can hold a screen beside a map
	w, h   float64 // the screen, pixels
	k      float64 // picture units per pixel
	ox, oy float64 // picture position of pixel (0, 0)
}

func newScreenLayout(v *viewport.View) screenLayout {
	d := v.Camera().Device
	k := min(1, screenMaxUnits/d.WidthPx, screenMaxUnits/d.HeightPx)
	return screenLayout{v: v, w: d.WidthPx, h: d.HeightPx, k: k, ox: screenGutter, oy: screenGutter}
}

// id returns the element id name in this picture.
func (l *screenLayout) id(name string) string { return l.prefix + name }

// at returns the picture position of pixel (x, y).
func (l *screenLayout) at(x, y float64) (float64, float64) { return l.ox + x*l.k, l.oy + y*l.k }

// pinBox returns the pixel box markers are pinned into: the screen and
// most of the gutter around it.
func (l *screenLayout) pinBox() (x0, y0, x1, y1 float64) {
	g := (screenGutter - pinInset) / l.k
	return -g, -g, l.w + g, l.h + g
}

// screenAttrs are the root element's data attributes stating the layout.
func screenAttrs(l *screenLayout) []string {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	return []string{"data-screen-origin-x", g(l.ox), "data-screen-origin-y", g(l.oy), "data-units-per-px", g(l.k),
		"data-width-px", g(l.w), "data-height-px", g(l.h)}
}

// depthLimits returns the depths (pixels) lines are clipped to before
// they are projected: the near limit is the depth of the ground seen at the
// bottom of the pin box (everything nearer is drawn below it, and toward
// the camera plane pixels run off to infinity), the far limit k·f (SPEC
// §2). Depth is constant along a screen row, so the near limit cuts along a
// row.
func (l *screenLayout) depthLimits() (near, far float64) {
	v := l.v
	far = v.Camera().Device.FarRatio * v.FocalPx()
	_, _, _, y1 := l.pinBox()
	m, ok := v.UnprojectMercator(viewport.Pixel{X: l.w / 2, Y: y1})
	if !ok { // not below the horizon: cannot happen for rows below the anchor
		return 1e-9 * v.FocalPx(), far
	}
	return v.ProjectMercator(m).DepthPx, far
}

// unwrapped returns the Mercator point of p with X taken the short way from
// the view's target, so that consecutive points of a line near the
// antimeridian stay beside each other.
func unwrapped(v *viewport.View, p orb.Point) viewport.Mercator {
	m := viewport.ToMercator(p)
	t := v.Target()
	m.X = t.X + viewport.ShortDXM(m.X-t.X)
	return m
}

// screenLines returns the pixel polylines of pts: each segment clipped on
// the ground to depths in [near, far] (depth is affine in the Mercator
// point, so the cut points are found by interpolating it) and its ends
// projected by the reference. Segments whose pixels lie wholly beyond one
// side of the pin box are left out (a ground segment in front of the camera
// is a straight segment on the screen, so nothing of it could show).
func (l *screenLayout) screenLines(pts []orb.Point, near, far float64) [][]viewport.Pixel {
	v := l.v
	var out [][]viewport.Pixel
	var cur []viewport.Pixel
	flush := func() {
		if len(cur) >= 2 {
			out = append(out, cur)
		}
		cur = nil
	}
	x0, y0, x1, y1 := l.pinBox()
	for i := 0; i+1 < len(pts); i++ {
		a, b := unwrapped(v, pts[i]), unwrapped(v, pts[i+1])
		da, db := v.ProjectMercator(a).DepthPx, v.ProjectMercator(b).DepthPx
		t0, t1 := 0.0, 1.0
		if da == db {
			if !(da >= near && da <= far) {
				flush()
				continue
			}
		} else {
			tn, tf := (near-da)/(db-da), (far-da)/(db-da)
			t0, t1 = max(0, min(tn, tf)), min(1, max(tn, tf))
			if !(t0 < t1) {
				flush()
				continue
			}
		}
		lerp := func(t float64) viewport.Mercator {
			switch t {
			case 0:
				return a
			case 1:
				return b
			}
			return viewport.Mercator{X: a.X + t*(b.X-a.X), Y: a.Y + t*(b.Y-a.Y)}
		}
		sa, sb := v.ProjectMercator(lerp(t0)), v.ProjectMercator(lerp(t1))
		if !sa.HasPixel() || !sb.HasPixel() ||
			(sa.X < x0 && sb.X < x0) || (sa.X > x1 && sb.X > x1) || (sa.Y < y0 && sb.Y < y0) || (sa.Y > y1 && sb.Y > y1) {
			flush()
			continue
		}
		if t0 > 0 || len(cur) == 0 {
			flush()
			cur = append(cur, sa.Pixel())
		}
		cur = append(cur, sb.Pixel())
		if t1 < 1 {
			flush()
		}
	}
	flush()
	return out
}

// pathOf writes pixel polylines as an SVG path in picture units.
func (l *screenLayout) pathOf(lines [][]viewport.Pixel) string {
	var b strings.Builder
	for _, line := range lines {
		for j, p := range line {
			x, y := l.at(p.X, p.Y)
			if j == 0 {
				b.WriteString("M")
			} else {
				b.WriteString(" L")
			}
			b.WriteString(num(x))
			b.WriteByte(' ')
			b.WriteString(num(y))
		}
		b.WriteByte(' ')
	}
	return strings.TrimSpace(b.String())
}

// Marker states on the screen, as the reference's screen point says.
const (
	stateInView       = "in-view"       // in the clear area, no deeper than k·f
	stateOutsideClear = "outside-clear" // a pixel outside the clear area (at most k·f deep)
	stateBeyondFar    = "beyond-far"    // a pixel above the far-limit row (deeper than k·f)
	stateBehind       = "behind-camera" // at or behind the camera plane: no pixel
)

// markerState returns the state of a screen point: in view, beyond the far
// limit (above the far row, whatever its column), outside the clear area,
// or behind the camera.
func markerState(v *viewport.View, sp viewport.ScreenPoint) string {
	switch {
	case !sp.HasPixel():
		return stateBehind
	case sp.InView():
		return stateInView
	case sp.Y < v.FarRowPx():
		return stateBeyondFar
	}
	return stateOutsideClear
}

// stateStyle returns the style of a marker drawn by its state.
func stateStyle(state string) markStyle {
	switch state {
	case stateInView:
		return styleIn
	case stateBeyondFar:
		return styleBeyond
	}
	return styleOutClear
}

// pinned returns the pixel p clamped into the pin box, and whether it
// moved.
func (l *screenLayout) pinned(p viewport.Pixel) (viewport.Pixel, bool) {
	x0, y0, x1, y1 := l.pinBox()
	q := viewport.Pixel{X: max(x0, min(x1, p.X)), Y: max(y0, min(y1, p.Y))}
	return q, q != p
}

// screenMarker is one marker as the screen picture draws it.
type screenMarker struct {
	m      timeline.Marker
	sp     viewport.ScreenPoint
	state  string
	drawn  viewport.Pixel // where the symbol is drawn (the pixel, or pinned)
	pinned bool
	shown  bool
	faded  bool // drawn by bucket and not in view now
	style  markStyle
}

// screenMarkers returns the scene's markers with pixels within a screen's
// width and height of the screen, in drawing order (the shown last, so that
// they are on top), the ids of those behind the camera and the number
// farther off the screen, which are not drawn.
func (l *screenLayout) screenMarkers(sc *Scene) (drawn []screenMarker, behind []string, far int) {
	shown := map[string]bool{}
	for _, id := range sc.Shown {
		shown[id] = true
	}
	for _, m := range sc.Markers {
		sp := l.v.Project(m.Point)
		st := markerState(l.v, sp)
		if st == stateBehind {
			behind = append(behind, m.ID)
			continue
		}
		sm := screenMarker{m: m, sp: sp, state: st, shown: shown[m.ID], style: stateStyle(st)}
		if sc.Buckets != nil {
			if b, ok := sc.Buckets[m.ID]; ok {
				sm.style = bucketStyle(b)
			} else {
				sm.style = styleNoneBk
			}
			sm.faded = st != stateInView
		}
		if sp.X < -l.w || sp.X > 2*l.w || sp.Y < -l.h || sp.Y > 2*l.h {
			far++ // more than a screen off: counted, not pinned
			continue
		}
		sm.drawn, sm.pinned = l.pinned(sp.Pixel())
		drawn = append(drawn, sm)
	}
	sort.SliceStable(drawn, func(i, j int) bool { return !drawn[i].shown && drawn[j].shown })
	return drawn, behind, far
}

// box is a label's extent, picture units.
type box struct{ x0, y0, x1, y1 float64 }

func (a box) overlaps(b box) bool { return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1 }

// labelBox returns the extent of a label of text at font size 11 with its
// anchor at (x, y): start-anchored to the right, end-anchored to the left.
func labelBox(text string, x, y float64, end bool) box {
	wd := 6.1*float64(len([]rune(text))) + 4
	if end {
		return box{x - wd, y - 10, x, y + 4}
	}
	return box{x, y - 10, x + wd, y + 4}
}

// labelSpot is where a label goes relative to its marker: its offset and
// anchor, and whether a leader line joins them.
type labelSpot struct {
	dx, dy float64
	end    bool
	leader bool
}

// labelSpots are the places tried for a label, nearest first; the far ones
// get a leader line.
var labelSpots = []labelSpot{
	{9, 4, false, false}, {-9, 4, true, false}, {8, -9, false, false}, {8, 17, false, false},
	{-8, -9, true, false}, {-8, 17, true, false},
	{26, -22, false, true}, {-26, -22, true, true}, {26, 30, false, true}, {-26, 30, true, true},
	{40, 4, false, true}, {-40, 4, true, true},
}

// labeller places labels greedily so that none overlaps another or a
// marker symbol; a label with no free place is left out (its marker keeps
// the name as a hover title).
type labeller struct {
	taken []box
}

func (lb *labeller) block(b box) { lb.taken = append(lb.taken, b) }

// place returns the first free spot for text at the marker (x, y), and
// false when every spot is taken.
func (lb *labeller) place(text string, x, y float64, within box) (labelSpot, bool) {
	for _, s := range labelSpots {
		b := labelBox(text, x+s.dx, y+s.dy, s.end)
		if b.x0 < within.x0 || b.x1 > within.x1 || b.y0 < within.y0 || b.y1 > within.y1 {
			continue
		}
		free := true
		for _, t := range lb.taken {
			if b.overlaps(t) {
				free = false
				break
			}
		}
		if free {
			lb.block(b)
			return s, true
		}
	}
	return labelSpot{}, false
}

// label writes a placed label (and its leader line) in the marker's group,
// whose origin is the marker.
func (w *writer) label(text string, s labelSpot) {
	if s.leader {
		ex := s.dx - 3
		if s.end {
			ex = s.dx + 3
		}
		w.empty("line", "class", "leader", "x1", "0", "y1", "0", "x2", num(ex), "y2", num(s.dy-4), "stroke", colInk, "stroke-width", "0.8")
	}
	anchor := "start"
	if s.end {
		anchor = "end"
	}
	w.text("text", text, "class", "marker-label", "x", num(s.dx), "y", num(s.dy), "text-anchor", anchor, "font-size", "11",
		"font-family", "sans-serif", "fill", colInk, "stroke", colPaper, "stroke-width", "3", "paint-order", "stroke")
}

// screenDefs writes the hatch patterns of screen pictures.
func (w *writer) screenDefs(l *screenLayout) {
	w.open("defs")
	w.open("pattern", "id", "hatch-beyond", "width", "8", "height", "8", "patternUnits", "userSpaceOnUse", "patternTransform", "rotate(45)")
	w.empty("rect", "width", "8", "height", "8", "fill", colBeyond)
	w.empty("line", "x1", "0", "y1", "0", "x2", "0", "y2", "8", "stroke", "#b8c4d2", "stroke-width", "2")
	w.close("pattern")
	w.open("pattern", "id", "hatch-inset", "width", "6", "height", "6", "patternUnits", "userSpaceOnUse", "patternTransform", "rotate(-45)")
	w.empty("line", "x1", "0", "y1", "0", "x2", "0", "y2", "6", "stroke", colInset, "stroke-width", "2.5")
	w.close("pattern")
	w.open("clipPath", "id", "screen-clip")
	x, y := l.at(0, 0)
	w.empty("rect", "x", num(x), "y", num(y), "width", num(l.w*l.k), "height", num(l.h*l.k))
	w.close("clipPath")
	w.close("defs")
}

// screenBase writes the device, the sky above the horizon, the ground
// beyond the far limit, and the horizon and far-limit rows; then opens the
// group clipped to the screen, which the caller closes.
func (w *writer) screenBase(l *screenLayout) {
	v := l.v
	x0, y0 := l.at(0, 0)
	sw, sh := l.w*l.k, l.h*l.k
	w.empty("rect", "id", l.id("device"), "x", num(x0-10), "y", num(y0-10), "width", num(sw+20), "height", num(sh+20),
		"rx", "16", "fill", "#2a2d31")
	w.empty("rect", "id", l.id("screen"), "x", num(x0), "y", num(y0), "width", num(sw), "height", num(sh), "fill", "#f7f6f2")
	w.open("g", "id", l.id("screen-ground"), "clip-path", "url(#screen-clip)")
	w.raw("\n")
	far := v.FarRowPx()
	horizon, hasHorizon := v.HorizonRowPx()
	if far > 0 {
		top := 0.0
		if hasHorizon {
			top = max(0, horizon)
		}
		if far > top {
			_, ya := l.at(0, min(top, l.h))
			_, yb := l.at(0, min(far, l.h))
			w.empty("rect", "id", l.id("beyond-far"), "x", num(x0), "y", num(ya), "width", num(sw), "height", num(yb-ya), "fill", "url(#hatch-beyond)")
		}
	}
	if hasHorizon && horizon > 0 {
		_, yb := l.at(0, min(horizon, l.h))
		w.empty("rect", "id", l.id("sky"), "x", num(x0), "y", num(y0), "width", num(sw), "height", num(yb-y0), "fill", colBeyond)
	}
}

// screenRows writes the horizon and far-limit rows with their names, when
// they cross the screen. data-row-px states each row in pixels.
func (w *writer) screenRows(l *screenLayout) {
	v := l.v
	x0, _ := l.at(0, 0)
	x1, _ := l.at(l.w, 0)
	row := func(id, name string, rowPx float64, dash string) {
		if !(rowPx >= 0 && rowPx <= l.h) {
			return
		}
		_, y := l.at(0, rowPx)
		w.open("g", "id", l.id(id), "data-row-px", strconv.FormatFloat(rowPx, 'g', -1, 64))
		kv := []string{"x1", num(x0), "y1", num(y), "x2", num(x1), "y2", num(y), "stroke", colInk, "stroke-width", "1.2"}
		if dash != "" {
			kv = append(kv, "stroke-dasharray", dash)
		}
		w.empty("line", kv...)
		w.text("text", name, "x", num(x1-6), "y", num(y-4), "text-anchor", "end", "font-size", "10", "font-family", "sans-serif",
			"fill", colInk, "stroke", colPaper, "stroke-width", "3", "paint-order", "stroke")
		w.close("g")
	}
	if h, ok := v.HorizonRowPx(); ok {
		row("horizon", "horizon", h, "")
	}
	row("far-row", "far limit (depth k·f)", v.FarRowPx(), "6 3")
}

// screenFrameUI writes the insets, the clear area's outline and the anchor.
func (w *writer) screenFrameUI(l *screenLayout) {
	v := l.v
	left, top, right, bottom := v.ClearArea()
	w.open("g", "id", l.id("insets"))
	for _, r := range [][4]float64{{0, 0, l.w, top}, {0, bottom, l.w, l.h}, {0, top, left, bottom}, {right, top, l.w, bottom}} {
		if r[2] > r[0] && r[3] > r[1] {
			x, y := l.at(r[0], r[1])
			w.empty("rect", "class", "inset", "x", num(x), "y", num(y), "width", num((r[2]-r[0])*l.k), "height", num((r[3]-r[1])*l.k),
				"fill", "url(#hatch-inset)", "stroke", "none")
		}
	}
	w.close("g")
	x, y := l.at(left, top)
	w.empty("rect", "id", l.id("clear-area"), "x", num(x), "y", num(y), "width", num((right-left)*l.k), "height", num((bottom-top)*l.k),
		"fill", "none", "stroke", colInk, "stroke-width", "1.5", "stroke-dasharray", "1 3", "stroke-linecap", "round")
	d := v.Camera().Device
	ax, ay := l.at(d.AnchorX*l.w, d.AnchorY*l.h)
	w.open("g", "id", l.id("anchor"), "transform", "translate("+num(ax)+" "+num(ay)+")")
	w.empty("circle", "r", "15", "fill", "none", "stroke", colInk, "stroke-width", "1")
	w.empty("path", "d", "M-20,0 L-15,0 M15,0 L20,0 M0,-20 L0,-15 M0,15 L0,20", "stroke", colInk, "stroke-width", "1")
	w.close("g")
}

// screenFootprint writes the footprint's vertices as the reference
// projects them, as the polygon #footprint.
func (w *writer) screenFootprint(l *screenLayout) {
	fp := l.v.Footprint()
	pts, class := "", "empty"
	if !fp.Empty {
		xy := make([][2]float64, 4)
		for i, m := range fp.Mercator {
			sp := l.v.ProjectMercator(m)
			xy[i][0], xy[i][1] = l.at(sp.X, sp.Y)
		}
		pts, class = points(xy), "footprint"
	}
	w.empty("polygon", "id", l.id("footprint"), "class", class, "points", pts, "fill", colFootprint, "fill-opacity", "0.16",
		"stroke", colReference, "stroke-width", "1.5", "stroke-linejoin", "round")
}

// screenNorth writes #north-arrow in the clear area's bottom-left corner,
// turned by −heading: the heading-up map turns the ground by −β, so north
// points β anticlockwise from up.
func (w *writer) screenNorth(l *screenLayout) {
	x, y := l.northAt()
	w.open("g", "id", l.id("north-arrow"), "transform", "translate("+num(x)+" "+num(y)+") rotate("+num(-l.v.Camera().HeadingDeg)+")")
	w.empty("circle", "r", "16", "fill", colPaper, "fill-opacity", "0.9", "stroke", colGrid)
	w.empty("path", "d", "M0,-13 L6,6 L0,2 L-6,6 Z", "fill", colInk)
	w.text("text", "N", "x", "0", "y", "14", "font-size", "8", "font-family", "sans-serif", "text-anchor", "middle", "font-weight", "bold", "fill", colInk)
	w.close("g")
}

// northAt returns the north arrow's centre, picture units.
func (l *screenLayout) northAt() (x, y float64) {
	left, _, _, bottom := l.v.ClearArea()
	x, y = l.at(left, bottom)
	return x + 26, y - 26
}

// ScreenScalePxPerM returns the screen scale at the user's row: pixels per
// ground metre along that row, measured by projecting the user and a point
// 100 Mercator metres to the right of the heading through the reference
// (rows are lines of constant depth, so the scale is the same all along
// the row).
func ScreenScalePxPerM(v *viewport.View) float64 {
	u := v.UserMercator()
	h := v.Camera().HeadingDeg * math.Pi / 180
	const d = 100.0
	a := v.ProjectMercator(u)
	b := v.ProjectMercator(viewport.Mercator{X: u.X + d*math.Cos(h), Y: u.Y - d*math.Sin(h)})
	return math.Hypot(b.X-a.X, b.Y-a.Y) / d / viewport.GroundScale(v.Camera().LatDeg)
}

// scaleGeom returns the scale bar on the user's row: its ends in pixels,
// the row, and a round ground length no longer than 30 % of the clear
// area's width at ScreenScalePxPerM; lengthM is 0 when none fits.
func (l *screenLayout) scaleGeom() (px0, px1, row, lengthM float64) {
	left, _, right, _ := l.v.ClearArea()
	user := l.v.ProjectMercator(l.v.UserMercator())
	perM := ScreenScalePxPerM(l.v)
	lengthM = RoundLengthM(0.3 * (right - left) / perM)
	px1 = right - 12
	return px1 - lengthM*perM, px1, user.Y, lengthM
}

// screenScale writes #scale-bar on the user's row, right-aligned in the
// clear area (see scaleGeom), and returns the box it covers.
func (w *writer) screenScale(l *screenLayout) box {
	px0, px1, row, lengthM := l.scaleGeom()
	if lengthM == 0 {
		return box{}
	}
	x0, y := l.at(px0, row)
	x1, _ := l.at(px1, row)
	w.open("g", "id", l.id("scale-bar"), "data-length-m", strconv.FormatFloat(lengthM, 'g', -1, 64))
	w.empty("rect", "x", num(x0-6), "y", num(y-19), "width", num(x1-x0+12), "height", "27", "fill", colPaper, "fill-opacity", "0.85")
	w.empty("line", "id", l.id("scale-bar-line"), "x1", num(x0), "y1", num(y), "x2", num(x1), "y2", num(y), "stroke", colInk, "stroke-width", "2")
	for _, x := range [2]float64{x0, x1} {
		w.empty("line", "x1", num(x), "y1", num(y-5), "x2", num(x), "y2", num(y+3), "stroke", colInk, "stroke-width", "2")
	}
	text := lengthLabel(lengthM) + " at the user's row"
	tw := 5.4 * float64(len([]rune(text)))
	w.text("text", text, "x", num(x1), "y", num(y-7), "font-size", "10",
		"font-family", "sans-serif", "text-anchor", "end", "fill", colInk, "stroke", colPaper, "stroke-width", "3", "paint-order", "stroke")
	w.close("g")
	return box{min(x0, x1-tw) - 6, y - 19, x1 + 6, y + 8}
}

// screenUser writes the user's arrow at the reference's pixel of the user
// (the anchor, up to rounding), pointing up the screen: the map is heading
// up.
func (w *writer) screenUser(l *screenLayout) {
	sp := l.v.ProjectMercator(l.v.UserMercator())
	x, y := l.at(sp.X, sp.Y)
	w.open("g", "id", l.id("user"), "transform", "translate("+num(x)+" "+num(y)+")")
	w.empty("path", "d", userPath, "fill", colUser, "stroke", colPaper, "stroke-width", "2", "stroke-linejoin", "round")
	w.close("g")
}

// screenLegendItems are the legend rows every screen picture has.
func screenLegendItems() []legendItem {
	return []legendItem{
		{"legend-inset", "screen edge covered by UI (inset)", func(w *writer) {
			w.empty("rect", "x", "-9", "y", "-7", "width", "18", "height", "14", "fill", "url(#hatch-inset)", "stroke", colInset)
		}},
		{"legend-clear", "clear area (where markers count as in view)", func(w *writer) {
			w.empty("rect", "x", "-9", "y", "-7", "width", "18", "height", "14", "fill", "none", "stroke", colInk, "stroke-dasharray", "1 3")
		}},
		{"legend-footprint", "footprint: the ground in view", func(w *writer) {
			w.empty("polygon", "points", "-9,7 9,7 6,-7 -6,-7", "fill", colFootprint, "fill-opacity", "0.3", "stroke", colReference, "stroke-width", "1.5")
		}},
		{"legend-beyond", "beyond the far limit, up to the horizon", func(w *writer) {
			w.empty("rect", "x", "-9", "y", "-7", "width", "18", "height", "14", "fill", "url(#hatch-beyond)")
		}},
		{"legend-sky", "above the horizon: no ground", func(w *writer) {
			w.empty("rect", "x", "-9", "y", "-7", "width", "18", "height", "14", "fill", colBeyond, "stroke", colGrid)
		}},
		{"legend-rows", "far-limit row (dashed), horizon (solid)", func(w *writer) {
			w.empty("line", "x1", "-10", "y1", "-3", "x2", "10", "y2", "-3", "stroke", colInk, "stroke-dasharray", "6 3")
			w.empty("line", "x1", "-10", "y1", "4", "x2", "10", "y2", "4", "stroke", colInk)
		}},
		{"legend-anchor", "anchor pixel and the user's arrow", func(w *writer) {
			w.empty("circle", "r", "8", "fill", "none", "stroke", colInk)
			w.empty("path", "d", userPath, "transform", "scale(0.6)", "fill", colUser)
		}},
	}
}

var (
	streetItem = legendItem{"legend-street", "street", func(w *writer) {
		w.empty("line", "x1", "-10", "y1", "0", "x2", "10", "y2", "0", "stroke", colStreet, "stroke-width", "3")
	}}
	shownItem = legendItem{"legend-shown", "shown (holds a slot)", func(w *writer) {
		w.empty("circle", "r", "10", "fill", "none", "stroke", colUser, "stroke-width", "2.5")
		w.empty("circle", "r", "4", "fill", colSlate)
	}}
	pinnedItem = legendItem{"legend-pinned", "off the screen: pinned to the margin", func(w *writer) {
		w.empty("circle", "r", "4.5", "fill", colPaper, "stroke", colSlate, "stroke-width", "1.5", "opacity", "0.6")
		w.empty("path", "d", "M7,-4 L12,0 L7,4", "fill", "none", "stroke", colSlate)
	}}
)

// drawScreenMarkers writes the markers (#markers): each a group at the
// drawn position with data-x, data-y (the reference's pixel), data-state,
// a hover title with its name, and a label where one fits.
func (w *writer) drawScreenMarkers(l *screenLayout, ms []screenMarker, names map[string]string, lb *labeller) {
	w.open("g", "id", l.id("markers"))
	w.raw("\n")
	x0, y0 := l.at(0, 0)
	within := box{x0 - screenGutter + 2, y0 - screenGutter + 2, x0 + l.w*l.k + screenGutter - 2, y0 + l.h*l.k + screenGutter - 2}
	for _, sm := range ms {
		x, y := l.at(sm.drawn.X, sm.drawn.Y)
		lb.block(box{x - markR, y - markR, x + markR, y + markR})
	}
	// Labels go to the shown first, then the in view, then the rest.
	order := make([]int, len(ms))
	for i := range order {
		order[i] = i
	}
	rank := func(sm *screenMarker) int {
		switch {
		case sm.shown:
			return 0
		case sm.state == stateInView:
			return 1
		case sm.pinned:
			return 3
		}
		return 2
	}
	sort.SliceStable(order, func(a, b int) bool { return rank(&ms[order[a]]) < rank(&ms[order[b]]) })
	spots := make([]*labelSpot, len(ms))
	for _, i := range order {
		sm := &ms[i]
		if sm.pinned {
			continue // off the screen: the hover title names it
		}
		x, y := l.at(sm.drawn.X, sm.drawn.Y)
		if s, ok := lb.place(nameOf(names, sm.m.ID), x, y, within); ok {
			spots[i] = &s
		}
	}
	for i, sm := range ms {
		x, y := l.at(sm.drawn.X, sm.drawn.Y)
		class := "marker " + sm.style.class + " state-" + sm.state
		if sm.shown {
			class += " shown"
		}
		if sm.pinned {
			class += " pinned"
		}
		kv := []string{"class", class, "data-id", sm.m.ID, "data-state", sm.state,
			"data-x", strconv.FormatFloat(sm.sp.X, 'g', -1, 64), "data-y", strconv.FormatFloat(sm.sp.Y, 'g', -1, 64),
			"transform", "translate(" + num(x) + " " + num(y) + ")"}
		switch {
		case sm.faded:
			kv = append(kv, "opacity", "0.35")
		case sm.pinned:
			kv = append(kv, "opacity", "0.6")
		}
		w.open("g", kv...)
		w.text("title", hoverText(names, sm.m.ID, sm.state))
		if sm.shown {
			w.empty("circle", "class", "halo", "r", "10.5", "fill", "none", "stroke", colUser, "stroke-width", "2.5")
		}
		w.symbolStyled(sm.style)
		if spots[i] != nil {
			w.label(nameOf(names, sm.m.ID), *spots[i])
		}
		w.close("g")
	}
	w.close("g")
}

// nameOf returns a marker's label: its name, or its id.
func nameOf(names map[string]string, id string) string {
	if n := names[id]; n != "" {
		return n
	}
	return id
}

// hoverText is a marker's hover title: name, id and state.
func hoverText(names map[string]string, id, state string) string {
	s := id
	if n := names[id]; n != "" {
		s = n + " (" + id + ")"
	}
	return s + ": " + strings.ReplaceAll(state, "-", " ")
}

// ScreenSVG returns an SVG picture (UTF-8 XML) of what the phone's screen
// shows for the view v: the device at its pixel size (one picture unit a
// pixel, scaled down for screens longer than 1280 px), the insets
// hatched, the clear area outlined, the sky above the horizon and the
// ground beyond the far limit shaded with their rows drawn, the footprint
// as the reference projects it, the streets and the route clipped on the
// ground at the near and far limits and projected by the reference, the
// markers at their reference pixels (filled in view, hollow outside the
// clear area, dashed beyond the far limit, pinned to the margin when off
// the screen, listed when behind the camera), the anchor and the user's
// arrow, a north arrow turned with the heading, a scale bar on the user's
// row and a legend. The same input gives the same bytes. A view that wraps
// round the world is refused.
func ScreenSVG(v *viewport.View, sc Scene, opts ...Option) ([]byte, error) {
	s, err := newSettings(opts)
	if err != nil {
		return nil, err
	}
	if v.Wrapped() {
		return nil, errWrapped
	}
	if err := checkScene(&sc); err != nil {
		return nil, err
	}
	l := newScreenLayout(v)
	cam := v.Camera()
	title := s.title
	if title == "" {
		title = fmt.Sprintf("Screen at %s, heading %g°, pitch %g°, zoom %g", latLonText(cam.User()), cam.HeadingDeg, cam.PitchDeg, cam.Zoom)
	}
	ms, behind, farOff := l.screenMarkers(&sc)

	items := screenLegendItems()
	if len(sc.Streets) > 0 {
		items = append(items, streetItem)
	}
	if len(sc.Route) >= 2 {
		items = append(items, routeItem)
	}
	if sc.Buckets != nil {
		for _, st := range bucketStyles {
			items = append(items, markerItem(st))
		}
		items = append(items, legendItem{"legend-not-in-view", "faded: not in view now", func(w *writer) {
			w.empty("circle", "r", "4.5", "fill", colSlate, "opacity", "0.35")
		}})
	} else if len(sc.Markers) > 0 {
		items = append(items, markerItem(styleIn), markerItem(styleOutClear), markerItem(styleBeyond))
	}
	if len(sc.Markers) > 0 {
		items = append(items, pinnedItem)
	}
	if len(sc.Shown) > 0 {
		items = append(items, shownItem)
	}
	items = append(items, northItem)

	sw, sh := l.w*l.k+2*screenGutter, l.h*l.k+2*screenGutter
	legendH := 30 + float64(len(items)+1)*legendRow
	lines := screenCaption(v, ms, behind, farOff, len(sc.Markers))
	width := sw + legendPanelW
	height := max(sh, legendH+40+16*float64(len(lines)))
	var w writer
	w.raw(`<?xml version="1.0" encoding="UTF-8"?>` + "\n")
	w.open("svg", append([]string{"xmlns", svgNS, "width", num(width), "height", num(height),
		"viewBox", "0 0 " + num(width) + " " + num(height), "id", "screen-view"}, screenAttrs(&l)...)...)
	w.raw("\n")
	w.text("title", title)
	w.empty("rect", "x", "0", "y", "0", "width", num(width), "height", num(height), "fill", colPaper)
	w.screenDefs(&l)
	w.screenBody(&l, &sc, ms, &labeller{})
	w.legend(sw+16, 30, "Legend", items)
	w.caption(sw+16, legendH+30, lines)
	w.text("desc", strings.Join(behind, "\n"), "id", "behind-camera")
	w.close("svg")
	return w.b.Bytes(), nil
}

// legendPanelW is the width of a screen picture's legend panel.
const legendPanelW = 330.0

var northItem = legendItem{"legend-north", "north, turned with the heading", func(w *writer) {
	w.empty("path", "d", "M0,-9 L4,4 L0,1.5 L-4,4 Z", "fill", colInk)
}}

// screenBody writes the device and everything on it.
func (w *writer) screenBody(l *screenLayout, sc *Scene, ms []screenMarker, lb *labeller) {
	w.screenBase(l)
	near, far := l.depthLimits()
	w.screenFootprint(l)
	w.open("g", "id", l.id("streets"))
	for _, st := range sc.Streets {
		if d := l.pathOf(l.screenLines(st.Points, near, far)); d != "" {
			w.open("path", "class", "street", "data-name", st.Name, "d", d, "fill", "none", "stroke", colStreet,
				"stroke-width", "3", "stroke-linejoin", "round", "stroke-linecap", "round")
			w.text("title", st.Name)
			w.close("path")
		}
	}
	w.close("g")
	if len(sc.Route) >= 2 {
		w.empty("path", "id", l.id("route"), "d", l.pathOf(l.screenLines(sc.Route, near, far)), "fill", "none", "stroke", colRoute,
			"stroke-width", "5", "stroke-linejoin", "round", "stroke-linecap", "round", "stroke-opacity", "0.75")
	}
	w.screenRows(l)
	w.close("g") // screen-ground
	w.screenFrameUI(l)
	w.screenUser(l)
	w.screenNorth(l)
	lb.block(w.screenScale(l))
	// Labels keep clear of the north arrow and the anchor.
	nx, ny := l.northAt()
	lb.block(box{nx - 17, ny - 17, nx + 17, ny + 17})
	d := l.v.Camera().Device
	ax, ay := l.at(d.AnchorX*l.w, d.AnchorY*l.h)
	lb.block(box{ax - 16, ay - 16, ax + 16, ay + 16})
	w.drawScreenMarkers(l, ms, sc.Names, lb)
}

// screenCaption says what the picture shows in numbers.
func screenCaption(v *viewport.View, ms []screenMarker, behind []string, farOff, total int) []string {
	cam := v.Camera()
	d := cam.Device
	lines := []string{
		"user " + latLonText(cam.User()),
		fmt.Sprintf("heading %.6g°, pitch %.6g°, zoom %.6g", cam.HeadingDeg, cam.PitchDeg, cam.Zoom),
		fmt.Sprintf("screen %.6g × %.6g px, fov_y %.6g°, far ratio %.6g", d.WidthPx, d.HeightPx, d.FovYDeg, d.FarRatio),
	}
	if h, ok := v.HorizonRowPx(); ok {
		lines = append(lines, fmt.Sprintf("horizon row %.1f px, far-limit row %.1f px", h, v.FarRowPx()))
	} else {
		lines = append(lines, "pitch 0: no horizon, no far limit on the screen")
	}
	if total == 0 {
		return lines
	}
	var n [3]int
	pinned := 0
	for _, sm := range ms {
		switch sm.state {
		case stateInView:
			n[0]++
		case stateOutsideClear:
			n[1]++
		case stateBeyondFar:
			n[2]++
		}
		if sm.pinned {
			pinned++
		}
	}
	lines = append(lines, fmt.Sprintf("markers: %d in view, %d outside the clear area,", n[0], n[1]),
		fmt.Sprintf("%d beyond the far limit, %d behind the camera", n[2], len(behind)))
	if pinned > 0 || farOff > 0 {
		lines = append(lines, fmt.Sprintf("%d off the screen, pinned to the margin;", pinned),
			fmt.Sprintf("%d more than a screen away, not drawn", farOff))
	}
	if len(behind) > 0 {
		lines = append(lines, "behind the camera: "+excerptIDs(behind, 6))
	}
	return lines
}

// excerptIDs lists up to n ids, and how many more.
func excerptIDs(ids []string, n int) string {
	if len(ids) <= n {
		return strings.Join(ids, ", ")
	}
	return strings.Join(ids[:n], ", ") + fmt.Sprintf(" and %d more", len(ids)-n)
}

// checkScene reports the first point of the scene out of range.
func checkScene(sc *Scene) error {
	if err := checkPoints("route", len(sc.Route), func(i int) orb.Point { return sc.Route[i] }); err != nil {
		return err
	}
	for j, st := range sc.Streets {
		if err := checkPoints(fmt.Sprintf("streets[%d].points", j), len(st.Points), func(i int) orb.Point { return st.Points[i] }); err != nil {
			return err
		}
	}
	return checkPoints("markers", len(sc.Markers), func(i int) orb.Point { return sc.Markers[i].Point })
}
