package routes

import (
	"math"
	"math/rand/v2"
	"runtime"
	"testing"

	"github.com/golang/geo/r3"
	"github.com/paulmach/orb"
	"pgregory.net/rapid"
)

// The index's helpers, each against its documented contract, where the
// answers of the queries would not tell a mistake from a slower search.

// keyed returns n entries with the keys along axis 0 given by key(i).
func keyed(n int, key func(i int) float64) []buildEntry {
	es := make([]buildEntry, n)
	for i := range es {
		es[i] = newBuildEntry(r3.Vector{X: key(i)}, int32(i))
	}
	return es
}

// TestSelectNthSortsSmallRanges: a range of selectSmall entries or fewer is
// sorted outright (no partition); one of selectSmall + 1 is partitioned
// once, which leaves at most selectSmall entries to sort, whatever the
// order and k. A budget of exactly the range's length still allows the
// cheap pivot; one entry less turns to the median of medians at once,
// which sorts the two groups of five it finds as well.
func TestSelectNthSortsSmallRanges(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	orders := map[string]func(i int) float64{
		"ascending":  func(i int) float64 { return float64(i) },
		"descending": func(i int) float64 { return float64(-i) },
		"random":     func(int) float64 { return rng.Float64() },
		"two keys":   func(i int) float64 { return float64(i % 2) },
	}
	for name, key := range orders {
		for n := 1; n <= selectSmall+1; n++ {
			want := 0
			if n > selectSmall {
				want = n
			}
			for k := range n {
				if w := selectNth(keyed(n, key), k, 0); w != want {
					t.Errorf("%s keys, n = %d, k = %d: selectNth's work %d, want %d", name, n, k, w, want)
				}
			}
		}
		n := selectSmall + 1
		for k := range n {
			if w := selectNthWithin(keyed(n, key), k, 0, n); w != n {
				t.Errorf("%s keys, n = %d, k = %d, budget n: work %d, want %d (one cheap partition)", name, n, k, w, n)
			}
			if w := selectNthWithin(keyed(n, key), k, 0, n-1); w != n+10 {
				t.Errorf("%s keys, n = %d, k = %d, budget n − 1: work %d, want %d (the median of medians: two groups of five, then one partition)", name, n, k, w, n+10)
			}
		}
	}
}

// TestCheapPivotsSuffice: on random, ordered and few-valued keys the
// medians of three and ninthers finish within their budget, so selectNth
// does exactly the work it does with an unlimited one; fixed seeds, so the
// cases are the same at every run.
func TestCheapPivotsSuffice(t *testing.T) {
	for seed := range uint64(200) {
		rng := rand.New(rand.NewPCG(seed, 3))
		n := 13 + rng.IntN(3000)
		keys := []func(i int) float64{
			func(int) float64 { return rng.Float64() },
			func(i int) float64 { return float64(i) },
			func(i int) float64 { return float64(-i) },
			func(i int) float64 { return float64(rng.IntN(5)) },
		}
		key := keys[seed%4]
		es := keyed(n, key)
		es2 := append([]buildEntry(nil), es...)
		k := rng.IntN(n)
		if w, wFree := selectNth(es, k, 0), selectNthWithin(es2, k, 0, math.MaxInt); w != wFree {
			t.Errorf("seed %d, %d keys of kind %d, k = %d: work %d, %d with no budget: the cheap pivots ran out", seed, n, seed%4, k, w, wFree)
		}
	}
}

// TestMedianOfMediansPivotWork: the pivot's own work is the ⌊n/5⌋ groups
// of five it sorts and the selection of their median: none for up to 12
// medians (sorted outright), and one partition of all 13 at 65 to 69
// entries (TestSelectNthSortsSmallRanges).
func TestMedianOfMediansPivotWork(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	for n := 5; n <= 69; n++ {
		es := keyed(n, func(int) float64 { return rng.Float64() })
		want := 5 * (n / 5)
		if n/5 == 13 {
			want += 13
		}
		if _, w := pivotMedianOfMedians(es, 0, n, 0); w != want {
			t.Errorf("pivotMedianOfMedians of %d entries: work %d, want %d", n, w, want)
		}
	}
}

