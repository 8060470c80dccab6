package render

import (
	"fmt"
	"math"
	"strconv"
)

// Series is one line of a line chart: points (X[i], Y[i]) in the units the
// labels name, joined in the order given.
type Series struct {
	// Name is the series' legend text, for example a rule file's name.
	Name string
	// XLabel and YLabel name the axes with their units, for example
	// "time (s)" and "pitch (°)". Every series of a chart must agree (or
	// leave them empty).
	XLabel, YLabel string
	X, Y           []float64
}

// Bar is one bar of a bar chart.
type Bar struct {
	// Label is written under the bar; consecutive bars with the same label
	// stand together as one cluster under one label.
	Label string
	// Group picks the bar's colour and its legend entry (for example the
	// rule set it counts for).
	Group string
	// Value is the bar's height in the chart's value unit; finite.
	Value float64
	// Tone, when set, colours the bar by the pictures' one code (earlier
	// as early, later as late) instead of by its group's place.
	Tone Tone
}

// Tone is a bar's meaning in the colour code every picture shares.
type Tone int

const (
	// ToneGroup colours a bar by its group's place among the groups.
	ToneGroup Tone = iota
	// ToneEarlier is a move to an earlier bucket: early's bluish green.
	ToneEarlier
	// ToneLater is a move to a later bucket: late's vermillion.
	ToneLater
)

// Chart layout, picture units.
const (
	chartW      = 720.0
	chartH      = 300.0
	chartLeft   = 64.0
	chartRight  = 20.0
	chartTop    = 64.0 // title and legend above the plot
	chartBottom = 48.0
)

// seriesStyle is a line's colour and dash pattern; they cycle.
var seriesStyles = []struct{ color, dash string }{
	{colReference, ""},
	{colOther, "7 4"},
	{colMid, "2 3"},
	{colSlate, "9 3 2 3"},
	{colFootprint, "4 2"},
}

// chartOpts are the page's additions to a chart.
type chartOpts struct {
	id         string // the svg element's id; prefixes inner ids
	standalone bool   // write the XML declaration and namespace
	cursor     bool   // add a vertical line #<id>-cursor the page moves
	// edges are horizontal lines across the plot (the rule set's band
	// edges), each with a shaded band of ± its hysteresis around it.
	edges []chartEdge
}

// chartEdge is a horizontal line at Y with a band [Y − Half, Y + Half].
type chartEdge struct {
	Y, Half float64
	Label   string
}

// LinesSVG returns a line chart (an SVG picture, UTF-8 XML) of series on
// shared axes, with a legend naming each series by colour and dash. Errors
// name the series and index of a non-finite value or mismatched lengths.
func LinesSVG(title string, series ...Series) ([]byte, error) {
	return lineChart(title, series, chartOpts{id: "chart", standalone: true})
}

// niceRange widens [lo, hi] to multiples of a round step (1, 2 or 5 × 10ⁿ,
// the largest not above a third of the range): 3 to 10 intervals.
func niceRange(lo, hi float64) (nlo, nhi, step float64) {
	if hi-lo < 1e-9*max(1, math.Abs(lo), math.Abs(hi)) {
		d := max(1, math.Abs(lo)*0.1)
		lo, hi = lo-d, hi+d
	}
	step = RoundLengthM((hi - lo) / 3)
	return math.Floor(lo/step) * step, math.Ceil(hi/step) * step, step
}

// tickText writes an axis tick value with no more digits than the step
// needs.
func tickText(v, step float64) string {
	digits := max(0, -int(math.Floor(math.Log10(step)+1e-9)))
	s := strconv.FormatFloat(v, 'f', digits, 64)
	if s == "-0" {
		s = "0"
	}
	return s
}

// axes is a chart's data-to-picture map.
type axes struct {
	x0, x1, y0, y1             float64 // data ranges
	left, right, top, bottom   float64 // plot area, picture units
	xStep, yStep               float64
	xLabel, yLabel, titleText  string
	width, height, legendStart float64
}

func (a *axes) px(x float64) float64 { return a.left + (x-a.x0)/(a.x1-a.x0)*(a.right-a.left) }
func (a *axes) py(y float64) float64 { return a.bottom - (y-a.y0)/(a.y1-a.y0)*(a.bottom-a.top) }

