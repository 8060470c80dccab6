package reference

import (
	"encoding/json"
	"math"
	"strconv"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// evalMetrics answers op metrics (SPEC §4): each marker's distances from
// the user and the route, how far along and how soon, its side with the
// decision margin side_margin_m, and with a camera its distance to the
// view.
func evalMetrics(req *wire.Request, m *wire.Margins) (any, error) {
	r, err := req.Route.Value("route")
	if err != nil {
		return nil, err
	}
	user, err := req.User.Value("user")
	if err != nil {
		return nil, err
	}
	ms, err := wire.Markers(req.Markers, "markers")
	if err != nil {
		return nil, err
	}
	var view *viewport.View
	var fp viewport.Footprint
	if req.Camera != nil {
		v, err := req.Camera.View("camera")
		if err != nil {
			return nil, err
		}
		view, fp = &v, v.Footprint()
	}
	ans := &wire.MetricsAnswer{Head: wire.Head{ID: req.ID}, Markers: make([]wire.MarkerMetrics, len(ms))}
	FillMetrics(r, user, ms, view, &fp, ans.Markers)
	if m != nil {
		m.ChoiceMarginM = choiceMargins(r, user, ms)
	}
	return ans, nil
}

// FillMetrics fills out[i] with the wire metrics of ms[i] for a user at
// user on route r, with the view distance when view is not nil (fp its
// footprint).
func FillMetrics(r *routes.Route, user orb.Point, ms []timeline.Marker, view *viewport.View, fp *viewport.Footprint, out []wire.MarkerMetrics) {
	place := r.Snap(user)
	// One backing array for every optional number, so a request allocates
	// a fixed handful of times whatever its size.
	nums := make([]float64, 3*len(ms))
	for i, m := range ms {
		mt := r.Metrics(place, m.Point)
		o := wire.MarkerMetrics{ID: m.ID, UserDistM: mt.UserDistM, RouteDistM: mt.RouteDistM, Side: mt.Side.String()}
		n := nums[3*i : 3*i+3]
		n[2] = mt.SideMarginM
		o.SideMarginM = &n[2]
		if mt.Ahead {
			n[0], n[1] = mt.AlongM, mt.EtaS
			o.AlongM, o.EtaS = &n[0], &n[1]
		}
		if view != nil {
			if d, ok := view.GroundDistM(fp, viewport.ToMercator(m.Point)); ok {
				o.ViewDistM = strconv.AppendFloat(nil, d, 'g', -1, 64)
			} else {
				o.ViewDistM = json.RawMessage("null")
			}
		}
		out[i] = o
	}
}

// choiceMargins returns each marker's choice margin (SPEC §4): the least of
// the user's place's and the marker's closest point's, null when infinite.
func choiceMargins(r *routes.Route, user orb.Point, ms []timeline.Marker) []*float64 {
	place := r.Snap(user)
	um := r.SnapChoiceMarginM(user)
	out := make([]*float64, len(ms))
	for i, mk := range ms {
		if c := min(um, r.ChoiceMarginM(place, mk.Point)); !math.IsInf(c, 1) {
			out[i] = &c
		}
	}
	return out
}
