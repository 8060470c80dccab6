package audit_test

import (
	"bytes"
	"compress/gzip"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// drawRecord draws a record of a drive through noisy fixes somewhere on
// Earth (stops included), a demo device and rule set, and candidates
// around the start; its display log is empty.
func drawRecord(t *rapid.T) *audit.Record {
	s := demo.Default()
	lat := rapid.Float64Range(-70, 70).Draw(t, "lat")
	lon := rapid.Float64Range(-180, 180).Draw(t, "lon")
	heading := rapid.Float64Range(0, 2*math.Pi).Draw(t, "heading")
	const mPerDeg = 111195.0
	var fixes []timeline.Fix
	p := orb.Point{lon, lat}
	for k := 0; k <= rapid.IntRange(2, 60).Draw(t, "fixes"); k++ {
		if k > 0 && rapid.IntRange(0, 4).Draw(t, "stop") > 0 {
			speed := rapid.Float64Range(0.5, 35).Draw(t, "speed_mps")
			heading += rapid.Float64Range(-0.6, 0.6).Draw(t, "turn")
			p = orb.Point{p[0] + speed*math.Sin(heading)/(mPerDeg*math.Cos(p[1]*math.Pi/180)), p[1] + speed*math.Cos(heading)/mPerDeg}
			p[0] -= 360 * math.Floor((p[0]+180)/360)
		}
		fixes = append(fixes, timeline.Fix{TS: float64(k), Point: p})
	}
	if fixes[len(fixes)-1].Point == fixes[0].Point {
		fixes[len(fixes)-1].Point[1] += 1e-4
	}
	r, stops, err := timeline.Replay(fixes, "trace")
	if err != nil {
		t.Fatalf("Replay: %v", err)
	}
	dev := s.Devices[rapid.IntRange(0, len(s.Devices)-1).Draw(t, "device")]
	rs, _ := s.RuleSet(dev.Rules)
	d := timeline.NewDrive(r, 0, dev.Device, rs.Set)
	d.Stops = stops
	d.HorizonS, d.TickS = 60, 0.25
	d.Cap = rapid.IntRange(1, 6).Draw(t, "cap")
	var cands []timeline.Marker
	for i := range rapid.IntRange(1, 60).Draw(t, "candidates") {
		clon := lon + rapid.Float64Range(-0.01, 0.01).Draw(t, "dlon")
		clon -= 360 * math.Floor((clon+180)/360)
		cands = append(cands, timeline.Marker{ID: "c" + string(rune('A'+i%26)) + string(rune('a'+i/26)),
			Point:    orb.Point{clon, lat + rapid.Float64Range(-0.01, 0.01).Draw(t, "dlat")},
			Priority: float64(rapid.IntRange(0, 3).Draw(t, "priority"))})
	}
	return &audit.Record{RequestID: "r", Drive: d, Fixes: fixes, Candidates: cands, Displayed: make([]*audit.Display, len(cands))}
}

// ownLog fills rec's display log with the reference's own timeline,
// intervals included.
func ownLog(t interface{ Fatal(...any) }, rec *audit.Record) {
	d := rec.Drive
	ivs := make([][][2]float64, len(rec.Candidates))
	d.OnTick = func(k int, _ *viewport.View, shown []int) {
		tS := float64(k) * d.TickS
		for _, j := range shown {
			if n := len(ivs[j]); n > 0 && ivs[j][n-1][1] == tS {
				ivs[j][n-1][1] = tS + d.TickS
			} else {
				ivs[j] = append(ivs[j], [2]float64{tS, tS + d.TickS})
			}
		}
	}
	got, err := timeline.Compute(&d, rec.Candidates)
	if err != nil {
		t.Fatal(err)
	}
	for i, g := range got {
		if g.Shown {
			rec.Displayed[i] = &audit.Display{FirstShownS: g.FirstShownS, ShownS: g.ShownS, Intervals: ivs[i]}
		}
	}
}

// A phone that shows exactly what the reference shows agrees on every
// candidate, and is never over its cap.
func TestOwnTimelineAlwaysAgrees(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		rec := drawRecord(t)
		ownLog(t, rec)
		res, err := audit.Audit(rec)
		if err != nil {
			t.Fatal(err)
		}
		for _, o := range res.Outcomes {
			if o.Verdict != audit.Agree || o.OverCap {
				t.Fatalf("candidate %s: %v (%s), over cap %v; reference %+v, phone %+v", o.ID, o.Verdict, o.Cause, o.OverCap, o.Ref, o.Phone)
			}
		}
		if !res.OnScreenKnown || res.MaxOnScreen > rec.Drive.Cap {
			t.Fatalf("on screen at most %d (known %v), cap %d", res.MaxOnScreen, res.OnScreenKnown, rec.Drive.Cap)
		}
	})
}

