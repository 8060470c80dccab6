package reference

import (
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/wire"
)

// evalTimeline answers op timeline (SPEC §5): for each marker, when it was
// first visible and first shown, for how long, and its bucket, with the
// decision margins bucket_margin_s and first_shown_margin_px.
func evalTimeline(req *wire.Request, m *wire.Margins) (any, error) {
	d, err := req.Drive()
	if err != nil {
		return nil, err
	}
	ms, err := wire.Markers(req.Markers, "markers")
	if err != nil {
		return nil, err
	}
	if req.Trace != nil && *req.Trace {
		got, ticks, err := timeline.ComputeTraced(&d, ms)
		if err != nil {
			return nil, err
		}
		return &wire.TimelineAnswer{Head: wire.Head{ID: req.ID}, Markers: wire.TimelineOf(ms, got), Ticks: ticks}, nil
	}
	got, err := timeline.Compute(&d, ms)
	if err != nil {
		return nil, err
	}
	return &wire.TimelineAnswer{Head: wire.Head{ID: req.ID}, Markers: wire.TimelineOf(ms, got)}, nil
}
