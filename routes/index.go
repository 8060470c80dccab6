package routes

// The spatial index: a binary tree over the segments, split at the median of their centres along
// the widest axis (k-d style), each node holding an axis-aligned box in 3-D space (unit-sphere
// units) that contains every arc below it, and the smallest and largest segment index below it.
// Working with the unit vectors, not with longitude and latitude, leaves no seam at the antimeridian
// and no singularity at the poles. The Euclidean distance from Q to a box is a lower bound on the
// chord from Q to any arc in it, and the chord grows with the angle, so whole regions of far
// segments are skipped; splitting by position rather than by index keeps the boxes apart even
// where a route crosses itself many times. "At or ahead of segment u" skips nodes whose largest
// index is below u.

import (
	"math"
	"sort"

	"github.com/golang/geo/r3"
)

// leafSegs is the most segments a leaf holds.
const leafSegs = 4

// boxPad widens every box to absorb rounding in its construction (unit-sphere units, ~6e-8 m).
const boxPad = 1e-14

type node struct {
	lo, hi         r3.Vector // the box
	first, last    int32     // the node's items are items[first:last]
	minSeg, maxSeg int32     // smallest and largest segment index among them
	left, right    int32     // children; -1 in a leaf
}

// item is one segment in the index's leaf order: its arc and its index along the route.
type item struct {
	arc
	seg int32
}

// arcBox returns a box containing the minor arc from a to b of angle theta: the ends' box grown
// by the arc's bulge away from its chord, 1 − cos(θ/2).
func arcBox(sg *segment) (lo, hi r3.Vector) {
	bulge := 1 - math.Cos(sg.theta/2) + boxPad
	lo = r3.Vector{X: math.Min(sg.a.X, sg.b.X) - bulge, Y: math.Min(sg.a.Y, sg.b.Y) - bulge, Z: math.Min(sg.a.Z, sg.b.Z) - bulge}
	hi = r3.Vector{X: math.Max(sg.a.X, sg.b.X) + bulge, Y: math.Max(sg.a.Y, sg.b.Y) + bulge, Z: math.Max(sg.a.Z, sg.b.Z) + bulge}
	return lo, hi
}

// buildTree builds the index over segs: the nodes (root 0) and the items in leaf order.
func buildTree(segs []segment) ([]node, []item) {
	type entry struct {
		seg    int32
		centre r3.Vector
		lo, hi r3.Vector
	}
	es := make([]entry, len(segs))
	for i := range segs {
		lo, hi := arcBox(&segs[i])
		es[i] = entry{seg: int32(i), centre: lo.Add(hi).Mul(0.5), lo: lo, hi: hi}
	}
	nodes := make([]node, 0, 2*(len(segs)/leafSegs+1))
	var build func(first, last int) int32
	build = func(first, last int) int32 {
		idx := int32(len(nodes))
		nd := node{first: int32(first), last: int32(last), minSeg: math.MaxInt32, maxSeg: -1, left: -1, right: -1}
		nd.lo = r3.Vector{X: math.Inf(1), Y: math.Inf(1), Z: math.Inf(1)}
		nd.hi = nd.lo.Mul(-1)
		cLo, cHi := nd.lo, nd.hi // bounds of the centres, to choose the split axis
		for _, e := range es[first:last] {
			nd.lo = r3.Vector{X: math.Min(nd.lo.X, e.lo.X), Y: math.Min(nd.lo.Y, e.lo.Y), Z: math.Min(nd.lo.Z, e.lo.Z)}
			nd.hi = r3.Vector{X: math.Max(nd.hi.X, e.hi.X), Y: math.Max(nd.hi.Y, e.hi.Y), Z: math.Max(nd.hi.Z, e.hi.Z)}
			cLo = r3.Vector{X: math.Min(cLo.X, e.centre.X), Y: math.Min(cLo.Y, e.centre.Y), Z: math.Min(cLo.Z, e.centre.Z)}
			cHi = r3.Vector{X: math.Max(cHi.X, e.centre.X), Y: math.Max(cHi.Y, e.centre.Y), Z: math.Max(cHi.Z, e.centre.Z)}
			nd.minSeg = min(nd.minSeg, e.seg)
			nd.maxSeg = max(nd.maxSeg, e.seg)
		}
		nodes = append(nodes, nd)
		if last-first <= leafSegs {
			return idx
		}
		ext := cHi.Sub(cLo)
		key := func(v r3.Vector) float64 { return v.X }
		if ext.Y >= ext.X && ext.Y >= ext.Z {
			key = func(v r3.Vector) float64 { return v.Y }
		} else if ext.Z >= ext.X && ext.Z >= ext.Y {
			key = func(v r3.Vector) float64 { return v.Z }
		}
		part := es[first:last]
		sort.Slice(part, func(i, j int) bool {
			ki, kj := key(part[i].centre), key(part[j].centre)
			if ki != kj {
				return ki < kj
			}
			return part[i].seg < part[j].seg // deterministic
		})
		mid := (first + last) / 2
		l := build(first, mid)
		r := build(mid, last)
		nodes[idx].left, nodes[idx].right = l, r
		return idx
	}
	build(0, len(segs))
	items := make([]item, len(es))
	for i, e := range es {
		items[i] = item{arc: segs[e.seg].arc, seg: e.seg}
	}
	return nodes, items
}

