package render

import (
	"encoding/json"
	"errors"
	"fmt"
	"strconv"

	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// pageData is the page's embedded recording (see the package doc), in
// picture units of its frame.
type pageData struct {
	TickS    float64      `json:"tick_s"`
	HorizonS float64      `json:"horizon_s"`
	Cap      int          `json:"cap"`
	Frame    pageFrame    `json:"frame"`
	Markers  []pageMarker `json:"markers"`
	Ticks    []pageTick   `json:"ticks"`
}

type pageFrame struct {
	CenterXM    float64 `json:"center_x_m"`
	CenterYM    float64 `json:"center_y_m"`
	OriginX     float64 `json:"origin_x"`
	OriginY     float64 `json:"origin_y"`
	UnitsPerM   float64 `json:"units_per_m"`
	GroundScale float64 `json:"ground_scale"`
}

type pageTick struct {
	TS         float64        `json:"t_s"`
	User       [2]float64     `json:"user"`
	HeadingDeg float64        `json:"heading_deg"`
	Zoom       float64        `json:"zoom"`
	PitchDeg   float64        `json:"pitch_deg"`
	Footprint  *[4][2]float64 `json:"footprint"`
	Shown      []string       `json:"shown"`
	Visible    []string       `json:"visible"`
	SpeedMps   float64        `json:"speed_mps"`
	Screen     pageScreen     `json:"screen"`
}

// driveArea fits the page's map to the user's path, the first footprint and
// every marker the drive has in view at some tick (or to WithSpanM around
// the start), in the frame of the drive's start. Later footprints, which at
// a steep pitch reach kilometres ahead, are clipped at the map's edge
// rather than shrinking the map.
func driveArea(rec *Recording, s *settings) (mapArea, error) {
	t0 := &rec.Ticks[0]
	pts := make([]viewport.Mercator, 0, len(rec.Ticks)+len(rec.Markers)+4)
	for i := range rec.Ticks {
		t := &rec.Ticks[i]
		if t.Footprint.Wrapped {
			return mapArea{}, fmt.Errorf("render: at t = %g s: %w", t.TS, errWrapped)
		}
		pts = append(pts, t.UserMercator)
	}
	if !t0.Footprint.Empty {
		pts = append(pts, t0.Footprint.Mercator[:]...)
	}
	for i, m := range rec.Markers {
		if rec.Timeline[i].Visible {
			pts = append(pts, viewport.ToMercator(m.Point))
		}
	}
	g := viewport.GroundScale(t0.User[1])
	f := fitFrame(t0.UserMercator, g, pts, s.mapW, s.mapH, mapPad, s.spanGroundM)
	return mapArea{w: s.mapW, h: s.mapH, frame: f}, nil
}

// pageDataOf returns rec in the picture units of f.
func pageDataOf(rec *Recording, f Frame, screens []pageScreen) pageData {
	pd := pageData{TickS: rec.TickS, HorizonS: rec.HorizonS, Cap: rec.Cap,
		Frame: pageFrame{f.Center.X, f.Center.Y, f.OriginX, f.OriginY, f.UnitsPerM, f.GroundScale},
		Ticks: make([]pageTick, len(rec.Ticks))}
	for i := range rec.Ticks {
		t := &rec.Ticks[i]
		ux, uy := f.Point(t.UserMercator)
		pt := pageTick{TS: t.TS, User: [2]float64{round7(ux), round7(uy)},
			HeadingDeg: t.HeadingDeg, Zoom: t.Zoom, PitchDeg: t.PitchDeg, Shown: t.Shown, Visible: t.Visible,
			SpeedMps: t.SpeedMps, Screen: screens[i]}
		if pt.Visible == nil {
			pt.Visible = []string{}
		}
		if !t.Footprint.Empty {
			var fp [4][2]float64
			for j, xy := range footprintPoints(f, &t.Footprint) {
				fp[j] = [2]float64{round7(xy[0]), round7(xy[1])}
			}
			pt.Footprint = &fp
		}
		pd.Ticks[i] = pt
	}
	return pd
}

// traceSeries returns zoom and pitch over time of rec, named name.
func traceSeries(rec *Recording, name string) (zoom, pitch Series) {
	n := len(rec.Ticks)
	zoom = Series{Name: name, XLabel: "time (s)", YLabel: "zoom level", X: make([]float64, n), Y: make([]float64, n)}
	pitch = Series{Name: name, XLabel: "time (s)", YLabel: "pitch (° from straight down)", X: make([]float64, n), Y: make([]float64, n)}
	for i, t := range rec.Ticks {
		zoom.X[i], zoom.Y[i] = t.TS, t.Zoom
		pitch.X[i], pitch.Y[i] = t.TS, t.PitchDeg
	}
	return zoom, pitch
}

// bucketCounts returns the number of markers in each bucket, indexed by
// timeline.Bucket.
func bucketCounts(rec *Recording) [4]int {
	var c [4]int
	for _, m := range rec.Timeline {
		c[m.Bucket]++
	}
	return c
}

// DriveHTML returns a self-contained HTML page (UTF-8; every script and
// style inline, nothing fetched) of the drive d with markers: a map, north
// up in the frame of the drive's start, of the route, the markers coloured
// by their bucket (from timeline.Compute), the footprint and the user, with
// a slider (input#time, one step a tick) that moves the user and the
// footprint and highlights the markers shown at that tick, the readouts
// span#time-s and span#shown-count; zoom and pitch over time; and a table
// of the markers' timeline answers. WithCompare adds a second rule set's
// zoom, pitch and buckets. The recording is embedded as JSON (see the
// package doc). Errors are RecordDrive's, or a view that wraps round the
// world at some tick.
func DriveHTML(d *timeline.Drive, markers []timeline.Marker, opts ...Option) ([]byte, error) {
	s, err := newSettings(opts)
	if err != nil {
		return nil, err
	}
	if d == nil {
		return nil, errors.New("render: no drive")
	}
	if err := d.Validate(); err != nil {
		return nil, err
	}
	// The screen view of every tick, drawn from the view the timeline used.
	merc := make([]viewport.Mercator, len(markers))
	for i, m := range markers {
		merc[i] = viewport.ToMercator(m.Point)
	}
	var screens []pageScreen
	var view0 viewport.View
	routeLine := []Street{{Points: d.Route.Points()}}
	dd := *d
	outer := d.OnTick
	dd.OnTick = func(k int, v *viewport.View, shown []int) {
		if k == 0 {
			view0 = *v
		}
		if v.Wrapped() {
			screens = append(screens, pageScreen{Markers: [][5]float64{}})
		} else {
			screens = append(screens, screenTick(v, s.streets, routeLine, merc))
		}
		if outer != nil {
			outer(k, v, shown)
		}
	}
	rec, err := RecordDrive(&dd, markers)
	if err != nil {
		return nil, err
	}
	var rec2 *Recording
	if s.compare != nil {
		r2, err := RecordDrive(s.compare, markers)
		if err != nil {
			return nil, fmt.Errorf("render: the compared drive (%s): %w", s.compareName, err)
		}
		rec2 = &r2
	}
	a, err := driveArea(&rec, &s)
	if err != nil {
		return nil, err
	}
	pd := pageDataOf(&rec, a.frame, screens)
	pd.Markers = pageMarkers(markers, rec.Timeline, s.names)
	data, err := json.Marshal(pd)
	if err != nil {
		return nil, err
	}
	t0 := &rec.Ticks[0]
	title := s.title
	if title == "" {
		title = fmt.Sprintf("Drive of %s from %s along the route, %g s, rules %s", lengthText(d.Route.LengthM()),
			lengthText(d.StartAlongM), d.HorizonS, s.rulesName)
		if rec2 != nil {
			title += " and " + s.compareName
		}
	}

	var w writer
	w.raw("<!DOCTYPE html>\n")
	w.open("html", "lang", "en")
	w.raw("\n<head>\n")
	w.empty("meta", "charset", "utf-8")
	w.empty("meta", "name", "viewport", "content", "width=device-width, initial-scale=1")
	w.text("title", title)
	w.raw("<style>/*<![CDATA[*/" + pageCSS + "/*]]>*/</style>\n</head>\n<body>\n")
	w.text("h1", title)

	// Summary.
	w.open("p", "class", "summary")
	w.raw(esc(fmt.Sprintf("Route %s, start %s along it at %s; %g s in ticks of %g s, at most %d markers shown at once, buckets at %g and %g s.",
		lengthText(d.Route.LengthM()), lengthText(d.StartAlongM), latLonText(t0.User), d.HorizonS, d.TickS, d.Cap,
		d.BucketEdgesS[0], d.BucketEdgesS[1])))
	w.close("p")
	w.open("ul", "class", "counts")
	for _, r := range []struct {
		name string
		rec  *Recording
	}{{s.rulesName, &rec}, {s.compareName, rec2}} {
		if r.rec == nil {
			continue
		}
		c := bucketCounts(r.rec)
		w.text("li", fmt.Sprintf("%s: %d early, %d mid, %d late, %d never (of %d markers)",
			r.name, c[timeline.Early], c[timeline.Mid], c[timeline.Late], c[timeline.Never], len(markers)))
	}
	w.close("ul")

	// Controls.
	k0 := t0.Shown
	w.open("div", "class", "controls")
	w.text("button", "▶ play", "type", "button", "id", "play")
	w.text("label", "time", "for", "time")
	w.empty("input", "type", "range", "id", "time", "min", "0", "max", strconv.Itoa(len(rec.Ticks)-1), "step", "1", "value", "0")
	w.open("span", "class", "readout")
	w.raw("t = ")
	w.inline("span", fmt.Sprintf("%.2f", t0.TS), "id", "time-s")
	w.raw(" s · shown ")
	w.inline("span", strconv.Itoa(len(k0)), "id", "shown-count")
	w.raw(esc(fmt.Sprintf(" (at most %d) · zoom ", d.Cap)))
	w.inline("span", fmt.Sprintf("%.2f", t0.Zoom), "id", "zoom-now")
	w.raw(" · pitch ")
	w.inline("span", fmt.Sprintf("%.1f", t0.PitchDeg), "id", "pitch-now")
	w.raw("° · heading ")
	w.inline("span", fmt.Sprintf("%.1f", t0.HeadingDeg), "id", "heading-now")
	w.raw("° · speed ")
	w.inline("span", fmt.Sprintf("%.0f", t0.SpeedMps*3.6), "id", "speed-now")
	w.raw(" km/h")
	w.close("span")
	w.close("div")

	// The map.
	shown0 := make(map[string]bool, len(k0))
	for _, id := range k0 {
		shown0[id] = true
	}
	w.open("div", "class", "views")
	w.open("div", "class", "map")
	width := a.w + panelW
	items := []legendItem{footprintItem, routeItem}
	if len(s.streets) > 0 {
		items = append(items, streetItem)
	}
	items = append(items, userItem)
	for _, st := range resultStyles {
		items = append(items, markerItem(st))
	}
	items = append(items, legendItem{"legend-shown", "shown at this tick", func(w *writer) {
		w.empty("circle", "r", "11", "fill", "none", "stroke", colUser, "stroke-width", "2.5")
		w.empty("circle", "r", "4", "fill", colSlate)
	}})
	legendH := 30 + float64(len(items)+1)*legendRow
	height := max(a.h, legendH+80)
	w.open("svg", append([]string{"id", "drive-map", "width", num(width), "height", num(height),
		"viewBox", "0 0 " + num(width) + " " + num(height)}, frameAttrs(a.frame)...)...)
	w.raw("\n")
	w.text("title", "Map of the drive, north up")
	w.empty("rect", "x", "0", "y", "0", "width", num(width), "height", num(height), "fill", colPaper)
	w.openMap(&a)
	w.streets(&a, s.streets)
	w.route(&a, d.Route.Points())
	w.footprint(&a, &t0.Footprint)
	outside := w.markers(&a, markers, func(i int) markStyle { return resultStyle(rec.Timeline[i]) }, shown0, s.names)
	ux, uy := a.frame.Point(t0.UserMercator)
	w.user(ux, uy, t0.HeadingDeg)
	w.close("g")
	w.northArrow(&a)
	w.scaleBar(&a)
	w.legend(a.w+20, 30, "Legend", items)
	w.caption(a.w+20, legendH+30, []string{
		fmt.Sprintf("buckets by %s", s.rulesName),
		fmt.Sprintf("%d of %d markers outside the map", outside, len(markers)),
	})
	w.close("svg")
	w.close("div")
	w.open("div", "class", "screen")
	w.screenPanel(&view0, screens[0], resultStyles)
	w.close("div")
	w.close("div")

	// Charts.
	zoom, pitch := traceSeries(&rec, s.rulesName)
	zs, ps := []Series{zoom}, []Series{pitch}
	if rec2 != nil {
		z2, p2 := traceSeries(rec2, s.compareName)
		zs, ps = append(zs, z2), append(ps, p2)
	}
	speed := Series{Name: "speed fed to " + s.rulesName, XLabel: "time (s)", YLabel: "speed (km/h)"}
	for _, t := range rec.Ticks {
		speed.X, speed.Y = append(speed.X, t.TS), append(speed.Y, t.SpeedMps*3.6)
	}
	var edges []chartEdge
	for i, b := range d.Rules.Bands {
		if b.BelowKmh != nil {
			edges = append(edges, chartEdge{Y: *b.BelowKmh, Half: d.Rules.HysteresisKmh,
				Label: fmt.Sprintf("edge %d|%d: %g km/h ± %g", i, i+1, *b.BelowKmh, d.Rules.HysteresisKmh)})
		}
	}
	w.open("div", "class", "charts")
	w.raw("\n")
	for _, c := range []struct {
		id, title string
		series    []Series
		edges     []chartEdge
	}{{"zoom-chart", "Zoom over time", zs, nil},
		{"speed-chart", "Speed over time, with the band edges of " + s.rulesName + " and their hysteresis", []Series{speed}, edges},
		{"pitch-chart", "Pitch over time", ps, nil}} {
		svg, err := lineChart(c.title, c.series, chartOpts{id: c.id, cursor: true, edges: c.edges})
		if err != nil {
			return nil, err
		}
		w.b.Write(svg)
	}
	w.b.Write(ganttSVG(&rec, s.names))
	if rec2 != nil {
		c1, c2 := bucketCounts(&rec), bucketCounts(rec2)
		var bars []Bar
		for _, b := range []timeline.Bucket{timeline.Early, timeline.Mid, timeline.Late, timeline.Never} {
			bars = append(bars, Bar{Label: b.String(), Group: s.rulesName, Value: float64(c1[b])},
				Bar{Label: b.String(), Group: s.compareName, Value: float64(c2[b])})
		}
		svg, err := barChart("Markers per bucket", "markers", bars, chartOpts{id: "buckets-chart"})
		if err != nil {
			return nil, err
		}
		w.b.Write(svg)
	}
	w.close("div")

	w.markerTable(&rec, rec2, s.rulesName, s.compareName, shown0, s.names)

	w.raw(`<script id="recording" type="application/json">`)
	w.b.Write(data) // json.Marshal escapes <, > and &, so the text cannot end the element
	w.raw("</script>\n<script>//<![CDATA[\n" + pageJS + "//]]></script>\n</body>\n</html>\n")
	return w.b.Bytes(), nil
}

// markerTable writes #markers-table: each marker's timeline answer, and its
// bucket under the compared rules when there are any.
func (w *writer) markerTable(rec, rec2 *Recording, name, name2 string, shown0 map[string]bool, names map[string]string) {
	opt := func(ok bool, v float64) string {
		if !ok {
			return "—"
		}
		return strconv.FormatFloat(v, 'f', 2, 64)
	}
	w.open("table", "id", "markers-table")
	w.raw("\n<thead>")
	w.open("tr")
	heads := []string{"marker", "name", "priority", "first visible (s)", "first shown (s)", "shown (s)", "bucket, " + name}
	if rec2 != nil {
		heads = append(heads, "bucket, "+name2)
	}
	for _, h := range heads {
		w.text("th", h)
	}
	w.close("tr")
	w.raw("</thead>\n<tbody>\n")
	for i, m := range rec.Markers {
		o := rec.Timeline[i]
		class := resultStyle(o).class
		if rec2 != nil && rec2.Timeline[i].Bucket != o.Bucket {
			class += " moved"
		}
		if shown0[m.ID] {
			class += " shown"
		}
		w.open("tr", "data-id", m.ID, "class", class)
		w.text("td", m.ID)
		w.text("td", names[m.ID], "class", "name")
		w.text("td", strconv.FormatFloat(m.Priority, 'g', -1, 64))
		w.text("td", opt(o.Visible, o.FirstVisibleS))
		w.text("td", opt(o.Shown, o.FirstShownS))
		w.text("td", strconv.FormatFloat(o.ShownS, 'f', 2, 64))
		bucket := o.Bucket.String()
		if o.Bucket == timeline.Never {
			if o.Visible {
				bucket += " (crowded out)"
			} else {
				bucket += " (never in view)"
			}
		}
		w.text("td", bucket, "class", "bucket")
		if rec2 != nil {
			w.text("td", rec2.Timeline[i].Bucket.String(), "class", "bucket2")
		}
		w.close("tr")
	}
	w.raw("</tbody>\n")
	w.close("table")
}

// pageCSS is the page's style: system fonts only, nothing fetched.
const pageCSS = `
body { font: 14px/1.4 sans-serif; margin: 16px; color: #222; background: #fff; }
h1 { font-size: 19px; margin: 0 0 6px; }
.summary, .counts { margin: 4px 0; }
.controls { display: flex; gap: 12px; align-items: center; flex-wrap: wrap; margin: 10px 0; }
#time { width: 460px; max-width: 100%; }
.readout { font-variant-numeric: tabular-nums; }
svg { max-width: 100%; height: auto; display: block; margin: 8px 0; }
.halo { visibility: hidden; }
.shown .halo { visibility: visible; }
#footprint.empty { display: none; }
.views { display: flex; gap: 16px; flex-wrap: wrap; align-items: flex-start; }
.views svg { margin: 0; }
#play { font: inherit; padding: 2px 10px; min-width: 78px; }
td.name { text-align: left; color: #444; }
table { border-collapse: collapse; margin: 12px 0; }
th, td { border-bottom: 1px solid #ddd; padding: 2px 10px; text-align: right; }
th:first-child, td:first-child { text-align: left; }
tr.shown { background: #fff1bf; }
tr.moved td.bucket2 { font-weight: bold; }
td.bucket { color: #444; }
tr.bucket-early td.bucket { color: #007a5a; }
tr.bucket-mid td.bucket { color: #9a6a00; }
tr.bucket-late td.bucket { color: #b34a00; }
tr.crowded-out td.bucket { font-style: italic; }
`

// pageJS moves the pictures to the slider's tick. It reads the recording,
// sets the map's footprint and user from the tick's picture coordinates,
// marks the shown markers (map and table) with the class "shown", redraws
// the screen view from the tick's screen data (paths, rows, markers at the
// pixels the reference computed; labels for the shown markers placed so
// that they do not overlap), writes the readouts and moves the charts'
// cursors. The play button steps the slider in real time.
const pageJS = `(function () {
  "use strict";
  var NS = document.getElementById("screen-view").namespaceURI;
  var STATES = ["in-view", "outside-clear", "beyond-far"];
  var data = JSON.parse(document.getElementById("recording").textContent);
  var ticks = data.ticks;
  var slider = document.getElementById("time");
  var footprint = document.getElementById("footprint");
  var user = document.getElementById("user");
  var play = document.getElementById("play");
  var scr = {
    footprint: document.getElementById("screen-footprint"),
    streets: document.getElementById("screen-streets"),
    route: document.getElementById("screen-route"),
    far: document.getElementById("screen-far-row"),
    horizon: document.getElementById("screen-horizon"),
    north: document.getElementById("screen-north-arrow"),
    markers: document.getElementById("screen-markers"),
    scaleLine: document.getElementById("screen-scale-bar-line"),
    scaleText: document.getElementById("screen-scale-bar-text")
  };
  var northBase = scr.north.getAttribute("transform").replace(/ rotate\([^)]*\)$/, "");
  var northAt = /translate\(([-0-9.e]+) ([-0-9.e]+)\)/.exec(northBase);
  var northBox = [Number(northAt[1]) - 17, Number(northAt[2]) - 17, Number(northAt[1]) + 17, Number(northAt[2]) + 17];
  var out = {
    time: document.getElementById("time-s"),
    count: document.getElementById("shown-count"),
    zoom: document.getElementById("zoom-now"),
    pitch: document.getElementById("pitch-now"),
    heading: document.getElementById("heading-now"),
    speed: document.getElementById("speed-now")
  };
  var byId = new Map();
  document.querySelectorAll("#drive-map [data-id], #markers-table [data-id]").forEach(function (el) {
    var id = el.getAttribute("data-id");
    if (!byId.has(id)) { byId.set(id, []); }
    byId.get(id).push(el);
  });
  var cursors = Array.prototype.slice.call(document.querySelectorAll("line.cursor"));
  var lit = Array.prototype.slice.call(document.querySelectorAll(".shown"));
  function el(name, attrs) {
    var e = document.createElementNS(NS, name);
    Object.keys(attrs).forEach(function (k) { e.setAttribute(k, attrs[k]); });
    return e;
  }
  function row(g, y) {
    if (y === null) { g.setAttribute("visibility", "hidden"); return; }
    g.setAttribute("visibility", "visible");
    g.setAttribute("transform", "translate(0 " + y + ")");
  }
  var SPOTS = [[9, 4, 0], [-9, 4, 1], [8, -9, 0], [8, 17, 0], [-8, -9, 1], [-8, 17, 1], [26, -22, 0], [-26, -22, 1], [26, 30, 0], [-26, 30, 1]];
  function screen(t) {
    var sc = t.screen;
    scr.footprint.setAttribute("points", sc.footprint);
    scr.streets.setAttribute("d", sc.streets);
    scr.route.setAttribute("d", sc.route);
    row(scr.far, sc.far_y);
    row(scr.horizon, sc.horizon_y);
    scr.north.setAttribute("transform", northBase + " rotate(" + (-t.heading_deg) + ")");
    if (sc.scale) {
      scr.scaleLine.setAttribute("x1", sc.scale[0]); scr.scaleLine.setAttribute("x2", sc.scale[1]);
      scr.scaleLine.setAttribute("y1", sc.scale[2]); scr.scaleLine.setAttribute("y2", sc.scale[2]);
      scr.scaleText.setAttribute("x", sc.scale[1]); scr.scaleText.setAttribute("y", sc.scale[2] - 6);
      var m = sc.scale[3];
      scr.scaleText.textContent = (m >= 1000 ? (m / 1000) + " km" : m + " m") + " at the user's row";
    }
    while (scr.markers.firstChild) { scr.markers.removeChild(scr.markers.firstChild); }
    var shown = new Set(t.shown);
    var boxes = [northBox];
    sc.markers.forEach(function (m) { boxes.push([m[1] - 6, m[2] - 6, m[1] + 6, m[2] + 6]); });
    var order = sc.markers.slice().sort(function (a, b) {
      return (shown.has(data.markers[a[0]].id) ? 0 : 1) - (shown.has(data.markers[b[0]].id) ? 0 : 1);
    });
    order.forEach(function (m) {
      var info = data.markers[m[0]];
      var isShown = shown.has(info.id);
      var cls = "smarker state-" + STATES[m[3]] + (isShown ? " shown" : "") + (m[4] ? " pinned" : "");
      var g = el("g", { "class": cls, "data-id": info.id, "data-state": STATES[m[3]], transform: "translate(" + m[1] + " " + m[2] + ")" });
      if (m[3] !== 0) { g.setAttribute("opacity", "0.35"); }
      var title = el("title", {});
      title.textContent = info.name + (info.name !== info.id ? " (" + info.id + ")" : "") + ": " + STATES[m[3]].replace(/-/g, " ");
      g.appendChild(title);
      if (isShown) { g.appendChild(el("circle", { "class": "halo", r: "10.5", fill: "none", stroke: "#111111", "stroke-width": "2.5" })); }
      g.appendChild(el("use", { href: "#sym-" + info.style }));
      if (isShown && !m[4]) {
        var wd = 6.1 * info.name.length + 4;
        for (var i = 0; i < SPOTS.length; i++) {
          var s = SPOTS[i], x = m[1] + s[0], y = m[2] + s[1];
          var b = s[2] ? [x - wd, y - 10, x, y + 4] : [x, y - 10, x + wd, y + 4];
          var free = boxes.every(function (o) { return !(b[0] < o[2] && o[0] < b[2] && b[1] < o[3] && o[1] < b[3]); });
          if (!free) { continue; }
          boxes.push(b);
          if (i >= 6) {
            g.appendChild(el("line", { "class": "leader", x1: 0, y1: 0, x2: s[0] + (s[2] ? 3 : -3), y2: s[1] - 4, stroke: "#222222", "stroke-width": "0.8" }));
          }
          var tx = el("text", { "class": "marker-label", x: s[0], y: s[1], "text-anchor": s[2] ? "end" : "start", "font-size": "11",
            "font-family": "sans-serif", fill: "#222222", stroke: "#ffffff", "stroke-width": "3", "paint-order": "stroke" });
          tx.textContent = info.name;
          g.appendChild(tx);
          break;
        }
      }
      scr.markers.appendChild(g);
    });
  }
  function show(k) {
    var t = ticks[k];
    if (!t) { return; }
    if (t.footprint) {
      footprint.setAttribute("points", t.footprint.map(function (p) { return p[0] + "," + p[1]; }).join(" "));
      footprint.setAttribute("class", "footprint");
    } else {
      footprint.setAttribute("points", "");
      footprint.setAttribute("class", "empty");
    }
    user.setAttribute("transform", "translate(" + t.user[0] + " " + t.user[1] + ") rotate(" + t.heading_deg + ")");
    lit.forEach(function (el) { el.classList.remove("shown"); });
    lit = [];
    t.shown.forEach(function (id) {
      (byId.get(id) || []).forEach(function (el) { el.classList.add("shown"); lit.push(el); });
    });
    screen(t);
    out.time.textContent = t.t_s.toFixed(2);
    out.count.textContent = String(t.shown.length);
    out.zoom.textContent = t.zoom.toFixed(2);
    out.pitch.textContent = t.pitch_deg.toFixed(1);
    out.heading.textContent = t.heading_deg.toFixed(1);
    out.speed.textContent = (t.speed_mps * 3.6).toFixed(0);
    cursors.forEach(function (c) {
      var x = Number(c.getAttribute("data-left")) + t.t_s * Number(c.getAttribute("data-units-per-x"));
      c.setAttribute("x1", x);
      c.setAttribute("x2", x);
    });
  }
  var timer = null;
  function stop() {
    if (timer !== null) { clearInterval(timer); timer = null; }
    play.textContent = "\u25b6 play";
  }
  play.addEventListener("click", function () {
    if (timer !== null) { stop(); return; }
    if (Number(slider.value) >= ticks.length - 1) { slider.value = "0"; }
    play.textContent = "\u275a\u275a pause";
    timer = setInterval(function () {
      var k = Number(slider.value) + 1;
      if (k >= ticks.length) { stop(); return; }
      slider.value = String(k);
      show(k);
    }, data.tick_s * 1000);
  });
  slider.addEventListener("input", function () { stop(); show(Number(slider.value)); });
  show(Number(slider.value));
})();
`