// TestMedianOfMediansWork: with no budget, selection by medians of medians
// alone sorts ⌊n/5⌋ groups of five and partitions the whole range at each
// step, and from 65 entries (13 medians) on partitions the medians too: at
// least n + 6·⌊n/5⌋ entries.
func TestMedianOfMediansWork(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	for _, n := range []int{65, 100, 1000} {
		es := keyed(n, func(int) float64 { return rng.Float64() })
		if w, least := selectNthWithin(es, n/3, 0, 0), n+6*(n/5); w < least {
			t.Errorf("%d entries by medians of medians: work %d, want at least %d", n, w, least)
		}
	}
}

// TestPivotNintherAtTheSwitch: TestPivotNinther's contract at the sizes
// where the rule changes (127 and 128 entries) and at its smallest.
func TestPivotNintherAtTheSwitch(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	for _, n := range []int{3, 4, 5, 126, 127, 128, 129, 1000} {
		for range 20 {
			es := keyed(n, func(int) float64 { return rng.Float64() })
			want := documentedPivot(es, 0, n, 0)
			if got := pivotNinther(es, 0, n, 0); got != want {
				t.Fatalf("pivotNinther of %d entries: index %d, want %d", n, got, want)
			}
		}
	}
}

// TestMedianOfMediansIsMedianOfGroups: the pivot is the median of the
// medians of the ⌊n/5⌋ consecutive groups of five, whole groups only (Blum
// et al. 1973), as the doc comment says.
func TestMedianOfMediansIsMedianOfGroups(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(5, 120).Draw(t, "n")
		lo := rapid.IntRange(0, 7).Draw(t, "lo")
		keys := rapid.SliceOfN(rapid.Float64Range(0, 1), lo+n, lo+n).Draw(t, "keys")
		es := keyed(lo+n, func(i int) float64 { return keys[i] })
		var medians []buildEntry
		for i := lo; i+5 <= lo+n; i += 5 {
			g := append([]buildEntry(nil), es[i:i+5]...)
			insertionSort(g, 0)
			medians = append(medians, g[2])
		}
		insertionSort(medians, 0)
		want := medians[len(medians)/2]
		p, _ := pivotMedianOfMedians(es, lo, lo+n, 0)
		if es[p] != want {
			t.Fatalf("pivotMedianOfMedians of %d entries from %d: %+v, want the median of the %d group medians %+v", n, lo, es[p], len(medians), want)
		}
	})
}

