package check_test

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
)

// pcase is a one-point project case with the given answer and margin.
func pcase(id, screen, margin string) corpus.Case {
	return corpus.Case{ID: id, Op: "project", Family: "unit",
		Request: json.RawMessage(`{"op":"project","id":"` + id + `"}`),
		Expect:  json.RawMessage(`{"id":"` + id + `","screen":[` + screen + `]}`),
		Margins: json.RawMessage(`{"margin_px":[` + margin + `]}`)}
}

// A regeneration compared with the corpus it replaces, by id: each kind of
// change is found and ranked (flipped, beyond the tolerance, another
// request, added, removed, rounding, margins alone), and the values that
// changed are named with their old and new text and, for numbers, by how
// much (hand-computed: 100.5 − 100 = 0.5; 100.0000000001 − 100 = 1e-10,
// within strict's 1e-6 px + 1e-9 rel).
func TestCorpusChanges(t *testing.T) {
	const p0 = `{"x":100,"y":200,"depth":500,"in_view":true}`
	old := []corpus.Case{
		pcase("same", p0, "3"),
		pcase("flip", p0, "3"),
		pcase("moved", p0, "3"),
		pcase("rounded", p0, "3"),
		pcase("margin", p0, "3"),
		pcase("redrawn", p0, "3"),
		pcase("gone", p0, "3"),
	}
	redrawn := pcase("redrawn", p0, "3")
	redrawn.Request = json.RawMessage(`{"op":"project","id":"redrawn","points":[]}`)
	next := []corpus.Case{
		pcase("same", p0, "3"),
		pcase("flip", `{"x":100,"y":200,"depth":500,"in_view":false}`, "3"),
		pcase("moved", `{"x":100.5,"y":200,"depth":500,"in_view":true}`, "3"),
		pcase("rounded", `{"x":100.0000000001,"y":200,"depth":500,"in_view":true}`, "3"),
		pcase("margin", p0, "2.5"),
		redrawn,
		pcase("new", p0, "3"),
	}
	strict := check.Profiles["strict"]
	got := check.CorpusChanges(old, next, &strict)
	rounded := 100.0000000001 // the double nearest; its distance from 100 is what the change reports
	want := []struct {
		id, kind string
		status   check.Status
		path     string
		diff     float64 // NaN: a flip
	}{
		{"flip", check.ChangeFlipped, check.Fail, "screen[0].in_view", math.NaN()},
		{"moved", check.ChangeBeyond, check.Fail, "screen[0].x", 0.5},
		{"redrawn", check.ChangeRequest, check.Pass, "points", math.NaN()},
		{"new", check.ChangeAdded, check.Pass, "", 0},
		{"gone", check.ChangeRemoved, check.Pass, "", 0},
		{"rounded", check.ChangeRounding, check.Pass, "screen[0].x", rounded - 100},
		{"margin", check.ChangeMargins, check.Pass, "margin_px[0]", 0.5},
	}
	if len(got) != len(want) {
		t.Fatalf("CorpusChanges = %+v, want %d changes", got, len(want))
	}
	for i, w := range want {
		g := got[i]
		if g.ID != w.id || g.Kind != w.kind || g.Status != w.status {
			t.Errorf("change %d = %s %s %v, want %s %s %v", i, g.ID, g.Kind, g.Status, w.id, w.kind, w.status)
			continue
		}
		if w.path == "" {
			if len(g.Fields) != 0 {
				t.Errorf("%s: fields %+v, want none", g.ID, g.Fields)
			}
			continue
		}
		if len(g.Fields) != 1 || g.Fields[0].Path != w.path {
			t.Errorf("%s: fields %+v, want one at %s", g.ID, g.Fields, w.path)
			continue
		}
		f := g.Fields[0]
		if math.IsNaN(w.diff) != f.Flip() || (!f.Flip() && f.Diff != w.diff) {
			t.Errorf("%s: %s changed by %v, want %v (off by %g, tolerance 0)", g.ID, f.Path, f.Diff, w.diff, f.Diff-w.diff)
		}
	}
	if f := got[0].Fields[0]; f.Old != "true" || f.New != "false" {
		t.Errorf("flip: %s %s → %s, want true → false", f.Path, f.Old, f.New)
	}
}

// A value that appears or goes away, and an array whose length changes,
// are flips.
func TestCorpusChangesShapes(t *testing.T) {
	old := []corpus.Case{pcase("a", `{"x":1,"y":2,"depth":3,"in_view":true}`, "1"), pcase("b", `null`, "null")}
	next := []corpus.Case{pcase("a", `null`, "null"), pcase("b", `null,null`, "null")}
	strict := check.Profiles["strict"]
	got := check.CorpusChanges(old, next, &strict)
	if len(got) != 2 || got[0].Kind != check.ChangeFlipped || got[1].Kind != check.ChangeFlipped {
		t.Fatalf("CorpusChanges = %+v, want two flips", got)
	}
	if f := got[0].Fields; len(f) != 1 || f[0].Path != "screen[0]" || f[0].New != "absent" {
		t.Errorf("a point that became null: %+v, want screen[0] → absent", f)
	}
	if f := got[1].Fields; len(f) != 1 || f[0].Path != "screen" || f[0].Old != "1 entries" || f[0].New != "2 entries" {
		t.Errorf("an array that grew: %+v, want screen 1 entries → 2 entries", f)
	}
}

