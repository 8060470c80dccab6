package routes

import (
	"math"
	"math/bits"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r3"
	"github.com/paulmach/orb"
	"pgregory.net/rapid"
)

// The index build (buildTree, by selection) must make exactly the tree the sort-based build it
// replaced makes (buildTreeSort in index_naive_test.go): the same nodes with the same float32
// boxes, the same root, the same items in the same leaf order. The queries read nothing else of
// the index, so every answer of the package is then the same bit for bit; the tangled-route test
// checks that too, on Snap and Metrics.

// checkSameTree reports the first difference between the two builds over segs.
func checkSameTree(t interface {
	Helper()
	Fatalf(string, ...any)
}, segs []segment, what string) {
	t.Helper()
	nodes, root, items := buildTree(segs)
	wantNodes, wantRoot, wantItems := buildTreeSort(segs)
	if root != wantRoot || len(nodes) != len(wantNodes) || len(items) != len(wantItems) {
		t.Fatalf("%s, %d segments: buildTree root %d, %d nodes, %d items; want root %d, %d nodes, %d items (buildTreeSort)",
			what, len(segs), root, len(nodes), len(items), wantRoot, len(wantNodes), len(wantItems))
	}
	for i := range nodes {
		if !sameNodeBits(&nodes[i], &wantNodes[i]) {
			t.Fatalf("%s, %d segments: buildTree node %d = %+v, want %+v (buildTreeSort)", what, len(segs), i, nodes[i], wantNodes[i])
		}
	}
	for i := range items {
		// An item's arc is a copy of its segment's, so equal indices give the same bits.
		if items[i].seg != wantItems[i].seg || items[i].end != wantItems[i].end {
			t.Fatalf("%s, %d segments: buildTree item %d = segment %d (end %v), want segment %d (end %v) (buildTreeSort)",
				what, len(segs), i, items[i].seg, items[i].end, wantItems[i].seg, wantItems[i].end)
		}
	}
}

// sameNodeBits reports whether two nodes are the same bit for bit (== would take −0 for +0).
func sameNodeBits(a, b *node) bool {
	for k := range 2 {
		x, y := a.box[k], b.box[k]
		for _, f := range [][2]float32{{x.cx, y.cx}, {x.cy, y.cy}, {x.cz, y.cz}, {x.ex, y.ex}, {x.ey, y.ey}, {x.ez, y.ez}} {
			if math.Float32bits(f[0]) != math.Float32bits(f[1]) {
				return false
			}
		}
	}
	return a.child == b.child && a.maxSeg == b.maxSeg
}

// TestPropBuildTreeMatchesSort: on every generated route (routeGen's small ones of every shape),
// the two builds agree exactly.
func TestPropBuildTreeMatchesSort(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		r, g := drawRoute(t)
		checkSameTree(t, r.segs, g.kind+" route")
	})
}

var bigRouteKinds = []string{"city", "tangle", "retrace", "equator", "meridian", "grid"}

// bigRoute lays out an n-vertex route of the given kind from rng, with exact ties between box
// centres in most kinds: a city drive (30–400 m steps, turns up to ±50°); a tangle (turns up to
// ±180°, crossing itself everywhere); a retrace (a short drive travelled out and back until n
// vertices, so each arc's box and centre occur many times); a drive along the equator (every
// centre's z is 0) or along the meridian 0 (every y is 0), back and forth; a walk on a lattice of
// 0.001° (many equal coordinates).
func bigRoute(rng *rand.Rand, kind string, n int) []orb.Point {
	start := orb.Point{rng.Float64()*360 - 180, rng.Float64()*160 - 80}
	switch kind {
	case "city":
		return cityRoute(rng, start, n, 50)
	case "tangle":
		return cityRoute(rng, start, n, 180)
	case "retrace":
		leg := cityRoute(rng, start, 2+rng.IntN(50), 50)
		pts := []orb.Point{leg[0]}
		for i, dir := 1, 1; len(pts) < n; i += dir {
			if i == len(leg) || i < 0 {
				dir = -dir
				i += 2 * dir
			}
			pts = append(pts, leg[i])
		}
		return pts
	}
	pts := []orb.Point{}
	x, y := 0.0, 0.0
	for len(pts) < n {
		switch kind {
		case "equator":
			x += (rng.Float64() - 0.3) * 0.01
			pts = append(pts, orb.Point{math.Remainder(start[0]+x, 360), 0})
		case "meridian":
			y += (rng.Float64() - 0.3) * 0.01
			pts = append(pts, orb.Point{0, math.Max(-89, math.Min(89, start[1]+y))})
		case "grid":
			if rng.IntN(2) == 0 {
				x += float64(rng.IntN(3) - 1)
			} else {
				y += float64(rng.IntN(3) - 1)
			}
			pts = append(pts, orb.Point{math.Round(start[0]*1000)/1000 + x/1000, math.Round(start[1]*1000)/1000 + y/1000})
		}
	}
	return pts
}

