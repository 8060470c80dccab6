package check_test

import (
	"os"
	"testing"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/internal/testtool"
)

// The second implementation, written in Python from SPEC.md alone
// (fixtures/examples/python), passes the strict profile on the default
// corpus, and each of its planted classic mistakes fails it: the checker's
// mutation score on these eight mistakes is 100 %.
func TestPythonImplementationAndMutants(t *testing.T) {
	python := testtool.Need(t, "python3", "python3")
	f, err := os.Open("../fixtures/corpus/default.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	cases, err := corpus.ReadCorpus("default.jsonl", f)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	run := func(mistake string) *check.Report {
		cmd := python + " ../fixtures/examples/python/viewspec_py.py"
		if mistake != "" {
			cmd += " --mistake " + mistake
		}
		ck := check.NewChecker(check.Profiles["strict"])
		res, err := check.Run(cases, check.RunOptions{Command: cmd}, ck)
		if err != nil {
			t.Fatalf("%s: %v", cmd, err)
		}
		if len(res.Trouble) > 0 {
			t.Fatalf("%s: trouble %v", cmd, res.Trouble)
		}
		return ck.Report()
	}
	clean := run("")
	if clean.Failed() || clean.Counts.Pass < 1000 {
		t.Fatalf("clean implementation: %+v", clean.Counts)
	}
	t.Logf("clean: %+v", clean.Counts)
	for _, m := range []string{"degrees-as-metres", "tiles-512", "heading-ccw", "pitch-from-horizon",
		"anchor-ignored", "insets-ignored", "y-up", "fov-horizontal"} {
		r := run(m)
		if !r.Failed() {
			t.Errorf("mistake %s passed the corpus: %+v", m, r.Counts)
			continue
		}
		t.Logf("%s: %d cases fail", m, r.Counts.Fail)
	}
}