// TestToBox32Tight: the float32 box holds the float64 one and is the
// tightest with its centre: its half-extents are the least float32 values
// that reach both corners, exact where the corners are.
func TestToBox32Tight(t *testing.T) {
	for _, c := range []struct {
		desc   string
		lo, hi r3.Vector
		want   box32
	}{
		{"unit cube", r3.Vector{}, r3.Vector{X: 1, Y: 1, Z: 1}, box32{0.5, 0.5, 0.5, 0.5, 0.5, 0.5}},
		{"about the origin", r3.Vector{X: -1, Y: -0.25, Z: -2}, r3.Vector{X: 1, Y: 0.25, Z: 2}, box32{0, 0, 0, 1, 0.25, 2}},
		{"a point", r3.Vector{X: 0.5, Y: -0.75, Z: 0.125}, r3.Vector{X: 0.5, Y: -0.75, Z: 0.125}, box32{0.5, -0.75, 0.125, 0, 0, 0}},
	} {
		if got := toBox32(c.lo, c.hi); got != c.want {
			t.Errorf("%s: toBox32(%v, %v) = %+v, want %+v", c.desc, c.lo, c.hi, got, c.want)
		}
	}
	// A corner that is not finite (which no arc's box has) gives an
	// infinite extent, not an endless search for one.
	if b := toBox32(r3.Vector{X: 0}, r3.Vector{X: math.Inf(1)}); !math.IsInf(float64(b.ex), 1) {
		t.Errorf("toBox32 of [0, +Inf]: half-extent %g, want +Inf", b.ex)
	}
	// Found by the property below: a corner far smaller than the centre
	// (l − c rounded to −c) was left outside by 5e-20.
	if b := toBox32(r3.Vector{X: -5.4210108624275222e-20}, r3.Vector{X: 0.001}); gap(-5.4210108624275222e-20, float64(b.cx), float64(b.ex)) != 0 {
		t.Errorf("toBox32 of [-5.42e-20, 0.001] = centre %g, half-extent %g: does not hold the lower corner", b.cx, b.ex)
	}
	rapid.Check(t, func(t *rapid.T) {
		l := rapid.Float64Range(-1, 1).Draw(t, "lo")
		h := l + rapid.Float64Range(0, 1e-3).Draw(t, "width")
		b := toBox32(r3.Vector{X: l}, r3.Vector{X: h})
		c, e := float64(b.cx), float64(b.ex)
		// In the box as the queries measure it (gap, the distance to the box, is 0).
		if gap(l, c, e) != 0 || gap(h, c, e) != 0 {
			t.Fatalf("toBox32 of [%.17g, %.17g]: [%.17g, %.17g] does not hold it", l, h, c-e, c+e)
		}
		if e > 0 {
			e0 := float64(math.Nextafter32(b.ex, 0))
			if gap(l, c, e0) == 0 && gap(h, c, e0) == 0 {
				t.Fatalf("toBox32 of [%.17g, %.17g]: half-extent %.9g, but %.9g already holds it", l, h, e, e0)
			}
		}
	})
}

// TestAxis32AsGapStepwise: axis32 finds its half-extent as the larger
// distance to the corners rounded up to a float32, or, where that distance
// is tiny or not finite, by stepping up with float32 steps taken by their
// bits; it gives, to the bit, what stepping both ways with gap and
// math.Nextafter32 gives (the way it was first written, kept here as the
// reference), on corners from subnormal to huge, equal, of either sign, ±0
// and one infinite.
func TestAxis32AsGapStepwise(t *testing.T) {
	stepwise := func(l, h float64) (float32, float32) {
		c := float32((l + h) / 2)
		cf := float64(c)
		holds := func(e float32) bool { return gap(l, cf, float64(e)) == 0 && gap(h, cf, float64(e)) == 0 }
		e32 := float32(math.Max(h-cf, cf-l))
		for e32 > 0 && holds(math.Nextafter32(e32, 0)) {
			e32 = math.Nextafter32(e32, 0)
		}
		for !holds(e32) && !math.IsInf(float64(e32), 1) {
			e32 = math.Nextafter32(e32, float32(math.Inf(1)))
		}
		return c, e32
	}
	// Corners about 1e-162 from the centre: their squared gap underflows to
	// 0, so gap calls them held a little short of them (the queries measure
	// it so, and the box must agree).
	for _, lh := range [][2]float64{{1e-162, 1e-162}, {1.2e-162, 1.2e-162}, {-1e-162, 1e-162}, {0, 1.5e-162}, {1e-162, 1e-161}} {
		c, e := axis32(lh[0], lh[1])
		wc, we := stepwise(lh[0], lh[1])
		if math.Float32bits(c) != math.Float32bits(wc) || math.Float32bits(e) != math.Float32bits(we) {
			t.Errorf("axis32(%g, %g) = %g ± %g, stepping with gap gives %g ± %g", lh[0], lh[1], c, e, wc, we)
		}
	}
	if t.Failed() {
		return // rapid refuses a test that has already failed
	}
	value := rapid.OneOf(
		rapid.Float64Range(-1, 1),
		rapid.Float64Range(-1e-300, 1e-300),
		rapid.Float64Range(-1e-150, 1e-150),
		rapid.Float64Range(-1e-38, 1e-38),
		rapid.Float64Range(-1e39, 1e39),
		rapid.SampledFrom([]float64{0, math.Copysign(0, -1), 5e-324, math.MaxFloat32, math.MaxFloat64, math.Inf(1), math.Inf(-1)}),
	)
	rapid.Check(t, func(t *rapid.T) {
		l := value.Draw(t, "l")
		var h float64
		switch rapid.IntRange(0, 2).Draw(t, "h_kind") {
		case 0:
			h = l
		case 1:
			h = value.Draw(t, "h")
		default:
			h = l + rapid.Float64Range(0, 1e-3).Draw(t, "width")
		}
		if h < l {
			l, h = h, l
		}
		if math.IsInf(l, 0) && math.IsInf(h, 0) {
			t.Skip("both corners infinite: the centre is NaN, and no extent holds (no box has them)")
		}
		c, e := axis32(l, h)
		wc, we := stepwise(l, h)
		if math.Float32bits(c) != math.Float32bits(wc) || math.Float32bits(e) != math.Float32bits(we) {
			t.Fatalf("axis32(%g, %g) = %g ± %g, stepping with gap gives %g ± %g", l, h, c, e, wc, we)
		}
	})
}

