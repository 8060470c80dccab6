package render

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/viewspec/viewspec/viewport"
)

// PointAnswer is one implementation's answer for one projected point, as
// the wire's project op gives it (SPEC §6): a pixel (x right, y down) and
// its depth, or none for a point at or behind the camera plane, and the
// in-view decision.
type PointAnswer struct {
	HasPixel bool
	X, Y     float64 // pixels, when HasPixel
	DepthPx  float64 // pixels along the view axis
	InView   bool
}

// PointDisagreement is a projected point on which an implementation and
// the reference disagree.
type PointDisagreement struct {
	// Label names the point, for example "screen[2]" or a marker's id.
	Label string
	// Reference is the reference's answer, MarginPx its in-view decision
	// margin (SPEC §2: pixels to the nearest edge of the in-view region,
	// positive inside; NaN when unknown).
	Reference PointAnswer
	MarginPx  float64
	// Other is the other implementation's answer.
	Other PointAnswer
}

// edgeNames are the edges viewport.View.BindingEdge names, in the words it
// starts its answer with.
var edgeNames = []string{"left edge", "right edge", "top edge", "bottom edge", "far limit", "behind the camera"}

// bindingEdge returns the name of the edge that decides the reference's
// in-view answer a (one of edgeNames) and the reference's sentence about
// it.
func bindingEdge(v *viewport.View, a PointAnswer, marginPx float64) (name, text string) {
	sp := viewport.ScreenPoint{X: a.X, Y: a.Y, DepthPx: a.DepthPx, MarginPx: marginPx}
	if !a.HasPixel {
		sp.DepthPx = min(a.DepthPx, 0)
		sp.MarginPx = math.Inf(-1)
	}
	text = v.BindingEdge(sp)
	for _, n := range edgeNames {
		if strings.HasPrefix(text, n) {
			return n, text
		}
	}
	return "", text
}

// answerText says an answer in a few words.
func answerText(a PointAnswer) string {
	if !a.HasPixel {
		return fmt.Sprintf("no pixel (depth %.1f px)", a.DepthPx)
	}
	in := "out of view"
	if a.InView {
		in = "in view"
	}
	return fmt.Sprintf("(%.2f, %.2f) px, %s", a.X, a.Y, in)
}

// DisagreementSVG returns an SVG picture (UTF-8 XML) of the screen of the
// view v (the request's camera and device) marking, for each point, the
// reference's pixel (a blue ring with a cross) and the other
// implementation's (a purple ×, named otherName), joined by a line, and
// the edge of the in-view region that decides the reference's answer
// (drawn thick and dashed, named in the caption with the reference's
// numbers, from viewport.View.BindingEdge). Pixels off the screen are
// pinned to its margin. The same input gives the same bytes. A view that
// wraps round the world is refused.
func DisagreementSVG(v *viewport.View, otherName string, pts []PointDisagreement, opts ...Option) ([]byte, error) {
	s, err := newSettings(opts)
	if err != nil {
		return nil, err
	}
	if v.Wrapped() {
		return nil, errWrapped
	}
	for i, p := range pts {
		for _, a := range [2]PointAnswer{p.Reference, p.Other} {
			if a.HasPixel && (math.IsNaN(a.X) || math.IsInf(a.X, 0) || math.IsNaN(a.Y) || math.IsInf(a.Y, 0)) {
				return nil, fmt.Errorf("render: points[%d] %q: pixel (%g, %g) is not finite", i, p.Label, a.X, a.Y)
			}
		}
	}
	if otherName == "" {
		otherName = "implementation"
	}
	l := newScreenLayout(v)
	cam := v.Camera()
	title := s.title
	if title == "" {
		title = fmt.Sprintf("The reference and %s disagree: camera heading %g°, pitch %g°, zoom %g", otherName, cam.HeadingDeg, cam.PitchDeg, cam.Zoom)
	}
	items := screenLegendItems()
	items = append(items,
		legendItem{"legend-reference", "the reference's pixel", func(w *writer) { w.refMark() }},
		legendItem{"legend-other", otherName + "'s pixel", func(w *writer) { w.otherMark() }},
		legendItem{"legend-deciding-edge", "the edge that decides in view (reference)", func(w *writer) {
			w.empty("line", "x1", "-10", "y1", "0", "x2", "10", "y2", "0", "stroke", colEdge, "stroke-width", "3.5", "stroke-dasharray", "5 3")
		}},
		pinnedItem, northItem)
	var lines []string
	lines = append(lines, screenCaption(v, nil, nil, 0, 0)...)
	for _, p := range pts {
		_, text := bindingEdge(v, p.Reference, p.MarginPx)
		lines = append(lines, p.Label+":", "  reference "+answerText(p.Reference))
		if !math.IsNaN(p.MarginPx) && !math.IsInf(p.MarginPx, 0) {
			lines = append(lines, fmt.Sprintf("  margin %.3f px; %s", p.MarginPx, text))
		} else {
			lines = append(lines, "  "+text)
		}
		lines = append(lines, "  "+otherName+" "+answerText(p.Other))
		if p.Reference.HasPixel && p.Other.HasPixel {
			lines = append(lines, fmt.Sprintf("  %.3f px apart", math.Hypot(p.Other.X-p.Reference.X, p.Other.Y-p.Reference.Y)))
		}
	}

	sw, sh := l.w*l.k+2*screenGutter, l.h*l.k+2*screenGutter
	legendH := 30 + float64(len(items)+1)*legendRow
	width := sw + legendPanelW + 60
	height := max(sh, legendH+40+16*float64(len(lines)))
	var w writer
	w.raw(`<?xml version="1.0" encoding="UTF-8"?>` + "\n")
	w.open("svg", append([]string{"xmlns", svgNS, "width", num(width), "height", num(height),
		"viewBox", "0 0 " + num(width) + " " + num(height), "id", "disagreement"}, screenAttrs(&l)...)...)
	w.raw("\n")
	w.text("title", title)
	w.empty("rect", "x", "0", "y", "0", "width", num(width), "height", num(height), "fill", colPaper)
	w.screenDefs(&l)
	w.screenBase(&l)
	w.screenFootprint(&l)
	w.screenRows(&l)
	w.close("g") // screen-ground
	w.screenFrameUI(&l)
	w.screenUser(&l)
	w.screenNorth(&l)
	w.open("g", "id", "points")
	for i, p := range pts {
		w.disagreement(&l, i, p)
	}
	w.close("g")
	w.legend(sw+16, 30, "Legend", items)
	w.caption(sw+16, legendH+30, lines)
	w.close("svg")
	return w.b.Bytes(), nil
}

