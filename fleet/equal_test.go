package fleet

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/demo"
)

// The demo fleet (its 2,000 records, demo.FleetRecord, split into four
// logs, plain and gzip, with one bad line) audited by the pipeline on
// Prism and by `viewspec audit` (built from the main module, run as a
// command): summary.json is the same bytes, the printed --json summary the
// same object, the Parquet rows the same set, the bad record the same; and
// there is one verdict line per audited record.
func TestSameAsViewspecAudit(t *testing.T) {
	if testing.Short() {
		t.Skip("audits the 2,000 demo records twice")
	}
	s := demo.Default()
	rulesDir := writeRules(t, s)
	logs := t.TempDir()
	lines := fleetLines(t, s, 0, 2000)
	bad := []byte(`{"request_id": "broken", "trace": 5}`)
	parts := [][][]byte{lines[:700], append(slices.Clone(lines[700:1000]), bad), lines[1000:1600], lines[1600:]}
	var files []string
	for i, p := range parts {
		name := filepath.Join(logs, fmt.Sprintf("day-%d.jsonl", i))
		if i%2 == 1 {
			name += ".gz"
		}
		writeLog(t, name, p)
		files = append(files, name)
	}

	viewspec := buildTool(t, mainModule(t), "./cmd/viewspec", "viewspec")
	cliOut := t.TempDir()
	args := append([]string{"audit"}, files...)
	args = append(args, "--rules", rulesDir, "--by", "client", "--by", "device", "--json", "--out", cliOut)
	cmd := exec.Command(viewspec, args...)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("viewspec audit: %v\n%s", err, stderr.String())
	}

	out := t.TempDir()
	sets, err := ReadRules(rulesDir)
	if err != nil {
		t.Fatal(err)
	}
	runPipeline(t, Config{Input: filepath.Join(logs, "day-*"), Rules: sets, By: []string{"client", "device"}, Output: out, Job: "test"})

	got, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	want, _ := os.ReadFile(filepath.Join(cliOut, "summary.json"))
	if !bytes.Equal(got, want) {
		t.Errorf("summary.json of the pipeline differs from viewspec audit's:\n got %s\nwant %s", got, want)
	}
	var compact bytes.Buffer
	json.Compact(&compact, got)
	if w := bytes.TrimSpace(stdout.Bytes()); !bytes.Equal(compact.Bytes(), w) {
		t.Errorf("summary.json of the pipeline, compacted = %s, want viewspec audit --json %s", compact.Bytes(), w)
	}
	var sum struct {
		Records    int64 `json:"records"`
		BadRecords int64 `json:"bad_records"`
	}
	json.Unmarshal(got, &sum)
	if sum.Records != 2000 || sum.BadRecords != 1 {
		t.Errorf("summary: %d records, %d bad, want 2000 and 1", sum.Records, sum.BadRecords)
	}

	shards := glob(t, filepath.Join(out, "labels-*-of-*.parquet"))
	if len(shards) < 2 {
		t.Errorf("%d Parquet shards, want one per bundle, at least 2: the partials' merge went untried", len(shards))
	}
	gotRows := readRows(t, shards)
	wantRows := readRows(t, []string{filepath.Join(cliOut, "labels.parquet")})
	if len(gotRows) != len(wantRows) || len(wantRows) < 2000 {
		t.Fatalf("pipeline's Parquet rows: %d, want viewspec audit's %d", len(gotRows), len(wantRows))
	}
	for i := range wantRows {
		if gotRows[i] != wantRows[i] {
			t.Fatalf("Parquet rows differ (sorted, row %d):\n got %s\nwant %s", i, gotRows[i], wantRows[i])
		}
	}

	gotBad := readLines(t, glob(t, filepath.Join(out, "bad-records-*-of-*.jsonl")))
	wantBad := readLines(t, []string{filepath.Join(cliOut, "bad-records.jsonl")})
	if !slices.Equal(gotBad, wantBad) || len(wantBad) != 1 || !strings.Contains(wantBad[0], `"line":301`) {
		t.Errorf("bad records = %q, want viewspec audit's %q (one, at line 301 of day-1.jsonl.gz)", gotBad, wantBad)
	}

	verdicts := readLines(t, glob(t, filepath.Join(out, "verdicts-*-of-*.jsonl")))
	ids := map[string]bool{}
	for _, l := range verdicts {
		var v Verdict
		if err := json.Unmarshal([]byte(l), &v); err != nil {
			t.Fatal(err)
		}
		ids[v.RequestID] = true
	}
	if len(verdicts) != 2000 || len(ids) != 2000 {
		t.Errorf("verdict lines: %d for %d request ids, want 2000 for 2000", len(verdicts), len(ids))
	}
	if left := glob(t, filepath.Join(out, ".tmp-*")); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
}
