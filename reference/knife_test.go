package reference_test

import (
	"bufio"
	"encoding/json"
	"os"
	"testing"

	"github.com/viewspec/viewspec/reference"
)

// Knife edges an implementation of SPEC.md written by another team met,
// where the text and the reference parted ways (testdata/knife_edges.jsonl,
// requests found by that implementation; the expectations are the text's,
// worked by it with exact arithmetic):
//   - uturn-opposite: an A→B→A route whose legs' bearings are exactly
//     opposite; §3 turns the map clockwise, and marker m0 is first shown at
//     20 s (the reference turned counter-clockwise and never showed it);
//   - uturn-hair: the same with a hair's breadth between the legs;
//   - start-at-end: a drive starting exactly at the route's end has speed 0
//     at t = 0 (§5), so marker m1, only reachable at speed, is never
//     visible (the reference moved at the last segment's speed at t = 0).
func TestKnifeEdgesFollowTheText(t *testing.T) {
	want := map[string]struct {
		id      string
		visible *float64
		bucket  string
	}{
		"uturn-opposite": {"m0", ptr(20), "late"},
		"uturn-hair":     {"m6", ptr(0), "early"},
		"start-at-end":   {"m1", nil, "never"},
	}
	f, err := os.Open("testdata/knife_edges.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Buffer(nil, 1<<20)
	seen := 0
	for n := 1; sc.Scan(); n++ {
		var ans struct {
			ID      string `json:"id"`
			Markers []struct {
				ID            string   `json:"id"`
				FirstVisibleS *float64 `json:"first_visible_s"`
				Bucket        string   `json:"bucket"`
			} `json:"markers"`
		}
		line := reference.AnswerLine(sc.Bytes(), n)
		if err := json.Unmarshal(line, &ans); err != nil || len(ans.Markers) != 1 {
			t.Fatalf("line %d: answer %s", n, line)
		}
		w, ok := want[ans.ID]
		if !ok {
			t.Fatalf("line %d: unexpected case %q", n, ans.ID)
		}
		seen++
		m := ans.Markers[0]
		if m.ID != w.id || m.Bucket != w.bucket || (m.FirstVisibleS == nil) != (w.visible == nil) ||
			(w.visible != nil && *m.FirstVisibleS != *w.visible) {
			t.Errorf("%s: %s, want marker %s first visible %v, bucket %s", ans.ID, line, w.id, show(w.visible), w.bucket)
		}
	}
	if seen != len(want) {
		t.Fatalf("read %d cases, want %d", seen, len(want))
	}
}

func ptr(v float64) *float64 { return &v }

func show(p *float64) any {
	if p == nil {
		return "null"
	}
	return *p
}
