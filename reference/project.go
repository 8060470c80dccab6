package reference

import (
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// evalProject answers op project (SPEC §2): each point's pixel, depth and
// in-view answer, with its decision margin margin_px; null for a point at
// or behind the camera plane.
func evalProject(req *wire.Request, m *wire.Margins) (any, error) {
	v, err := req.Camera.View("camera")
	if err != nil {
		return nil, err
	}
	if req.Points == nil {
		return nil, spec.Absent("points")
	}
	ans := &wire.ProjectAnswer{Head: wire.Head{ID: req.ID}, Screen: make([]*wire.Screen, len(req.Points))}
	screens := make([]wire.Screen, len(req.Points))
	margins := make([]float64, len(req.Points))
	for i, pw := range req.Points {
		p, err := pw.Value(spec.Index("points", i))
		if err != nil {
			return nil, err
		}
		sp := v.Project(p)
		if !sp.HasPixel() {
			continue
		}
		margins[i] = sp.MarginPx
		screens[i] = wire.Screen{X: sp.X, Y: sp.Y, Depth: sp.DepthPx, InView: sp.InView(), MarginPx: &margins[i]}
		ans.Screen[i] = &screens[i]
	}
	return ans, nil
}