// refMark is the reference's pixel mark: a blue ring with a cross.
func (w *writer) refMark() {
	w.empty("circle", "r", "7", "fill", "none", "stroke", colReference, "stroke-width", "2.5")
	w.empty("path", "d", "M-10,0 L10,0 M0,-10 L0,10", "stroke", colReference, "stroke-width", "1.2")
}

// otherMark is the other implementation's pixel mark: a purple ×.
func (w *writer) otherMark() {
	w.empty("path", "d", "M-7,-7 L7,7 M-7,7 L7,-7", "stroke", colPaper, "stroke-width", "5", "stroke-linecap", "round")
	w.empty("path", "d", "M-7,-7 L7,7 M-7,7 L7,-7", "stroke", colOther, "stroke-width", "3", "stroke-linecap", "round")
}

// disagreement writes point i: the deciding edge, the two pixels (data-x,
// data-y the answers' pixels; pinned when off the screen) joined by a line,
// and the label.
func (w *writer) disagreement(l *screenLayout, i int, p PointDisagreement) {
	edge, _ := bindingEdge(l.v, p.Reference, p.MarginPx)
	w.open("g", "class", "point", "data-index", strconv.Itoa(i), "data-label", p.Label, "data-deciding-edge", edge)
	w.decidingEdge(l, edge)
	var at [2][2]float64
	var has [2]bool
	for j, a := range [2]PointAnswer{p.Reference, p.Other} {
		if !a.HasPixel {
			continue
		}
		q, pinned := l.pinned(viewport.Pixel{X: a.X, Y: a.Y})
		x, y := l.at(q.X, q.Y)
		at[j], has[j] = [2]float64{x, y}, true
		class := []string{"reference", "other"}[j]
		if pinned {
			class += " pinned"
		}
		w.open("g", "class", class, "data-x", strconv.FormatFloat(a.X, 'g', -1, 64), "data-y", strconv.FormatFloat(a.Y, 'g', -1, 64),
			"transform", "translate("+num(x)+" "+num(y)+")")
		if j == 0 {
			w.refMark()
		} else {
			w.otherMark()
		}
		w.close("g")
	}
	if has[0] && has[1] {
		w.empty("line", "class", "apart", "x1", num(at[0][0]), "y1", num(at[0][1]), "x2", num(at[1][0]), "y2", num(at[1][1]),
			"stroke", colInk, "stroke-width", "1", "stroke-dasharray", "2 2")
	}
	for j := range 2 {
		if has[j] {
			w.text("text", p.Label, "x", num(at[j][0]+12), "y", num(at[j][1]-10), "font-size", "11", "font-family", "sans-serif",
				"fill", colInk, "stroke", colPaper, "stroke-width", "3", "paint-order", "stroke")
			break
		}
	}
	w.close("g")
}

// decidingEdge draws the edge named edge (of edgeNames) thick and dashed:
// a side or row of the clear area, or the far-limit row across the
// screen. Nothing is drawn for a point behind the camera.
func (w *writer) decidingEdge(l *screenLayout, edge string) {
	left, top, right, bottom := l.v.ClearArea()
	var a, b [2]float64
	switch edge {
	case "left edge":
		a, b = [2]float64{left, top}, [2]float64{left, bottom}
	case "right edge":
		a, b = [2]float64{right, top}, [2]float64{right, bottom}
	case "top edge":
		a, b = [2]float64{left, top}, [2]float64{right, top}
	case "bottom edge":
		a, b = [2]float64{left, bottom}, [2]float64{right, bottom}
	case "far limit":
		far := l.v.FarRowPx()
		if !(far >= -l.h && far <= 2*l.h) {
			return
		}
		a, b = [2]float64{left, far}, [2]float64{right, far}
	default:
		return
	}
	x1, y1 := l.at(a[0], a[1])
	x2, y2 := l.at(b[0], b[1])
	w.empty("line", "class", "deciding-edge", "x1", num(x1), "y1", num(y1), "x2", num(x2), "y2", num(y2),
		"stroke", colEdge, "stroke-width", "3.5", "stroke-dasharray", "5 3")
}