func newAxes(title string, xlo, xhi, ylo, yhi float64, xLabel, yLabel string, niceX bool) axes {
	a := axes{width: chartW, height: chartH, titleText: title, xLabel: xLabel, yLabel: yLabel,
		left: chartLeft, right: chartW - chartRight, top: chartTop, bottom: chartH - chartBottom}
	if niceX {
		a.x0, a.x1, a.xStep = niceRange(xlo, xhi)
	}
	a.y0, a.y1, a.yStep = niceRange(ylo, yhi)
	return a
}

// openChart writes the chart's root element, title, background and axes with
// grid lines (the x grid only when xStep is set).
func (w *writer) openChart(a *axes, o chartOpts, kind string) {
	if o.standalone {
		w.raw(`<?xml version="1.0" encoding="UTF-8"?>` + "\n")
	}
	kv := []string{}
	if o.standalone {
		kv = append(kv, "xmlns", svgNS)
	}
	kv = append(kv, "id", o.id, "class", "chart "+kind, "width", num(a.width), "height", num(a.height),
		"viewBox", "0 0 "+num(a.width)+" "+num(a.height))
	w.open("svg", kv...)
	w.raw("\n")
	w.text("title", a.titleText)
	w.empty("rect", "x", "0", "y", "0", "width", num(a.width), "height", num(a.height), "fill", colPaper)
	w.text("text", a.titleText, "x", num(a.left), "y", "20", "font-size", "14", "font-weight", "bold",
		"font-family", "sans-serif", "fill", colInk)
	font := []string{"font-size", "11", "font-family", "sans-serif", "fill", colInk}
	w.open("g", "class", "axes")
	for y := a.y0; y <= a.y1+a.yStep*1e-9; y += a.yStep {
		py := a.py(y)
		w.empty("line", "x1", num(a.left), "y1", num(py), "x2", num(a.right), "y2", num(py), "stroke", colGrid)
		w.text("text", tickText(y, a.yStep), append([]string{"x", num(a.left - 6), "y", num(py + 4), "text-anchor", "end"}, font...)...)
	}
	if a.xStep > 0 {
		for x := a.x0; x <= a.x1+a.xStep*1e-9; x += a.xStep {
			px := a.px(x)
			w.empty("line", "x1", num(px), "y1", num(a.top), "x2", num(px), "y2", num(a.bottom), "stroke", colGrid)
			w.text("text", tickText(x, a.xStep), append([]string{"x", num(px), "y", num(a.bottom + 16), "text-anchor", "middle"}, font...)...)
		}
	}
	w.empty("line", "x1", num(a.left), "y1", num(a.bottom), "x2", num(a.right), "y2", num(a.bottom), "stroke", colInk)
	w.empty("line", "x1", num(a.left), "y1", num(a.top), "x2", num(a.left), "y2", num(a.bottom), "stroke", colInk)
	if a.xLabel != "" {
		w.text("text", a.xLabel, append([]string{"x", num((a.left + a.right) / 2), "y", num(a.height - 8), "text-anchor", "middle"}, font...)...)
	}
	if a.yLabel != "" {
		w.text("text", a.yLabel, append([]string{"x", "14", "y", num((a.top + a.bottom) / 2), "text-anchor", "middle",
			"transform", "rotate(-90 14 " + num((a.top+a.bottom)/2) + ")"}, font...)...)
	}
	w.close("g")
}

// chartLegend writes the legend row under the title: one entry per name,
// its sample drawn by draw(i) at the entry's origin.
func (w *writer) chartLegend(o chartOpts, a *axes, names []string, draw func(i int)) {
	id := "legend"
	if !o.standalone {
		id = o.id + "-legend"
	}
	w.open("g", "id", id, "class", "legend", "transform", "translate("+num(a.left)+" 42)")
	x := 0.0
	for i, n := range names {
		w.open("g", "class", "legend-item", "transform", "translate("+num(x)+" 0)")
		draw(i)
		w.text("text", n, "x", "28", "y", "4", "font-size", "11", "font-family", "sans-serif", "fill", colInk)
		w.close("g")
		x += 44 + 6.5*float64(len([]rune(n)))
	}
	w.close("g")
}

