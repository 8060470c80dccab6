package routes

import (
	"math"
	"sort"

	"github.com/golang/geo/r3"
)

// buildTreeSort is the index build as it was before selection replaced sorting (commit 798be14),
// kept as the baseline that buildTree must reproduce exactly (index_test.go) and that its
// benchmarks are measured against (index_bench_test.go). It sorts every node's range along its
// widest axis with sort.Slice and rescans all the segments below each child for its box:
// O(n log² n).
func buildTreeSort(segs []segment) ([]node, int32, []item) {
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
		// Split at the median of the centres along their widest axis, or next to it (splitAt).
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
		mid := first + splitAt(last-first)
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
		items[i] = item{seg: e.seg, end: ends[i]}
	}
	return nodes, root, items
}
