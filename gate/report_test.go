package gate_test

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/gate"
	"github.com/viewspec/viewspec/timeline"
)

// reports returns the text, markdown and JSON reports of rep.
func reports(t *testing.T, rep *gate.Comparison, gates []gate.Verdict) (text, md string, js map[string]any) {
	t.Helper()
	var tb, mb bytes.Buffer
	if err := rep.WriteText(&tb, "base.yaml", "new.yaml", gates); err != nil {
		t.Fatal(err)
	}
	if err := rep.WriteMarkdown(&mb, "base.yaml", "new.yaml", gates, nil); err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(rep)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &js); err != nil {
		t.Fatal(err)
	}
	return tb.String(), mb.String(), js
}

// lostShownCase compares the fast drive from a top-band zoom to another,
// the cap lifted so that only visibility decides.
func lostShownCase(t *testing.T, fromZoom, toZoom float64) (*gate.Comparison, []timeline.Marker) {
	t.Helper()
	dr, ms := fastDrive(t)
	opt := gate.Setup{Device: phone(), Markers: ms, Configure: func(d *timeline.Drive) { d.Cap = len(ms) }}
	rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(fromZoom), threeBands(toZoom), opt)
	if err != nil {
		t.Fatal(err)
	}
	return rep, ms
}

// lost_shown_pct is positive when shown time is lost, and the reports say
// the same number with the same sign: when the new rules show markers less
// (zoom 15 → 17 narrows the view) and when they show them more (17 → 15).
// (The text and markdown reports used to print −lost_shown_pct: "lost
// 1170.8 s (-44.6 %)" beside a gate 'lost_shown_pct > 5' that failed.)
func TestLostShownSign(t *testing.T) {
	for _, c := range []struct {
		desc       string
		from, to   float64
		wantLost   bool // lost_shown_pct > gained_shown_pct
		lostAbove5 bool
	}{
		{"the new rules show markers less (zoom 15 → 17)", 15, 17, true, true},
		{"the new rules show markers more (zoom 17 → 15)", 17, 15, false, false},
	} {
		rep, _ := lostShownCase(t, c.from, c.to)
		m := rep.Total.Measures
		if m.LostShownPct < 0 || m.GainedShownPct < 0 {
			t.Errorf("%s: lost_shown_pct %v, gained_shown_pct %v, want both ≥ 0", c.desc, m.LostShownPct, m.GainedShownPct)
		}
		if want := 100 * m.LostShownS / m.ShownSBase; m.LostShownPct != want {
			t.Errorf("%s: lost_shown_pct = %v, want 100·lost_shown_s/shown_s_base = %v", c.desc, m.LostShownPct, want)
		}
		if (m.LostShownPct > m.GainedShownPct) != c.wantLost || (m.ShownSNew < m.ShownSBase) != c.wantLost {
			t.Errorf("%s: shown %v → %v s, lost %v %%, gained %v %%", c.desc, m.ShownSBase, m.ShownSNew, m.LostShownPct, m.GainedShownPct)
		}
		cond, _ := gate.ParseCondition("lost_shown_pct > 5")
		verdicts := rep.Check([]gate.Condition{cond})
		if verdicts[0].Holds != c.lostAbove5 {
			t.Errorf("%s: lost_shown_pct > 5 on %v %%: holds %v, want %v", c.desc, m.LostShownPct, verdicts[0].Holds, c.lostAbove5)
		}
		text, md, js := reports(t, rep, verdicts)
		// The numbers as the reports print them, both ≥ 0.
		lost := fmt.Sprintf("%.1f s (%.1f %%)", m.LostShownS, m.LostShownPct)
		gained := fmt.Sprintf("%.1f s (%.1f %%)", m.GainedShownS, m.GainedShownPct)
		if !strings.Contains(text, "gained "+gained+", lost "+lost) {
			t.Errorf("%s: the text report does not say gained %s, lost %s:\n%s", c.desc, gained, lost, text)
		}
		if !strings.Contains(md, "| "+gained+" | "+lost+" |") {
			t.Errorf("%s: the markdown report does not say gained %s, lost %s:\n%s", c.desc, gained, lost, md)
		}
		if negative := regexp.MustCompile(`(gained|lost) [0-9.]+ s \(-|s \(-[0-9.]+ %\) \|`); negative.MatchString(text) || negative.MatchString(md) {
			t.Errorf("%s: a negative shown percentage in a report:\n%s\n%s", c.desc, text, md)
		}
		if got := js["total"].(map[string]any)["lost_shown_pct"]; got != m.LostShownPct {
			t.Errorf("%s: JSON lost_shown_pct = %v, want %v", c.desc, got, m.LostShownPct)
		}
		if !strings.Contains(md, "`lost_shown_pct` 10 means 10 % of the shown time lost") {
			t.Errorf("%s: the markdown report does not state the sign convention:\n%s", c.desc, md)
		}
	}
}

