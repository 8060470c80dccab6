package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/wire"
)

// maxOverlayPoints bounds the points one disagreement picture marks.
const maxOverlayPoints = 12

// projectOverlay draws the disagreement of a project case: the request's
// screen with the reference's pixels (from the case's expectation and
// margins) and the implementation's (got) for the points the differences
// name (every point when none is named), and the edge that decides each
// in-view answer. ok is false for a case that is not a readable project
// case with a readable answer; such cases get no picture.
func projectOverlay(c *corpus.Case, got []byte, diffs []check.Diff, otherName string) (svg []byte, ok bool, err error) {
	if c.Op != "project" || got == nil {
		return nil, false, nil
	}
	var req wire.Request
	if wire.DecodeRequest(c.Request, &req) != nil || req.Camera == nil {
		return nil, false, nil
	}
	v, err := req.Camera.View("camera")
	if err != nil {
		return nil, false, nil
	}
	var want, have wire.ProjectAnswer
	if json.Unmarshal(c.Expect, &want) != nil || json.Unmarshal(got, &have) != nil || len(have.Screen) == 0 {
		return nil, false, nil
	}
	var m wire.Margins
	if len(c.Margins) > 0 {
		_ = json.Unmarshal(c.Margins, &m) // margins are a help, not a need
	}
	idx := diffPoints(diffs)
	if len(idx) == 0 {
		for i := range want.Screen {
			idx = append(idx, i)
		}
	}
	var pts []render.PointDisagreement
	for _, i := range idx {
		if len(pts) == maxOverlayPoints || i >= len(want.Screen) {
			break
		}
		p := render.PointDisagreement{Label: fmt.Sprintf("screen[%d]", i), Reference: pointAnswer(want.Screen[i]), MarginPx: math.NaN()}
		if i < len(have.Screen) {
			p.Other = pointAnswer(have.Screen[i])
		}
		if i < len(m.MarginPx) && m.MarginPx[i] != nil {
			p.MarginPx = *m.MarginPx[i]
		}
		pts = append(pts, p)
	}
	if len(pts) == 0 {
		return nil, false, nil
	}
	svg, err = render.DisagreementSVG(&v, otherName, pts, render.WithTitle(fmt.Sprintf("%s (%s): the reference and %s disagree", c.ID, c.Family, otherName)))
	if err != nil {
		return nil, false, err
	}
	return svg, true, nil
}

// pointAnswer turns a wire screen point (nil for none) into a picture's.
func pointAnswer(s *wire.Screen) render.PointAnswer {
	if s == nil {
		return render.PointAnswer{DepthPx: math.NaN()}
	}
	return render.PointAnswer{HasPixel: s.Depth > 0, X: s.X, Y: s.Y, DepthPx: s.Depth, InView: s.InView}
}

// diffPoints returns, in order, the point indices i of differences at
// "screen[i]…".
func diffPoints(diffs []check.Diff) []int {
	seen := map[int]bool{}
	for _, d := range diffs {
		rest, ok := strings.CutPrefix(d.Path, "screen[")
		if !ok {
			continue
		}
		end := strings.IndexByte(rest, ']')
		if end < 0 {
			continue
		}
		if i, err := strconv.Atoi(rest[:end]); err == nil {
			seen[i] = true
		}
	}
	out := make([]int, 0, len(seen))
	for i := range seen {
		out = append(out, i)
	}
	sort.Ints(out)
	return out
}

// maxPictures is how many of a run's worst failures get a picture.
const maxPictures = 5

// worstCase is a failed case kept for its picture.
type worstCase struct {
	c     *corpus.Case
	got   []byte
	diffs []check.Diff
	ratio float64 // the largest Diff.Ratio (+Inf for a decision outside its margin)
}

// worstCases keeps the maxPictures worst failed project cases of a run,
// worst first (the largest difference relative to its tolerance; the
// earlier case on a tie).
type worstCases struct {
	cases []worstCase
}

// add is a check.RunOptions.OnChecked hook.
func (wc *worstCases) add(c *corpus.Case, got []byte, res check.CaseResult) {
	if res.Status != check.Fail || c.Op != "project" {
		return
	}
	r := 0.0
	for _, d := range res.Diffs {
		r = max(r, d.Ratio)
	}
	i := sort.Search(len(wc.cases), func(i int) bool { return wc.cases[i].ratio < r })
	if i >= maxPictures {
		return
	}
	wc.cases = append(wc.cases, worstCase{})
	copy(wc.cases[i+1:], wc.cases[i:])
	wc.cases[i] = worstCase{c: c, got: append([]byte(nil), got...), diffs: res.Diffs, ratio: r}
	wc.cases = wc.cases[:min(len(wc.cases), maxPictures)]
}

// write draws each kept case into dir as CASE-ID.svg (the id with every
// character other than a letter, a digit, '.', '-' or '_' made '-') and
// says where on the command's error stream.
func (wc *worstCases) write(cmd *cobra.Command, dir string) error {
	if len(wc.cases) == 0 {
		fmt.Fprintf(cmd.ErrOrStderr(), "no failed project case to draw in %s\n", dir)
		return nil
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for _, k := range wc.cases {
		svg, ok, err := projectOverlay(k.c, k.got, k.diffs, "the implementation")
		if err != nil {
			return fmt.Errorf("case %s: %w", k.c.ID, err)
		}
		if !ok {
			continue
		}
		name := filepath.Join(dir, fileSafe(k.c.ID)+".svg")
		if err := writeFileAtomic(name, svg); err != nil {
			return err
		}
		fmt.Fprintf(cmd.ErrOrStderr(), "picture of %s: %s\n", k.c.ID, name)
	}
	return nil
}

// fileSafe turns an id into a file name.
func fileSafe(id string) string {
	s := strings.Map(func(r rune) rune {
		if r == '.' || r == '-' || r == '_' || ('a' <= r && r <= 'z') || ('A' <= r && r <= 'Z') || ('0' <= r && r <= '9') {
			return r
		}
		return '-'
	}, id)
	if s = strings.Trim(s, "-."); s == "" {
		s = "case"
	}
	return s
}
