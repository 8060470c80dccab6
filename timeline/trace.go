package timeline

import (
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/viewport"
)

// MaxTraceMarkerTicks is the most markers × ticks a trace reports: a trace
// repeats every marker at every tick, so it is bounded far below the
// timeline's own work limit.
const MaxTraceMarkerTicks = 1e6

// Tick is the reference's state at one tick of a drive, for finding where
// another implementation's timeline parts from it: the camera, the
// footprint and the markers in view (with their in-view margins) and shown.
type Tick struct {
	TS         float64      `json:"t_s"`
	Lat        float64      `json:"lat"`
	Lon        float64      `json:"lon"`
	HeadingDeg float64      `json:"heading_deg"`
	Zoom       float64      `json:"zoom"`
	PitchDeg   float64      `json:"pitch_deg"`
	Footprint  [][2]float64 `json:"footprint"` // [lat, lon] vertices near-left, near-right, far-right, far-left; none when empty
	Visible    []TickMarker `json:"visible"`   // in view, in marker order
	Shown      []string     `json:"shown"`     // ids holding a slot, in slot order
}

// TickMarker is a marker in view at a tick, and its in-view margin (SPEC
// §2), pixels.
type TickMarker struct {
	ID       string  `json:"id"`
	MarginPx float64 `json:"margin_px"`
}

// ComputeTraced runs Compute and also returns the state at every tick. It
// refuses a drive of more than MaxTraceMarkerTicks marker-ticks.
func ComputeTraced(d *Drive, ms []Marker) ([]Result, []Tick, error) {
	if err := d.Validate(); err != nil {
		return nil, nil, err
	}
	if work := float64(d.Ticks()+1) * float64(max(len(ms), 1)); work > MaxTraceMarkerTicks {
		return nil, nil, spec.Out("trace", work, "a trace reports at most 1e6 marker-ticks, markers × (ticks + 1)")
	}
	var ticks []Tick
	dd := *d
	onTick := d.OnTick
	dd.OnTick = func(k int, v *viewport.View, shown []int) {
		c := v.Camera()
		t := Tick{TS: float64(k) * d.TickS, Lat: c.LatDeg, Lon: c.LonDeg, HeadingDeg: c.HeadingDeg,
			Zoom: c.Zoom, PitchDeg: c.PitchDeg, Footprint: [][2]float64{}, Visible: []TickMarker{}, Shown: []string{}}
		if fp := v.Footprint(); !fp.Empty {
			for _, p := range fp.Vertices {
				t.Footprint = append(t.Footprint, [2]float64{p[1], p[0]})
			}
		}
		for _, m := range ms {
			if sp := v.Project(m.Point); sp.InView() {
				t.Visible = append(t.Visible, TickMarker{ID: m.ID, MarginPx: sp.MarginPx})
			}
		}
		for _, i := range shown {
			t.Shown = append(t.Shown, ms[i].ID)
		}
		ticks = append(ticks, t)
		if onTick != nil {
			onTick(k, v, shown)
		}
	}
	got, err := Compute(&dd, ms)
	return got, ticks, err
}