// boxDist2 returns the squared Euclidean distance from q to the node's box (0 inside).
func (nd *node) boxDist2(q r3.Vector) float64 {
	return gap(q.X, nd.lo.X, nd.hi.X) + gap(q.Y, nd.lo.Y, nd.hi.Y) + gap(q.Z, nd.lo.Z, nd.hi.Z)
}

// gap returns the squared distance from v to the interval [lo, hi] (plain comparisons: this is
// the index's innermost loop, and math.Max's NaN and signed-zero care is not needed here).
func gap(v, lo, hi float64) float64 {
	if v < lo {
		return (lo - v) * (lo - v)
	}
	if v > hi {
		return (v - hi) * (v - hi)
	}
	return 0
}

// Tie tolerance (SPEC §4): per-segment closest points whose distances from Q differ by at most
// tieTolM are tied, and the one with the smallest along-route position wins. The comparison is made
// on the sphere, the metres turned into an angle at the mean radius.
const tieTolM = 1e-6

var tieTolRad = tieTolM / meanRadiusM

// query is a closest-point question: the unit vector q and the part of the route considered,
// which starts on segment u at the point lo, lying in the direction (cl, sl) of segment u's (a, t)
// plane, and runs to the route's end. For the whole route u = 0 and lo = segs[0].a.
type query struct {
	q      r3.Vector
	u      int
	cl, sl float64
	lo     r3.Vector
}

// Where on its segment a closest point lies.
const (
	atFoot = iota // inside the considered arc: the foot of the perpendicular from Q
	atLo          // at the start of the considered arc (segment start, or the user's place on segment u)
	atEnd         // at the segment's end vertex
)

// chordAngle returns the angle subtended by a chord whose square is c2.
func chordAngle(c2 float64) float64 {
	return 2 * math.Asin(math.Min(1, math.Sqrt(c2)/2))
}

// endsTied reports whether the end at squared chord dLo is as near as the end at dHi < dLo within
// the tie tolerance.
func endsTied(dLo, dHi float64) bool {
	// The angle grows at least as fast as the chord, so chords more than the tolerance apart
	// cannot be tied; only near cases pay for the arcsines.
	if math.Sqrt(dLo)-math.Sqrt(dHi) > tieTolRad {
		return false
	}
	return chordAngle(dLo)-chordAngle(dHi) <= tieTolRad
}

// segClosest returns the squared chord from q to the closest point of the considered part of
// segment i, where that point is (atFoot, atLo, atEnd), and Q's coordinates (x, y) in the
// segment's (a, t) plane.
func (r *Route) segClosest(i int, qq *query) (c2 float64, at int, x, y float64) {
	return arcClosest(&r.segs[i].arc, i == qq.u, qq)
}

// arcClosest is segClosest on an arc; onU says whether it is the user's segment qq.u. The closest
// point of an arc no longer than π is the foot of the perpendicular when that lies on the arc,
// otherwise the nearer end; ends tied within tieTolM go to the start, and Q exactly at an end (the
// same unit vector) gets that end. Q exactly on the axis of the arc's great circle (x = y = 0),
// equidistant from every point, also gets the start.
func arcClosest(sg *arc, onU bool, qq *query) (c2 float64, at int, x, y float64) {
	q := qq.q
	x = q.X*sg.a.X + q.Y*sg.a.Y + q.Z*sg.a.Z
	y = q.X*sg.t.X + q.Y*sg.t.Y + q.Z*sg.t.Z
	cl, sl, lo := 1.0, 0.0, sg.a
	if onU {
		cl, sl, lo = qq.cl, qq.sl, qq.lo
	}
	// Q exactly at an end (a marker placed on a vertex) is that end, not a foot a rounding error
	// away from it.
	if q == lo {
		return 0, atLo, x, y
	}
	if q == sg.b {
		return 0, atEnd, x, y
	}
	if (x != 0 || y != 0) && y*cl-x*sl >= 0 && y*sg.cosT-x*sg.sinT <= 0 {
		z := q.X*sg.n.X + q.Y*sg.n.Y + q.Z*sg.n.Z
		d := 1 - math.Sqrt(x*x+y*y)
		return d*d + z*z, atFoot, x, y
	}
	dx, dy, dz := q.X-lo.X, q.Y-lo.Y, q.Z-lo.Z
	dLo := dx*dx + dy*dy + dz*dz
	dx, dy, dz = q.X-sg.b.X, q.Y-sg.b.Y, q.Z-sg.b.Z
	dHi := dx*dx + dy*dy + dz*dz
	if dHi < dLo && !endsTied(dLo, dHi) {
		return dHi, atEnd, x, y
	}
	return dLo, atLo, x, y
}

