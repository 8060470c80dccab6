package gate

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
)

// movesOn returns n moves on drive k, mid → late, first shown at 10 s and
// 40 s, ids d<k>-00….
func movesOn(k, n int) []MarkerMove {
	base, next := 10.0, 40.0
	out := make([]MarkerMove, n)
	for i := range out {
		out[i] = MarkerMove{Drive: fmt.Sprintf("drive%d", k), ID: fmt.Sprintf("d%d-%02d", k, i), From: "mid", To: "late",
			FirstShownSBase: &base, FirstShownSNew: &next, drive: k, from: 1, to: 2}
	}
	return out
}

// hand builds a comparison of the given drives with the given moves per
// drive; every number in it is chosen by hand, so that the reports can be
// read against it line by line.
func hand(movesPerDrive ...int) *Comparison {
	r := &Comparison{Timeline: TimelineParams{HorizonS: 120, TickS: 0.25, Cap: 4, BucketEdgesS: [2]float64{5, 35}},
		MovedMarkers: []MarkerMove{}, Skipped: []Skipped{}}
	for k, n := range movesPerDrive {
		dd := TripDiff{Name: fmt.Sprintf("drive%d", k), Measures: Measures{Markers: 12, Moved: n,
			AreaSBase: 2.5e6, AreaSNew: 5e6, AreaChangePct: 100}}
		dd.Moves[1][2] = n
		dd.Moves[0][0] = 12 - n
		r.Drives = append(r.Drives, dd)
		r.Total.add(&dd)
		r.MovedMarkers = append(r.MovedMarkers, movesOn(k, n)...)
	}
	r.Total.Name = "total"
	r.Total.finish()
	return r
}

func text(t *testing.T, r *Comparison, gates []Verdict) string {
	t.Helper()
	var b bytes.Buffer
	if err := r.WriteText(&b, "base.yaml", "new.yaml", gates); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

func markdown(t *testing.T, r *Comparison, gates []Verdict, plots []Plot) string {
	t.Helper()
	var b bytes.Buffer
	if err := r.WriteMarkdown(&b, "base.yaml", "new.yaml", gates, plots); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// contains reports each of want missing from got, and each of wantNot
// present.
func contains(t *testing.T, desc, got string, want, wantNot []string) {
	t.Helper()
	for _, w := range want {
		if !strings.Contains(got, w) {
			t.Errorf("%s: report lacks %q:\n%s", desc, w, got)
		}
	}
	for _, w := range wantNot {
		if strings.Contains(got, w) {
			t.Errorf("%s: report has %q, want none:\n%s", desc, w, got)
		}
	}
}

// The text report: the counts in words, the area-seconds in km²·s
// (2.5e6 m²·s is 2.5 km²·s), each drive's moved markers under that drive
// alone, at most ten with "and N more" only when some are left out, and
// the gates only when there are some.
func TestWriteTextHand(t *testing.T) {
	one := text(t, hand(3), nil)
	contains(t, "one drive", one,
		[]string{"rules diff: base.yaml → new.yaml on 1 drive, 12 markers\n", "  footprint area-seconds 2.5 → 5 km²·s (+100.0 %)\n",
			"    d0-02  mid → late  10.00 s → 40.00 s\n"},
		[]string{"and 0 more", "gate "})
	if strings.HasSuffix(one, "\n\n") {
		t.Errorf("one drive, no gates: report ends in a blank line:\n%s", one)
	}
	two := text(t, hand(textMovesPerDrive, textMovesPerDrive+1), []Verdict{
		{Condition: "moved > 20", Value: 21, Holds: true}, {Condition: "moved > 30", Value: 21}})
	contains(t, "two drives", two,
		[]string{"on 2 drives, 12 markers\n", "    and 1 more (--json lists them all)\n",
			"\ngate moved > 20: FAILS (the total is 21)\ngate moved > 30: passes (the total is 21)\n"},
		[]string{"and 0 more"})
	// Drive 0's list holds its own ten and nothing of drive 1's.
	d0 := two[strings.Index(two, "\ndrive0\n"):strings.Index(two, "\ndrive1\n")]
	if n := strings.Count(d0, "    d0-"); n != textMovesPerDrive || strings.Contains(d0, "d1-") {
		t.Errorf("drive0's section lists %d of its moves (want %d) and drive1's: %v:\n%s", n, textMovesPerDrive, strings.Contains(d0, "d1-"), d0)
	}
	total := two[strings.Index(two, "\ntotal\n"):]
	if strings.Contains(total, "markers that moved") {
		t.Errorf("the total lists moved markers:\n%s", total)
	}
}

// The markdown report: counts in words, skipped files and gates only when
// there are some, the total's row in bold, the diagonal of the moves table
// in italics, at most 50 moved markers with "and N more" only when some
// are left out, plots only when there are some.
func TestWriteMarkdownHand(t *testing.T) {
	plain := markdown(t, hand(3), nil, nil)
	contains(t, "one drive", plain,
		[]string{"1 drive, 12 markers each;", "| drive0 | 3 |", "| **total** | 3 |", "| early | *9* | 0 | 0 | 0 |\n", "| mid | 0 | *0* | 3 | 0 |\n"},
		[]string{"Skipped files", "- gate ", "### Plots", "and 0 more", "more (the JSON"})
	if strings.Contains(plain, "\n\n\n") {
		t.Errorf("markdown with no skipped files and no gates has an empty section:\n%s", plain)
	}
	r := hand(markdownMoves/2, markdownMoves/2)
	if got := markdown(t, r, nil, nil); strings.Contains(got, "more (the JSON") || strings.Count(got, "| mid → late |") != markdownMoves {
		t.Errorf("exactly %d moves: want them all and no \"and N more\":\n%s", markdownMoves, got)
	}
	r = hand(markdownMoves/2, markdownMoves/2+1)
	r.Skipped = []Skipped{{File: "notes.json", Reason: "not a drive"}}
	full := markdown(t, r, []Verdict{{Condition: "moved > 20", Value: 51, Holds: true}, {Condition: "moved > 60", Value: 51}},
		[]Plot{{Title: "zoom", File: "zoom.svg"}})
	contains(t, "two drives", full,
		[]string{"2 drives, 12 markers each;", "Skipped files (not drives, or named twice):\n\n- `notes.json`: not a drive\n",
			"- gate `moved > 20` ❌ fails (total 51)\n- gate `moved > 60` ✅ passes (total 51)\n",
			"\nand 1 more (the JSON report lists them all).\n", "### Plots\n\n- [zoom](zoom.svg)\n\n![zoom](zoom.svg)\n"},
		nil)
}

// compareShown orders first-shown times, never shown (nil) last, and
// ties as equal.
func TestCompareShown(t *testing.T) {
	a, b := 1.0, 2.0
	for _, c := range []struct {
		x, y *float64
		want int
	}{{nil, nil, 0}, {nil, &a, 1}, {&a, nil, -1}, {&a, &b, -1}, {&b, &a, 1}, {&a, &a, 0}} {
		if got := compareShown(c.x, c.y); got != c.want {
			t.Errorf("compareShown(%v, %v) = %d, want %d", show(c.x), show(c.y), got, c.want)
		}
	}
}

func show(p *float64) string {
	if p == nil {
		return "nil"
	}
	return fmt.Sprint(*p)
}
