package audit_test

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
)

// demoSets returns the demo town's rule sets by name.
func demoSets(s *demo.Scenario) audit.RuleSets {
	sets := audit.RuleSets{}
	for _, r := range s.RuleSets {
		sets[r.Name] = r.Set
	}
	return sets
}

// writeFleet writes records [from, to) of the demo fleet to a log file.
func writeFleet(t testing.TB, s *demo.Scenario, from, to int) string {
	t.Helper()
	var data []byte
	for i := from; i < to; i++ {
		line, err := s.FleetRecord(i)
		if err != nil {
			t.Fatal(err)
		}
		data = append(append(data, line...), '\n')
	}
	p := filepath.Join(t.TempDir(), "fleet.jsonl")
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestSmokeFleet(t *testing.T) {
	s := demo.Default()
	p := writeFleet(t, s, 0, 80)
	tot, err := audit.Run([]string{p}, audit.Options{Sets: demoSets(s), By: []string{"client"},
		OnBad: func(b *audit.BadRecord) { t.Errorf("bad: %v", b) }})
	if err != nil {
		t.Fatal(err)
	}
	sum := tot.Summary()
	for i := range sum.Findings {
		sum.Findings[i].Example = nil
	}
	b, _ := json.MarshalIndent(sum, "", " ")
	t.Logf("%s", b)
}