func lineChart(title string, series []Series, o chartOpts) ([]byte, error) {
	if len(series) == 0 {
		return nil, fmt.Errorf("render: chart %q has no series", title)
	}
	xlo, xhi, ylo, yhi := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	xLabel, yLabel := "", ""
	for i, s := range series {
		if len(s.X) != len(s.Y) {
			return nil, fmt.Errorf("render: series[%d] %q: %d x values but %d y values", i, s.Name, len(s.X), len(s.Y))
		}
		if len(s.X) == 0 {
			return nil, fmt.Errorf("render: series[%d] %q: no points", i, s.Name)
		}
		for j := range s.X {
			if x, y := s.X[j], s.Y[j]; math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(y) || math.IsInf(y, 0) {
				return nil, fmt.Errorf("render: series[%d] %q: point %d = (%g, %g): not finite", i, s.Name, j, x, y)
			}
			xlo, xhi = min(xlo, s.X[j]), max(xhi, s.X[j])
			ylo, yhi = min(ylo, s.Y[j]), max(yhi, s.Y[j])
		}
		for _, l := range [2][2]*string{{&xLabel, &series[i].XLabel}, {&yLabel, &series[i].YLabel}} {
			switch {
			case *l[1] == "":
			case *l[0] == "":
				*l[0] = *l[1]
			case *l[0] != *l[1]:
				return nil, fmt.Errorf("render: series[%d] %q: axis label %q differs from %q", i, s.Name, *l[1], *l[0])
			}
		}
	}
	for _, e := range o.edges {
		ylo, yhi = min(ylo, e.Y-e.Half), max(yhi, e.Y+e.Half)
	}
	// A little room above and below, so that no line runs along the frame.
	pad := 0.05 * (yhi - ylo)
	a := newAxes(title, xlo, xhi, ylo-pad, yhi+pad, xLabel, yLabel, true)
	var w writer
	w.openChart(&a, o, "lines")
	clip := o.id + "-plot"
	w.open("defs")
	w.open("clipPath", "id", clip)
	w.empty("rect", "x", num(a.left), "y", num(a.top-2), "width", num(a.right-a.left), "height", num(a.bottom-a.top+4))
	w.close("clipPath")
	w.close("defs")
	if len(o.edges) > 0 {
		w.open("g", "class", "edges", "clip-path", "url(#"+clip+")")
		for _, e := range o.edges {
			y0, y1 := a.py(e.Y+e.Half), a.py(e.Y-e.Half)
			w.empty("rect", "class", "hysteresis", "x", num(a.left), "y", num(y0), "width", num(a.right-a.left), "height", num(y1-y0),
				"fill", colMid, "fill-opacity", "0.16")
			w.empty("line", "class", "edge", "x1", num(a.left), "y1", num(a.py(e.Y)), "x2", num(a.right), "y2", num(a.py(e.Y)),
				"stroke", colMid, "stroke-width", "1.2", "stroke-dasharray", "6 3")
			w.text("text", e.Label, "x", num(a.right-4), "y", num(a.py(e.Y)-4), "text-anchor", "end", "font-size", "10",
				"font-family", "sans-serif", "fill", colInk, "stroke", colPaper, "stroke-width", "3", "paint-order", "stroke")
		}
		w.close("g")
	}
	w.open("g", "class", "series-lines", "clip-path", "url(#"+clip+")")
	w.raw("\n")
	names := make([]string, len(series))
	for i, s := range series {
		names[i] = s.Name
		st := seriesStyles[i%len(seriesStyles)]
		xy := make([][2]float64, len(s.X))
		for j := range s.X {
			xy[j] = [2]float64{a.px(s.X[j]), a.py(s.Y[j])}
		}
		kv := []string{"class", "series", "data-name", s.Name, "points", points(xy), "fill", "none",
			"stroke", st.color, "stroke-width", "2", "stroke-linejoin", "round"}
		if st.dash != "" {
			kv = append(kv, "stroke-dasharray", st.dash)
		}
		w.empty("polyline", kv...)
	}
	w.close("g")
	if o.cursor {
		// The page moves x1 and x2 to data-left + t·data-units-per-x.
		w.empty("line", "id", o.id+"-cursor", "class", "cursor", "x1", num(a.left), "y1", num(a.top), "x2", num(a.left), "y2", num(a.bottom),
			"data-left", strconv.FormatFloat(a.left-a.x0*(a.right-a.left)/(a.x1-a.x0), 'g', -1, 64),
			"data-units-per-x", strconv.FormatFloat((a.right-a.left)/(a.x1-a.x0), 'g', -1, 64),
			"stroke", colInk, "stroke-width", "1", "stroke-dasharray", "3 3")
	}
	if len(o.edges) > 0 {
		names = append(names, "band edge ± hysteresis")
	}
	w.chartLegend(o, &a, names, func(i int) {
		if i == len(series) {
			w.empty("rect", "x", "0", "y", "-5", "width", "22", "height", "10", "fill", colMid, "fill-opacity", "0.3")
			w.empty("line", "x1", "0", "y1", "0", "x2", "22", "y2", "0", "stroke", colMid, "stroke-dasharray", "6 3")
			return
		}
		st := seriesStyles[i%len(seriesStyles)]
		kv := []string{"x1", "0", "y1", "0", "x2", "22", "y2", "0", "stroke", st.color, "stroke-width", "2"}
		if st.dash != "" {
			kv = append(kv, "stroke-dasharray", st.dash)
		}
		w.empty("line", kv...)
	})
	w.close("svg")
	return w.b.Bytes(), nil
}

