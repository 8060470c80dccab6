package fleet

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
)

// A record that panics the audit is a bad record naming the panic and
// its request id, counted; the job goes on and audits the others. The
// panic is planted for one of 30 demo records (demo.FleetRecord 0–29).
func TestPanicIsABadRecord(t *testing.T) {
	s := demo.Default()
	lines := fleetLines(t, s, 0, 30)
	var victim struct {
		ID string `json:"request_id"`
	}
	json.Unmarshal(lines[7], &victim)
	defer func(f func(string, int, []byte, audit.RuleSets) (*audit.Result, *audit.BadRecord)) { auditLine = f }(auditLine)
	auditLine = func(file string, line int, data []byte, sets audit.RuleSets) (*audit.Result, *audit.BadRecord) {
		if bytes.Contains(data, []byte(`"request_id":"`+victim.ID+`"`)) {
			panic("planted")
		}
		return audit.AuditLine(file, line, data, sets)
	}

	logs := t.TempDir()
	writeLog(t, filepath.Join(logs, "a.jsonl"), lines)
	sets, err := ReadRules(writeRules(t, s))
	if err != nil {
		t.Fatal(err)
	}
	out := t.TempDir()
	runPipeline(t, Config{Input: filepath.Join(logs, "*.jsonl"), Rules: sets, By: []string{"client"}, Output: out, Job: "panic"})

	bad := readLines(t, glob(t, filepath.Join(out, "bad-records-*-of-*.jsonl")))
	var b audit.BadRecord
	if len(bad) == 1 {
		json.Unmarshal([]byte(bad[0]), &b)
	}
	if len(bad) != 1 || b.RequestID != victim.ID || b.Line != 8 || !strings.Contains(b.Reason, "the audit failed on this record: planted") {
		t.Errorf("bad records = %q, want one for request %s at line 8 naming the panic", bad, victim.ID)
	}
	data, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var sum audit.Summary
	json.Unmarshal(data, &sum)
	if sum.Records != 29 || sum.BadRecords != 1 {
		t.Errorf("summary: %d records, %d bad; want 29 and 1", sum.Records, sum.BadRecords)
	}
}
