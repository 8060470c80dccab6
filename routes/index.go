package routes

// The spatial index: a binary tree over the segments, split at (or next to) the median of their
// centres along the widest axis (k-d style), so that every leaf is nearly full (splitAt). Each
// internal node holds, for each of its two children, an axis-aligned box in 3-D space (unit-sphere
// units) containing every arc below that child, and the largest segment index below it. Working
// with the unit vectors, not with longitude and latitude, leaves no seam at the antimeridian and no
// singularity at the poles. The Euclidean distance from Q to a box is a lower bound on the chord
// from Q to any arc in it, and the chord grows with the angle, so whole regions of far segments are
// skipped; splitting by position rather than by index keeps the boxes apart even where a route
// crosses itself many times (a tree over runs of consecutive segments had ~60 boxes over every
// point of a tangled 20,000-vertex drive). "At or ahead of segment u" skips children whose largest
// index is below u. Queries open about ten nodes and leaves on a 500-vertex city drive, 22 on a
// 20,000-vertex one, 29 on a 20,000-vertex tangle, within 15% of the nodes any search must open
// (index_work_test.go bounds them).
//
// The build (treeBuilder) is O(n log n): each split finds its place by selection, in time linear
// in the node's segments, not by sorting them, and the boxes are made bottom-up, a parent's from
// its children's. Centres that tie along the split axis go by segment index, so every split, and
// so the tree, is fully determined by the segments: the same tree a sort at every level made.

