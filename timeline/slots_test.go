package timeline_test

import (
	"cmp"
	"slices"
	"strings"
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