// A phone one second late is a first_shown disagreement on every display
// whose first showing is not decided by the view's edge.
func TestLateDisplayDisagrees(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		rec := drawRecord(t)
		ownLog(t, rec)
		late := 0
		for _, d := range rec.Displayed {
			if d != nil && d.FirstShownS+1 <= rec.Drive.HorizonS {
				d.FirstShownS++
				d.Intervals = nil
				late++
			}
		}
		res, err := audit.Audit(rec)
		if err != nil {
			t.Fatal(err)
		}
		for _, o := range res.Outcomes {
			if o.Phone == nil || o.Phone.Intervals != nil {
				continue
			}
			if o.Verdict == audit.Agree || o.Verdict == audit.Disagree && o.Cause != audit.CauseFirstShown {
				t.Fatalf("candidate %s one second late: %v (%s)", o.ID, o.Verdict, o.Cause)
			}
		}
	})
}

// fleetSummary audits logs and returns the summary as JSON.
func fleetSummary(t *testing.T, files []string, sets audit.RuleSets, workers int) (*audit.Totals, []byte) {
	t.Helper()
	tot, err := audit.Run(files, audit.Options{Sets: sets, By: []string{"client", "device"}, Workers: workers})
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(tot.Summary())
	if err != nil {
		t.Fatal(err)
	}
	return tot, b
}

