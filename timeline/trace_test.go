package timeline_test

import (
	"reflect"
	"slices"
	"testing"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/timeline"
)

// The trace is the timeline's own run, tick by tick: the same results as
// Compute; one record per tick; the shown markers are in view and at most
// cap; each marker's first showing is the first tick its id is shown, and
// its first visibility the first tick it is in view.
func TestTraceAgreesWithTimeline(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d, ms := drawDrive(t)
		want, err := timeline.Compute(&d, ms)
		if err != nil {
			t.Skip(err.Error())
		}
		got, ticks, err := timeline.ComputeTraced(&d, ms)
		if err != nil {
			t.Skip(err.Error()) // over the trace's limit
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("ComputeTraced results differ from Compute's:\n%+v\n%+v", got, want)
		}
		if len(ticks) != d.Ticks()+1 {
			t.Fatalf("%d tick records, want %d", len(ticks), d.Ticks()+1)
		}
		firstShown, firstVisible := map[string]float64{}, map[string]float64{}
		for _, tk := range ticks {
			if len(tk.Shown) > d.Cap {
				t.Fatalf("t = %v: %d shown, cap %d", tk.TS, len(tk.Shown), d.Cap)
			}
			var visible []string
			for _, v := range tk.Visible {
				visible = append(visible, v.ID)
				if v.MarginPx < 0 {
					t.Fatalf("t = %v: %s in view with margin %v px", tk.TS, v.ID, v.MarginPx)
				}
				if _, ok := firstVisible[v.ID]; !ok {
					firstVisible[v.ID] = tk.TS
				}
			}
			for _, id := range tk.Shown {
				if !slices.Contains(visible, id) {
					t.Fatalf("t = %v: %s shown but not in view", tk.TS, id)
				}
				if _, ok := firstShown[id]; !ok {
					firstShown[id] = tk.TS
				}
			}
		}
		for i, r := range got {
			id := ms[i].ID
			if fs, ok := firstShown[id]; ok != r.Shown || (ok && fs != r.FirstShownS) {
				t.Fatalf("%s: first shown in the trace %v (%v), in the result %v (%v)", id, fs, ok, r.FirstShownS, r.Shown)
			}
			if fv, ok := firstVisible[id]; ok != r.Visible || (ok && fv != r.FirstVisibleS) {
				t.Fatalf("%s: first visible in the trace %v (%v), in the result %v (%v)", id, fv, ok, r.FirstVisibleS, r.Visible)
			}
		}
	})
}
