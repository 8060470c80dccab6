package routes

// The spatial index: a binary tree over the segments, split at the median of their centres along
// the widest axis (k-d style). Each internal node holds, for each of its two children, an
// axis-aligned box in 3-D space (unit-sphere units) containing every arc below that child, and the
// largest segment index below it. Working with the unit vectors, not with longitude and latitude,
// leaves no seam at the antimeridian and no singularity at the poles. The Euclidean distance from Q
// to a box is a lower bound on the chord from Q to any arc in it, and the chord grows with the
// angle, so whole regions of far segments are skipped; splitting by position rather than by index
// keeps the boxes apart even where a route crosses itself many times (a tree over runs of
// consecutive segments had ~60 boxes over every point of a tangled 20,000-vertex drive). "At or
// ahead of segment u" skips children whose largest index is below u. Queries touch about ten nodes
// and six segments on a 500-vertex city drive, twenty nodes on a 20,000-vertex one.

import (
	"math"
	"sort"

	"github.com/golang/geo/r3"
)

// leafSegs is the most segments a leaf holds.
const leafSegs = 4

// boxPad widens every box to absorb rounding in its construction (unit-sphere units, ~6e-8 m).
const boxPad = 1e-14

// box32 is an axis-aligned box as centre and half-extents in float32, rounded outwards when made
// (so it holds everything the float64 box held, padded by up to ~6e-8, 0.4 m on the ground).
type box32 struct {
	cx, cy, cz, ex, ey, ez float32
}

// node is an internal node of the index: its two children's boxes, so that ordering and pruning
// them reads this one 64-byte node only. A child code ≥ 0 is an internal node; < 0 is a leaf
// whose items start at index ^code and run to the first item marked end.
type node struct {
	box    [2]box32
	child  [2]int32
	maxSeg [2]int32 // largest segment index under each child
}

// item is one segment in the index's leaf order: its arc, its index along the route, and whether
// it ends its leaf.
type item struct {
	arc
	seg int32
	end bool
}

// arcBox returns a box containing the minor arc from a to b of angle theta: the ends' box grown
// by the arc's bulge away from its chord, 1 − cos(θ/2).
func arcBox(sg *segment) (lo, hi r3.Vector) {
	bulge := 1 - math.Cos(sg.theta/2) + boxPad
	lo = r3.Vector{X: math.Min(sg.a.X, sg.b.X) - bulge, Y: math.Min(sg.a.Y, sg.b.Y) - bulge, Z: math.Min(sg.a.Z, sg.b.Z) - bulge}
	hi = r3.Vector{X: math.Max(sg.a.X, sg.b.X) + bulge, Y: math.Max(sg.a.Y, sg.b.Y) + bulge, Z: math.Max(sg.a.Z, sg.b.Z) + bulge}
	return lo, hi
}

// toBox32 rounds the box [lo, hi] outwards into a box32.
func toBox32(lo, hi r3.Vector) box32 {
	axis := func(l, h float64) (float32, float32) {
		c := float32((l + h) / 2)
		e := math.Max(h-float64(c), float64(c)-l) // exact: c is representable in float64
		e32 := float32(e)
		if float64(e32) < e {
			e32 = math.Nextafter32(e32, float32(math.Inf(1)))
		}
		return c, e32
	}
	var b box32
	b.cx, b.ex = axis(lo.X, hi.X)
	b.cy, b.ey = axis(lo.Y, hi.Y)
	b.cz, b.ez = axis(lo.Z, hi.Z)
	return b
}

