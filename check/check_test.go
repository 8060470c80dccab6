package check_test

import (
	"encoding/json"
	"encoding/xml"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
)

// onePoint is a project case expecting one point at (100, 200) in view
// with the given margin.
func onePoint(id, family, margin string) *corpus.Case {
	return &corpus.Case{ID: id, Op: "project", Family: family,
		Request: json.RawMessage(`{"op":"project","id":"` + id + `"}`),
		Expect:  json.RawMessage(`{"id":"` + id + `","screen":[{"x":100,"y":200,"depth":500,"in_view":true}]}`),
		Margins: json.RawMessage(`{"margin_px":[` + margin + `]}`)}
}

func answer(id string, x float64, in bool) json.RawMessage {
	return json.RawMessage(fmt.Sprintf(`{"id":%q,"screen":[{"x":%v,"y":200,"depth":500,"in_view":%v}]}`, id, x, in))
}

// A report of a hand-made mix, counted by status, op and family (SPEC §7):
// two passes, one borderline (in view flipped with a margin of 1e-7 px,
// within strict's 1e-6 px), two fails (a pixel 0.5 px off; in view flipped
// 40 px inside), one missing, two skipped — 8 cases, 5 checked, so the
// report fails with 2 failed and 1 missing; the text report says so, lists
// the worst difference first (the flip outside its margin, ratio +Inf),
// the skipped share (2/8 = 25 %), and the stray answers after ten.
func TestReportOfAMix(t *testing.T) {
	ck := check.NewChecker(check.Profiles["strict"])
	ck.Check(onePoint("a", "plain", "40"), answer("a", 100, true))
	ck.Check(onePoint("b", "plain", "40"), answer("b", 100, true))
	ck.Check(onePoint("c", "edge", "1e-7"), answer("c", 100, false))
	ck.Check(onePoint("d", "plain", "40"), answer("d", 100.5, true))
	ck.Check(onePoint("e", "edge", "40"), answer("e", 100, false))
	ck.Check(onePoint("f", "plain", "40"), nil)
	ck.Record(check.CaseResult{ID: "g", Op: "zoom", Family: "plain", Status: check.Skipped, Note: "op not selected"})
	ck.Record(check.CaseResult{ID: "h", Op: "zoom", Family: "plain", Status: check.Skipped, Note: "op not selected"})
	for i := range 12 {
		ck.Stray(fmt.Sprintf("stray %d", i))
	}
	rep := ck.Report()
	want := check.Counts{Pass: 2, Borderline: 1, Fail: 2, Missing: 1, Skipped: 2}
	if rep.Counts != want || rep.Counts.Total() != 8 || rep.Counts.Checked() != 5 {
		t.Errorf("counts %+v (total %d, checked %d), want %+v (8, 5)", rep.Counts, rep.Counts.Total(), rep.Counts.Checked(), want)
	}
	if got := rep.ByOp["project"]; got == nil || *got != (check.Counts{Pass: 2, Borderline: 1, Fail: 2, Missing: 1}) {
		t.Errorf("by op project %+v", got)
	}
	if got := rep.ByFamily["project/edge"]; got == nil || *got != (check.Counts{Borderline: 1, Fail: 1}) {
		t.Errorf("by family project/edge %+v", got)
	}
	if !rep.Failed() || rep.Verdict() != "2 failed, 1 missing" {
		t.Errorf("Failed %v, Verdict %q, want true, \"2 failed, 1 missing\"", rep.Failed(), rep.Verdict())
	}
	if len(rep.NotPassed) != 4 {
		t.Errorf("not passed %+v, want c, d, e and f", rep.NotPassed)
	}
	if len(rep.Worst) == 0 || rep.Worst[0].CaseID != "e" {
		t.Errorf("worst %+v, want e's flip first", rep.Worst)
	}
	var b strings.Builder
	if err := rep.WriteText(&b); err != nil {
		t.Fatal(err)
	}
	text := b.String()
	for _, w := range []string{
		"FAIL: 8 cases under the strict profile: 2 pass, 1 borderline, 2 fail, 1 missing, 2 skipped (25% of the corpus)\n",
		"  edge       0     1           1     0        0        \n",
		" 1. e  screen[0].in_view (fail): got false, want true — pixel_px decision, tolerance 1e-06 (reference margin 40)\n",
		"screen[0].xy (fail): got (100.5, 200), want (100, 200) — off by 0.5, pixel_px tolerance ",
		"stray answer: stray 9\n… and 2 more stray answers\n",
	} {
		if !strings.Contains(text, w) {
			t.Errorf("WriteText lacks %q:\n%s", w, text)
		}
	}
	if strings.Contains(text, "stray 10") || strings.Contains(text, "nothing was compared") {
		t.Errorf("WriteText lists an eleventh stray answer or says nothing was compared:\n%s", text)
	}
}