// TestPropBuildTreeMatchesSortBig: on routes of up to 3,000 vertices of every bigRoute kind, the
// two builds agree exactly.
func TestPropBuildTreeMatchesSortBig(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		kind := rapid.SampledFrom(bigRouteKinds).Draw(t, "kind")
		n := int(logUniform(t, 2, 3000, "n_vertices"))
		seed := rapid.Uint64().Draw(t, "layout_seed")
		pts := bigRoute(rand.New(rand.NewPCG(seed, 1)), kind, n)
		r, err := New(pts, []float64{10})
		if err != nil {
			if kind == "grid" || kind == "retrace" || kind == "equator" || kind == "meridian" {
				return // every vertex the same: too few distinct vertices
			}
			t.Fatalf("New refused a %s route: %v", kind, err)
		}
		checkSameTree(t, r.segs, kind+" route")
	})
}

// TestBuildTreeMatchesSortTangled: on tangled 20,000-vertex drives (the benchmarks' route, turns of
// ±50° at every vertex; a random walk turning up to ±180°; a 50-vertex drive retraced 400 times),
// the two builds agree exactly, and so do Snap and Metrics, bit for bit, for 2,000 markers.
func TestBuildTreeMatchesSortTangled(t *testing.T) {
	if testing.Short() {
		t.Skip("20,000-vertex routes")
	}
	cases := []struct {
		desc string
		pts  []orb.Point
	}{
		{"benchmark drive", benchRoutePts(20000)},
		{"random walk", bigRoute(rand.New(rand.NewPCG(7, 1)), "tangle", 20000)},
		{"retraced drive", bigRoute(rand.New(rand.NewPCG(8, 1)), "retrace", 20000)},
	}
	for _, c := range cases {
		t.Run(c.desc, func(t *testing.T) {
			r := mustRoute(t, c.pts)
			checkSameTree(t, r.segs, c.desc)
			old := &Route{preps: r.preps, segs: r.segs, startM: r.startM, startS: r.startS}
			old.tree, old.root, old.items = buildTreeSort(r.segs)
			rng := rand.New(rand.NewPCG(9, 1))
			user := r.Snap(offsetPoint(r.PointAt(r.LengthM()/10), 90, 4))
			for i, q := range markersNear(rng, c.pts, 2000) {
				if got, want := r.Snap(q), old.Snap(q); got != want {
					t.Fatalf("marker %d %.17g: Snap = %+v, want %+v (sort-built index)", i, q, got, want)
				}
				if got, want := r.Metrics(user, q), old.Metrics(user, q); got != want {
					t.Fatalf("marker %d %.17g: Metrics = %+v, want %+v (sort-built index)", i, q, got, want)
				}
			}
		})
	}
}

