package probe

import (
	"math"
	"time"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/wire"
)

// reduce shrinks a disagreement further than rapid does, by edits a
// reader would make, each kept only when the implementation still
// disagrees: drop points, pixels, markers and samples one at a time, then
// round the camera's and the points' numbers to as few decimals as still
// fail. It stops at deadline and returns the smallest disagreement found
// (d itself when no edit keeps the failure).
func reduce(impl Impl, d *Disagreement, opt *Options, deadline time.Time) *Disagreement {
	var req wire.Request
	if d.Family == "wire_errors" || wire.DecodeRequest(d.Case.Request, &req) != nil {
		return d // a raw line: nothing to drop or round
	}
	best := d
	// try reports whether req still disagrees, and keeps it as the best.
	try := func() bool {
		if time.Now().After(deadline) {
			return false
		}
		f := disagrees(impl, &req, d.Op, d.Family, opt)
		if f != nil {
			f.Checks, f.Shrunk = d.Checks, true
			best = f
		}
		return f != nil
	}
	dropEach(&req.Points, try)
	dropEach(&req.Pixels, try)
	dropEach(&req.Markers, try)
	dropEach(&req.Samples, try)
	var nums []*float64
	if c := req.Camera; c != nil {
		nums = append(nums, c.Lat, c.Lon, c.HeadingDeg, c.PitchDeg, c.Zoom)
	}
	for _, p := range req.Points {
		if p != nil {
			nums = append(nums, p.Lat, p.Lon)
		}
	}
	if u := req.User; u != nil {
		nums = append(nums, u.Lat, u.Lon)
	}
	for _, p := range nums {
		roundWhileFailing(p, try)
	}
	return best
}

// dropEach removes the elements of *list one at a time, from the last,
// keeping each removal that still fails; at least one element stays.
func dropEach[T any](list *[]T, fails func() bool) {
	for i := len(*list) - 1; i >= 0 && len(*list) > 1; i-- {
		old := *list
		next := append(append([]T(nil), old[:i]...), old[i+1:]...)
		*list = next
		if !fails() {
			*list = old
		}
	}
}

// roundWhileFailing rounds *p to the fewest decimals (0 to 6) that still
// fail, and leaves it as it was when none does.
func roundWhileFailing(p *float64, fails func() bool) {
	if p == nil {
		return
	}
	old := *p
	for decimals := 0; decimals <= 6; decimals++ {
		k := math.Pow(10, float64(decimals))
		r := math.Round(old*k) / k
		if r == old {
			return
		}
		*p = r
		if fails() {
			return
		}
	}
	*p = old
}

// disagrees asks the reference and the implementation for req and returns
// the disagreement, or nil when they agree (or the reference cannot make a
// case of it).
func disagrees(impl Impl, req *wire.Request, op, family string, opt *Options) *Disagreement {
	c, err := corpus.NewCase("probe/"+op+"/"+family, family, req)
	if err != nil {
		return nil
	}
	got, err := impl.Answer(c.Request)
	if err != nil {
		return &Disagreement{Op: op, Family: family, Case: c, Err: err.Error()}
	}
	if st, diffs := check.Compare(&c, got, &opt.Profile); st == check.Fail {
		return &Disagreement{Op: op, Family: family, Case: c, Got: got, Diffs: diffs}
	}
	return nil
}
