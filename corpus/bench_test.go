package corpus_test

import (
	"io"
	"testing"

	"github.com/viewspec/viewspec/corpus"
)

// BenchmarkGenerate makes cases of each op group, as `fixtures gen --ops`
// does, and reports cases per second. Targets: ≥ 100,000 cases/s for the
// camera ops, ≥ 20,000 for timeline.
//
//	go test ./corpus -run '^$' -bench Generate -cpu 1
func BenchmarkGenerate(b *testing.B) {
	for _, g := range []struct {
		name  string
		ops   []string
		count int
	}{
		{"camera", []string{"project", "unproject", "footprint", "horizon"}, 20000},
		{"metrics", []string{"metrics"}, 5000},
		{"zoom", []string{"zoom"}, 5000},
		{"timeline", []string{"timeline"}, 2000},
	} {
		ops := map[string]bool{}
		for _, op := range g.ops {
			ops[op] = true
		}
		b.Run(g.name, func(b *testing.B) {
			n := 0
			for b.Loop() {
				k, err := corpus.Generate(io.Discard, 1, g.count, ops)
				if err != nil {
					b.Fatal(err)
				}
				n += k
			}
			b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "cases/s")
		})
	}
}
