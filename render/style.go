package render

import "github.com/viewspec/viewspec/timeline"

// The one colour and shape code of every picture (see the package doc,
// "The colour code"). Colours are the Okabe–Ito set, which stays apart for
// the common forms of colour blindness; every code that a colour carries
// is carried by a shape, a dash or a fill as well, so that no picture
// depends on telling red from green.
const (
	colEarly     = "#009e73" // bluish green: early, earlier
	colMid       = "#e69f00" // orange: mid
	colLate      = "#d55e00" // vermillion: late, later
	colNever     = "#8c939d" // grey: never shown
	colSlate     = "#37474f" // markers drawn by their in-view state
	colReference = "#0072b2" // blue: the reference's answer, the first rule set
	colOther     = "#cc79a7" // reddish purple: the other implementation, the compared rule set
	colFootprint = "#56b4e9" // sky blue: the ground in view
	colRoute     = "#6f6a64" // warm grey
	colStreet    = "#b9b2a6" // light warm grey
	colUser      = "#111111"
	colInk       = "#222222"
	colPaper     = "#ffffff"
	colGrid      = "#d9d9d9"
	colInset     = "#9aa3ad" // screen edges covered by UI, drawn with a hatch
	colBeyond    = "#e4e9ef" // ground beyond the far limit, and the sky above the horizon
	colEdge      = "#000000" // the edge that decides an in-view answer
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
	dash   bool // a dashed outline
}

var (
	styleEarly   = markStyle{class: "bucket-early", label: "early (first shown before the first edge)", shape: shapeCircle, fill: colEarly, stroke: colPaper}
	styleMid     = markStyle{class: "bucket-mid", label: "mid (between the edges)", shape: shapeSquare, fill: colMid, stroke: colPaper}
	styleLate    = markStyle{class: "bucket-late", label: "late (from the second edge on)", shape: shapeTriangle, fill: colLate, stroke: colPaper}
	styleNever   = markStyle{class: "bucket-never", label: "never shown", shape: shapeDiamond, fill: colPaper, stroke: colNever}
	styleCrowded = markStyle{class: "bucket-never crowded-out", label: "never shown, though in view: crowded out by the cap", shape: shapeDiamond, fill: colNever, stroke: colInk}
	styleUnseen  = markStyle{class: "bucket-never never-in-view", label: "never shown: never in view", shape: shapeDiamond, fill: colPaper, stroke: colNever}
	styleNoneBk  = markStyle{class: "bucket-none", label: "no bucket given", shape: shapeDot, fill: colSlate, stroke: colPaper}
	styleIn      = markStyle{class: "in-view", label: "marker in view", shape: shapeDot, fill: colSlate, stroke: colPaper}
	styleOut     = markStyle{class: "out-of-view", label: "marker out of view", shape: shapeDot, fill: colPaper, stroke: colSlate}

	// On the screen, what the reference says of each marker's pixel.
	styleOutClear = markStyle{class: "outside-clear", label: "outside the clear area (under UI, off the side)", shape: shapeDot, fill: colPaper, stroke: colSlate}
	styleBeyond   = markStyle{class: "beyond-far", label: "beyond the far limit (deeper than k·f)", shape: shapeDot, fill: colPaper, stroke: colSlate, dash: true}
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

// resultStyle returns the style of a marker's timeline answer: its
// bucket's, with "never" split into crowded out (in view at some tick but
// never given a slot) and never in view.
func resultStyle(r timeline.Result) markStyle {
	if r.Bucket != timeline.Never {
		return bucketStyle(r.Bucket)
	}
	if r.Visible {
		return styleCrowded
	}
	return styleUnseen
}

// bucketStyles are the four bucket styles in legend order.
var bucketStyles = []markStyle{styleEarly, styleMid, styleLate, styleNever}

// resultStyles are the styles of timeline answers in legend order.
var resultStyles = []markStyle{styleEarly, styleMid, styleLate, styleCrowded, styleUnseen}

// symbol writes a marker symbol about the origin.
func (w *writer) symbol(s shape, fill, stroke string) {
	w.symbolStyled(markStyle{shape: s, fill: fill, stroke: stroke})
}

// symbolStyled writes st's symbol about the origin.
func (w *writer) symbolStyled(st markStyle) {
	r := float64(markR)
	common := []string{"fill", st.fill, "stroke", st.stroke, "stroke-width", "1.5"}
	if st.dash {
		common = append(common, "stroke-dasharray", "2.5 1.5")
	}
	switch st.shape {
	case shapeCircle:
		w.empty("circle", append([]string{"r", num(r)}, common...)...)
	case shapeSquare:
		a := r * 0.9
		w.empty("rect", append([]string{"x", num(-a), "y", num(-a), "width", num(2 * a), "height", num(2 * a)}, common...)...)
	case shapeTriangle:
		w.empty("polygon", append([]string{"points", points([][2]float64{{0, -r * 1.15}, {r, r * 0.75}, {-r, r * 0.75}})}, common...)...)
	case shapeDiamond:
		kv := []string{"points", points([][2]float64{{0, -r}, {r, 0}, {0, r}, {-r, 0}}), "fill", st.fill, "stroke", st.stroke, "stroke-width", "2"}
		w.empty("polygon", kv...)
	default:
		w.empty("circle", append([]string{"r", num(r * 0.75)}, common...)...)
	}
}