// stackCap bounds the depth-first stack: popping one node pushes at most its two children, so the
// stack never holds more than the tree's depth + 1 entries, and a median-split tree over fewer than
// 2³¹ segments in leaves of leafSegs is at most 31 deep.
const stackCap = 34

// farAway is a lower bound larger than any chord (≤ 2) and any threshold that matters.
const farAway = 1e300

type searchEntry struct {
	node int32
	lb2  float64 // squared lower bound on the chord from Q to the node's arcs
}

// maxTies is how many near-tied segments the search keeps; more (a route retracing one road many
// times) falls back to a second pass.
const maxTies = 8

// nearest returns the segment holding the closest point of the considered part of the route, by the
// tie rule: among the segments whose closest points are within tieTolM of the minimum distance,
// the one with the smallest index (hence the smallest along-route position). It does not allocate.
func (r *Route) nearest(qq *query) int {
	best := math.Inf(1) // smallest squared chord so far
	thr := math.Inf(1)  // (√best + tieTolRad)²: anything farther can be neither best nor tied
	var cand [maxTies]struct {
		seg int
		c2  float64
	}
	nc, overflow := 0, false
	u := int32(qq.u)
	q := qq.q

	var stack [stackCap]searchEntry
	sp := 0
	stack[sp] = searchEntry{0, 0}
	sp++
	for sp > 0 {
		sp--
		e := stack[sp]
		if e.lb2 > thr {
			continue
		}
		nd := &r.tree[e.node]
		if nd.left < 0 {
			for k := nd.first; k < nd.last; k++ {
				it := &r.items[k]
				if it.seg < u {
					continue
				}
				c2, _, _, _ := arcClosest(&it.arc, it.seg == u, qq)
				if c2 > thr {
					continue
				}
				if c2 < best {
					best = c2
					s := math.Sqrt(c2) + tieTolRad
					thr = s * s
					k := 0
					for j := 0; j < nc; j++ {
						if cand[j].c2 <= thr {
							cand[k] = cand[j]
							k++
						}
					}
					nc = k
				}
				if nc < maxTies {
					cand[nc].seg, cand[nc].c2 = int(it.seg), c2
					nc++
				} else {
					overflow = true
				}
			}
			continue
		}
		// Push the farther child first so that the nearer one is searched first; children wholly
		// behind u or already too far are not pushed.
		l, rt := &r.tree[nd.left], &r.tree[nd.right]
		lbL, lbR := farAway, farAway
		if l.maxSeg >= u {
			lbL = l.boxDist2(q)
		}
		if rt.maxSeg >= u {
			lbR = rt.boxDist2(q)
		}
		first, second, lbF, lbS := nd.left, nd.right, lbL, lbR
		if lbL > lbR {
			first, second, lbF, lbS = nd.right, nd.left, lbR, lbL
		}
		if lbS < farAway && lbS <= thr {
			stack[sp] = searchEntry{second, lbS}
			sp++
		}
		if lbF < farAway && lbF <= thr {
			stack[sp] = searchEntry{first, lbF}
			sp++
		}
	}
	if overflow {
		return r.firstWithin(qq, chordAngle(best)+tieTolRad)
	}
	// Resolve ties exactly, in angles (only the rare near-ties pay for the arcsines).
	win, limit := math.MaxInt, -1.0
	for j := 0; j < nc; j++ {
		if cand[j].seg >= win {
			continue
		}
		if cand[j].c2 != best {
			if limit < 0 {
				limit = chordAngle(best) + tieTolRad
			}
			if chordAngle(cand[j].c2) > limit {
				continue
			}
		}
		win = cand[j].seg
	}
	return win
}

// firstWithin returns the smallest segment index (≥ qq.u) whose closest point is within limitRad of
// Q. The caller knows one exists.
func (r *Route) firstWithin(qq *query, limitRad float64) int {
	ch := 2 * math.Sin(limitRad/2)
	thr := ch * ch
	var stack [stackCap]int32
	sp := 0
	stack[sp] = 0
	sp++
	q := qq.q
	u := int32(qq.u)
	win := int32(math.MaxInt32)
	for sp > 0 {
		sp--
		nd := &r.tree[stack[sp]]
		if nd.maxSeg < u || nd.minSeg >= win {
			continue
		}
		if nd.boxDist2(q) > thr {
			continue
		}
		if nd.left < 0 {
			for k := nd.first; k < nd.last; k++ {
				it := &r.items[k]
				if it.seg < u || it.seg >= win {
					continue
				}
				if c2, _, _, _ := arcClosest(&it.arc, it.seg == u, qq); c2 <= thr && chordAngle(c2) <= limitRad {
					win = it.seg
				}
			}
			continue
		}
		stack[sp] = nd.right
		sp++
		stack[sp] = nd.left
		sp++
	}
	return int(win)
}
