package render_test

import (
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/render"
)

// A line chart: one polyline per series inside the plot, a legend naming
// every series, the axis labels, and points in the order given.
func TestRenderLinesSVG(t *testing.T) {
	a := render.Series{Name: "phone.yaml", XLabel: "time (s)", YLabel: "zoom level",
		X: []float64{0, 1, 2, 3, 4}, Y: []float64{17.5, 17.5, 17, 16.5, 16.5}}
	b := render.Series{Name: "car.yaml", X: []float64{0, 2, 4}, Y: []float64{16.5, 16.2, 15.9}}
	flat := render.Series{Name: "flat", X: []float64{0, 10}, Y: []float64{3, 3}}
	for _, series := range [][]render.Series{{a, b}, {a}, {flat}} {
		svg, err := render.LinesSVG("Zoom over time", series...)
		if err != nil {
			t.Fatal(err)
		}
		root := parseXML(t, svg)
		lines := root.all(func(n *node) bool { return n.hasClass("series") })
		if len(lines) != len(series) {
			t.Fatalf("%d polylines, want %d", len(lines), len(series))
		}
		legend := root.byID(t, "legend").text()
		for i, s := range series {
			if !strings.Contains(legend, s.Name) {
				t.Errorf("legend %q lacks %q", legend, s.Name)
			}
			pts := parsePoints(t, lines[i].get("points"))
			if len(pts) != len(s.X) {
				t.Fatalf("series %q: %d points, want %d", s.Name, len(pts), len(s.X))
			}
			for j := 1; j < len(pts); j++ {
				// x grows with X; y grows down as Y falls.
				if (pts[j][0] > pts[j-1][0]) != (s.X[j] > s.X[j-1]) || (s.Y[j] < s.Y[j-1]) != (pts[j][1] > pts[j-1][1]) {
					t.Errorf("series %q: points %v and %v do not follow (%v, %v) → (%v, %v)", s.Name, pts[j-1], pts[j], s.X[j-1], s.Y[j-1], s.X[j], s.Y[j])
				}
			}
			for _, p := range pts {
				if p[0] < 0 || p[0] > 720 || p[1] < 0 || p[1] > 300 {
					t.Errorf("series %q: point %v outside the picture", s.Name, p)
				}
			}
		}
		if strings.Contains(root.text(), "time (s)") != (series[0].XLabel != "") {
			t.Error("x axis label missing or invented")
		}
	}
}