// TestArcBoxHoldsItsEnds: an arc's box holds both its ends exactly, even
// on arcs shorter than the padding's scale (centimetres to a metre), where
// the bulge is below the padding.
func TestArcBoxHoldsItsEnds(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 1))
	for _, stepM := range []float64{0.01, 0.1, 1, 30} {
		pts := []orb.Point{{13.405, 52.52}}
		for range 50 {
			pts = append(pts, offsetPoint(pts[len(pts)-1], rng.Float64()*360, stepM))
		}
		r := mustRoute(t, pts)
		for i := range r.segs {
			sg := &r.segs[i]
			lo, hi := arcBox(sg)
			for _, p := range []r3.Vector{sg.a, sg.b} {
				if p.X < lo.X || p.Y < lo.Y || p.Z < lo.Z || p.X > hi.X || p.Y > hi.Y || p.Z > hi.Z {
					t.Fatalf("%g m steps, segment %d: box [%v, %v] does not hold its end %v", stepM, i, lo, hi, p)
				}
			}
		}
	}
}

// TestNewAllocatesAFixedNumber: New allocates the same number of times
// whatever the route's length (each slice once, at its final size), from 2
// vertices to 2,000: an index whose node slice were made too small would
// grow it by appending; and one made larger than the tree (one node fewer
// than its leaves, at least one) would hold memory it never uses. The
// build's entries come from a pool (entryPool), filled by the count's
// first run, so they are not counted.
func TestNewAllocatesAFixedNumber(t *testing.T) {
	// A first collection here, not during the count: the runtime starts
	// the collector's workers at its first cycle, and their goroutines are
	// allocations too (run alone, the test counted 11 for 2,000 vertices).
	runtime.GC()
	rng := rand.New(rand.NewPCG(2, 8))
	var want float64
	for _, n := range []int{2, 3, 5, 6, 7, 9, 10, 13, 17, 33, 100, 2000} {
		pts := cityRoute(rng, orb.Point{13.405, 52.52}, n, 50)
		got := testing.AllocsPerRun(5, func() {
			if _, err := New(pts, []float64{10}); err != nil {
				t.Fatal(err)
			}
		})
		if want == 0 {
			want = got
		}
		if got != want {
			t.Errorf("New of %d vertices: %g allocations, want %g (as for 2 vertices)", n, got, want)
		}
		if r := mustRoute(t, pts); cap(r.tree) != max(1, len(r.tree)) {
			t.Errorf("New of %d vertices: %d internal nodes in a slice made for %d", n, len(r.tree), cap(r.tree))
		}
	}
}