// groupColors colour bar groups in first-seen order; they cycle.
var groupColors = []string{colReference, colOther, colMid, colSlate, colFootprint, colNever}

// BarsSVG returns a bar chart (an SVG picture, UTF-8 XML) of bars in the
// order given, valueLabel naming the value axis (for example "markers"),
// with a legend of the groups by colour. Errors name the index of a
// non-finite value.
func BarsSVG(title, valueLabel string, bars ...Bar) ([]byte, error) {
	return barChart(title, valueLabel, bars, chartOpts{id: "chart", standalone: true})
}

func barChart(title, valueLabel string, bars []Bar, o chartOpts) ([]byte, error) {
	if len(bars) == 0 {
		return nil, fmt.Errorf("render: chart %q has no bars", title)
	}
	lo, hi := 0.0, 0.0
	var groups []string
	groupOf := map[string]int{}
	groupCol := map[string]string{}
	for i, b := range bars {
		if math.IsNaN(b.Value) || math.IsInf(b.Value, 0) {
			return nil, fmt.Errorf("render: bars[%d] %q: value %g is not finite", i, b.Label, b.Value)
		}
		lo, hi = min(lo, b.Value), max(hi, b.Value)
		if _, ok := groupOf[b.Group]; !ok {
			groupOf[b.Group] = len(groups)
			groups = append(groups, b.Group)
			groupCol[b.Group] = groupColors[groupOf[b.Group]%len(groupColors)]
			switch b.Tone {
			case ToneEarlier:
				groupCol[b.Group] = colEarly
			case ToneLater:
				groupCol[b.Group] = colLate
			}
		}
	}
	a := newAxes(title, 0, 1, lo, hi, "", valueLabel, false)
	// Slots: one per bar, and half a slot between clusters.
	slots := 0.0
	for i := range bars {
		if i > 0 && bars[i].Label != bars[i-1].Label {
			slots += 0.5
		}
		slots++
	}
	slotW := (a.right - a.left) / (slots + 0.5)
	var w writer
	w.openChart(&a, o, "bars")
	w.open("g", "class", "bars")
	w.raw("\n")
	font := []string{"font-size", "11", "font-family", "sans-serif", "fill", colInk}
	x := a.left + slotW/4
	clusterStart := x
	y0 := a.py(0)
	for i, b := range bars {
		if i > 0 && b.Label != bars[i-1].Label {
			x += slotW / 2
			clusterStart = x
		}
		yv := a.py(b.Value)
		top, h := min(yv, y0), math.Abs(yv-y0)
		w.empty("rect", "class", "bar", "data-label", b.Label, "data-group", b.Group,
			"data-value", strconv.FormatFloat(b.Value, 'g', -1, 64),
			"x", num(x+slotW*0.1), "y", num(top), "width", num(slotW*0.8), "height", num(h),
			"fill", groupCol[b.Group])
		w.text("text", strconv.FormatFloat(b.Value, 'g', 6, 64), append([]string{"x", num(x + slotW/2), "y", num(top - 4), "text-anchor", "middle"}, font...)...)
		x += slotW
		if i == len(bars)-1 || bars[i+1].Label != b.Label {
			w.text("text", b.Label, append([]string{"class", "bar-label", "x", num((clusterStart + x) / 2), "y", num(a.bottom + 16), "text-anchor", "middle"}, font...)...)
		}
	}
	w.close("g")
	names := groups
	if len(groups) == 1 && groups[0] == "" {
		names = []string{valueLabel}
	}
	w.chartLegend(o, &a, names, func(i int) {
		col := groupColors[i%len(groupColors)]
		if i < len(groups) {
			col = groupCol[groups[i]]
		}
		w.empty("rect", "x", "0", "y", "-6", "width", "22", "height", "12", "fill", col)
	})
	w.close("svg")
	return w.b.Bytes(), nil
}
