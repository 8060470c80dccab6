package timeline_test

import (
	"cmp"
	"fmt"
	"slices"
	"strings"
	"sync"
	"testing"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/timeline"
)

// The markers free slots go to are the first of those waiting in the
// order of SPEC §5 (higher priority first, then the smaller id byte by
// byte), written here as a sort, whether the tick picks them out one by
// one (up to 16 slots) or sorts them all. Few priorities and short ids,
// so that ties are common.
func TestBestAreFirstInRank(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 60).Draw(t, "markers")
		ids := rapid.SliceOfNDistinct(rapid.StringOfN(rapid.RuneFrom([]rune("ab\u00e9")), 0, 3, -1), n, n, rapid.ID[string]).Draw(t, "ids")
		ms := make([]timeline.Marker, n)
		all := make([]int, n)
		for i := range ms {
			ms[i] = timeline.Marker{ID: ids[i], Priority: float64(rapid.IntRange(-1, 2).Draw(t, "priority"))}
			all[i] = i
		}
		ws := rapid.Permutation(all).Draw(t, "order")[:rapid.IntRange(1, n).Draw(t, "waiting")]
		k := rapid.IntRange(1, 20).Draw(t, "free")
		want := slices.Clone(ws)
		slices.SortFunc(want, func(a, b int) int {
			if c := cmp.Compare(ms[b].Priority, ms[a].Priority); c != 0 {
				return c
			}
			return strings.Compare(ms[a].ID, ms[b].ID)
		})
		want = want[:min(k, len(want))]
		if got := timeline.Best(ms, ws, k); !slices.Equal(got, want) {
			t.Fatalf("%d free slots among %v: got %v, want %v", k, ws, got, want)
		}
	})
}

// A run in memory left by another (more markers, fewer, a drive that
// errs) gives the answers of a run in fresh memory.
func TestScratchReusedGivesSameAnswers(t *testing.T) {
	big, bigMs := benchDrive(t)
	small, smallMs := benchDrive(t)
	dup := slices.Clone(bigMs)
	dup[150].ID = dup[20].ID
	smallMs = smallMs[:37]
	small.StartAlongM = 2500
	want, err := timeline.Compute(&small, smallMs)
	if err != nil {
		t.Fatal(err)
	}
	for _, before := range []struct {
		desc string
		d    *timeline.Drive
		ms   []timeline.Marker
	}{
		{"more markers", &big, bigMs},
		{"the same run", &small, smallMs},
		{"fewer markers", &big, bigMs[:3]},
		{"markers with a duplicate id (refused)", &big, dup},
	} {
		got, err := timeline.ComputeAfter(before.d, before.ms, &small, smallMs)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(got, want) {
			t.Errorf("after a run on %s: the results differ from a fresh run's", before.desc)
		}
	}
}

// A run reuses the set of ids of the run before it in the same memory,
// and makes one afresh after a run on more than four times its markers
// and 64 more, whose room clearing would walk through for nothing.
func TestIDSetReusedUnlessMuchLarger(t *testing.T) {
	for _, c := range []struct {
		n0, n int
		want  bool
	}{
		{200, 200, true},
		{200, 34, true},  // 4·34 + 64 = 200: not more
		{200, 33, false}, // 196
		{10, 1000, true},
		{0, 0, true},
	} {
		if _, got := timeline.Reused(c.n0, c.n); got != c.want {
			t.Errorf("%d markers after %d: set reused %v, want %v", c.n, c.n0, got, c.want)
		}
	}
}

// A run keeps the markers' points in the array of the run before it when
// that is large enough, up to exactly its size.
func TestPointsReusedUpToCapacity(t *testing.T) {
	for _, c := range []struct {
		n0, n int
		want  bool
	}{{8, 1, true}, {8, 8, true}, {8, 9, false}} {
		if got, _ := timeline.Reused(c.n0, c.n); got != c.want {
			t.Errorf("%d markers after %d: points' array reused %v, want %v", c.n, c.n0, got, c.want)
		}
	}
}

// Timelines computed at once in several goroutines (each taking memory
// that others have left) give the answers of one computed alone.
func TestComputeAtOnce(t *testing.T) {
	d1, ms1 := benchDrive(t)
	d2, ms2 := benchDrive(t)
	d2.StartAlongM, ms2 = 4000, ms2[50:120]
	want1, err1 := timeline.Compute(&d1, ms1)
	want2, err2 := timeline.Compute(&d2, ms2)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	var wg sync.WaitGroup
	bad := make(chan string, 4)
	for g := range 4 {
		wg.Go(func() {
			for k := range 6 {
				d, ms, want := &d1, ms1, want1
				if (g+k)%2 == 1 {
					d, ms, want = &d2, ms2, want2
				}
				if got, err := timeline.Compute(d, ms); err != nil || !slices.Equal(got, want) {
					bad <- fmt.Sprintf("goroutine %d, run %d: the results differ from one computed alone (%v)", g, k, err)
					return
				}
			}
		})
	}
	wg.Wait()
	close(bad)
	for b := range bad {
		t.Error(b)
	}
}