func TestRenderLinesSVGErrors(t *testing.T) {
	ok := render.Series{Name: "a", XLabel: "time (s)", X: []float64{0, 1}, Y: []float64{1, 2}}
	for _, c := range []struct {
		name   string
		series []render.Series
		want   string
	}{
		{"none", nil, "no series"},
		{"lengths", []render.Series{{Name: "b", X: []float64{0, 1}, Y: []float64{1}}}, "series[0]"},
		{"empty", []render.Series{ok, {Name: "b"}}, "series[1]"},
		{"nan", []render.Series{{Name: "b", X: []float64{0, 1}, Y: []float64{1, math.NaN()}}}, "point 1"},
		{"inf", []render.Series{{Name: "b", X: []float64{math.Inf(1)}, Y: []float64{1}}}, "point 0"},
		{"labels", []render.Series{ok, {Name: "b", XLabel: "distance (m)", X: []float64{0}, Y: []float64{0}}}, "axis label"},
	} {
		if _, err := render.LinesSVG("t", c.series...); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// A bar chart: bars in order, heights proportional to values from a
// shared baseline, clusters labelled once, a legend of the groups.
func TestRenderBarsSVG(t *testing.T) {
	bars := []render.Bar{
		{Label: "early → mid", Group: "moved later", Value: 3},
		{Label: "mid → early", Group: "moved earlier", Value: 1},
		{Label: "mid → never", Group: "moved later", Value: 4},
		{Label: "never → late", Group: "moved earlier", Value: 0},
	}
	svg, err := render.BarsSVG("Markers moving between buckets", "markers", bars...)
	if err != nil {
		t.Fatal(err)
	}
	root := parseXML(t, svg)
	rects := root.all(func(n *node) bool { return n.hasClass("bar") })
	if len(rects) != len(bars) {
		t.Fatalf("%d bars, want %d", len(rects), len(bars))
	}
	var perUnit, base float64
	for i, r := range rects {
		if r.get("data-label") != bars[i].Label {
			t.Errorf("bar %d labelled %q, want %q", i, r.get("data-label"), bars[i].Label)
		}
		h, y := r.float(t, "height"), r.float(t, "y")
		if i == 0 {
			perUnit, base = h/bars[0].Value, y+h
		}
		if want := bars[i].Value * perUnit; math.Abs(h-want) > unitTol {
			t.Errorf("bar %d height %v, want %v", i, h, want)
		}
		if math.Abs(y+h-base) > unitTol {
			t.Errorf("bar %d stands on %v, the first on %v", i, y+h, base)
		}
		if i > 0 && r.float(t, "x") <= rects[i-1].float(t, "x") {
			t.Errorf("bar %d is not right of bar %d", i, i-1)
		}
	}
	var labels []string
	for _, l := range root.all(func(n *node) bool { return n.hasClass("bar-label") }) {
		labels = append(labels, l.text())
	}
	if !slices.Equal(labels, []string{"early → mid", "mid → early", "mid → never", "never → late"}) {
		t.Errorf("labels %v", labels)
	}
	legend := root.byID(t, "legend").text()
	if !strings.Contains(legend, "moved later") || !strings.Contains(legend, "moved earlier") {
		t.Errorf("legend %q does not name both groups", legend)
	}

	// Clusters: two bars per label, one label each; negative values hang
	// below the baseline.
	svg, err = render.BarsSVG("Change per bucket", "markers",
		render.Bar{Label: "early", Group: "a", Value: 2}, render.Bar{Label: "early", Group: "b", Value: -1})
	if err != nil {
		t.Fatal(err)
	}
	root = parseXML(t, svg)
	if n := len(root.all(func(n *node) bool { return n.hasClass("bar-label") })); n != 1 {
		t.Errorf("%d cluster labels, want 1", n)
	}
	rects = root.all(func(n *node) bool { return n.hasClass("bar") })
	if up, down := rects[0], rects[1]; math.Abs(up.float(t, "y")+up.float(t, "height")-down.float(t, "y")) > unitTol {
		t.Errorf("the negative bar does not hang from the baseline: %v vs %v", up.float(t, "y")+up.float(t, "height"), down.float(t, "y"))
	}

	if _, err := render.BarsSVG("t", "markers"); err == nil {
		t.Error("no bars: no error")
	}
	if _, err := render.BarsSVG("t", "markers", render.Bar{Label: "x", Value: math.NaN()}); err == nil || !strings.Contains(err.Error(), "bars[0]") {
		t.Errorf("NaN bar: error %v, want one naming bars[0]", err)
	}
	// One unnamed group: the legend names the value.
	svg, err = render.BarsSVG("t", "markers", render.Bar{Label: "x", Value: 1})
	if err != nil {
		t.Fatal(err)
	}
	if legend := parseXML(t, svg).byID(t, "legend").text(); !strings.Contains(legend, "markers") {
		t.Errorf("legend %q", legend)
	}
}

// Bars with a tone take the colour code every picture shares: a move to a
// later bucket is late's vermillion, to an earlier one early's green,
// whichever group comes first.
func TestRenderBarsTone(t *testing.T) {
	svg, err := render.BarsSVG("moves", "markers",
		render.Bar{Label: "early → late", Group: "later", Value: 3, Tone: render.ToneLater},
		render.Bar{Label: "late → early", Group: "earlier", Value: 1, Tone: render.ToneEarlier})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{"later": "#d55e00", "earlier": "#009e73"}
	for _, b := range parseXML(t, svg).all(func(n *node) bool { return n.hasClass("bar") }) {
		if got := b.get("fill"); got != want[b.get("data-group")] {
			t.Errorf("bar of group %q filled %s, want %s", b.get("data-group"), got, want[b.get("data-group")])
		}
	}
}
