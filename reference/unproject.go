package reference

import (
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// evalUnproject answers op unproject (SPEC §2): the ground point seen at
// each pixel, null at or above the horizon.
func evalUnproject(req *wire.Request, m *wire.Margins) (any, error) {
	v, err := req.Camera.View("camera")
	if err != nil {
		return nil, err
	}
	if req.Pixels == nil {
		return nil, spec.Absent("pixels")
	}
	if m != nil {
		m.HorizonPx = make([]*float64, len(req.Pixels))
		if row, ok := v.HorizonRowPx(); ok {
			for i, p := range req.Pixels {
				if p != nil && p.Y != nil {
					d := *p.Y - row
					m.HorizonPx[i] = &d
				}
			}
		}
	}
	ans := &wire.UnprojectAnswer{Head: wire.Head{ID: req.ID}, Points: make([]*wire.LatLon, len(req.Pixels))}
	pts := make([]wire.LatLon, len(req.Pixels))
	for i, pw := range req.Pixels {
		px, err := pw.Value(spec.Index("pixels", i))
		if err != nil {
			return nil, err
		}
		p, ok := v.Unproject(px)
		if !ok {
			continue
		}
		pts[i] = wire.LatLon{Lat: p[1], Lon: p[0]}
		ans.Points[i] = &pts[i]
	}
	return ans, nil
}
