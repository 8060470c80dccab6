package routes

import (
	"math"

	"github.com/paulmach/orb"
)

// ChoiceMarginM returns how far, in metres, the choice of marker q's
// closest point at or ahead of user is from changing (SPEC §4): the least
// distance of any of the choice's discrete decisions from its threshold.
// The decisions are the tie rule between segments (a segment before the
// chosen one that would join the tie, or the chosen one that would leave
// it), the tie between the two ends of the chosen segment, the vertex rule
// (a foot 1e-6 m along the route from a vertex) and the route-end rule
// (Ahead). Distances are angles × the mean radius, as the rules measure
// them; +Inf when no decision was near any threshold (one segment, foot
// well inside it). Where the margin is within rounding, two sound
// implementations can pick different closest points, and along_m, eta_s and
// side can jump.
//
// It scans every segment ahead of the user, for decision margins, not for
// the hot path; it does not allocate.
func (r *Route) ChoiceMarginM(user Place, q orb.Point) float64 {
	uc := r.userCache(&user)
	qv, _, _ := unitVec(q)
	qq := query{q: qv, u: uc.seg, cl: uc.cl, sl: uc.sl, lo: uc.v}
	return r.choiceMarginM(&qq, uc)
}

// SnapChoiceMarginM is ChoiceMarginM for Snap(p): how far the choice of the
// user's place is from changing, metres.
func (r *Route) SnapChoiceMarginM(p orb.Point) float64 {
	qv, _, _ := unitVec(p)
	qq := query{q: qv, u: 0, cl: 1, sl: 0, lo: r.segs[0].a}
	return r.choiceMarginM(&qq, nil)
}

func (r *Route) choiceMarginM(qq *query, user *placeCache) float64 {
	win := r.nearest(qq)
	// The tie rule: the least angle, then every segment up to the winner
	// measured against the tie limit.
	dMin := math.Inf(1)
	for i := qq.u; i < len(r.segs); i++ {
		c2, _, _, _ := r.segClosest(i, qq)
		dMin = min(dMin, chordAngle(c2))
	}
	limit := dMin + tieTolRad
	c2, _, _, _ := r.segClosest(win, qq)
	dWin := chordAngle(c2)
	c := r.resolve(win, qq, user)
	marginRad := math.Inf(1)
	for i := qq.u; i < len(r.segs); i++ {
		c2, _, _, _ := r.segClosest(i, qq)
		d := chordAngle(c2)
		var m float64
		switch {
		case i < win: // would win by joining the tie
			m = math.Abs(d - limit)
		case i == win && d != dMin: // would lose by leaving it
			m = math.Abs(d - limit)
		case i > win: // would win by drawing a tolerance nearer than the winner
			m = math.Abs(d - (dWin - tieTolRad))
		default:
			continue
		}
		// A segment whose closest point is the winner's (a shared vertex)
		// changes nothing by winning.
		if m < marginRad && (i == win || r.resolve(i, qq, user).alongM != c.alongM) {
			marginRad = m
		}
	}
	marginM := marginRad * meanRadiusM

	// The chosen segment: the tie between its ends, or the vertex rule.
	sg := &r.segs[win]
	_, at, x, y := r.segClosest(win, qq)
	lo := sg.a
	if win == qq.u {
		lo = qq.lo
	}
	if at == atFoot {
		s := c.s
		if c.at != atFoot { // snapped: measure the foot itself
			s = math.Atan2(y, x)
		}
		marginM = min(marginM, math.Abs((sg.theta-s)/sg.theta*sg.lengthM-vertexSnapM))
		if win != qq.u || (qq.cl == 1 && qq.sl == 0) {
			marginM = min(marginM, math.Abs(s/sg.theta*sg.lengthM-vertexSnapM))
		}
	} else if qq.q != lo && qq.q != sg.b {
		dLo, dHi := chordAngle(qq.q.Sub(lo).Norm2()), chordAngle(qq.q.Sub(sg.b).Norm2())
		marginM = min(marginM, math.Abs(dLo-dHi-tieTolRad)*meanRadiusM)
	}

	// The route-end rule, when the choice is the final vertex.
	last := len(r.segs) - 1
	if c.alongM >= r.startM[last+1] {
		ls := &r.segs[last]
		x, y := qq.q.Dot(ls.a), qq.q.Dot(ls.t)
		if x != 0 || y != 0 {
			marginM = min(marginM, math.Abs(math.Atan2(y, x)-ls.theta-tieTolRad)*meanRadiusM)
		}
	}
	return marginM
}
