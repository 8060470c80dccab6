package audit_test

import (
	"encoding/json"
	"fmt"
	"syscall"
	"testing"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
)

// benchRecord returns fleet record i grown to 200 candidates (copies of
// its own shifted by 3 m), with its 121-point trace, and the display log of
// a phone that shows what the reference shows, lagOnS seconds late: the
// record size SPEC §9's throughput target names.
func benchRecord(b *testing.B, i int, lagS float64) []byte {
	s := demo.Default()
	sets := demoSets(s)
	line, err := s.FleetRecord(i)
	if err != nil {
		b.Fatal(err)
	}
	var m map[string]any
	json.Unmarshal(line, &m)
	cands := m["candidates"].([]any)
	preds := m["predicted"].([]any)
	for k := 0; len(cands) < 200; k++ {
		c := cands[k%len(cands)].(map[string]any)
		id := fmt.Sprintf("copy-%d", k)
		cands = append(cands, map[string]any{"id": id, "lat": c["lat"].(float64) + 3e-5, "lon": c["lon"], "priority": c["priority"]})
		preds = append(preds, map[string]any{"id": id, "p": []float64{0.1, 0.2, 0.3, 0.4}})
	}
	m["candidates"], m["predicted"], m["shown"] = cands, preds, []any{}
	grown, _ := json.Marshal(m)
	rec, err := audit.DecodeRecord(grown, sets)
	if err != nil {
		b.Fatal(err)
	}
	ownLog(b, rec)
	var shown []any
	for k, d := range rec.Displayed {
		if d == nil || d.FirstShownS+lagS > rec.Drive.HorizonS {
			continue
		}
		var ivs [][2]float64
		for _, iv := range d.Intervals {
			ivs = append(ivs, [2]float64{iv[0] + lagS, min(iv[1]+lagS, rec.Drive.HorizonS+rec.Drive.TickS)})
		}
		shown = append(shown, map[string]any{"id": rec.Candidates[k].ID, "first_shown_s": d.FirstShownS + lagS, "shown_s": d.ShownS, "intervals_s": ivs})
	}
	m["shown"] = shown
	out, _ := json.Marshal(m)
	return out
}

// BenchmarkAuditRecord: decode and audit one record of 200 candidates
// and 121 fixes; "clean" agrees everywhere, "lag" (every display a second
// late) disagrees and pays for the explanations and the hypotheses. SPEC §9's target: ≥ 1,000 records
// per second per core.
func BenchmarkAuditRecord(b *testing.B) {
	sets := demoSets(demo.Default())
	for _, c := range []struct {
		name string
		lagS float64
	}{{"clean", 0}, {"lag", 1}} {
		line := benchRecord(b, 0, c.lagS)
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			cpu0 := cpuTimeNs()
			for b.Loop() {
				rec, err := audit.DecodeRecord(line, sets)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := audit.Audit(rec); err != nil {
					b.Fatal(err)
				}
			}
			// CPU time, not wall time: this machine is shared, and the
			// target is per core.
			b.ReportMetric(float64(cpuTimeNs()-cpu0)/float64(b.N), "cpu-ns/op")
		})
	}
}

// cpuTimeNs returns the process's user and system CPU time, nanoseconds.
func cpuTimeNs() int64 {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return ru.Utime.Nano() + ru.Stime.Nano()
}
