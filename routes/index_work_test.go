package routes

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r3"
	"github.com/paulmach/orb"
	"pgregory.net/rapid"
)

// The index's work, which no answer shows: a looser box, a search that
// opens the farther child first or prunes nothing, a worse pivot, all give
// the same answers and cost only time. These tests bound the work itself.

// necessaryOpens returns how many nodes and leaves any search of the tree
// for qq must open, given the answer's squared chord best: those whose
// lower bound lies within the final threshold (√best + tieTolRad)², with
// every node above them (a node cannot be left closed while a leaf under
// it might hold the answer or a tie). The walk is the test's own.
func necessaryOpens(r *Route, qq *query, best float64) int {
	s := math.Sqrt(best) + tieTolRad
	thr := s * s
	var walk func(code int32) int
	walk = func(code int32) int {
		if code < 0 {
			return 1
		}
		nd := &r.tree[code]
		n := 1
		for k := range 2 {
			if nd.maxSeg[k] >= int32(qq.u) && nd.box[k].boxDist2(qq.q) <= thr {
				n += walk(nd.child[k])
			}
		}
		return n
	}
	return walk(r.root)
}

// bestChord returns the smallest squared chord from qq's point to the
// considered part of the route, segment by segment.
func bestChord(r *Route, qq *query) float64 {
	best := math.Inf(1)
	for i := qq.u; i < len(r.segs); i++ {
		c2, _, _, _ := r.segClosest(i, qq)
		best = min(best, c2)
	}
	return best
}

// TestSearchOpensLittle: a closest-point search, nearer child first,
// opens the nodes that any search must open and few more: on city drives
// of 500 and 20,000 vertices and a tangle of 20,000, with markers within
// 300 m of the route (Snap's query, the whole route) and from a user's
// place on (Metrics' query), the opens beyond the necessary ones are at
// most a quarter of them over all the queries, and a query opens about ten
// nodes at 500 vertices, 24 on the city drive of 20,000 and 31 on the
// tangle (measured 2026-12-03; the bounds leave a little room). A search
// opening the farther child first, or pruning less, opens several times
// as many.
func TestSearchOpensLittle(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: 20,000-vertex routes")
	}
	testSearchOpensLittle(t, []int{500, 20000})
}

// TestSearchOpensLittleShort is TestSearchOpensLittle on the 500-vertex
// drive alone, for -short runs.
func TestSearchOpensLittleShort(t *testing.T) {
	testSearchOpensLittle(t, []int{500})
}

func testSearchOpensLittle(t *testing.T, sizes []int) {
	// Per-query averages measured on 2026-12-03 (the figures in the index's
	// doc comment): bounds are those with some room.
	maxPerQuery := map[string]float64{"city/500": 13, "city/20000": 30, "tangle/20000": 38}
	for _, n := range sizes {
		for _, kind := range []string{"city", "tangle"} {
			if kind == "tangle" && n < 20000 {
				continue
			}
			rng := rand.New(rand.NewPCG(uint64(n), 9))
			var pts []orb.Point
			if kind == "city" {
				pts = benchRoutePts(n)
			} else {
				pts = bigRoute(rng, "tangle", n)
			}
			r := mustRoute(t, pts)
			t.Run(fmt.Sprintf("%s/vertices=%d", kind, n), func(t *testing.T) {
				const queries = 400
				opened, necessary := 0, 0
				for j := range queries {
					p := r.PointAt(rng.Float64() * r.LengthM())
					p = orb.Point{p[0] + (rng.Float64()-0.5)*0.008, p[1] + (rng.Float64()-0.5)*0.0054}
					qv, _, _ := unitVec(p)
					qq := query{q: qv, u: 0, cl: 1, sl: 0, lo: r.segs[0].a}
					if j%2 == 1 { // from a user's place on
						user := r.PlaceAt(rng.Float64() * r.LengthM())
						uc := r.userCache(&user)
						qq = query{q: qv, u: uc.seg, cl: uc.cl, sl: uc.sl, lo: uc.v}
					}
					seg, o := r.search(&qq)
					if want := r.nearest(&qq); seg != want {
						t.Fatalf("query %d: search gives segment %d, nearest %d", j, seg, want)
					}
					opened += o
					necessary += necessaryOpens(r, &qq, bestChord(r, &qq))
				}
				if opened < necessary {
					t.Fatalf("%d queries opened %d nodes, fewer than the %d every search must open: the search skips nodes that may hold the answer", queries, opened, necessary)
				}
				if extra := opened - necessary; 4*extra > necessary {
					t.Errorf("%d queries opened %d nodes beyond the %d necessary (%.0f%%), want at most 25%%", queries, extra, necessary, 100*float64(extra)/float64(necessary))
				}
				if per, limit := float64(opened)/queries, maxPerQuery[fmt.Sprintf("%s/%d", kind, n)]; per > limit {
					t.Errorf("%.1f nodes opened a query, want at most %g", per, limit)
				}
				t.Logf("%d queries: %.1f nodes opened a query, %.1f necessary", queries, float64(opened)/queries, float64(necessary)/queries)
			})
		}
	}
}