// Shuffling the records, auditing with any number of workers, or
// splitting a log into parts and merging their totals gives the same
// summary, byte for byte (SPEC §9: the aggregation is exact and
// order-free).
func TestSummaryIsOrderFreeAndMergeable(t *testing.T) {
	s := demo.Default()
	sets := demoSets(s)
	var lines [][]byte
	for i := range 48 {
		l, err := s.FleetRecord(i)
		if err != nil {
			t.Fatal(err)
		}
		lines = append(lines, l)
	}
	dir := t.TempDir()
	write := func(name string, ls [][]byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, append(bytes.Join(ls, []byte("\n")), '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	_, whole := fleetSummary(t, []string{write("whole.jsonl", lines)}, sets, 1)

	shuffled := append([][]byte(nil), lines...)
	rand.New(rand.NewPCG(1, 2)).Shuffle(len(shuffled), func(i, j int) { shuffled[i], shuffled[j] = shuffled[j], shuffled[i] })
	if _, got := fleetSummary(t, []string{write("shuffled.jsonl", shuffled)}, sets, 3); !bytes.Equal(got, whole) {
		t.Errorf("shuffled records, 3 workers: the summary changed\n got %s\nwant %s", got, whole)
	}

	parts := []string{write("a.jsonl", lines[:10]), write("b.jsonl", lines[10:31]), write("c.jsonl", lines[31:])}
	merged := audit.NewTotals([]string{"client", "device"})
	for _, p := range []string{parts[2], parts[0], parts[1]} {
		tot, _ := fleetSummary(t, []string{p}, sets, 2)
		merged.Merge(tot)
	}
	if got, _ := json.Marshal(merged.Summary()); !bytes.Equal(got, whole) {
		t.Errorf("parts merged: the summary changed\n got %s\nwant %s", got, whole)
	}
}

// Shuffling a record's candidates changes no candidate's verdict.
func TestCandidateOrderChangesNothing(t *testing.T) {
	s := demo.Default()
	sets := demoSets(s)
	for i := range 8 {
		line, _ := s.FleetRecord(i)
		verdicts := func(line []byte) map[string]string {
			rec, err := audit.DecodeRecord(line, sets)
			if err != nil {
				t.Fatal(err)
			}
			res, err := audit.Audit(rec)
			if err != nil {
				t.Fatal(err)
			}
			m := map[string]string{}
			for _, o := range res.Outcomes {
				m[o.ID] = o.Verdict.String() + "/" + o.Cause + "/" + o.Edge
			}
			return m
		}
		want := verdicts(line)
		var rec map[string]any
		json.Unmarshal(line, &rec)
		cands := rec["candidates"].([]any)
		rand.New(rand.NewPCG(uint64(i), 9)).Shuffle(len(cands), func(a, b int) { cands[a], cands[b] = cands[b], cands[a] })
		shuffled, _ := json.Marshal(rec)
		got := verdicts(shuffled)
		for id, v := range want {
			if got[id] != v {
				t.Errorf("record %d, candidate %s: %s after shuffling, %s before", i, id, got[id], v)
			}
		}
	}
}

// Bad records are reported with file, line and field, counted and
// skipped; the others are audited.
func TestBadRecordsNameFileLineAndField(t *testing.T) {
	s := demo.Default()
	sets := demoSets(s)
	good, _ := s.FleetRecord(0)
	edit := func(f func(m map[string]any)) []byte {
		var m map[string]any
		json.Unmarshal(good, &m)
		f(m)
		b, _ := json.Marshal(m)
		return b
	}
	cases := []struct {
		line []byte
		want string
	}{
		{edit(func(m map[string]any) { m["trace"].([]any)[3].(map[string]any)["t_s"] = 1.5 }), "trace[3].t_s = 1.5: fix times must not decrease"},
		{edit(func(m map[string]any) { m["rules_ref"] = "sports" }), `rules_ref = sports: no such rule set (known: incar, phone)`},
		{edit(func(m map[string]any) {
			m["shown"] = []any{map[string]any{"id": "nobody", "first_shown_s": 1, "shown_s": 1}}
		}), `shown[0].id = nobody: not a candidate of this request`},
		{bytes.Replace(edit(func(m map[string]any) {
			m["predicted"].([]any)[0].(map[string]any)["p"] = []any{"NaN", 0.1, 0.1, 0.8}
		}), []byte(`"NaN"`), []byte(`1e999`), 1), "predicted[0].p[0] = 1e999: not a finite number"},
		{edit(func(m map[string]any) {
			m["predicted"].([]any)[1].(map[string]any)["p"] = []any{0.5, 0.5, 0.1, 0}
		}), "predicted[1].p = 1.1: the probabilities must sum to 1 within 1e-6"},
		{[]byte(`{"request_id": "x", "trace": 5}`), "trace: expected an array"},
	}
	var lines [][]byte
	for _, c := range cases {
		lines = append(lines, good, c.line)
	}
	dir := t.TempDir()
	plain := filepath.Join(dir, "log.jsonl")
	os.WriteFile(plain, append(bytes.Join(lines, []byte("\n")), '\n'), 0o644)

	// A gzip log cut short: the records before the cut are audited.
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write(append(append(good, '\n'), append(good, '\n')...))
	zw.Close()
	cut := filepath.Join(dir, "cut.jsonl.gz")
	os.WriteFile(cut, gz.Bytes()[:gz.Len()-30], 0o644)

	var bad []*audit.BadRecord
	tot, err := audit.Run([]string{plain, cut}, audit.Options{Sets: sets, OnBad: func(b *audit.BadRecord) { bad = append(bad, b) }})
	if err != nil {
		t.Fatal(err)
	}
	if len(bad) != len(cases)+1 {
		t.Fatalf("%d bad records, want %d: %v", len(bad), len(cases)+1, bad)
	}
	for i, c := range cases {
		b := bad[i]
		if b.File != plain || b.Line != 2*i+2 || !strings.Contains(b.Error(), c.want) {
			t.Errorf("bad record %d: %v (line %d), want %s:%d: … %s", i, b, b.Line, plain, 2*i+2, c.want)
		}
	}
	last := bad[len(bad)-1]
	if last.File != cut || !strings.Contains(last.Reason, "breaks off") {
		t.Errorf("truncated gzip: %v", last)
	}
	// Every good line of the plain log, and whatever came through of the
	// cut one (its second line at most).
	if tot.All.Records < int64(len(cases)) || tot.All.Records > int64(len(cases))+2 || tot.BadRecords != int64(len(bad)) {
		t.Errorf("%d records audited, %d bad; want %d good and %d bad", tot.All.Records, tot.BadRecords, len(cases), len(bad))
	}
}

// Wilson score intervals: the worked examples of Newcombe, "Two-sided
// confidence intervals for the single proportion: comparison of seven
// methods", Statistics in Medicine 17 (1998) 857–872, Table I, method 3
// (quoted from memory, to the four decimals the paper prints).
func TestWilsonPublishedExamples(t *testing.T) {
	for _, c := range []struct {
		k, n   int64
		lo, hi float64
	}{
		{81, 263, 0.2553, 0.3662},
		{15, 148, 0.0624, 0.1605},
		{0, 20, 0, 0.1611},
		{1, 29, 0.0061, 0.1718},
	} {
		lo, hi := audit.Wilson(c.k, c.n, audit.Z95)
		if math.Abs(lo-c.lo) > 5e-5 || math.Abs(hi-c.hi) > 5e-5 {
			t.Errorf("Wilson(%d, %d) = [%.5f, %.5f], want [%.4f, %.4f]", c.k, c.n, lo, hi, c.lo, c.hi)
		}
	}
}

// ReadLog gives each non-blank line with its 1-based number, trimmed; a
// gzip log cut short ends with a bad record at the line after the last one
// read; an error of the callback stops it and comes back unchanged.
// Hand-made logs: "a", a blank line, " b " (lines 1 and 3).
func TestReadLog(t *testing.T) {
	var got []string
	err := audit.ReadLog(strings.NewReader("a\n\n b \n"), "x.jsonl", func(l audit.LogLine) error {
		got = append(got, fmt.Sprintf("%s:%d:%s:%v", l.File, l.Line, l.Data, l.Bad != nil))
		return nil
	})
	if want := []string{"x.jsonl:1:a:false", "x.jsonl:3:b:false"}; err != nil || !slices.Equal(got, want) {
		t.Errorf("ReadLog(plain) = %q, %v, want %q, nil", got, err, want)
	}

	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write([]byte(strings.Repeat("{}\n", 1000)))
	zw.Close()
	var lines int
	var bad *audit.BadRecord
	err = audit.ReadLog(bytes.NewReader(gz.Bytes()[:gz.Len()-30]), "cut.jsonl.gz", func(l audit.LogLine) error {
		if l.Bad != nil {
			bad = l.Bad
			return nil
		}
		lines++
		return nil
	})
	if err != nil || bad == nil || bad.Line != lines+1 || !strings.Contains(bad.Reason, "breaks off") {
		t.Errorf("ReadLog(cut gzip) = %v after %d lines, bad %v; want a bad record at line %d", err, lines, bad, lines+1)
	}

	stop := errors.New("stop")
	n := 0
	err = audit.ReadLog(strings.NewReader("a\nb\nc\n"), "x", func(audit.LogLine) error { n++; return stop })
	if err != stop || n != 1 {
		t.Errorf("ReadLog(callback fails) = %v after %d calls, want %v after 1", err, n, stop)
	}
}