// TestPropSelectNth: selectNth leaves es[k] where a sort would put it, the lesser entries before
// and the greater after, and moves entries only; also with the median of medians from the first
// partition on (budget 0). Keys drawn from a few values (−0 and +0 among them) tie often.
func TestPropSelectNth(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 400).Draw(t, "n")
		axis := rapid.IntRange(0, 2).Draw(t, "axis")
		keys := rapid.SampledFrom([]*rapid.Generator[float64]{
			rapid.SampledFrom([]float64{-1, math.Copysign(0, -1), 0, 1e-300, 1}),
			rapid.Float64Range(-1, 1),
		}).Draw(t, "key_kind")
		order := rapid.SampledFrom([]string{"drawn", "ascending", "descending", "organ pipe"}).Draw(t, "order")
		es := make([]buildEntry, n)
		for i := range es {
			es[i].seg = int32(i)
			es[i].key[axis] = orderedKey(keys.Draw(t, "key"))
		}
		if order != "drawn" {
			insertionSort(es, axis)
			if order == "descending" {
				for i, j := 0, n-1; i < j; i, j = i+1, j-1 {
					es[i], es[j] = es[j], es[i]
				}
			}
			if order == "organ pipe" {
				for i, j := n/2, n-1; i < j; i, j = i+1, j-1 {
					es[i], es[j] = es[j], es[i]
				}
			}
		}
		sorted := append([]buildEntry(nil), es...)
		insertionSort(sorted, axis)
		k := rapid.IntRange(0, n-1).Draw(t, "k")
		if rapid.Bool().Draw(t, "median_of_medians") {
			selectNthWithin(es, k, axis, 0)
		} else {
			selectNth(es, k, axis)
		}
		if es[k] != sorted[k] {
			t.Fatalf("selectNth(%d of %d): es[k] = %+v, want %+v", k, n, es[k], sorted[k])
		}
		seen := make([]bool, n)
		for i, e := range es {
			if seen[e.seg] || e != sorted[rankIn(sorted, e, axis)] {
				t.Fatalf("selectNth(%d of %d): entry %d = %+v duplicated or changed", k, n, i, e)
			}
			seen[e.seg] = true
			if (i < k && !e.less(&es[k], axis)) || (i > k && !es[k].less(&e, axis)) {
				t.Fatalf("selectNth(%d of %d): entry %d = %+v on the wrong side of %+v", k, n, i, e, es[k])
			}
		}
	})
}

