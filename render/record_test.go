package render_test

import (
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// timelineTicks runs timeline.Compute with its own hook and returns, per
// tick, the ids shown (in slot order) and the camera's zoom and pitch: the
// reference the recordings are checked against.
func timelineTicks(t testing.TB, d timeline.Drive, ms []timeline.Marker) (shown [][]string, zoom, pitch []float64, res []timeline.Result) {
	t.Helper()
	d.OnTick = func(k int, v *viewport.View, idx []int) {
		if k != len(shown) {
			t.Fatalf("OnTick called for tick %d after %d ticks", k, len(shown))
		}
		ids := []string{}
		for _, i := range idx {
			ids = append(ids, ms[i].ID)
		}
		shown = append(shown, ids)
		c := v.Camera()
		zoom, pitch = append(zoom, c.Zoom), append(pitch, c.PitchDeg)
	}
	res, err := timeline.Compute(&d, ms)
	if err != nil {
		t.Fatal(err)
	}
	return shown, zoom, pitch, res
}

// The recording holds what the timeline saw at each tick and the
// timeline's answer; per marker, its first shown tick and its count of
// shown ticks give back FirstShownS and ShownS.
func TestRenderRecordDriveMatchesTimeline(t *testing.T) {
	for _, rs := range []struct {
		name string
		d    timeline.Drive
	}{{"phone", demoDrive(t, phoneRules())}, {"car", demoDrive(t, carRules())}} {
		t.Run(rs.name, func(t *testing.T) {
			ms := demoMarkers()
			d := rs.d
			calls := 0
			d.OnTick = func(int, *viewport.View, []int) { calls++ }
			rec, err := render.RecordDrive(&d, ms)
			if err != nil {
				t.Fatal(err)
			}
			if calls != d.Ticks()+1 {
				t.Errorf("the drive's own OnTick ran %d times, want %d", calls, d.Ticks()+1)
			}
			wantShown, wantZoom, wantPitch, wantRes := timelineTicks(t, rs.d, ms)
			if len(rec.Ticks) != len(wantShown) {
				t.Fatalf("%d ticks recorded, the timeline ran %d", len(rec.Ticks), len(wantShown))
			}
			if !slices.Equal(rec.Timeline, wantRes) {
				t.Errorf("recorded timeline answer differs from timeline.Compute's")
			}
			firstShown := map[string]int{}
			shownTicks := map[string]int{}
			everShown := 0
			for k, tf := range rec.Ticks {
				if tf.TS != float64(k)*d.TickS {
					t.Errorf("tick %d at %v s, want %v", k, tf.TS, float64(k)*d.TickS)
				}
				if !slices.Equal(tf.Shown, wantShown[k]) {
					t.Errorf("tick %d: shown %v, the timeline shows %v", k, tf.Shown, wantShown[k])
				}
				if len(tf.Shown) > d.Cap {
					t.Errorf("tick %d: %d shown, cap %d", k, len(tf.Shown), d.Cap)
				}
				if tf.Zoom != wantZoom[k] || tf.PitchDeg != wantPitch[k] {
					t.Errorf("tick %d: zoom %v pitch %v, the timeline's camera has %v, %v", k, tf.Zoom, tf.PitchDeg, wantZoom[k], wantPitch[k])
				}
				for _, id := range tf.Shown {
					if _, ok := firstShown[id]; !ok {
						firstShown[id] = k
					}
					shownTicks[id]++
				}
				everShown += len(tf.Shown)
			}
			if everShown == 0 {
				t.Fatal("the demo drive shows nothing")
			}
			buckets := rec.Buckets()
			for i, m := range ms {
				o := rec.Timeline[i]
				k, ok := firstShown[m.ID]
				if ok != o.Shown || (ok && float64(k)*d.TickS != o.FirstShownS) {
					t.Errorf("%s: first shown at tick %d (%v) in the recording; the timeline says %v at %v s", m.ID, k, ok, o.Shown, o.FirstShownS)
				}
				if got := float64(shownTicks[m.ID]) * d.TickS; math.Abs(got-o.ShownS) > 1e-9 {
					t.Errorf("%s: shown %v s in the recording, %v s by the timeline", m.ID, got, o.ShownS)
				}
				if buckets[m.ID] != o.Bucket {
					t.Errorf("%s: Buckets() says %v, the timeline %v", m.ID, buckets[m.ID], o.Bucket)
				}
			}
			if rs.d.OnTick != nil {
				t.Error("RecordDrive changed the caller's drive")
			}
		})
	}
}

func TestRenderRecordDriveErrors(t *testing.T) {
	if _, err := render.RecordDrive(nil, nil); err == nil {
		t.Error("nil drive: no error")
	}
	d := demoDrive(t, phoneRules())
	d.TickS = 0.7
	if _, err := render.RecordDrive(&d, demoMarkers()); err == nil || !strings.Contains(err.Error(), "tick_s") {
		t.Errorf("tick 0.7 s: error %v, want one naming tick_s", err)
	}
	d = demoDrive(t, phoneRules())
	d.HorizonS, d.TickS = 1e5, 0.25
	if _, err := render.RecordDrive(&d, demoMarkers()); err == nil || !strings.Contains(err.Error(), "at most") {
		t.Errorf("400001 ticks: error %v, want one about the limit", err)
	}
	d = demoDrive(t, phoneRules())
	ms := append(demoMarkers(), demoMarkers()[0])
	if _, err := render.RecordDrive(&d, ms); err == nil || !strings.Contains(err.Error(), "duplicate") {
		t.Errorf("duplicate id: error %v, want one naming it", err)
	}
}
