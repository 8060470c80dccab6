package fleet

import (
	"bytes"
	"path/filepath"
	"testing"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
)

// A run's totals split into parts per group, each through the part coder
// (JSON) and back, make totals whose summary is the same bytes: the
// coder's round trip is exact. The run: `viewspec audit`'s audit.Run on
// the first 60 demo fleet records, grouped by client and device.
func TestPartsRoundTrip(t *testing.T) {
	s := demo.Default()
	log := filepath.Join(t.TempDir(), "a.jsonl")
	writeLog(t, log, fleetLines(t, s, 0, 60))
	sets := audit.RuleSets{}
	for _, r := range s.RuleSets {
		sets[r.Name] = r.Set
	}
	by := []string{"client", "device"}
	tot, err := audit.Run([]string{log}, audit.Options{Sets: sets, By: by})
	if err != nil {
		t.Fatal(err)
	}
	tot.BadRecords = 3 // the whole run's part carries them
	sum := tot.Summary()
	want, _ := audit.SummaryJSON(&sum)

	ps := map[string]*part{}
	for key, p := range parts(tot) {
		b, err := encodePart(*p)
		if err != nil {
			t.Fatal(err)
		}
		q, err := decodePart(b)
		if err != nil {
			t.Fatal(err)
		}
		ps[key] = &q
	}
	if len(ps) < 1+4 {
		t.Fatalf("parts(totals of 4 clients) = %d groups, want at least 5", len(ps))
	}
	back := totals(by, ps).Summary()
	got, _ := audit.SummaryJSON(&back)
	if !bytes.Equal(got, want) {
		t.Errorf("summary after the part coder's round trip:\n got %s\nwant %s", got, want)
	}
}

// Group keys split back into the tag and value they were made of, whatever
// the value holds; the whole run's key is no group.
func TestGroupKeys(t *testing.T) {
	for _, c := range []struct{ tag, value string }{{"client", "4.2"}, {"region", "a=b"}, {"t", ""}, {"device", audit.NoTag}} {
		tag, v, ok := splitKey(groupKey(c.tag, c.value))
		if !ok || tag != c.tag || v != c.value {
			t.Errorf("splitKey(groupKey(%q, %q)) = %q, %q, %v, want %q, %q, true", c.tag, c.value, tag, v, ok, c.tag, c.value)
		}
	}
	if _, _, ok := splitKey(allKey); ok {
		t.Errorf("splitKey(%q) = a group, want none", allKey)
	}
}