// The reports list the markers that moved: id, name when the marker file
// gives one, from → to, and when each was first shown under each rule set;
// drive by drive, by the bucket left and entered, then by first-shown
// time; the text at most 10 per drive with "and N more", the JSON all.
func TestMovedMarkersListed(t *testing.T) {
	dr, ms := fastDrive(t)
	names := map[string]string{"m03": "Café Roma", "m20": "Bakery | Bar"}
	opt := gate.Setup{Device: phone(), Markers: ms, MarkerNames: names, Configure: func(d *timeline.Drive) { d.Cap = len(ms) }}
	dr2 := dr
	dr2.Name = "fast-again"
	rep, err := gate.CompareRules([]gate.Trip{dr, dr2}, threeBands(15), threeBands(17), opt)
	if err != nil {
		t.Fatal(err)
	}
	moved := rep.Drives[0].Moved
	if moved <= 10 || len(rep.MovedMarkers) != rep.Total.Moved {
		t.Fatalf("%d markers moved on the fast drive, %d listed of %d in total; the test wants more than 10 on a drive, all listed",
			moved, len(rep.MovedMarkers), rep.Total.Moved)
	}
	byID := map[string]int{}
	for i, m := range ms {
		byID[m.ID] = i
	}
	order := map[string]int{"early": 0, "mid": 1, "late": 2, "never": 3}
	for k, mv := range rep.MovedMarkers {
		dd := rep.Drives[0]
		if mv.Drive == "fast-again" {
			dd = rep.Drives[1]
		}
		i := byID[mv.ID]
		b, n := dd.Base.Markers[i], dd.New.Markers[i]
		if mv.From != b.Bucket.String() || mv.To != n.Bucket.String() || mv.From == mv.To || mv.Name != names[mv.ID] {
			t.Errorf("move %+v: want %s → %s, name %q", mv, b.Bucket, n.Bucket, names[mv.ID])
		}
		if (mv.FirstShownSBase == nil) == b.Shown || (b.Shown && *mv.FirstShownSBase != b.FirstShownS) ||
			(mv.FirstShownSNew == nil) == n.Shown || (n.Shown && *mv.FirstShownSNew != n.FirstShownS) {
			t.Errorf("move %+v: first shown want %v/%v → %v/%v", mv, b.Shown, b.FirstShownS, n.Shown, n.FirstShownS)
		}
		if k > 0 {
			p := rep.MovedMarkers[k-1]
			key := func(m gate.MarkerMove) []float64 {
				drive := 0.0
				if m.Drive == "fast-again" {
					drive = 1
				}
				base := 1e9
				if m.FirstShownSBase != nil {
					base = *m.FirstShownSBase
				}
				return []float64{drive, float64(order[m.From]), float64(order[m.To]), base}
			}
			if slices.Compare(key(p), key(mv)) > 0 {
				t.Errorf("moves %d and %d out of order: %+v before %+v", k-1, k, p, mv)
			}
		}
	}
	text, md, js := reports(t, rep, nil)
	if got := len(js["moved_markers"].([]any)); got != rep.Total.Moved {
		t.Errorf("JSON moved_markers has %d entries, want %d", got, rep.Total.Moved)
	}
	first := rep.MovedMarkers[0]
	if want := fmt.Sprintf(`\n    %s +%s → %s +%.2f s → %.2f s\n`, first.ID, first.From, first.To, *first.FirstShownSBase, *first.FirstShownSNew); !regexp.MustCompile(want).MatchString(text) {
		t.Errorf("the text report does not list the first move as %q:\n%s", want, text)
	}
	if want := fmt.Sprintf("    and %d more (--json lists them all)\n", moved-10); strings.Count(text, want) != 2 {
		t.Errorf("the text report does not say %q once per drive:\n%s", want, text)
	}
	for _, mv := range rep.MovedMarkers {
		if mv.ID == "m03" && !strings.Contains(text, "m03 (Café Roma)") {
			t.Errorf("the text report does not name m03:\n%s", text)
		}
	}
	if !strings.Contains(md, "| fast | "+first.ID) || !strings.Contains(md, "| drive | marker | bucket, base → new | first shown, base | first shown, new |") {
		t.Errorf("the markdown report does not list the moves:\n%s", md)
	}
	if strings.Contains(md, "Bakery | Bar") {
		t.Errorf("a name with | breaks the markdown table:\n%s", md)
	}
	if t.Failed() {
		t.Logf("text report:\n%s", text)
	}
}

