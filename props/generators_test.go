package props_test

import (
	"testing"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/props"
)

// Every family of every op is drawn by the prober's generator, and every
// drawn request is one the reference answers (an answer or a named error,
// never a failure to encode).
func TestGeneratorsCoverFamilies(t *testing.T) {
	for _, plan := range props.Plans() {
		seen := map[string]int{}
		gen := props.ProbeRequest(plan.Op)
		for i := range 400 {
			lr := gen.Example(i)
			seen[lr.Family]++
			if lr.Raw != nil {
				if _, err := corpus.NewRawCase("g", lr.Family, plan.Op, lr.Raw); err != nil {
					t.Fatalf("%s example %d (%s): %v", plan.Op, i, lr.Raw, err)
				}
				continue
			}
			if lr.Request.Op != plan.Op {
				t.Fatalf("%s example %d has op %q", plan.Op, i, lr.Request.Op)
			}
			if _, err := corpus.NewCase("g", lr.Family, lr.Request); err != nil {
				t.Fatalf("%s example %d: %v", plan.Op, i, err)
			}
		}
		for _, f := range plan.Families {
			if seen[f.Name] == 0 {
				t.Errorf("%s: family %s never drawn in 400 examples (%v)", plan.Op, f.Name, seen)
			}
		}
	}
}
