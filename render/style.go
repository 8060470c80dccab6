package render

import "github.com/viewspec/viewspec/timeline"

// The picture's own palette. Each marker style differs in shape as well as
// colour, so the pictures read in greyscale and for colour-blind readers.
const (
	colEarly     = "#1f9e6e" // green
	colMid       = "#e3a21a" // amber
	colLate      = "#c4453c" // brick red
	colNever     = "#8c939d" // grey
	colSlate     = "#37474f" // markers without a bucket
	colFootprint = "#3d7dd8" // blue
	colRoute     = "#6f6a64" // warm grey
	colUser      = "#111111"
	colInk       = "#222222"
	colPaper     = "#ffffff"
	colGrid      = "#d9d9d9"
)

// shape is a marker symbol, drawn about the origin with half-size markR.
type shape int

const (
	shapeCircle shape = iota
	shapeSquare
	shapeTriangle
	shapeDiamond
	shapeDot
)

// markR is the half-size of a marker symbol, picture units.
const markR = 6

// markStyle is how one class of markers is drawn and named in the legend.
type markStyle struct {
	class  string // CSS class on the marker's group
	label  string // legend text
	shape  shape
	fill   string
	stroke string
}

var (
	styleEarly  = markStyle{"bucket-early", "early (first shown before the first edge)", shapeCircle, colEarly, colPaper}
	styleMid    = markStyle{"bucket-mid", "mid (between the edges)", shapeSquare, colMid, colPaper}
	styleLate   = markStyle{"bucket-late", "late (from the second edge on)", shapeTriangle, colLate, colPaper}
	styleNever  = markStyle{"bucket-never", "never shown", shapeDiamond, colPaper, colNever}
	styleNoneBk = markStyle{"bucket-none", "no bucket given", shapeDot, colSlate, colPaper}
	styleIn     = markStyle{"in-view", "marker in view", shapeDot, colSlate, colPaper}
	styleOut    = markStyle{"out-of-view", "marker out of view", shapeDot, colPaper, colSlate}
)

// bucketStyle returns the style of a bucket.
func bucketStyle(b timeline.Bucket) markStyle {
	switch b {
	case timeline.Early:
		return styleEarly
	case timeline.Mid:
		return styleMid
	case timeline.Late:
		return styleLate
	}
	return styleNever
}

// bucketStyles are the four bucket styles in legend order.
var bucketStyles = []markStyle{styleEarly, styleMid, styleLate, styleNever}

// symbol writes a marker symbol about the origin.
func (w *writer) symbol(s shape, fill, stroke string) {
	r := float64(markR)
	common := []string{"fill", fill, "stroke", stroke, "stroke-width", "1.5"}
	switch s {
	case shapeCircle:
		w.empty("circle", append([]string{"r", num(r)}, common...)...)
	case shapeSquare:
		a := r * 0.9
		w.empty("rect", append([]string{"x", num(-a), "y", num(-a), "width", num(2 * a), "height", num(2 * a)}, common...)...)
	case shapeTriangle:
		w.empty("polygon", append([]string{"points", points([][2]float64{{0, -r * 1.15}, {r, r * 0.75}, {-r, r * 0.75}})}, common...)...)
	case shapeDiamond:
		w.empty("polygon", append([]string{"points", points([][2]float64{{0, -r}, {r, 0}, {0, r}, {-r, 0}}), "stroke-width", "2"}, common[:4]...)...)
	default:
		w.empty("circle", append([]string{"r", num(r * 0.75)}, common...)...)
	}
}