// A drive on which nothing moved lists nothing, and the JSON says so with
// an empty list, not null.
func TestNoMovedMarkers(t *testing.T) {
	dr, ms := fastDrive(t)
	rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(15), gate.Setup{Device: phone(), Markers: ms})
	if err != nil {
		t.Fatal(err)
	}
	text, md, js := reports(t, rep, nil)
	if strings.Contains(text, "markers that moved") || strings.Contains(md, "Markers that moved") {
		t.Errorf("a move list with nothing moved:\n%s\n%s", text, md)
	}
	if l, ok := js["moved_markers"].([]any); !ok || len(l) != 0 {
		t.Errorf("JSON moved_markers = %v, want []", js["moved_markers"])
	}
}

// The timeline's parameters reach the drives and the reports say them.
func TestTimelineParamsReported(t *testing.T) {
	dr, ms := fastDrive(t)
	opt := gate.Setup{Device: phone(), Markers: ms, Configure: func(d *timeline.Drive) {
		d.HorizonS, d.TickS, d.Cap, d.BucketEdgesS = 60, 0.5, 2, [2]float64{3, 20}
	}}
	rep, err := gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(17), opt)
	if err != nil {
		t.Fatal(err)
	}
	want := gate.TimelineParams{HorizonS: 60, TickS: 0.5, Cap: 2, BucketEdgesS: [2]float64{3, 20}}
	if rep.Timeline != want {
		t.Errorf("Timeline = %+v, want %+v", rep.Timeline, want)
	}
	// 60 s at 0.5 s: 121 ticks.
	if n := len(rep.Drives[0].Base.Trace.TimesS); n != 121 {
		t.Errorf("%d ticks traced, want 121", n)
	}
	text, md, _ := reports(t, rep, nil)
	line := "60 s horizon, 0.5 s ticks, at most 2 shown at once, buckets early < 3 s ≤ mid < 20 s ≤ late"
	if !strings.Contains(text, "timeline: "+line+"\n") || !strings.Contains(md, "timeline: "+line+".") {
		t.Errorf("the reports do not say %q:\n%s\n%s", line, text, md)
	}
}

// Drive names are printed once: a drive read from drive-fast.geojson is
// drive-fast, and neither the reports nor an error say "drive drive-fast".
func TestDriveNamedOnce(t *testing.T) {
	dir := writeFolder(t, map[string]string{"drive-fast.geojson": driveGeoJSON})
	trips, _, err := gate.ReadTrips([]string{dir})
	if err != nil {
		t.Fatal(err)
	}
	_, ms := fastDrive(t)
	rep, err := gate.CompareRules(trips, threeBands(15), threeBands(17), gate.Setup{Device: phone(), Markers: ms})
	if err != nil {
		t.Fatal(err)
	}
	text, md, _ := reports(t, rep, nil)
	if strings.Contains(text, "drive drive-") || strings.Contains(md, "drive drive-") || !strings.Contains(text, "\ndrive-fast\n") || !strings.Contains(md, "| drive-fast |") {
		t.Errorf("the drive is not named drive-fast, once:\n%s\n%s", text, md)
	}
	_, err = gate.CompareRules(trips, threeBands(15), threeBands(17), gate.Setup{Device: phone(), Markers: ms,
		Configure: func(d *timeline.Drive) { d.Cap = 0 }})
	if want := filepath.Join(dir, "drive-fast.geojson") + ": cap = 0"; err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Errorf("CompareRules with cap 0 = %v, want an error starting %q", err, want)
	}
}

// A timeline that cannot run (a tick of 0, a NaN horizon) is an error
// naming the drive and the field, not a panic sizing the traces.
func TestBadTimelineIsAnError(t *testing.T) {
	dr, ms := fastDrive(t)
	for _, c := range []struct {
		desc string
		set  func(d *timeline.Drive)
		want string
	}{
		{"tick 0", func(d *timeline.Drive) { d.TickS = 0 }, "fast: tick_s = 0: "},
		{"NaN horizon", func(d *timeline.Drive) { d.HorizonS = math.NaN() }, "fast: horizon_s = NaN: "},
		{"tick of 1e-300", func(d *timeline.Drive) { d.TickS = 1e-300 }, "fast: tick_s = 1e-300: "},
	} {
		_, err := gate.CompareRules([]gate.Trip{dr}, threeBands(15), threeBands(17), gate.Setup{Device: phone(), Markers: ms, Configure: c.set})
		if err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s: CompareRules = %v, want an error starting %q", c.desc, err, c.want)
		}
	}
}
