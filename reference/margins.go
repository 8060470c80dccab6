package reference

import "github.com/viewspec/viewspec/wire"

// Answer answers req as Evaluate does, with the decision margins apart
// from the answer, as a corpus case holds them; margins is nil when the
// answer is an error.
func Answer(req *wire.Request) (ans any, margins *wire.Margins, err error) {
	f, ok := ops[req.Op]
	if !ok {
		_, err := Evaluate(req)
		return nil, nil, err
	}
	m := &wire.Margins{}
	if ans, err = f(req, m); err != nil {
		return nil, nil, err
	}
	moveMargins(ans, m)
	return ans, m, nil
}

// moveMargins moves the margins the answer carries out of it into m.
func moveMargins(ans any, m *wire.Margins) {
	switch a := ans.(type) {
	case *wire.ProjectAnswer:
		m.MarginPx = make([]*float64, len(a.Screen))
		for i, s := range a.Screen {
			if s != nil {
				m.MarginPx[i], s.MarginPx = s.MarginPx, nil
			}
		}
	case *wire.MetricsAnswer:
		m.SideMarginM = make([]*float64, len(a.Markers))
		for i := range a.Markers {
			mk := &a.Markers[i]
			m.SideMarginM[i], mk.SideMarginM = mk.SideMarginM, nil
		}
	case *wire.TimelineAnswer:
		m.BucketMarginS = make([]*float64, len(a.Markers))
		m.FirstShownMarginPx = make([]*float64, len(a.Markers))
		turn := make([]*float64, len(a.Markers))
		anyTurn := false
		for i := range a.Markers {
			mk := &a.Markers[i]
			m.BucketMarginS[i], mk.BucketMarginS = mk.BucketMarginS, nil
			m.FirstShownMarginPx[i], mk.FirstShownMarginPx = mk.FirstShownMarginPx, nil
			turn[i], mk.TurnMarginDeg = mk.TurnMarginDeg, nil
			anyTurn = anyTurn || turn[i] != nil
		}
		if anyTurn {
			m.TurnMarginDeg = turn
		}
	}
}