// TestBuildTreeReusesEntries: once a build has given its entries back to
// entryPool, the next build of as many segments takes them from it and
// allocates only the builder and the tree it returns (its nodes and leaf
// items): 3 allocations, where making the entries anew would be 4 (or 5
// with the pool's slice header). AllocsPerRun's first, uncounted run fills
// the pool (it sets GOMAXPROCS, which empties a sync.Pool).
func TestBuildTreeReusesEntries(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	for _, n := range []int{2, 100, 2000, 3000} {
		r := mustRoute(t, cityRoute(rng, orb.Point{13.405, 52.52}, n, 50))
		if got := testing.AllocsPerRun(10, func() { buildTree(r.segs) }); got != 3 {
			t.Errorf("buildTree of %d segments: %g allocations, want 3 (builder, nodes, items)", len(r.segs), got)
		}
	}
}

// closestOracle is the closest point of the considered part of arc sg to
// q, worked out another way: the foot is q projected on the arc's plane
// and normalised, its angle from a by atan2; it counts when its angle lies
// between the start's s0 and the arc's theta, else the nearer end (the
// start on a tie within tieTolM). It returns the squared chord and where.
func closestOracle(sg *segment, q r3.Vector, s0 float64, start r3.Vector) (c2 float64, at int) {
	p := q.Sub(sg.n.Mul(q.Dot(sg.n)))
	if p.Norm() > 0 {
		s := math.Atan2(p.Dot(sg.t), p.Dot(sg.a))
		if s >= s0 && s <= sg.theta {
			return q.Sub(p.Normalize()).Norm2(), atFoot
		}
	}
	// The ends tie within the tie tolerance as angles (SPEC §4), the start winning.
	dLo, dHi := q.Sub(start).Norm2(), q.Sub(sg.b).Norm2()
	angle := func(c2 float64) float64 { return 2 * math.Asin(math.Min(1, math.Sqrt(c2)/2)) }
	if angle(dHi) < angle(dLo)-tieTolM/meanRadiusM {
		return dHi, atEnd
	}
	return dLo, atLo
}

// TestArcClosestAgainstOracle: arcClosest agrees with closestOracle on
// points all round arcs of 1 m to 1,000 km, over the whole arc and from a
// user's place on it (the start moved along the arc), to 1e-6 of the
// squared chord (the rounding of 1 − √(x² + y²) on short arcs is 2e-9 of
// it) and in where the point lies, away from the places where
// two answers are a rounding apart (the foot within 1e-9 rad of an end).
func TestArcClosestAgainstOracle(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		a := orb.Point{rapid.Float64Range(-180, 180).Draw(t, "lon"), rapid.Float64Range(-80, 80).Draw(t, "lat")}
		b := offsetPoint(a, rapid.Float64Range(0, 360).Draw(t, "bearing"), logUniform(t, 1, 1e6, "length_m"))
		r, err := New([]orb.Point{a, b}, []float64{10})
		if err != nil {
			t.Skip(err)
		}
		sg := &r.segs[0]
		frac := 0.0
		if rapid.Bool().Draw(t, "from_user") {
			frac = rapid.Float64Range(0, 1).Draw(t, "user_frac")
		}
		s0 := frac * sg.theta
		sl, cl := math.Sincos(s0)
		start := sg.a.Mul(cl).Add(sg.t.Mul(sl))
		if frac == 0 {
			cl, sl, start = 1, 0, sg.a
		}
		// Q around the arc: along it from before its start to past its end, off it to either side.
		along := rapid.Float64Range(-0.5, 1.5).Draw(t, "q_along_frac") * sg.theta
		off := rapid.Float64Range(-1, 1).Draw(t, "q_off_frac") * max(sg.theta, 1e-4)
		sa, ca := math.Sincos(along)
		so, co := math.Sincos(off)
		q := sg.a.Mul(ca).Add(sg.t.Mul(sa)).Mul(co).Add(sg.n.Mul(so))
		qq := query{q: q, u: 0, cl: cl, sl: sl, lo: start}
		c2, at, _, _ := arcClosest(&sg.arc, frac != 0, &qq)
		wantC2, wantAt := closestOracle(sg, q, s0, start)
		// Relative: on a metre-long arc the squared chords are ~1e-14, and a foot taken behind the
		// user's place differs from the place by a fraction of that.
		if math.Abs(c2-wantC2) > 1e-6*wantC2+1e-24 {
			t.Fatalf("arcClosest squared chord %.17g (at %d), oracle %.17g (at %d)", c2, at, wantC2, wantAt)
		}
		if near := math.Min(math.Abs(along-s0), math.Abs(along-sg.theta)); at != wantAt && near > 1e-9 {
			t.Fatalf("arcClosest at %d, oracle at %d (squared chords %.17g, %.17g)", at, wantAt, c2, wantC2)
		}
	})
}