// TestBuildPartitionsLinearly: the build's selections partition, over all
// the splits of a level, about 2–3 times the level's entries (Hoare's
// FIND with medians of three: 2.75·n comparisons on average, Kirschenhofer,
// Prodinger and Martínez 1997; ninthers do better), so the whole build at
// most 3·n per level, on every kind of big route, ordered runs and ties
// included. Medians of three that are not medians, or a budget spent too
// soon, leave the answer the same and cost more.
func TestBuildPartitionsLinearly(t *testing.T) {
	n := 20000
	if testing.Short() {
		n = 4000
	}
	for _, kind := range bigRouteKinds {
		r := mustRoute(t, bigRoute(rand.New(rand.NewPCG(5, 2)), kind, n))
		b := newTreeBuilder(r.segs, make([]buildEntry, len(r.segs)))
		b.build(0, len(r.segs))
		m := len(r.segs)
		levels := math.Ceil(math.Log2(float64(m) / leafSegs))
		if limit := 3 * float64(m) * levels; float64(b.work) > limit {
			t.Errorf("%s route of %d segments: the build partitioned %d entries, want at most 3·n·levels = %.0f", kind, m, b.work, limit)
		}
		t.Logf("%s: %d segments, %.2f·n a level", kind, m, float64(b.work)/float64(m)/levels)
	}
}

// TestSelectNthPartitionsLinearly: one selection partitions at most
// selectWorkFactor·n entries with cheap pivots and then at most what the
// median of medians needs, about 10·n more (each of its steps shrinks the
// range by 3/10 and selects among n/5 medians: n·(1 + 1/5)/(1 − 7/10 − 1/5)
// = 12·n in all at worst, Blum et al. 1973); on random keys it takes
// about 2–3·n.
func TestSelectNthPartitionsLinearly(t *testing.T) {
	// Found by the property below: with medians of the first, middle and
	// last entries, the least of 71 descending keys took 359 entries
	// partitioned, past the budget of 5·71.
	es := keyed(71, func(i int) float64 { return float64(-i) })
	if w := selectNth(es, 0, 0); w > 2*len(es) {
		t.Errorf("the least of 71 descending keys: partitioned %d entries, want at most 2·n = %d", w, 2*len(es))
	}
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(13, 3000).Draw(t, "n")
		order := rapid.SampledFrom([]string{"random", "ascending", "descending", "organ pipe", "few keys"}).Draw(t, "order")
		rng := rand.New(rand.NewPCG(rapid.Uint64().Draw(t, "seed"), 1))
		es := make([]buildEntry, n)
		for i := range es {
			es[i].seg = int32(i)
			switch order {
			case "random":
				es[i].key[0] = orderedKey(rng.Float64())
			case "ascending":
				es[i].key[0] = orderedKey(float64(i))
			case "descending":
				es[i].key[0] = orderedKey(float64(-i))
			case "organ pipe":
				es[i].key[0] = orderedKey(float64(min(i, n-i)))
			case "few keys":
				es[i].key[0] = orderedKey(float64(rng.IntN(3)))
			}
		}
		k := rapid.IntRange(0, n-1).Draw(t, "k")
		w := selectNth(es, k, 0)
		if limit := (selectWorkFactor + 12) * n; w > limit {
			t.Fatalf("%s keys, n = %d, k = %d: partitioned %d entries, want at most %d", order, n, k, w, limit)
		}
		if budget := selectWorkFactor * n; order != "few keys" && w > budget {
			t.Fatalf("%s keys, n = %d, k = %d: partitioned %d entries, more than the cheap pivots' budget %d (medians of three failed on an easy order)", order, n, k, w, budget)
		}
	})
}

