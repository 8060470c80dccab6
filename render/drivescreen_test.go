package render_test

import (
	"bytes"
	"encoding/json"
	"slices"
	"testing"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/viewport"
)

// pageScreens is the screen data of a page's ticks.
type pageScreens struct {
	Markers []struct {
		ID string `json:"id"`
	} `json:"markers"`
	Ticks []struct {
		Visible []string `json:"visible"`
		Screen  struct {
			Footprint string       `json:"footprint"`
			Markers   [][5]float64 `json:"markers"`
		} `json:"screen"`
	} `json:"ticks"`
}

// At every tick of a page, the screen view's data puts each marker within
// the screen at the pixel the reference projects it to from that tick's
// camera (to 0.01 of a unit, as written), in the reference's state, and
// the footprint at the reference's pixels of its vertices; the page is the
// same bytes when made twice.
func TestRenderDriveScreenData(t *testing.T) {
	d := demoDrive(t, phoneRules())
	ms := demoMarkers()
	page, err := render.DriveHTML(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	again, err := render.DriveHTML(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(page, again) {
		t.Error("two pages of the same drive differ")
	}
	rec, err := render.RecordDrive(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	root := parseXML(t, page)
	sf := readScreenFrame(t, root.byID(t, "screen-view"))
	var ps pageScreens
	if err := json.Unmarshal([]byte(root.byID(t, "recording").Text), &ps); err != nil {
		t.Fatal(err)
	}
	if len(ps.Ticks) != len(rec.Ticks) || len(ps.Markers) != len(ms) {
		t.Fatalf("page has %d ticks and %d markers, want %d and %d", len(ps.Ticks), len(ps.Markers), len(rec.Ticks), len(ms))
	}
	codes := []string{"in-view", "outside-clear", "beyond-far"}
	const tol = 0.005 + 1e-9 // rounded to 0.01
	checked := 0
	for k, tk := range rec.Ticks {
		v, err := viewport.Prepare(viewport.Camera{LatDeg: tk.User[1], LonDeg: tk.User[0], HeadingDeg: tk.HeadingDeg,
			PitchDeg: tk.PitchDeg, Zoom: tk.Zoom, Device: d.Device})
		if err != nil {
			t.Fatal(err)
		}
		got := map[int][5]float64{}
		for _, m := range ps.Ticks[k].Screen.Markers {
			got[int(m[0])] = m
		}
		for i, m := range ms {
			sp := v.Project(m.Point)
			onScreen := sp.HasPixel() && sp.X >= 0 && sp.X <= sf.w && sp.Y >= 0 && sp.Y <= sf.h
			g, ok := got[i]
			if !onScreen {
				continue
			}
			if !ok {
				t.Fatalf("tick %d: marker %q on the screen at (%v, %v) is missing", k, m.ID, sp.X, sp.Y)
			}
			checked++
			if err := closePoints([][2]float64{{g[1], g[2]}}, [][2]float64{sf.at(sp.X, sp.Y)}, tol); err != nil {
				t.Errorf("tick %d: marker %q: %v", k, m.ID, err)
			}
			if st := codes[int(g[3])]; st != wantState(&v, sp) {
				t.Errorf("tick %d: marker %q state %s, the reference's %s", k, m.ID, st, wantState(&v, sp))
			}
		}
		if fp := v.Footprint(); !fp.Empty {
			var want [][2]float64
			for _, mm := range fp.Mercator {
				sp := v.ProjectMercator(mm)
				want = append(want, sf.at(sp.X, sp.Y))
			}
			if err := closePoints(parsePoints(t, ps.Ticks[k].Screen.Footprint), want, tol); err != nil {
				t.Errorf("tick %d: screen footprint: %v", k, err)
			}
		}
		if !slices.Equal(ps.Ticks[k].Visible, tk.Visible) {
			t.Errorf("tick %d: page visible %v, recording %v", k, ps.Ticks[k].Visible, tk.Visible)
		}
	}
	if checked < len(rec.Ticks) {
		t.Errorf("only %d marker-ticks on the screen: the test proves little", checked)
	}
}

// The recording's in-view ids are the reference's in-view test at the
// tick's camera, its speeds are the route's, and the marker timeline (a
// row per marker in view at some tick), the speed chart with the band
// edges and the play button are on the page.
func TestRenderDrivePageParts(t *testing.T) {
	d := demoDrive(t, phoneRules())
	ms := demoMarkers()
	rec, err := render.RecordDrive(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	for k, tk := range rec.Ticks {
		v, err := viewport.Prepare(viewport.Camera{LatDeg: tk.User[1], LonDeg: tk.User[0], HeadingDeg: tk.HeadingDeg,
			PitchDeg: tk.PitchDeg, Zoom: tk.Zoom, Device: d.Device})
		if err != nil {
			t.Fatal(err)
		}
		var want []string
		for _, m := range ms {
			if v.Project(m.Point).InView() {
				want = append(want, m.ID)
			}
		}
		if !slices.Equal(tk.Visible, want) {
			t.Errorf("tick %d: visible %v, the reference %v", k, tk.Visible, want)
		}
		// demoDrive: 14, 24, 14 m/s on its three legs.
		if s := tk.SpeedMps; s != 14 && s != 24 && s != 0 {
			t.Errorf("tick %d: speed %v m/s is none of the route's", k, s)
		}
	}
	page, err := render.DriveHTML(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	root := parseXML(t, page)
	rows := root.byID(t, "gantt-chart").all(func(n *node) bool { return n.hasClass("gantt-row") })
	nVisible := 0
	for _, r := range rec.Timeline {
		if r.Visible {
			nVisible++
		}
	}
	if len(rows) != min(nVisible, 60) {
		t.Errorf("%d marker timeline rows, %d markers in view at some tick", len(rows), nVisible)
	}
	edges := root.byID(t, "speed-chart").all(func(n *node) bool { return n.hasClass("edge") })
	if len(edges) != len(phoneRules().Bands)-1 {
		t.Errorf("%d band edges on the speed chart, want %d", len(edges), len(phoneRules().Bands)-1)
	}
	if root.byID(t, "play").XMLName.Local != "button" {
		t.Error("#play is not a button")
	}
}
