package reference

import "github.com/viewspec/viewspec/wire"

// Answer answers req as Evaluate does, with the decision margins apart
// from the answer, as a corpus case holds them; margins is nil when the
// answer is an error.
func Answer(req *wire.Request) (ans any, margins *wire.Margins, err error) {
	if ans, err = Evaluate(req); err != nil {
		return nil, nil, err
	}
	return ans, splitMargins(req, ans), nil
}

// splitMargins moves the margins out of ans into a Margins, adding those
// the answer does not carry (the horizon for unproject, emptiness for
// footprint), which need the camera again.
func splitMargins(req *wire.Request, ans any) *wire.Margins {
	m := &wire.Margins{}
	switch a := ans.(type) {
	case *wire.ProjectAnswer:
		m.MarginPx = make([]*float64, len(a.Screen))
		for i, s := range a.Screen {
			if s != nil {
				m.MarginPx[i], s.MarginPx = s.MarginPx, nil
			}
		}
	case *wire.UnprojectAnswer:
		v, err := req.Camera.View("camera")
		if err != nil {
			return m
		}
		m.HorizonPx = make([]*float64, len(req.Pixels))
		if row, ok := v.HorizonRowPx(); ok {
			for i, p := range req.Pixels {
				d := *p.Y - row
				m.HorizonPx[i] = &d
			}
		}
	case *wire.FootprintAnswer:
		v, err := req.Camera.View("camera")
		if err != nil {
			return m
		}
		_, top, _, bottom := v.ClearArea()
		d := bottom - max(top, v.FarRowPx())
		m.EmptyPx = &d
	case *wire.MetricsAnswer:
		m.SideMarginM = make([]*float64, len(a.Markers))
		for i := range a.Markers {
			mk := &a.Markers[i]
			m.SideMarginM[i], mk.SideMarginM = mk.SideMarginM, nil
		}
	case *wire.TimelineAnswer:
		m.BucketMarginS = make([]*float64, len(a.Markers))
		m.FirstShownMarginPx = make([]*float64, len(a.Markers))
		for i := range a.Markers {
			mk := &a.Markers[i]
			m.BucketMarginS[i], mk.BucketMarginS = mk.BucketMarginS, nil
			m.FirstShownMarginPx[i], mk.FirstShownMarginPx = mk.FirstShownMarginPx, nil
		}
	}
	return m
}
