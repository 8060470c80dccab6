package render

import (
	"fmt"
	"sort"
	"strconv"
)

// Layout of the marker timeline, picture units.
const (
	ganttLabelW  = 170.0 // the marker names' column
	ganttRowH    = 15.0
	ganttStripH  = 64.0 // the in-view count over the cap
	ganttMaxRows = 60
)

// ganttRun is a run of consecutive ticks, [from, to] tick indices.
type ganttRun struct{ from, to int }

// runsOf returns the runs of ticks k with in(k).
func runsOf(n int, in func(k int) bool) []ganttRun {
	var out []ganttRun
	for k := 0; k < n; k++ {
		if !in(k) {
			continue
		}
		start := k
		for k+1 < n && in(k+1) {
			k++
		}
		out = append(out, ganttRun{start, k})
	}
	return out
}

// ganttSVG writes svg#gantt-chart: a row per marker in view at some tick
// (first in view first, at most ganttMaxRows), its ticks in view as an
// outlined bar and its ticks shown as a bar filled in its bucket's colour
// (so a marker crowded out by the cap is an outline with no fill), and
// above the rows the number of markers in view against the cap, shaded
// where there are more than the cap (contention). A cursor line follows
// the page's slider.
func ganttSVG(rec *Recording, names map[string]string) []byte {
	n := len(rec.Ticks)
	idx := map[string]int{}
	for i, m := range rec.Markers {
		idx[m.ID] = i
	}
	visible := make([]map[int]bool, len(rec.Markers))
	shown := make([]map[int]bool, len(rec.Markers))
	for i := range rec.Markers {
		visible[i], shown[i] = map[int]bool{}, map[int]bool{}
	}
	for k, t := range rec.Ticks {
		for _, id := range t.Visible {
			visible[idx[id]][k] = true
		}
		for _, id := range t.Shown {
			shown[idx[id]][k] = true
		}
	}
	var rows []int
	for i, r := range rec.Timeline {
		if r.Visible {
			rows = append(rows, i)
		}
	}
	sort.SliceStable(rows, func(a, b int) bool {
		return rec.Timeline[rows[a]].FirstVisibleS < rec.Timeline[rows[b]].FirstVisibleS
	})
	more := 0
	if len(rows) > ganttMaxRows {
		rows, more = rows[:ganttMaxRows], len(rows)-ganttMaxRows
	}
	left, right := ganttLabelW, chartW-chartRight
	top := chartTop + ganttStripH + 12
	height := top + float64(len(rows))*ganttRowH + 40
	span := rec.HorizonS
	if span <= 0 {
		span = 1
	}
	px := func(tS float64) float64 { return left + tS/span*(right-left) }
	tickW := rec.TickS / span * (right - left)

	var w writer
	title := "Each marker over time: in view (outline) and shown (filled)"
	w.open("svg", "id", "gantt-chart", "class", "chart gantt", "width", num(chartW), "height", num(height),
		"viewBox", "0 0 "+num(chartW)+" "+num(height))
	w.raw("\n")
	w.text("title", title)
	w.empty("rect", "x", "0", "y", "0", "width", num(chartW), "height", num(height), "fill", colPaper)
	w.text("text", title, "x", num(chartLeft), "y", "20", "font-size", "14", "font-weight", "bold", "font-family", "sans-serif", "fill", colInk)
	font := []string{"font-size", "10", "font-family", "sans-serif", "fill", colInk}
	// Legend.
	w.open("g", "id", "gantt-legend", "class", "legend", "transform", "translate("+num(chartLeft)+" 40)")
	w.empty("rect", "x", "0", "y", "-5", "width", "22", "height", "10", "fill", "none", "stroke", colSlate)
	w.text("text", "in view", append([]string{"x", "28", "y", "4"}, font...)...)
	w.empty("rect", "x", "80", "y", "-3", "width", "22", "height", "6", "fill", colEarly)
	w.text("text", "shown (bucket's colour)", append([]string{"x", "108", "y", "4"}, font...)...)
	w.empty("rect", "x", "240", "y", "-6", "width", "22", "height", "12", "fill", "url(#gantt-hatch)")
	w.text("text", "more in view than the cap: contention", append([]string{"x", "268", "y", "4"}, font...)...)
	w.close("g")
	w.open("defs")
	w.open("pattern", "id", "gantt-hatch", "width", "6", "height", "6", "patternUnits", "userSpaceOnUse", "patternTransform", "rotate(45)")
	w.empty("rect", "width", "6", "height", "6", "fill", "#fbe3c0")
	w.empty("line", "x1", "0", "y1", "0", "x2", "0", "y2", "6", "stroke", colMid, "stroke-width", "1.5")
	w.close("pattern")
	w.close("defs")

	// The in-view count against the cap.
	maxCount := rec.Cap
	for _, t := range rec.Ticks {
		maxCount = max(maxCount, len(t.Visible))
	}
	s0, s1 := chartTop, chartTop+ganttStripH
	cy := func(c int) float64 { return s1 - float64(c)/float64(max(1, maxCount))*(s1-s0) }
	for _, r := range runsOf(n, func(k int) bool { return len(rec.Ticks[k].Visible) > rec.Cap }) {
		x0 := px(rec.Ticks[r.from].TS) - tickW/2
		w.empty("rect", "class", "contention", "x", num(max(left, x0)), "y", num(s0), "width", num(float64(r.to-r.from+1)*tickW),
			"height", num(s1-s0), "fill", "url(#gantt-hatch)")
	}
	xy := make([][2]float64, 0, 2*n)
	for k, t := range rec.Ticks {
		y := cy(len(t.Visible))
		if k > 0 {
			xy = append(xy, [2]float64{px(t.TS), xy[len(xy)-1][1]})
		}
		xy = append(xy, [2]float64{px(t.TS), y})
	}
	w.empty("polyline", "id", "in-view-count", "points", points(xy), "fill", "none", "stroke", colSlate, "stroke-width", "1.5")
	w.empty("line", "id", "cap-line", "x1", num(left), "y1", num(cy(rec.Cap)), "x2", num(right), "y2", num(cy(rec.Cap)),
		"stroke", colInk, "stroke-width", "1", "stroke-dasharray", "5 3")
	w.text("text", fmt.Sprintf("in view (cap %d)", rec.Cap), append([]string{"x", num(left - 6), "y", num(cy(rec.Cap) + 4), "text-anchor", "end"}, font...)...)
	w.text("text", strconv.Itoa(maxCount), append([]string{"x", num(left - 6), "y", num(s0 + 8), "text-anchor", "end"}, font...)...)

	// The rows.
	for r, i := range rows {
		m := rec.Markers[i]
		y := top + float64(r)*ganttRowH
		st := resultStyle(rec.Timeline[i])
		w.open("g", "class", "gantt-row "+st.class, "data-id", m.ID, "transform", "translate(0 "+num(y)+")")
		w.text("text", nameOf(names, m.ID), append([]string{"x", num(left - 6), "y", "4", "text-anchor", "end"}, font...)...)
		for _, run := range runsOf(n, func(k int) bool { return visible[i][k] }) {
			x0 := px(rec.Ticks[run.from].TS)
			w.empty("rect", "class", "in-view", "x", num(x0), "y", "-5", "width", num(max(tickW, float64(run.to-run.from)*tickW)), "height", "10",
				"fill", "none", "stroke", colSlate, "stroke-width", "1")
		}
		fill := st.fill
		if fill == colPaper {
			fill = colNever
		}
		for _, run := range runsOf(n, func(k int) bool { return shown[i][k] }) {
			x0 := px(rec.Ticks[run.from].TS)
			w.empty("rect", "class", "shown", "x", num(x0), "y", "-3", "width", num(max(tickW, float64(run.to-run.from)*tickW)), "height", "6",
				"fill", fill)
		}
		w.close("g")
	}
	// The time axis.
	bottom := top + float64(len(rows))*ganttRowH
	_, _, step := niceRange(0, span)
	for t := 0.0; t <= span+step*1e-9; t += step {
		x := px(t)
		w.empty("line", "x1", num(x), "y1", num(s0), "x2", num(x), "y2", num(bottom), "stroke", colGrid, "stroke-width", "0.7")
		w.text("text", tickText(t, step), append([]string{"x", num(x), "y", num(bottom + 14), "text-anchor", "middle"}, font...)...)
	}
	note := "time (s)"
	if more > 0 {
		note += fmt.Sprintf("; %d more markers in view at some time not listed", more)
	}
	w.text("text", note, append([]string{"x", num((left + right) / 2), "y", num(bottom + 30), "text-anchor", "middle"}, font...)...)
	w.empty("line", "id", "gantt-chart-cursor", "class", "cursor", "x1", num(left), "y1", num(s0), "x2", num(left), "y2", num(bottom),
		"data-left", strconv.FormatFloat(left, 'g', -1, 64),
		"data-units-per-x", strconv.FormatFloat((right-left)/span, 'g', -1, 64),
		"stroke", colInk, "stroke-width", "1", "stroke-dasharray", "3 3")
	w.close("svg")
	return w.b.Bytes()
}