// TestMedian3: median3 returns the index holding the median of the three
// entries, by the build's order, for every order of three keys with ties.
func TestMedian3(t *testing.T) {
	keys := []float64{0, 1, 2}
	for _, a := range keys {
		for _, b := range keys {
			for _, c := range keys {
				es := []buildEntry{newBuildEntry(r3.Vector{X: a}, 0), newBuildEntry(r3.Vector{X: b}, 1), newBuildEntry(r3.Vector{X: c}, 2)}
				got := median3(es, 0, 1, 2, 0)
				less := 0
				for i := range es {
					if es[i].less(&es[got], 0) {
						less++
					}
				}
				if less != 1 {
					t.Errorf("median3 of keys (%g, %g, %g) = index %d, which %d of the three precede, want 1", a, b, c, got, less)
				}
			}
		}
	}
}

// TestPivotNinther: the pivot is the median of the first, middle and last
// entries below 128 entries, and Tukey's ninther at 128 or more: the
// median of the medians of three spaced triples, at the positions the doc
// comment gives.
func TestPivotNinther(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(3, 400).Draw(t, "n")
		lo := rapid.IntRange(0, 20).Draw(t, "lo")
		keys := rapid.SliceOfN(rapid.Float64Range(0, 1), lo+n, lo+n).Draw(t, "keys")
		es := make([]buildEntry, lo+n)
		for i, k := range keys {
			es[i] = newBuildEntry(r3.Vector{Y: k}, int32(i))
		}
		hi := lo + n
		key := func(i int) float64 { return es[i].centre(1) }
		want := documentedPivot(es, lo, hi, 1)
		if got := pivotNinther(es, lo, hi, 1); got != want {
			t.Fatalf("pivotNinther of %d entries from %d: index %d (key %g), want %d (key %g)", n, lo, got, key(got), want, key(want))
		}
	})
}

// documentedPivot returns the pivot pivotNinther's doc comment names for
// es[lo:hi], worked out here: the entry holding the middle key of three,
// by a sort of the three indices.
func documentedPivot(es []buildEntry, lo, hi, axis int) int {
	med := func(a, b, c int) int {
		x := []int{a, b, c}
		for i := 1; i < 3; i++ {
			for j := i; j > 0 && es[x[j]].less(&es[x[j-1]], axis); j-- {
				x[j], x[j-1] = x[j-1], x[j]
			}
		}
		return x[1]
	}
	n, m := hi-lo, lo+(hi-lo)/2
	if n < 128 {
		return med(lo+n/4, m, hi-1-n/4)
	}
	s := n / 8
	return med(med(lo, lo+s, lo+2*s), med(m-s, m, m+s), med(hi-1-2*s, hi-1-s, hi-1))
}

// TestTieOverflowOpensLittle: a road driven ten times over the same
// vertices ties ten segments at every point, more than the search keeps
// (maxTies), so the search goes again for the first within the tie
// (firstWithin): the two passes together open 1.8 to 2.5 times the nodes
// any search must open, and the first drive of the road wins.
func TestTieOverflowOpensLittle(t *testing.T) {
	road := make([]orb.Point, 21)
	for i := range road {
		road[i] = orb.Point{2 + 0.0005*float64(i), 45 + 0.0001*float64(i%2)}
	}
	pts := append([]orb.Point(nil), road...)
	for pass := 1; pass < 10; pass++ {
		for i := 1; i < len(road); i++ {
			j := i
			if pass%2 == 1 {
				j = len(road) - 1 - i
			}
			pts = append(pts, road[j])
		}
	}
	r := mustRoute(t, pts)
	rng := rand.New(rand.NewPCG(6, 6))
	opened, necessary := 0, 0
	for range 50 {
		along := rng.Float64() * r.Segment(19).StartM
		p := r.PointAt(along)
		q := orb.Point{p[0], p[1] + 0.0003}
		qv, _, _ := unitVec(q)
		qq := query{q: qv, u: 0, cl: 1, sl: 0, lo: r.segs[0].a}
		_, o := r.search(&qq)
		if got, want := r.Snap(q).Segment, r.snapScan(q).Segment; got != want || got >= 20 {
			t.Fatalf("marker %v: Snap gives segment %d, want %d (snapScan), on the first drive", q, got, want)
		}
		opened += o
		necessary += necessaryOpens(r, &qq, bestChord(r, &qq))
	}
	// Each pass opens about the necessary nodes (the second's threshold is the first's final
	// one, as an angle), so the two open about twice them.
	if 2*opened > 5*necessary || 5*opened < 9*necessary {
		t.Errorf("50 markers opened %d nodes, want 1.8 to 2.5 times the %d necessary (two passes)", opened, necessary)
	}
	t.Logf("%.1f opened a query, %.1f necessary", float64(opened)/50, float64(necessary)/50)
}
