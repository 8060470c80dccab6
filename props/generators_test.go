package props_test

import (
	"slices"
	"testing"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/props"
)

// Every edge family of every request generator actually appears, and every
// drawn request is one the reference answers (an answer or a named error,
// never a failure to encode).
func TestGeneratorsCoverFamilies(t *testing.T) {
	want := map[string][]string{
		"project": props.CameraFamilies, "unproject": props.CameraFamilies, "footprint": props.CameraFamilies,
		"metrics": props.RouteFamilies, "timeline": props.RouteFamilies, "zoom": props.ZoomFamilies,
	}
	for op, fams := range want {
		seen := map[string]int{}
		gen := props.ProbeRequest(op)
		for i := range 600 {
			lr := gen.Example(i)
			seen[lr.Family]++
			if _, err := corpus.NewCase("g", lr.Family, lr.Request); err != nil {
				t.Fatalf("%s example %d: %v", op, i, err)
			}
		}
		for _, f := range fams {
			if seen[f] == 0 {
				t.Errorf("%s: family %s never drawn in 600 examples (%v)", op, f, seen)
			}
		}
		for f := range seen {
			if !slices.Contains(fams, f) {
				t.Errorf("%s: unlisted family %s", op, f)
			}
		}
	}
}