// A report with nothing checked fails and says why; one with every case
// passed passes.
func TestReportVerdicts(t *testing.T) {
	empty := check.NewChecker(check.Profiles["strict"]).Report()
	if !empty.Failed() || empty.Verdict() != "no cases: the corpus is empty" {
		t.Errorf("empty: Failed %v, Verdict %q", empty.Failed(), empty.Verdict())
	}
	ck := check.NewChecker(check.Profiles["strict"])
	ck.Record(check.CaseResult{ID: "g", Op: "zoom", Family: "plain", Status: check.Skipped})
	skipped := ck.Report()
	if !skipped.Failed() || skipped.Verdict() != "no case checked: all 1 skipped or missing" {
		t.Errorf("all skipped: Failed %v, Verdict %q", skipped.Failed(), skipped.Verdict())
	}
	var b strings.Builder
	_ = skipped.WriteText(&b)
	if !strings.Contains(b.String(), "(100% of the corpus)") || !strings.Contains(b.String(), "nothing was compared, so nothing is shown to agree") ||
		strings.Contains(b.String(), "worst differences") {
		t.Errorf("all skipped: WriteText = %q", b.String())
	}
	ck = check.NewChecker(check.Profiles["strict"])
	ck.Check(onePoint("a", "plain", "40"), answer("a", 100, true))
	if r := ck.Report(); r.Failed() {
		t.Errorf("one case passed: Failed true")
	}
}

// A discrete disagreement fails only when the reference's margin is larger
// than the tolerance (SPEC §7): a margin of exactly strict's 1e-6 px, either
// sign, is borderline; the next double above is a fail.
func TestDiscreteMarginAtTheTolerance(t *testing.T) {
	strict := check.Profiles["strict"]
	for _, c := range []struct {
		margin string
		want   check.Status
	}{{"1e-6", check.Borderline}, {"-1e-6", check.Borderline}, {"1.0000000000000002e-6", check.Fail}} {
		if st, _ := check.Compare(onePoint("h", "edge", c.margin), answer("h", 100, false), &strict); st != c.want {
			t.Errorf("in view flipped with a margin of %s px (tolerance 1e-6 px): %v, want %v", c.margin, st, c.want)
		}
	}
}

// An unprojected point is off by its haversine distance on the mean sphere
// (R = 6 371 008.8 m, SPEC §7). Hand-computed: 1° of longitude on the
// equator or of latitude anywhere is R·π/180 = 111 195.08 m; 1° of
// longitude at 60° is 2R·asin(cos 60°·sin 0.5°) = 55 598.6 m.
func TestUnprojectOffByTheHaversine(t *testing.T) {
	const r = 6371008.8
	field := check.Profiles["field"]
	for _, c := range []struct {
		want, got [2]float64 // lat, lon
		m         float64
	}{
		{[2]float64{0, 0}, [2]float64{0, 1}, r * math.Pi / 180},
		{[2]float64{0, 0}, [2]float64{1, 0}, r * math.Pi / 180},
		{[2]float64{60, 10}, [2]float64{60, 11}, 2 * r * math.Asin(math.Cos(math.Pi/3)*math.Sin(math.Pi/360))},
		{[2]float64{10, 179.5}, [2]float64{10, -179.5}, 2 * r * math.Asin(math.Cos(math.Pi/18)*math.Sin(math.Pi/360))},
	} {
		cs := &corpus.Case{ID: "u", Op: "unproject", Family: "unit", Request: json.RawMessage(`{"op":"unproject","id":"u"}`),
			Expect: json.RawMessage(fmt.Sprintf(`{"id":"u","points":[{"lat":%v,"lon":%v}]}`, c.want[0], c.want[1]))}
		st, diffs := check.Compare(cs, json.RawMessage(fmt.Sprintf(`{"id":"u","points":[{"lat":%v,"lon":%v}]}`, c.got[0], c.got[1])), &field)
		if st != check.Fail || len(diffs) != 1 || math.Abs(diffs[0].Diff-c.m) > 1e-6*c.m {
			t.Errorf("unprojected %v for %v: %v %+v, want a fail off by %.6g m (tolerance 1e-6 relative)", c.got, c.want, st, diffs, c.m)
		}
	}
}

