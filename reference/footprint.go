package reference

import (
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// evalFootprint answers op footprint (SPEC §2): the ground trapezoid's
// vertices, area and visible radius; no vertices when it is empty.
func evalFootprint(req *wire.Request, m *wire.Margins) (any, error) {
	v, err := req.Camera.View("camera")
	if err != nil {
		return nil, err
	}
	if m != nil {
		// The height of the band of rows that shows ground within the far
		// limit: not positive when the footprint is empty.
		_, top, _, bottom := v.ClearArea()
		d := bottom - max(top, v.FarRowPx())
		m.EmptyPx = &d
	}
	return footprintAnswer(req, &v), nil
}

func footprintAnswer(req *wire.Request, v *viewport.View) *wire.FootprintAnswer {
	fp := v.Footprint()
	ans := &wire.FootprintAnswer{Head: wire.Head{ID: req.ID}, Vertices: []wire.LatLon{}}
	if fp.Empty {
		return ans
	}
	for _, p := range fp.Vertices {
		ans.Vertices = append(ans.Vertices, wire.LatLon{Lat: p[1], Lon: p[0]})
	}
	ans.AreaM2, ans.VisibleRadiusM = fp.AreaM2, fp.VisibleRadiusM
	return ans
}