// The report a reviewer reads: the count by kind with what each means, by
// op, then one line per case, its flips first, then its largest moves, at
// most four values and "and N more".
func TestWriteCorpusChanges(t *testing.T) {
	strict := check.Profiles["strict"]
	var b bytes.Buffer
	check.WriteCorpusChanges(&b, nil, 12, &strict)
	if got := b.String(); got != "no case changed (12 cases)\n" {
		t.Errorf("no change: %q", got)
	}
	old := []corpus.Case{pcase("m", `{"x":1,"y":2,"depth":3,"in_view":true},{"x":1,"y":2,"depth":3,"in_view":true}`, "1,1")}
	next := []corpus.Case{pcase("m", `{"x":1.5,"y":4,"depth":3.25,"in_view":false},{"x":11,"y":2,"depth":3,"in_view":true}`, "1,1")}
	b.Reset()
	check.WriteCorpusChanges(&b, check.CorpusChanges(old, next, &strict), 1, &strict)
	want := "1 of 1 cases changed (answers judged under the strict profile):\n" +
		"  1 flipped: a decision flipped: a behaviour change; trace it to the SPEC rule it follows before accepting it\n" +
		"  by op: project 1\n" +
		"m (project, unit): flipped, fail under strict: screen[0].in_view true → false; screen[1].x 1 → 11 (by 10); " +
		"screen[0].y 2 → 4 (by 2); screen[0].x 1 → 1.5 (by 0.5); and 1 more\n"
	if got := b.String(); got != want {
		t.Errorf("WriteCorpusChanges =\n%s\nwant\n%s", got, want)
	}
}

// Each kind's line: the verdict under the profile is given for changed
// answers (flipped, beyond, rounding) and not for the others; exactly
// four changed values are listed without "and 0 more"; an expectation
// that differs only in its spacing is no change.
func TestWriteCorpusChangesKinds(t *testing.T) {
	strict := check.Profiles["strict"]
	const p0 = `{"x":100,"y":200,"depth":500,"in_view":true}`
	redrawn := pcase("req", p0, "3")
	redrawn.Request = []byte(`{"op":"project","id":"req","points":[]}`)
	spaced := pcase("spaced", p0, "3")
	spaced.Expect = []byte(`{ "id": "spaced", "screen": [ {"x": 100, "y": 200, "depth": 500, "in_view": true} ] }`)
	old := []corpus.Case{pcase("beyond", p0, "3"), pcase("round", p0, "3"), pcase("req", p0, "3"), pcase("four", p0, "3"), pcase("spaced", p0, "3")}
	next := []corpus.Case{
		pcase("beyond", `{"x":100.5,"y":200,"depth":500,"in_view":true}`, "3"),
		pcase("round", `{"x":100.0000000001,"y":200,"depth":500,"in_view":true}`, "3"),
		redrawn,
		pcase("four", `{"x":101,"y":201,"depth":501,"in_view":false}`, "3"),
		spaced,
	}
	var b bytes.Buffer
	changes := check.CorpusChanges(old, next, &strict)
	check.WriteCorpusChanges(&b, changes, len(next), &strict)
	got := b.String()
	for _, w := range []string{
		"4 of 5 cases changed",
		"\nbeyond (project, unit): beyond, fail under strict: screen[0].x 100 → 100.5 (by 0.5)\n",
		"\nround (project, unit): rounding, pass under strict: screen[0].x 100 → 100.0000000001 (by ",
		"\nreq (project, unit): request: points absent → []\n",
		"\nfour (project, unit): flipped, fail under strict: screen[0].in_view true → false; screen[0].depth 500 → 501 (by 1); screen[0].x 100 → 101 (by 1); screen[0].y 200 → 201 (by 1)\n",
	} {
		if !strings.Contains(got, w) {
			t.Errorf("WriteCorpusChanges lacks %q:\n%s", w, got)
		}
	}
	if strings.Contains(got, "spaced") || strings.Contains(got, "and 0 more") {
		t.Errorf("WriteCorpusChanges lists a change of spacing, or \"and 0 more\":\n%s", got)
	}
}

// TestWriteCorpusChangesListsAtMost200: a regeneration that changes more
// cases than a reviewer reads one by one lists the first 200 and says how
// many more; the counts cover them all.
func TestWriteCorpusChangesListsAtMost200(t *testing.T) {
	var changes []check.CaseChange
	for i := range 250 {
		changes = append(changes, check.CaseChange{ID: fmt.Sprintf("c%03d", i), Op: "project", Family: "plain", Kind: check.ChangeAdded})
	}
	strict := check.Profiles["strict"]
	var b strings.Builder
	check.WriteCorpusChanges(&b, changes, 250, &strict)
	out := b.String()
	if n := strings.Count(out, ": added\n"); n != 200 || !strings.Contains(out, "… and 50 more changed cases\n") || !strings.Contains(out, "250 of 250 cases changed") {
		t.Errorf("WriteCorpusChanges(250 added) lists %d cases:\n%s\nwant 200, then … and 50 more, counts of all 250", n, out)
	}
}
