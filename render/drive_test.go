package render_test

import (
	"encoding/json"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// pageJSON is the page's recording as the package doc describes it.
type pageJSON struct {
	TickS    float64 `json:"tick_s"`
	HorizonS float64 `json:"horizon_s"`
	Cap      int     `json:"cap"`
	Frame    struct {
		CenterXM    float64 `json:"center_x_m"`
		CenterYM    float64 `json:"center_y_m"`
		OriginX     float64 `json:"origin_x"`
		OriginY     float64 `json:"origin_y"`
		UnitsPerM   float64 `json:"units_per_m"`
		GroundScale float64 `json:"ground_scale"`
	} `json:"frame"`
	Ticks []struct {
		TS         float64        `json:"t_s"`
		User       [2]float64     `json:"user"`
		HeadingDeg float64        `json:"heading_deg"`
		Zoom       float64        `json:"zoom"`
		PitchDeg   float64        `json:"pitch_deg"`
		Footprint  *[4][2]float64 `json:"footprint"`
		Shown      []string       `json:"shown"`
	} `json:"ticks"`
}

// pageRecording returns the page's embedded recording.
func pageRecording(t testing.TB, root *node) pageJSON {
	t.Helper()
	s := root.byID(t, "recording")
	if s.XMLName.Local != "script" || s.get("type") != "application/json" {
		t.Fatalf("#recording is <%s type=%q>, want a JSON script", s.XMLName.Local, s.get("type"))
	}
	var p pageJSON
	if err := json.Unmarshal([]byte(s.Text), &p); err != nil {
		t.Fatalf("recording: %v", err)
	}
	return p
}

// externalRef matches what would make a page fetch something.
var externalRef = regexp.MustCompile(`(?i)(https?:|//[a-z0-9.-]+\.[a-z]{2,}/|@import|<link\b|\bsrc\s*=|fetch\(|XMLHttpRequest|\burl\((?:[^#)]))`)

// checkSelfContained fails when the page could load anything: no network
// URL anywhere, no src, every href and url() a fragment of the page.
func checkSelfContained(t testing.TB, page []byte, root *node) {
	t.Helper()
	if m := externalRef.Find(page); m != nil {
		t.Errorf("page refers outside itself: %q", m)
	}
	for _, n := range root.all(func(*node) bool { return true }) {
		for _, a := range n.Attrs {
			switch strings.ToLower(a.Name.Local) {
			case "src", "srcset", "action", "formaction", "poster", "data", "background":
				t.Errorf("<%s %s=%q>: pages load nothing", n.XMLName.Local, a.Name.Local, a.Value)
			case "href":
				if !strings.HasPrefix(a.Value, "#") {
					t.Errorf("<%s href=%q>: only links within the page", n.XMLName.Local, a.Value)
				}
			}
			if strings.Contains(a.Value, "url(") && !strings.HasPrefix(strings.TrimPrefix(a.Value, "url("), "#") {
				t.Errorf("<%s %s=%q>: url() outside the page", n.XMLName.Local, a.Name.Local, a.Value)
			}
		}
		if n.XMLName.Local == "link" || n.XMLName.Local == "iframe" || n.XMLName.Local == "img" || n.XMLName.Local == "object" {
			t.Errorf("<%s> in a self-contained page", n.XMLName.Local)
		}
	}
}

// The page parses, loads nothing, carries the controls, and its embedded
// recording is the timeline's, tick by tick: shown ids (and so the counts),
// zoom and pitch, and the footprint's vertices mapped through the frame the
// page declares.
func TestRenderDriveHTML(t *testing.T) {
	d := demoDrive(t, phoneRules())
	ms := demoMarkers()
	page, err := render.DriveHTML(&d, ms, render.WithRulesName("phone.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(string(page), "<!DOCTYPE html>") {
		t.Error("page does not start with <!DOCTYPE html>")
	}
	root := parseXML(t, page)
	checkSelfContained(t, page, root)

	slider := root.byID(t, "time")
	if slider.XMLName.Local != "input" || slider.get("type") != "range" {
		t.Fatalf("#time is <%s type=%q>, want a range input", slider.XMLName.Local, slider.get("type"))
	}
	if got, want := slider.get("max"), strconv.Itoa(d.Ticks()); got != want || slider.get("min") != "0" || slider.get("step") != "1" {
		t.Errorf("slider min %q max %q step %q, want 0, %s, 1", slider.get("min"), got, slider.get("step"), want)
	}

	wantShown, wantZoom, wantPitch, res := timelineTicks(t, d, ms)
	p := pageRecording(t, root)
	if p.TickS != d.TickS || p.HorizonS != d.HorizonS || p.Cap != d.Cap {
		t.Errorf("page says tick %v, horizon %v, cap %v; the drive %v, %v, %v", p.TickS, p.HorizonS, p.Cap, d.TickS, d.HorizonS, d.Cap)
	}
	if len(p.Ticks) != len(wantShown) {
		t.Fatalf("page has %d ticks, the timeline ran %d", len(p.Ticks), len(wantShown))
	}
	if got := root.byID(t, "shown-count").text(); got != strconv.Itoa(len(wantShown[0])) {
		t.Errorf("#shown-count before any script runs = %q, want %d", got, len(wantShown[0]))
	}
	if got := root.byID(t, "time-s").text(); got != "0.00" {
		t.Errorf("#time-s before any script runs = %q, want 0.00", got)
	}

	// The frame is the one the map's root declares.
	svgMap := root.byID(t, "drive-map")
	f := readFrame(t, svgMap)
	pf := pictureFrame{p.Frame.CenterXM, p.Frame.CenterYM, p.Frame.OriginX, p.Frame.OriginY, p.Frame.UnitsPerM, p.Frame.GroundScale}
	if f != pf {
		t.Fatalf("the map declares frame %+v, the data %+v", f, pf)
	}

	rec, err := render.RecordDrive(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	changes := 0
	for k, tk := range p.Ticks {
		if !slices.Equal(tk.Shown, wantShown[k]) {
			t.Errorf("tick %d: page shows %v, the timeline %v", k, tk.Shown, wantShown[k])
		}
		if k > 0 && len(tk.Shown) != len(p.Ticks[k-1].Shown) {
			changes++
		}
		if tk.Zoom != wantZoom[k] || tk.PitchDeg != wantPitch[k] {
			t.Errorf("tick %d: page zoom %v pitch %v, the timeline %v, %v", k, tk.Zoom, tk.PitchDeg, wantZoom[k], wantPitch[k])
		}
		fp := rec.Ticks[k].Footprint
		if fp.Empty != (tk.Footprint == nil) {
			t.Fatalf("tick %d: footprint empty %v, page has %v", k, fp.Empty, tk.Footprint)
		}
		if tk.Footprint != nil {
			var want [][2]float64
			for _, m := range fp.Mercator {
				want = append(want, f.apply(m))
			}
			if err := closePoints(tk.Footprint[:], want, unitTol); err != nil {
				t.Errorf("tick %d footprint: %v", k, err)
			}
		}
		if err := closePoints([][2]float64{tk.User}, [][2]float64{f.apply(rec.Ticks[k].UserMercator)}, unitTol); err != nil {
			t.Errorf("tick %d user: %v", k, err)
		}
	}
	if changes == 0 {
		t.Error("the shown count never changes on the demo drive: the slider test would prove nothing")
	}

	// Markers on the map carry the timeline's buckets; the table lists all.
	byID := map[string]timeline.Bucket{}
	for i, m := range ms {
		byID[m.ID] = res[i].Bucket
	}
	for _, g := range svgMap.all(func(n *node) bool { return n.hasClass("marker") }) {
		id := g.get("data-id")
		if want := "bucket-" + byID[id].String(); !g.hasClass(want) {
			t.Errorf("map marker %q has class %q, want %q", id, g.get("class"), want)
		}
	}
	rows := root.byID(t, "markers-table").all(func(n *node) bool { return n.XMLName.Local == "tr" && n.get("data-id") != "" })
	if len(rows) != len(ms) {
		t.Errorf("table has %d marker rows, want %d", len(rows), len(ms))
	}
	legend := svgMap.all(func(n *node) bool { return n.get("id") == "legend" })
	if len(legend) != 1 || !strings.Contains(legend[0].text(), "early") || !strings.Contains(legend[0].text(), "shown at this tick") {
		t.Error("map legend missing or incomplete")
	}
	for _, id := range []string{"zoom-chart", "pitch-chart"} {
		c := root.byID(t, id)
		if n := len(c.all(func(n *node) bool { return n.hasClass("series") })); n != 1 {
			t.Errorf("%s has %d series, want 1", id, n)
		}
		root.byID(t, id+"-cursor")
		root.byID(t, id+"-legend")
	}
	// Element ids are unique across the page's pictures.
	seen := map[string]bool{}
	for _, n := range root.all(func(n *node) bool { return n.get("id") != "" }) {
		if seen[n.get("id")] {
			t.Errorf("id %q used twice", n.get("id"))
		}
		seen[n.get("id")] = true
	}
}

// With a second rule set the page plots both, counts both sets' buckets
// and lists each marker's bucket under both.
func TestRenderDriveHTMLCompare(t *testing.T) {
	d := demoDrive(t, phoneRules())
	d2 := demoDrive(t, carRules())
	ms := demoMarkers()
	page, err := render.DriveHTML(&d, ms, render.WithRulesName("phone.yaml"), render.WithCompare("car.yaml", &d2))
	if err != nil {
		t.Fatal(err)
	}
	root := parseXML(t, page)
	checkSelfContained(t, page, root)
	for _, id := range []string{"zoom-chart", "pitch-chart"} {
		var names []string
		for _, s := range root.byID(t, id).all(func(n *node) bool { return n.hasClass("series") }) {
			names = append(names, s.get("data-name"))
		}
		if !slices.Equal(names, []string{"phone.yaml", "car.yaml"}) {
			t.Errorf("%s series %v, want phone.yaml and car.yaml", id, names)
		}
		legend := root.byID(t, id+"-legend").text()
		if !strings.Contains(legend, "phone.yaml") || !strings.Contains(legend, "car.yaml") {
			t.Errorf("%s legend %q does not name both rule sets", id, legend)
		}
	}
	res2, err := timeline.Compute(&d2, ms)
	if err != nil {
		t.Fatal(err)
	}
	var counts [4]float64
	for _, r := range res2 {
		counts[r.Bucket]++
	}
	bars := root.byID(t, "buckets-chart").all(func(n *node) bool { return n.hasClass("bar") && n.get("data-group") == "car.yaml" })
	if len(bars) != 4 {
		t.Fatalf("%d bars for car.yaml, want 4", len(bars))
	}
	for _, b := range bars {
		var want float64
		for k := range counts {
			if timeline.Bucket(k).String() == b.get("data-label") {
				want = counts[k]
			}
		}
		if got := b.float(t, "data-value"); got != want {
			t.Errorf("bar %s for car.yaml = %v, want %v", b.get("data-label"), got, want)
		}
	}
	rows := root.byID(t, "markers-table").all(func(n *node) bool { return n.XMLName.Local == "tr" && n.get("data-id") != "" })
	for i, r := range rows {
		cells := r.all(func(n *node) bool { return n.hasClass("bucket2") })
		if len(cells) != 1 || cells[0].text() != res2[i].Bucket.String() {
			t.Errorf("row %d: second bucket cell %v, want %s", i, cells, res2[i].Bucket)
		}
	}
}

func TestRenderDriveHTMLErrors(t *testing.T) {
	if _, err := render.DriveHTML(nil, nil); err == nil {
		t.Error("nil drive: no error")
	}
	d := demoDrive(t, phoneRules())
	bad := demoDrive(t, carRules())
	bad.Cap = 0
	if _, err := render.DriveHTML(&d, demoMarkers(), render.WithCompare("car.yaml", &bad)); err == nil ||
		!strings.Contains(err.Error(), "car.yaml") || !strings.Contains(err.Error(), "cap") {
		t.Errorf("bad compared drive: error %v, want one naming it and cap", err)
	}
	low := demoDrive(t, phoneRules())
	low.Rules.MinZoom, low.Rules.MaxZoom = 0.5, 0.5
	low.Device = viewport.NewDevice(2000, 800, 60)
	if _, err := render.DriveHTML(&low, demoMarkers()); err == nil || !strings.Contains(err.Error(), "wraps") {
		t.Errorf("zoom 0.5 drive: error %v, want one saying the view wraps", err)
	}
}
