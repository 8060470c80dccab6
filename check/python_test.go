package check_test

import (
	"os"
	"testing"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/fixtures"
	"github.com/viewspec/viewspec/internal/testtool"
)

// The second implementation, written in Python from SPEC.md alone
// (fixtures/examples/python), passes the strict profile on the default
// corpus with every op it speaks, and each of its planted mistakes fails it
// on the cases of the ops it touches: the checker's mutation score on these
// mistakes is 100 %.
func TestPythonImplementationAndMutants(t *testing.T) {
	if testing.Short() {
		t.Skip("the Python implementation over the whole corpus, with each of its mistakes; skipped with -short")
	}
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
	run := func(mistake string, ops []string) *check.Report {
		cmd := python + " ../fixtures/examples/python/viewspec_py.py"
		if mistake != "" {
			cmd += " --mistake " + mistake
		}
		var only map[string]bool
		for _, op := range ops {
			if only == nil {
				only = map[string]bool{}
			}
			only[op] = true
		}
		ck := check.NewChecker(check.Profiles["strict"])
		res, err := check.Run(cases, check.RunOptions{Command: cmd, Ops: only}, ck)
		if err != nil {
			t.Fatalf("%s: %v", cmd, err)
		}
		if len(res.Trouble) > 0 {
			t.Fatalf("%s: trouble %v", cmd, res.Trouble)
		}
		return ck.Report()
	}
	clean := run("", nil)
	if clean.Failed() || clean.Counts.Pass < 2500 {
		t.Fatalf("clean implementation: %+v", clean.Counts)
	}
	for _, op := range []string{"project", "unproject", "footprint", "metrics", "zoom", "timeline"} {
		if c := clean.ByOp[op]; c == nil || c.Skipped > 0 || c.Fail > 0 || c.Pass == 0 {
			t.Errorf("clean implementation on %s: %+v, want every case checked and none failed", op, c)
		}
	}
	t.Logf("clean: %+v", clean.Counts)
	for _, m := range fixtures.PythonMistakes {
		r := run(m.Name, m.Ops)
		if !r.Failed() || r.Counts.Fail == 0 {
			t.Errorf("mistake %s passed the corpus's %v cases: %+v", m.Name, m.Ops, r.Counts)
			continue
		}
		t.Logf("%s: %d cases fail", m.Name, r.Counts.Fail)
	}
}
