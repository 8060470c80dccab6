package render_test

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/viewport"
)

// answerOf is the reference's answer for a marker, as the wire would
// carry it.
func answerOf(sp viewport.ScreenPoint) render.PointAnswer {
	return render.PointAnswer{HasPixel: sp.HasPixel(), X: sp.X, Y: sp.Y, DepthPx: sp.DepthPx, InView: sp.InView()}
}

// A disagreement picture marks the reference's pixel and the other's at
// their pixels (recomputed from the layout the picture declares; pinned
// into the margin when off the screen), names for each point the edge
// that the reference's viewport.View.BindingEdge says decides, draws that
// edge, and gives the same bytes for the same input.
func TestRenderDisagreement(t *testing.T) {
	v := prepare(t, demoCamera())
	var pts []render.PointDisagreement
	for _, m := range screenMarkersScene() {
		sp := v.Project(m.Point)
		other := answerOf(sp)
		other.Y = 844 - other.Y // a y-up mistake
		other.InView = !other.InView
		pts = append(pts, render.PointDisagreement{Label: m.ID, Reference: answerOf(sp), MarginPx: sp.MarginPx, Other: other})
	}
	svg, err := render.DisagreementSVG(v, "y-up", pts)
	if err != nil {
		t.Fatal(err)
	}
	again, err := render.DisagreementSVG(v, "y-up", pts)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(svg, again) {
		t.Error("two pictures of the same disagreement differ")
	}
	root := parseXML(t, svg)
	f := readScreenFrame(t, root)
	g0 := (44.0 - 12) / f.k
	groups := root.all(func(n *node) bool { return n.hasClass("point") })
	if len(groups) != len(pts) {
		t.Fatalf("%d points drawn, want %d", len(groups), len(pts))
	}
	edges := map[string]bool{}
	for i, g := range groups {
		p := pts[i]
		if g.get("data-label") != p.Label {
			t.Errorf("point %d labelled %q, want %q", i, g.get("data-label"), p.Label)
		}
		want := v.BindingEdge(v.Project(screenMarkersScene()[i].Point))
		edge := g.get("data-deciding-edge")
		if edge == "" || !strings.HasPrefix(want, edge) {
			t.Errorf("point %q: deciding edge %q, the reference says %q", p.Label, edge, want)
		}
		edges[edge] = true
		drawnEdge := g.all(func(n *node) bool { return n.hasClass("deciding-edge") })
		if (edge != "behind the camera") != (len(drawnEdge) == 1) {
			t.Errorf("point %q: deciding edge %q drawn %d times", p.Label, edge, len(drawnEdge))
		}
		for _, who := range []struct {
			class string
			a     render.PointAnswer
		}{{"reference", p.Reference}, {"other", p.Other}} {
			marks := g.all(func(n *node) bool { return n.hasClass(who.class) })
			if !who.a.HasPixel {
				if len(marks) != 0 {
					t.Errorf("point %q: %s has no pixel but is drawn", p.Label, who.class)
				}
				continue
			}
			if len(marks) != 1 {
				t.Fatalf("point %q: %d %s marks", p.Label, len(marks), who.class)
			}
			x := max(-g0, min(f.w+g0, who.a.X))
			y := max(-g0, min(f.h+g0, who.a.Y))
			if err := closePoints([][2]float64{translateOf(t, marks[0].get("transform"))}, [][2]float64{f.at(x, y)}, unitTol); err != nil {
				t.Errorf("point %q, %s: %v", p.Label, who.class, err)
			}
			if pinned := x != who.a.X || y != who.a.Y; pinned != marks[0].hasClass("pinned") {
				t.Errorf("point %q, %s: pinned %v, class %q", p.Label, who.class, pinned, marks[0].get("class"))
			}
		}
	}
	if len(edges) < 3 {
		t.Errorf("only the edges %v decide: the test proves little", edges)
	}
	legend := root.byID(t, "legend").text()
	for _, want := range []string{"the reference's pixel", "y-up's pixel", "the edge that decides"} {
		if !strings.Contains(legend, want) {
			t.Errorf("legend lacks %q", want)
		}
	}
	if _, err := render.DisagreementSVG(v, "x", []render.PointDisagreement{{Reference: render.PointAnswer{HasPixel: true, X: math.NaN()}}}); err == nil {
		t.Error("a NaN pixel is accepted")
	}
}