// buildTree builds the index over segs: the internal nodes, the root's code (see node), and the
// items in leaf order.
func buildTree(segs []segment) ([]node, int32, []item) {
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
	// rangeBox returns the box and the largest segment index of es[first:last].
	rangeBox := func(first, last int) (box32, int32) {
		lo := r3.Vector{X: math.Inf(1), Y: math.Inf(1), Z: math.Inf(1)}
		hi := lo.Mul(-1)
		maxSeg := int32(-1)
		for _, e := range es[first:last] {
			lo = r3.Vector{X: math.Min(lo.X, e.lo.X), Y: math.Min(lo.Y, e.lo.Y), Z: math.Min(lo.Z, e.lo.Z)}
			hi = r3.Vector{X: math.Max(hi.X, e.hi.X), Y: math.Max(hi.Y, e.hi.Y), Z: math.Max(hi.Z, e.hi.Z)}
			maxSeg = max(maxSeg, e.seg)
		}
		return toBox32(lo, hi), maxSeg
	}
	nodes := make([]node, 0, 2*(len(segs)/leafSegs+1))
	ends := make([]bool, len(segs))
	var build func(first, last int) int32
	build = func(first, last int) int32 {
		if last-first <= leafSegs {
			ends[last-1] = true
			return ^int32(first)
		}
		// Split at the median of the centres along their widest axis.
		cLo := r3.Vector{X: math.Inf(1), Y: math.Inf(1), Z: math.Inf(1)}
		cHi := cLo.Mul(-1)
		for _, e := range es[first:last] {
			cLo = r3.Vector{X: math.Min(cLo.X, e.centre.X), Y: math.Min(cLo.Y, e.centre.Y), Z: math.Min(cLo.Z, e.centre.Z)}
			cHi = r3.Vector{X: math.Max(cHi.X, e.centre.X), Y: math.Max(cHi.Y, e.centre.Y), Z: math.Max(cHi.Z, e.centre.Z)}
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
		idx := int32(len(nodes))
		nodes = append(nodes, node{})
		var nd node
		nd.box[0], nd.maxSeg[0] = rangeBox(first, mid)
		nd.box[1], nd.maxSeg[1] = rangeBox(mid, last)
		nd.child[0] = build(first, mid)
		nd.child[1] = build(mid, last)
		nodes[idx] = nd
		return idx
	}
	root := build(0, len(segs))
	items := make([]item, len(es))
	for i, e := range es {
		items[i] = item{arc: segs[e.seg].arc, seg: e.seg, end: ends[i]}
	}
	return nodes, root, items
}

// boxDist2 returns the squared Euclidean distance from q to the box (0 inside).
func (b *box32) boxDist2(q r3.Vector) float64 {
	return gap(q.X, float64(b.cx), float64(b.ex)) + gap(q.Y, float64(b.cy), float64(b.ey)) + gap(q.Z, float64(b.cz), float64(b.ez))
}

// gap returns the squared distance from v to the interval [c − e, c + e]. This is the index's
// innermost arithmetic, so it is written without branches or min/max (the branches of a comparison
// mispredict on scattered queries, and min/max carry NaN and signed-zero care not needed here):
// with t = |v − c| − e, the distance is max(t, 0) = (t + |t|)/2.
func gap(v, c, e float64) float64 {
	t := math.Abs(v-c) - e
	d := (t + math.Abs(t)) * 0.5
	return d * d
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
	code int32   // a node or leaf code (see node)
	lb2  float64 // squared lower bound on the chord from Q to its arcs
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
	stack[sp] = searchEntry{r.root, 0}
	sp++
	for sp > 0 {
		sp--
		e := stack[sp]
		if e.lb2 > thr {
			continue
		}
		if e.code < 0 { // a leaf
			for k := ^e.code; ; k++ {
				it := &r.items[k]
				if it.seg >= u {
					c2, _, _, _ := arcClosest(&it.arc, it.seg == u, qq)
					if c2 <= thr {
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
				}
				if it.end {
					break
				}
			}
			continue
		}
		// Push the farther child first so that the nearer one is searched first; children wholly
		// behind u or already too far are not pushed.
		nd := &r.tree[e.code]
		lbL, lbR := farAway, farAway
		if nd.maxSeg[0] >= u {
			lbL = nd.box[0].boxDist2(q)
		}
		if nd.maxSeg[1] >= u {
			lbR = nd.box[1].boxDist2(q)
		}
		first, second, lbF, lbS := nd.child[0], nd.child[1], lbL, lbR
		if lbL > lbR {
			first, second, lbF, lbS = nd.child[1], nd.child[0], lbR, lbL
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
	stack[sp] = r.root
	sp++
	q := qq.q
	u := int32(qq.u)
	win := int32(math.MaxInt32)
	for sp > 0 {
		sp--
		code := stack[sp]
		if code < 0 {
			for k := ^code; ; k++ {
				it := &r.items[k]
				if it.seg >= u && it.seg < win {
					if c2, _, _, _ := arcClosest(&it.arc, it.seg == u, qq); c2 <= thr && chordAngle(c2) <= limitRad {
						win = it.seg
					}
				}
				if it.end {
					break
				}
			}
			continue
		}
		nd := &r.tree[code]
		for k := 1; k >= 0; k-- {
			if nd.maxSeg[k] >= u && nd.box[k].boxDist2(q) <= thr {
				stack[sp] = nd.child[k]
				sp++
			}
		}
	}
	return int(win)
}
