package reference

import (
	"math"

	"github.com/viewspec/viewspec/wire"
)

// evalHorizon answers op horizon (SPEC §2): the rows of the horizon,
// cy − f·cot θ, and of the far limit, cy − (k−1)·f·cos θ/(k·sin θ); both
// null at pitch 0. The rows are continuous in the camera, so the answer
// has no decision margin.
func evalHorizon(req *wire.Request, _ *wire.Margins) (any, error) {
	v, err := req.Camera.View("camera")
	if err != nil {
		return nil, err
	}
	ans := &wire.HorizonAnswer{Head: wire.Head{ID: req.ID}}
	if row, ok := v.HorizonRowPx(); ok {
		ans.HorizonRowPx = &row
	}
	if far := v.FarRowPx(); !math.IsInf(far, 0) {
		ans.FarRowPx = &far
	}
	return ans, nil
}