// TestArcClosestFootOnAnEnd: a point whose foot falls exactly on an end of
// the arc (Q in the plane through that end and the pole, the coordinates
// exact) has its closest point at the foot: the arc's ends belong to it.
// And a foot behind the user's place is not taken.
func TestArcClosestFootOnAnEnd(t *testing.T) {
	// A quarter of the equator from (1, 0, 0) to (0, 1, 0): t = (0, 1, 0),
	// n = (0, 0, 1), b = a·0 + t·1.
	sg := arc{a: r3.Vector{X: 1}, b: r3.Vector{Y: 1}, t: r3.Vector{Y: 1}, n: r3.Vector{Z: 1}, cosT: 0, sinT: 1}
	for _, c := range []struct {
		desc string
		q    r3.Vector
	}{
		{"above the start", r3.Vector{X: 0.6, Z: 0.8}},
		{"below the start", r3.Vector{X: 0.6, Z: -0.8}},
		{"above the end", r3.Vector{Y: 0.6, Z: 0.8}},
		{"below the end", r3.Vector{Y: 0.6, Z: -0.8}},
	} {
		qq := query{q: c.q, u: 0, cl: 1, sl: 0, lo: sg.a}
		c2, at, _, _ := arcClosest(&sg, false, &qq)
		if want := 0.4*0.4 + 0.8*0.8; at != atFoot || math.Abs(c2-want) > 1e-15 {
			t.Errorf("%s %v: squared chord %.17g at %d, want %.17g at the foot (%d)", c.desc, c.q, c2, at, want, atFoot)
		}
	}
	// From a user's place 0.25 rad along the arc, a point whose foot lies
	// 0.005 rad behind it (0.01 rad off the arc) has its closest point at
	// the user's place: the foot's angle 0.245 is below the start's, so
	// y·cos s₀ − x·sin s₀ = sin(0.245 − 0.25)·cos(0.01) < 0.
	s0, phi := 0.25, 0.245
	sl, cl := math.Sincos(s0)
	lo := sg.a.Mul(cl).Add(sg.t.Mul(sl))
	sp, cp := math.Sincos(phi)
	q := sg.a.Mul(cp).Add(sg.t.Mul(sp)).Mul(math.Cos(0.01)).Add(sg.n.Mul(math.Sin(0.01)))
	qq := query{q: q, u: 0, cl: cl, sl: sl, lo: lo}
	if c2, at, _, _ := arcClosest(&sg, true, &qq); at != atLo || math.Abs(c2-q.Sub(lo).Norm2()) > 1e-15 {
		t.Errorf("foot behind the user's place: squared chord %.17g at %d, want %.17g at the user's place (%d)", c2, at, q.Sub(lo).Norm2(), atLo)
	}
}