// A continuous difference equal to its tolerance passes (|got − want| ≤
// abs + rel·|want|, SPEC §7): a zoom of 1e-9 against 0 under strict's 1e-9.
// A tolerance of 0 is a tolerance (finite and non-negative).
func TestToleranceInclusive(t *testing.T) {
	strict := check.Profiles["strict"]
	cs := &corpus.Case{ID: "z", Op: "zoom", Family: "unit", Request: json.RawMessage(`{"op":"zoom","id":"z"}`),
		Expect: json.RawMessage(`{"id":"z","zoom":[0],"pitch_deg":[0]}`)}
	if st, diffs := check.Compare(cs, json.RawMessage(`{"id":"z","zoom":[1e-9],"pitch_deg":[0]}`), &strict); st != check.Pass {
		t.Errorf("zoom 1e-9 against 0 (tolerance 1e-9): %v %+v, want pass", st, diffs)
	}
	if st, _ := check.Compare(cs, json.RawMessage(`{"id":"z","zoom":[1.0000000000000002e-9],"pitch_deg":[0]}`), &strict); st != check.Fail {
		t.Errorf("zoom 1 ulp past 1e-9 against 0: %v, want fail", st)
	}
	f := t.TempDir() + "/zero.yaml"
	if err := os.WriteFile(f, []byte("base: strict\nzoom: {abs: 0, rel: 0}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if p, err := check.LoadProfile("strict", f); err != nil || p.Zoom != (check.Tolerance{}) {
		t.Errorf("LoadProfile(zoom abs 0) = %+v, %v, want a zero zoom tolerance", p.Zoom, err)
	}
}

// The timeline's borderline rules at exactly their tolerances (SPEC §7): a
// first showing decided by exactly strict's 1e-6 px, or after a U-turn
// decided by exactly its 1e-9°, is borderline.
func TestTimelineBordersAtTheTolerance(t *testing.T) {
	strict := check.Profiles["strict"]
	mk := func(margins string) *corpus.Case {
		return &corpus.Case{ID: "t", Op: "timeline", Family: "unit", Request: json.RawMessage(`{"op":"timeline","id":"t"}`),
			Expect:  json.RawMessage(`{"id":"t","markers":[{"id":"m0","first_visible_s":20,"first_shown_s":20,"shown_s":0.5,"bucket":"late"}]}`),
			Margins: json.RawMessage(margins)}
	}
	later := json.RawMessage(`{"id":"t","markers":[{"id":"m0","first_visible_s":20.25,"first_shown_s":20.25,"shown_s":0.25,"bucket":"late"}]}`)
	for _, c := range []struct{ desc, margins string }{
		{"first shown by 1e-6 px", `{"bucket_margin_s":[5],"first_shown_margin_px":[1e-6]}`},
		{"after a U-turn decided by 1e-9°", `{"bucket_margin_s":[5],"first_shown_margin_px":[40],"turn_margin_deg":[1e-9]}`},
	} {
		if st, diffs := check.Compare(mk(c.margins), later, &strict); st != check.Borderline {
			t.Errorf("a tick later, %s: %v %+v, want borderline", c.desc, st, diffs)
		}
	}
}

// A horizon answer is compared row by row: a row a pixel off fails.
func TestHorizonCompared(t *testing.T) {
	strict := check.Profiles["strict"]
	cs := &corpus.Case{ID: "h", Op: "horizon", Family: "unit", Request: json.RawMessage(`{"op":"horizon","id":"h"}`),
		Expect: json.RawMessage(`{"id":"h","horizon_row_px":0,"far_row_px":40}`)}
	for _, got := range []string{`{"id":"h","horizon_row_px":1,"far_row_px":40}`, `{"id":"h","horizon_row_px":0,"far_row_px":41}`} {
		if st, _ := check.Compare(cs, json.RawMessage(got), &strict); st != check.Fail {
			t.Errorf("horizon %s against %s: %v, want fail", got, cs.Expect, st)
		}
	}
}

// Cases missing for a reason (not merely unanswered) are listed with it,
// at most ten.
func TestMissingListed(t *testing.T) {
	ck := check.NewChecker(check.Profiles["strict"])
	ck.Check(onePoint("a", "plain", "40"), answer("a", 100, true))
	ck.Check(onePoint("f", "plain", "40"), nil)
	for i := range 11 {
		ck.Record(check.CaseResult{ID: fmt.Sprintf("m%02d", i), Op: "project", Family: "plain", Status: check.Missing, Note: "the implementation exited"})
	}
	var b strings.Builder
	_ = ck.Report().WriteText(&b)
	text := b.String()
	if !strings.Contains(text, "missing m09: the implementation exited\n") || strings.Contains(text, "missing m10") || strings.Contains(text, "missing f:") {
		t.Errorf("WriteText: want m00 to m09 listed with their note, not m10 nor the unanswered f:\n%s", text)
	}
}

// A footprint is compared vertex by vertex, then its area and radius; an
// empty footprint against a full one is a decision, borderline within the
// reference's empty_px margin; a different count of vertices otherwise is
// a failed shape.
func TestFootprintCompared(t *testing.T) {
	strict := check.Profiles["strict"]
	const v4 = `[{"lat":0,"lon":0},{"lat":0,"lon":0.01},{"lat":0.01,"lon":0.01},{"lat":0.01,"lon":0}]`
	mk := func(emptyPx string) *corpus.Case {
		return &corpus.Case{ID: "f", Op: "footprint", Family: "unit", Request: json.RawMessage(`{"op":"footprint","id":"f"}`),
			Expect:  json.RawMessage(`{"id":"f","vertices":` + v4 + `,"area_m2":1000000,"visible_radius_m":1500}`),
			Margins: json.RawMessage(`{"empty_px":` + emptyPx + `}`)}
	}
	for _, c := range []struct {
		desc, emptyPx, got string
		want               check.Status
	}{
		{"the same", "40", `{"id":"f","vertices":` + v4 + `,"area_m2":1000000,"visible_radius_m":1500}`, check.Pass},
		{"empty, decided by 40 px", "40", `{"id":"f","vertices":[],"area_m2":0,"visible_radius_m":0}`, check.Fail},
		{"empty, decided by 1e-7 px", "1e-7", `{"id":"f","vertices":[],"area_m2":0,"visible_radius_m":0}`, check.Borderline},
		{"three vertices", "1e-7", `{"id":"f","vertices":[{"lat":0,"lon":0},{"lat":0,"lon":0.01},{"lat":0.01,"lon":0.01}],"area_m2":1000000,"visible_radius_m":1500}`, check.Fail},
		{"a vertex 1 m off", "40", `{"id":"f","vertices":[{"lat":0,"lon":0},{"lat":0,"lon":0.01},{"lat":0.01,"lon":0.01},{"lat":0.01,"lon":0.000009}],"area_m2":1000000,"visible_radius_m":1500}`, check.Fail},
		{"the area 1 m² off", "40", `{"id":"f","vertices":` + v4 + `,"area_m2":1000001,"visible_radius_m":1500}`, check.Fail},
		{"the radius 1 m off", "40", `{"id":"f","vertices":` + v4 + `,"area_m2":1000000,"visible_radius_m":1501}`, check.Fail},
	} {
		if st, diffs := check.Compare(mk(c.emptyPx), json.RawMessage(c.got), &strict); st != c.want {
			t.Errorf("footprint %s: %v %+v, want %v", c.desc, st, diffs, c.want)
		}
	}
}

// JUnit XML of the hand-made mix: one suite per op, one test case per
// case; fails and missing are failures (typed by their status, headed by
// their first difference or note), skipped are skipped, borderline passes
// with its differences in its output.
func TestWriteJUnitOfAMix(t *testing.T) {
	ck := check.NewChecker(check.Profiles["strict"])
	ck.KeepCases = true // every case in the file, as --junit asks
	ck.Check(onePoint("a", "plain", "40"), answer("a", 100, true))
	ck.Check(onePoint("c", "edge", "1e-7"), answer("c", 100, false))
	ck.Check(onePoint("d", "plain", "40"), answer("d", 100.5, true))
	ck.Check(onePoint("f", "plain", "40"), nil)
	ck.Record(check.CaseResult{ID: "g", Op: "zoom", Family: "plain", Status: check.Skipped, Note: "op not selected"})
	var b strings.Builder
	if err := ck.Report().WriteJUnit(&b); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Tests    int `xml:"tests,attr"`
		Failures int `xml:"failures,attr"`
		Skipped  int `xml:"skipped,attr"`
		Suites   []struct {
			Name     string `xml:"name,attr"`
			Tests    int    `xml:"tests,attr"`
			Failures int    `xml:"failures,attr"`
			Skipped  int    `xml:"skipped,attr"`
			Cases    []struct {
				Name      string `xml:"name,attr"`
				Classname string `xml:"classname,attr"`
				Failure   *struct {
					Message string `xml:"message,attr"`
					Type    string `xml:"type,attr"`
				} `xml:"failure"`
				Skipped   *struct{} `xml:"skipped"`
				SystemOut string    `xml:"system-out"`
			} `xml:"testcase"`
		} `xml:"testsuite"`
	}
	if err := xml.Unmarshal([]byte(b.String()), &doc); err != nil {
		t.Fatalf("WriteJUnit: %v\n%s", err, b.String())
	}
	if doc.Tests != 5 || doc.Failures != 2 || doc.Skipped != 1 || len(doc.Suites) != 2 {
		t.Fatalf("WriteJUnit: tests %d, failures %d, skipped %d, %d suites; want 5, 2, 1, 2:\n%s", doc.Tests, doc.Failures, doc.Skipped, len(doc.Suites), b.String())
	}
	p, z := doc.Suites[0], doc.Suites[1]
	if p.Name != "project" || p.Tests != 4 || p.Failures != 2 || p.Skipped != 0 || z.Name != "zoom" || z.Tests != 1 || z.Skipped != 1 || z.Failures != 0 {
		t.Errorf("suites %+v", doc.Suites)
	}
	byName := map[string]int{}
	for i, c := range p.Cases {
		byName[c.Name] = i
	}
	d, f, c := p.Cases[byName["d"]], p.Cases[byName["f"]], p.Cases[byName["c"]]
	if d.Failure == nil || d.Failure.Type != "fail" || !strings.HasPrefix(d.Failure.Message, "fail: screen[0].xy: got (100.5, 200), want (100, 200) (off by 0.5, pixel_px tolerance ") || d.Classname != "viewspec.project.plain" {
		t.Errorf("case d: %+v, want a fail headed by screen[0].xy", d)
	}
	if f.Failure == nil || f.Failure.Type != "missing" || !strings.Contains(f.Failure.Message, "no answer") {
		t.Errorf("case f: %+v, want a missing failure saying no answer", f)
	}
	if c.Failure != nil || !strings.HasPrefix(c.SystemOut, "borderline: screen[0].in_view: got false, want true") {
		t.Errorf("case c: %+v, want a borderline pass with its difference", c)
	}
}

// TestReportKeepsOnlyWhatDidNotPass: a checker that does not keep every
// case (the default, so that memory does not grow with the corpus) lists
// the cases not passed in NotPassed and in the JUnit file, none passed.
func TestReportKeepsOnlyWhatDidNotPass(t *testing.T) {
	ck := check.NewChecker(check.Profiles["strict"])
	ck.Check(onePoint("a", "plain", "40"), answer("a", 100, true))
	ck.Check(onePoint("d", "plain", "40"), answer("d", 100.5, true))
	ck.Check(onePoint("f", "plain", "40"), nil)
	r := ck.Report()
	var b strings.Builder
	if err := r.WriteJUnit(&b); err != nil {
		t.Fatal(err)
	}
	if len(r.Cases) != 0 || len(r.NotPassed) != 2 || r.Counts.Pass != 1 ||
		strings.Contains(b.String(), `name="a"`) || !strings.Contains(b.String(), `name="d"`) || !strings.Contains(b.String(), `name="f"`) {
		t.Errorf("report keeps %d cases, %d not passed, counts %+v; JUnit:\n%s\nwant no case kept, d and f not passed and in the file, a counted only",
			len(r.Cases), len(r.NotPassed), r.Counts, b.String())
	}
}