// rankIn returns the index of e in sorted (sorted by less along axis).
func rankIn(sorted []buildEntry, e buildEntry, axis int) int {
	lo, hi := 0, len(sorted)
	for lo < hi {
		m := (lo + hi) / 2
		if sorted[m].less(&e, axis) {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// TestBigRouteTies: the kinds of bigRoute meant to tie do tie: box centres equal in some
// coordinate between different segments, which the split must order by segment index.
func TestBigRouteTies(t *testing.T) {
	for _, kind := range []string{"retrace", "equator", "meridian", "grid"} {
		r := mustRoute(t, bigRoute(rand.New(rand.NewPCG(3, 1)), kind, 2000))
		seen := [3]map[float64]bool{{}, {}, {}}
		ties := 0
		for i := range r.segs {
			lo, hi := arcBox(&r.segs[i])
			c := lo.Add(hi).Mul(0.5)
			for a, v := range [3]float64{c.X, c.Y, c.Z} {
				if seen[a][v] {
					ties++
				}
				seen[a][v] = true
			}
		}
		if ties < len(r.segs)/4 {
			t.Errorf("%s route of %d segments: %d tied centre coordinates, want ≥ %d", kind, len(r.segs), ties, len(r.segs)/4)
		}
	}
}

// TestWidestAxis: the split axis is the one the centres spread most along, ties going to y, then
// z, then x (the rule of the sort-based build).
func TestWidestAxis(t *testing.T) {
	for _, c := range []struct {
		desc    string
		centres [][3]float64
		want    int
	}{
		{"x widest", [][3]float64{{0, 0, 0}, {2, 1, 1}}, 0},
		{"y widest", [][3]float64{{0, 0, 0}, {1, 2, 1}}, 1},
		{"z widest", [][3]float64{{0, 0, 0}, {1, 1, 2}}, 2},
		{"x = y", [][3]float64{{0, 0, 0}, {1, 1, 0.5}}, 1},
		{"x = z", [][3]float64{{0, 0, 0}, {1, 0.5, 1}}, 2},
		{"y = z", [][3]float64{{0, 0, 0}, {0.5, 1, 1}}, 1},
		{"all equal spreads", [][3]float64{{0, 0, 0}, {1, 1, 1}}, 1},
		{"one point", [][3]float64{{0.25, -0.5, 0.75}}, 1},
		{"−0 and +0", [][3]float64{{math.Copysign(0, -1), 0, 0}, {0, math.Copysign(0, -1), 0}}, 1},
		{"spread across the origin", [][3]float64{{-0.5, 0.1, 0}, {0.5, -0.6, 0.2}, {0, 0, -0.7}}, 0},
	} {
		b := treeBuilder{}
		for i, ct := range c.centres {
			b.es = append(b.es, newBuildEntry(r3.Vector{X: ct[0], Y: ct[1], Z: ct[2]}, int32(i)))
		}
		if got := b.widestAxis(0, len(b.es)); got != c.want {
			t.Errorf("%s: widestAxis(%v) = %d, want %d", c.desc, c.centres, got, c.want)
		}
	}
}

// TestPropMedianOfMediansPivot: the median of medians has at least 3/10 of its range, less 3
// entries, on either side (Blum et al. 1973: half the ⌊n/5⌋ groups have a median ≤ it, each with 3
// entries ≤ it), whatever the order, which is what bounds selectNth's work when medians of three
// fail.
func TestPropMedianOfMediansPivot(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(5, 600).Draw(t, "n")
		keys := rapid.SliceOfN(rapid.SampledFrom([]float64{0, 1, 2, 3}), n, n).Draw(t, "keys")
		es := make([]buildEntry, n)
		for i, k := range keys {
			es[i] = newBuildEntry(r3.Vector{Z: k}, int32(i))
		}
		p, _ := pivotMedianOfMedians(es, 0, n, 2)
		rank := 0
		for i := range es {
			if es[i].less(&es[p], 2) {
				rank++
			}
		}
		if lo := 3*(n/5)/2 - 3; rank < lo || n-1-rank < lo {
			t.Fatalf("pivotMedianOfMedians of %d entries: rank %d, want %d or more on each side", n, rank, lo)
		}
	})
}

// TestSplitAtFillsLeaves: the splits share a node's entries so that a tree
// over n entries has exactly L = ⌈n/leafSegs⌉ leaves, each of ⌊n/L⌋ or
// ⌈n/L⌉ entries, and is ⌈log₂ L⌉ deep (a balanced binary tree over L
// leaves); so its internal nodes, L − 1, fit the node slice newTreeBuilder
// makes. Checked for every n up to 20,000, the benchmarks' largest route.
func TestSplitAtFillsLeaves(t *testing.T) {
	for n := 1; n <= 20000; n++ {
		L := (n + leafSegs - 1) / leafSegs
		lo, hi := n/L, (n+L-1)/L
		leaves, depth := 0, 0
		var walk func(m, d int)
		walk = func(m, d int) {
			if m <= leafSegs {
				leaves++
				depth = max(depth, d)
				if m < lo || m > hi {
					t.Fatalf("n = %d: a leaf of %d entries, want %d to %d", n, m, lo, hi)
				}
				return
			}
			k := splitAt(m)
			if k <= 0 || k >= m {
				t.Fatalf("n = %d: splitAt(%d) = %d", n, m, k)
			}
			walk(k, d+1)
			walk(m-k, d+1)
		}
		walk(n, 0)
		wantDepth := bits.Len(uint(L - 1))
		if leaves != L || depth != wantDepth {
			t.Fatalf("n = %d: %d leaves %d deep, want %d leaves %d deep", n, leaves, depth, L, wantDepth)
		}
		if nodes := leaves - 1; nodes > max(1, (n-1)/leafSegs) {
			t.Fatalf("n = %d: %d internal nodes, more than the %d newTreeBuilder makes room for", n, nodes, (n-1)/leafSegs)
		}
	}
}

// TestOrderedKeyOrdersAsFloats: orderedKey orders every two floats other
// than NaN as float comparison does (−0 and +0 equal), and orderedFloat
// undoes it (−0 coming back as +0), on floats of every kind: subnormal,
// huge, infinite, ±0, and neighbours one step apart.
func TestOrderedKeyOrdersAsFloats(t *testing.T) {
	value := rapid.OneOf(
		rapid.Float64(),
		rapid.Float64Range(-1e-300, 1e-300),
		rapid.SampledFrom([]float64{0, math.Copysign(0, -1), 5e-324, -5e-324, 1, -1, math.MaxFloat64, -math.MaxFloat64, math.Inf(1), math.Inf(-1)}),
	)
	rapid.Check(t, func(t *rapid.T) {
		a := value.Draw(t, "a")
		b := value.Draw(t, "b")
		if rapid.Bool().Draw(t, "neighbour") {
			b = math.Nextafter(a, b)
		}
		if math.IsNaN(a) || math.IsNaN(b) {
			t.Skip("NaN has no order (no box centre is NaN)")
		}
		ka, kb := orderedKey(a), orderedKey(b)
		if (a < b) != (ka < kb) || (a == b) != (ka == kb) {
			t.Fatalf("a = %g, b = %g: keys %d and %d order them otherwise", a, b, ka, kb)
		}
		back := orderedFloat(ka)
		if a == 0 {
			a = 0 // −0 comes back as +0
		}
		if math.Float64bits(back) != math.Float64bits(a) {
			t.Fatalf("orderedFloat(orderedKey(%g)) = %g", a, back)
		}
	})
}