import (
	"math"
	"sync"

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

// item is one segment in the index's leaf order: its index along the route, and whether it ends
// its leaf. The search reads the segment's arc from the route's segments: a leaf's segments are
// near each other, and so, on a road, mostly near each other along the route, and a copy of the
// arcs in leaf order (kept until 2026-12) cost 2.2 MB on a 20,000-vertex route and the time to
// make it, and made the queries no faster (BenchmarkMetrics200x20000 within 2%).
type item struct {
	seg int32
	end bool
}

// arcBox returns a box containing the minor arc from a to b of angle theta: the ends' box grown
// by the arc's bulge away from its chord (arcBulge) and boxPad. The built-in min and max order ±0
// and NaN as math.Min and math.Max do, without a call.
func arcBox(sg *segment) (lo, hi r3.Vector) {
	bulge := arcBulge(sg.cosT, sg.sinT) + boxPad
	lo = r3.Vector{X: min(sg.a.X, sg.b.X) - bulge, Y: min(sg.a.Y, sg.b.Y) - bulge, Z: min(sg.a.Z, sg.b.Z) - bulge}
	hi = r3.Vector{X: max(sg.a.X, sg.b.X) + bulge, Y: max(sg.a.Y, sg.b.Y) + bulge, Z: max(sg.a.Z, sg.b.Z) + bulge}
	return lo, hi
}

// arcBulge returns how far a minor arc of angle θ ∈ [0, π) leaves its chord, 1 − cos(θ/2), from
// cos θ and sin θ by the half-angle formulas: cos(θ/2) = √((1 + cos θ)/2) up to θ = π/2, and
// beyond, where 1 + cos θ cancels, sin θ / √(2(1 − cos θ)). A square root costs less than a
// cosine, and the result is within a few 1e-16 of the cosine's (TestArcBulgeIsHalfAngle), well
// inside boxPad.
func arcBulge(cosTheta, sinTheta float64) float64 {
	if cosTheta >= 0 {
		return 1 - math.Sqrt((1+cosTheta)/2)
	}
	return 1 - sinTheta/math.Sqrt(2*(1-cosTheta))
}

// toBox32 rounds the box [lo, hi] outwards into a box32: about the float32 nearest its centre,
// the least float32 half-extents that hold both corners as the queries measure it (gap).
func toBox32(lo, hi r3.Vector) box32 {
	var b box32
	b.cx, b.ex = axis32(lo.X, hi.X)
	b.cy, b.ey = axis32(lo.Y, hi.Y)
	b.cz, b.ez = axis32(lo.Z, hi.Z)
	return b
}

// axis32 returns one axis of toBox32: the float32 c nearest the middle of [l, h], and the least
// float32 e ≥ 0 for which the interval [c − e, c + e] holds l and h as gap measures it.
func axis32(l, h float64) (c, e float32) {
	c = float32((l + h) / 2)
	cf := float64(c)
	// The distances from c to the corners are rounded (l − c is not exact when l is far smaller
	// than c); gap is what the queries measure with, so the half-extent must hold as gap says.
	al, ah := math.Abs(l-cf), math.Abs(h-cf)
	// Where the larger distance m is finite and not tiny, gap holds a corner exactly when e ≥ m
	// (a shortfall m − e > 0 is then at least 2⁻⁴⁵⁴, whose square does not underflow), so the
	// least e is m rounded up to a float32.
	if m := max(al, ah); m >= 0x1p-400 && m <= math.MaxFloat64 {
		e = float32(m)
		if float64(e) < m {
			e = stepUp32(e)
		}
		return c, e
	}
	// Otherwise m is below 2⁻⁴⁰⁰, and e starts at its float32 rounding, 0, or a corner is
	// infinite, and e starts at +Inf (an infinite extent holds anything). Holding is monotone in
	// e, so stepping up from there finds the least e: one step at most from 0, where gap holds a
	// corner a little short of it (the square of a shortfall below ~1e-162 underflows to 0).
	holds := func(e float32) bool { return gapAt(al, float64(e)) == 0 && gapAt(ah, float64(e)) == 0 }
	e = float32(math.Max(h-cf, cf-l))
	for e <= math.MaxFloat32 && !holds(e) {
		e = stepUp32(e)
	}
	return c, e
}

// stepUp32 returns math.Nextafter32(e, +Inf), by its bits where it can.
func stepUp32(e float32) float32 {
	if b := math.Float32bits(e); b < 0x7f800000 { // +0 or positive and finite
		return math.Float32frombits(b + 1)
	}
	return math.Nextafter32(e, float32(math.Inf(1)))
}

// buildTree builds the index over segs: the internal nodes, the root's code (see node), and the
// items in leaf order. See treeBuilder for how, in O(n log n).
func buildTree(segs []segment) ([]node, int32, []item) {
	es := pooledEntries(len(segs))
	b := newTreeBuilder(segs, *es)
	root := b.build(0, len(segs)).code // before reading b.nodes, which it appends to
	entryPool.Put(es)
	return b.nodes, root, b.items
}

// entryPool keeps the entries of finished builds for the next one: a server prepares one route
// after another, and fresh memory costs a large build more than its use does (on 20,000 vertices
// the entries are 640 KB, each page of it faulted in and zeroed anew).
var entryPool sync.Pool

// newTreeBuilder returns a builder for the tree over segs, with each segment's box and centre made
// into es (len(segs) entries, whatever they held).
func newTreeBuilder(segs []segment, es []buildEntry) *treeBuilder {
	b := &treeBuilder{
		segs: segs,
		es:   es,
		// One node fewer than the ⌈n/leafSegs⌉ leaves (splitAt); at least one, so that every route
		// allocates alike.
		nodes: make([]node, 0, max(1, (len(segs)-1)/leafSegs)),
		items: make([]item, len(segs)),
	}
	for i := range segs {
		lo, hi := arcBox(&segs[i])
		b.es[i] = newBuildEntry(lo.Add(hi).Mul(0.5), int32(i))
	}
	return b
}

// pooledEntries returns a slice of n entries, from entryPool when it holds one; their contents
// are whatever the last build left (newTreeBuilder writes every one). The pool holds the slice
// alone, so that it keeps no route alive.
func pooledEntries(n int) *[]buildEntry {
	p, _ := entryPool.Get().(*[]buildEntry)
	if p == nil {
		p = new([]buildEntry)
	}
	if cap(*p) < n {
		*p = make([]buildEntry, n)
	}
	*p = (*p)[:n]
	return p
}

// treeBuilder builds the index top-down, splitting each range of entries at (or next to) the
// median of their box centres along the widest axis of those centres (splitAt says where), and
// makes the boxes bottom-up:
//
//   - the split selects the entry at its place (selectNth), which leaves the lower part before it
//     and the upper after it, each in no particular order, in time linear in the range, so a level
//     of the tree costs O(n) and the build O(n log n) (sorting every range cost O(n log² n));
//   - a leaf's box is made from its segments' boxes and an internal node's from its children's;
//     a segment's box is made twice, for its centre at the start and in its leaf, which costs less
//     than keeping it (read in leaf order, a kept box was a cache miss on a large route: New on
//     20,000 vertices took 7% longer in one alternating set).
//
// The order is strict (equal centres go by segment index), so the halves of every split are
// determined by the set of entries alone, and the tree is the one a full sort at every level makes
// (it was built that way until 2026-12; index_test.go checks the two builds agree exactly). A
// leaf's items are in their parent's split order, by centre along its axis and then by index; the
// root, when it is a leaf, keeps the route's order. A box is the componentwise min and max of the
// boxes under it, exact in any order of combination.
type treeBuilder struct {
	segs  []segment
	es    []buildEntry // the segments, reordered in place into leaf order
	nodes []node
	items []item
	// work counts the entries the splits' selections partitioned (selectNth): the build's work,
	// which the tree cannot show (a worse pivot costs time only), so tests bound it.
	work int
}

// buildEntry is a segment while the tree is built: the centre of its box (unit-sphere units) as
// ordered integers (orderedKey), and its index.
type buildEntry struct {
	key [3]int64
	seg int32
}

// newBuildEntry returns the entry of segment seg, whose box has the centre c.
func newBuildEntry(c r3.Vector, seg int32) buildEntry {
	return buildEntry{key: [3]int64{orderedKey(c.X), orderedKey(c.Y), orderedKey(c.Z)}, seg: seg}
}

// orderedKey returns an integer that orders as v does among the floats other than NaN, −0 and +0
// both 0: v's bits, with those of a negative v but its sign inverted (a larger magnitude is then a
// smaller integer). Comparing, and taking the least and greatest of, such integers costs a
// compare and a conditional move; a float's min and max carry NaN and signed-zero care (widestAxis
// was 29% of the build's instructions with them; the build takes 22% fewer on 20,000 vertices).
func orderedKey(v float64) int64 {
	if v == 0 {
		return 0
	}
	i := int64(math.Float64bits(v))
	return i ^ int64(uint64(i>>63)>>1)
}

// orderedFloat returns the float whose orderedKey is k (+0 for 0).
func orderedFloat(k int64) float64 {
	return math.Float64frombits(uint64(k ^ int64(uint64(k>>63)>>1)))
}

// segBox is a box as its float64 corners, unit-sphere units.
type segBox struct {
	lo, hi r3.Vector
}

// subtree is what treeBuilder.build made: the code of its root (see node), the float64 box of all
// the arcs in it and the largest segment index in it.
type subtree struct {
	code   int32
	box    segBox
	maxSeg int32
}

// build builds the tree over es[first:last] and returns it. Internal nodes are numbered in
// preorder.
func (b *treeBuilder) build(first, last int) subtree {
	if last-first <= leafSegs {
		return b.leaf(first, last)
	}
	axis := b.widestAxis(first, last)
	mid := first + splitAt(last-first)
	b.work += selectNth(b.es[first:last], mid-first, axis)
	idx := int32(len(b.nodes))
	b.nodes = append(b.nodes, node{})
	l := b.build(first, mid)
	r := b.build(mid, last)
	b.nodes[idx] = node{
		box:    [2]box32{toBox32(l.box.lo, l.box.hi), toBox32(r.box.lo, r.box.hi)},
		child:  [2]int32{l.code, r.code},
		maxSeg: [2]int32{l.maxSeg, r.maxSeg},
	}
	return subtree{code: idx, box: l.box.union(&r.box), maxSeg: max(l.maxSeg, r.maxSeg)}
}

// splitAt returns how many of a node's n > leafSegs entries go to its lower child: the node's
// ⌈n/leafSegs⌉ leaves are shared ⌈half⌉ to the lower child, ⌊half⌋ to the upper, and its entries
// in proportion, so every leaf below holds ⌊n/L⌋ or ⌈n/L⌉ of the L leaves' entries. Splitting at
// the plain median instead left leaves of 2 or 3 entries on routes a little longer than a power of
// two times leafSegs (20,000 segments: 8,192 leaves, against 5,000 now).
func splitAt(n int) int {
	leaves := (n + leafSegs - 1) / leafSegs
	return n * ((leaves + 1) / 2) / leaves
}

// leaf makes es[first:last] a leaf, its entries written out as items in the order they are in. A
// leaf's parent holds at most 2·leafSegs + 1 entries, which selectNth sorts outright (see
// selectSmall), so that order is the parent's split order.
func (b *treeBuilder) leaf(first, last int) subtree {
	es := b.es[first:last]
	inf := math.Inf(1)
	st := subtree{code: ^int32(first), box: segBox{r3.Vector{X: inf, Y: inf, Z: inf}, r3.Vector{X: -inf, Y: -inf, Z: -inf}}, maxSeg: -1}
	for k := range es {
		seg := es[k].seg
		sg := &b.segs[seg]
		lo, hi := arcBox(sg) // made again, in leaf order, rather than kept in segment order
		st.box = st.box.union(&segBox{lo, hi})
		st.maxSeg = max(st.maxSeg, seg)
		b.items[first+k] = item{seg: seg}
	}
	b.items[last-1].end = true
	return st
}

// widestAxis returns the axis (0, 1, 2 for x, y, z) along which the centres of es[first:last]
// spread the most; on equal spreads y before z before x.
func (b *treeBuilder) widestAxis(first, last int) int {
	loX, loY, loZ := int64(math.MaxInt64), int64(math.MaxInt64), int64(math.MaxInt64)
	hiX, hiY, hiZ := int64(math.MinInt64), int64(math.MinInt64), int64(math.MinInt64)
	es := b.es[first:last]
	for i := range es {
		k := &es[i].key
		loX, loY, loZ = min(loX, k[0]), min(loY, k[1]), min(loZ, k[2])
		hiX, hiY, hiZ = max(hiX, k[0]), max(hiY, k[1]), max(hiZ, k[2])
	}
	extX := orderedFloat(hiX) - orderedFloat(loX)
	extY := orderedFloat(hiY) - orderedFloat(loY)
	extZ := orderedFloat(hiZ) - orderedFloat(loZ)
	switch {
	case extY >= extX && extY >= extZ:
		return 1
	case extZ >= extX && extZ >= extY:
		return 2
	}
	return 0
}

// union returns the smallest box holding bx and o. Go's min and max, like math.Min and math.Max,
// order −0 before +0, so the result does not depend on the order boxes are combined in.
func (bx segBox) union(o *segBox) segBox {
	return segBox{
		r3.Vector{X: min(bx.lo.X, o.lo.X), Y: min(bx.lo.Y, o.lo.Y), Z: min(bx.lo.Z, o.lo.Z)},
		r3.Vector{X: max(bx.hi.X, o.hi.X), Y: max(bx.hi.Y, o.hi.Y), Z: max(bx.hi.Z, o.hi.Z)},
	}
}

// less orders entries by their centres along axis, equal centres by segment index: a strict total
// order, since segment indices differ.
func (e *buildEntry) less(f *buildEntry, axis int) bool {
	if e.key[axis] != f.key[axis] {
		return e.key[axis] < f.key[axis]
	}
	return e.seg < f.seg
}

// selectNth reorders es so that es[k] is the entry a sort by less along axis would put there, with
// the entries less than it before it and the others after (C++'s nth_element). Deterministic and
// O(len(es)) at worst: pivots are medians of three (ninthers on long ranges), and should those
// shrink the range too slowly, so that the ranges partitioned add up to more than
// selectWorkFactor·len(es), the rest goes with the median of medians, which always shrinks it by
// 3/10 or more. It returns its work: how many entries it partitioned, with those the median of
// medians sorted in groups of five or partitioned, O(len(es)).
func selectNth(es []buildEntry, k, axis int) (work int) {
	return selectNthWithin(es, k, axis, selectWorkFactor*len(es))
}

// selectWorkFactor bounds, as a multiple of the length, the entries partitioned with cheap pivots
// before selectNth turns to the median of medians. With medians of three, finding a median takes
// about 2.75·n comparisons on average (Kirschenhofer, Prodinger and Martínez, "Analysis of Hoare's
// FIND algorithm with median-of-three partition", 1997), so the switch is rare and comes late.
const selectWorkFactor = 5

// selectSmall is the longest range that selection sorts outright, by insertion. It must be at
// least 2·leafSegs + 1, the most entries a leaf's parent holds, for the leaves' order (see
// treeBuilder.leaf); the constant below does not compile otherwise.
const selectSmall = 12

const _ = uint(selectSmall - (2*leafSegs + 1))

// selectNthWithin is selectNth with the cheap pivots' budget given, in entries partitioned.
func selectNthWithin(es []buildEntry, k, axis, budget int) (work int) {
	lo, hi := 0, len(es)
	for hi-lo > selectSmall {
		budget -= hi - lo
		work += hi - lo
		var p int
		if budget >= 0 {
			p = pivotNinther(es, lo, hi, axis)
		} else {
			var w int
			p, w = pivotMedianOfMedians(es, lo, hi, axis)
			work += w
		}
		p = partitionAround(es, lo, hi, p, axis)
		switch {
		case k < p:
			hi = p
		case k > p:
			lo = p + 1
		default:
			return work
		}
	}
	insertionSort(es[lo:hi], axis)
	return work
}

// partitionAround reorders es[lo:hi] around the pivot es[p]: entries less than it, then it, then
// the greater ones. It returns the pivot's new index.
func partitionAround(es []buildEntry, lo, hi, p, axis int) int {
	es[lo], es[p] = es[p], es[lo]
	pivot := es[lo]
	i, j := lo+1, hi-1
	for {
		for i <= j && es[i].less(&pivot, axis) {
			i++
		}
		for i <= j && pivot.less(&es[j], axis) {
			j--
		}
		if i > j {
			break
		}
		es[i], es[j] = es[j], es[i]
		i++
		j--
	}
	es[lo], es[j] = es[j], es[lo]
	return j
}

// pivotNinther returns the index of a pivot for es[lo:hi] (at least 3 entries): the median of the
// entries a quarter, a half and three quarters of the way along, or on 128 or more entries the
// median of three medians of spaced triples across the range (Tukey's ninther), which resists the
// ordered runs that along-route order leaves. Not the first and last entries below 128: a partition
// of a run in descending order leaves an ascending run behind the one entry it moved to the front,
// whose first and last entries are then the two largest, and the range shrank by two entries a step
// (5·n partitioned to select the least of 71 descending keys, against 1.7·n now).
func pivotNinther(es []buildEntry, lo, hi, axis int) int {
	n := hi - lo
	m := lo + n/2
	if n < 128 {
		return median3(es, lo+n/4, m, hi-1-n/4, axis)
	}
	s := n / 8
	return median3(es,
		median3(es, lo, lo+s, lo+2*s, axis),
		median3(es, m-s, m, m+s, axis),
		median3(es, hi-1-2*s, hi-1-s, hi-1, axis), axis)
}

// median3 returns whichever of the indices a, b, c holds the median of their three entries.
func median3(es []buildEntry, a, b, c, axis int) int {
	if es[b].less(&es[a], axis) {
		a, b = b, a
	}
	if es[c].less(&es[b], axis) {
		if es[c].less(&es[a], axis) {
			return a
		}
		return c
	}
	return b
}

// pivotMedianOfMedians returns the index of a pivot for es[lo:hi] (at least 5 entries) with at
// least 3/10 of the range, less a few entries, on each side: the median of the medians of groups
// of five (Blum, Floyd, Pratt, Rivest and Tarjan, "Time bounds for selection", 1973). It gathers
// the medians at the front of the range, and returns with the pivot its work: the entries it
// sorted in groups of five and those its selection of the median partitioned.
func pivotMedianOfMedians(es []buildEntry, lo, hi, axis int) (p, work int) {
	g := 0
	for i := lo; i+5 <= hi; i += 5 {
		insertionSort(es[i:i+5], axis)
		es[lo+g], es[i+2] = es[i+2], es[lo+g] // lo+g lies in a group already done
		g++
	}
	work = 5*g + selectNth(es[lo:lo+g], g/2, axis)
	return lo + g/2, work
}

// insertionSort sorts es by less along axis.
func insertionSort(es []buildEntry, axis int) {
	for i := 1; i < len(es); i++ {
		for j := i; j > 0 && es[j].less(&es[j-1], axis); j-- {
			es[j], es[j-1] = es[j-1], es[j]
		}
	}
}

// boxDist2 returns the squared Euclidean distance from q to the box (0 inside).
func (b *box32) boxDist2(q r3.Vector) float64 {
	return gap(q.X, float64(b.cx), float64(b.ex)) + gap(q.Y, float64(b.cy), float64(b.ey)) + gap(q.Z, float64(b.cz), float64(b.ez))
}

// gap returns the squared distance from v to the interval [c − e, c + e]. This is the index's
// innermost arithmetic, so it is written without branches or min/max (the branches of a comparison
// mispredict on scattered queries, and min/max carry NaN and signed-zero care not needed here):
// with t = |v − c| − e, the distance is max(t, 0) = (t + |t|)/2.
func gap(v, c, e float64) float64 { return gapAt(math.Abs(v-c), e) }

// gapAt is gap for a v at distance a = |v − c| from c: toBox32 tries several e at one distance.
func gapAt(a, e float64) float64 {
	t := a - e
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
// stack never holds more than the tree's depth + 1 entries, and a balanced tree over fewer than
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
	seg, _ := r.search(qq)
	return seg
}

// search is nearest, also returning how many nodes and leaves it opened: its work, which the
// answer cannot show (a looser box or a worse order of search costs time only), so tests bound it.
func (r *Route) search(qq *query) (seg, opened int) {
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
		opened++
		if e.code < 0 { // a leaf
			for k := ^e.code; ; k++ {
				it := &r.items[k]
				if it.seg >= u {
					c2, _, _, _ := arcClosest(&r.segs[it.seg].arc, it.seg == u, qq)
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
		win, o := r.firstWithin(qq, chordAngle(best)+tieTolRad)
		return win, opened + o
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
	return win, opened
}

// firstWithin returns the smallest segment index (≥ qq.u) whose closest point is within limitRad of
// Q, and the nodes and leaves it opened. The caller knows one exists.
func (r *Route) firstWithin(qq *query, limitRad float64) (seg, opened int) {
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
		opened++
		if code < 0 {
			for k := ^code; ; k++ {
				it := &r.items[k]
				if it.seg >= u && it.seg < win {
					if c2, _, _, _ := arcClosest(&r.segs[it.seg].arc, it.seg == u, qq); c2 <= thr && chordAngle(c2) <= limitRad {
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
	return int(win), opened
}
