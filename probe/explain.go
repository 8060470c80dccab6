package probe

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/wire"
)

// Explain says, for each difference of d that is an in-view decision of a
// projected point, which edge of the in-view region decides it in the
// reference and with which numbers ("screen[0].in_view: far limit: depth
// 1450.9 px > k·f 1074.8 px"), so that a reader sees why the reference
// answered as it did. Other differences get no line.
func Explain(d *Disagreement) []string {
	if d.Op != "project" {
		return nil
	}
	var req wire.Request
	if err := wire.DecodeRequest(d.Case.Request, &req); err != nil {
		return nil
	}
	v, err := req.Camera.View("camera")
	if err != nil {
		return nil
	}
	var out []string
	for _, df := range d.Diffs {
		i, ok := pointIndex(df)
		if !ok || i >= len(req.Points) {
			continue
		}
		p, err := req.Points[i].Value(fmt.Sprintf("points[%d]", i))
		if err != nil {
			continue
		}
		out = append(out, fmt.Sprintf("%s: %s", df.Path, v.BindingEdge(v.Project(p))))
	}
	return out
}

// pointIndex returns i of a difference at "screen[i].in_view" or
// "screen[i]" (a point behind the camera in one answer).
func pointIndex(df check.Diff) (int, bool) {
	rest, ok := strings.CutPrefix(df.Path, "screen[")
	if !ok {
		return 0, false
	}
	end := strings.IndexByte(rest, ']')
	if end < 0 || (rest[end+1:] != ".in_view" && rest[end+1:] != "") {
		return 0, false
	}
	i, err := strconv.Atoi(rest[:end])
	return i, err == nil
}
