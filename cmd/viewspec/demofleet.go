package main

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/internal/atomicfile"
)

// fleetRecords is how many logged requests the demo's fleet makes.
const fleetRecords = 2000

// plantedFinding names, per fault, the finding kind that must single the
// build out.
var plantedFinding = map[string]string{
	demo.FaultLag:    "lag",
	demo.FaultNoCap:  "cap_ignored",
	demo.FaultInsets: "insets_swapped",
}

// fleet simulates the fleet's drive log, audits it as `viewspec audit`
// does, and checks that the audit singles out each faulty build with its
// planted cause and flags under 0.5% of the clean build's candidates.
func (d *demoRun) fleet(town *demo.Scenario) error {
	d.step("simulating a fleet: %d logged requests from four phone builds (one clean; a 1 s display lag; the cap ignored; left and right insets swapped), then auditing them", fleetRecords)
	dir := filepath.Join(d.dir, "fleet")
	if err := os.MkdirAll(filepath.Join(dir, "rules"), 0o755); err != nil {
		return err
	}
	for _, r := range town.RuleSets {
		p := filepath.Join(dir, "rules", r.File)
		if err := atomicfile.WriteBytes(p, r.YAML); err != nil {
			return err
		}
	}
	logFile := filepath.Join(dir, "drive-log.jsonl.gz")
	if err := atomicfile.Write(logFile, func(w io.Writer) error { return writeFleetLog(w, town) }); err != nil {
		return err
	}
	d.files = append(d.files, logFile)

	var text, errs bytes.Buffer
	a := &auditCmd{rulesDir: filepath.Join(dir, "rules"), out: filepath.Join(d.dir, "audit"), by: []string{"client"},
		worst: 5, streetsFile: filepath.Join(d.dir, "streets.geojson"), namesFile: filepath.Join(d.dir, "businesses.geojson"), maxBad: -1}
	sum, err := a.run(&text, &errs, []string{logFile})
	if err != nil {
		return fmt.Errorf("audit: %v\n%s", err, errs.String())
	}
	if err := atomicfile.WriteBytes(filepath.Join(d.dir, "audit", "summary.txt"), text.Bytes()); err != nil {
		return err
	}
	for _, f := range []string{"report.html", "summary.json", "labels.parquet", "labels.csv"} {
		d.files = append(d.files, filepath.Join(d.dir, "audit", f))
	}
	for _, line := range strings.Split(strings.TrimSpace(text.String()), "\n") {
		fmt.Fprintf(d.w, "    %s\n", line)
	}
	verdicts, ok := fleetVerdicts(sum)
	for _, v := range verdicts {
		fmt.Fprintf(d.w, "    %s\n", v)
	}
	state := "each faulty build singled out with its planted cause; the clean build clean"
	if !ok {
		state = "NOT every planted fault was found (see above)"
	}
	d.summary = append(d.summary, fmt.Sprintf("fleet audit: %d records, %d candidates, %.2f%% disagree; %s (audit/report.html)",
		sum.Records, sum.Candidates, sum.DisagreePct, state))
	return nil
}

// fleetVerdicts says, per build, whether the audit found what was planted,
// and whether all were.
func fleetVerdicts(sum *audit.Summary) ([]string, bool) {
	var out []string
	all := true
	for _, b := range demo.Builds {
		group := "client=" + b.Client
		var g *audit.GroupStats
		for i := range sum.Groups {
			if sum.Groups[i].Tag == "client" && sum.Groups[i].Value == b.Client {
				g = &sum.Groups[i]
			}
		}
		var kinds []string
		for _, f := range sum.Findings {
			if f.Group == group && f.Kind != "rate" {
				kinds = append(kinds, f.Kind)
			}
		}
		if g == nil {
			out, all = append(out, group+": no records"), false
			continue
		}
		if b.Fault == demo.FaultNone {
			good := g.DisagreePct < 0.5 && len(kinds) == 0
			all = all && good
			out = append(out, fmt.Sprintf("%s (clean): %.2f%% of %d candidates flagged (%d borderline, counted apart), findings %v — %s",
				group, g.DisagreePct, g.Candidates, g.Borderline, kinds, okWord(good)))
			continue
		}
		found := len(kinds) > 0 && kinds[0] == plantedFinding[b.Fault]
		all = all && found
		out = append(out, fmt.Sprintf("%s (planted: %s): first finding %v — %s", group, b.Fault, kinds, okWord(found)))
	}
	return out, all
}

func okWord(ok bool) string {
	if ok {
		return "as planted"
	}
	return "NOT as planted"
}

// writeFleetLog writes the demo fleet's records, gzipped, made on every
// core in order.
func writeFleetLog(w io.Writer, town *demo.Scenario) error {
	zw := gzip.NewWriter(w)
	bw := bufio.NewWriterSize(zw, 1<<20)
	const batch = 64
	workers := runtime.GOMAXPROCS(0)
	lines := make([][]byte, batch)
	errs := make([]error, batch)
	for from := 0; from < fleetRecords; from += batch {
		n := min(batch, fleetRecords-from)
		var wg sync.WaitGroup
		for k := range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for i := k; i < n; i += workers {
					lines[i], errs[i] = town.FleetRecord(from + i)
				}
			}()
		}
		wg.Wait()
		for i := range n {
			if errs[i] != nil {
				return errs[i]
			}
			bw.Write(lines[i])
			bw.WriteByte('\n')
		}
	}
	if err := bw.Flush(); err != nil {
		return err
	}
	return zw.Close()
}
