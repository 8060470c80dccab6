package check_test

import (
	"bytes"
	"os/exec"
	"path/filepath"
	"testing"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/reference"
)

// cameraCorpus makes a corpus of project and footprint cases and the
// reference's answers to them.
func cameraCorpus(b *testing.B, count int) ([]corpus.Case, []corpus.Answer) {
	var buf bytes.Buffer
	if _, err := corpus.Generate(&buf, 1, count, map[string]bool{"project": true, "footprint": true}); err != nil {
		b.Fatal(err)
	}
	cases, err := corpus.ReadCorpus("bench", &buf)
	if err != nil {
		b.Fatal(err)
	}
	var answers bytes.Buffer
	for _, c := range cases {
		answers.Write(reference.AnswerLine(c.Request, 1))
		answers.WriteByte('\n')
	}
	as, _, err := corpus.ReadAnswers("answers", &answers)
	if err != nil {
		b.Fatal(err)
	}
	return cases, as
}

// BenchmarkCheck compares project and footprint answers with their cases
// (strict profile), on one core.
func BenchmarkCheck(b *testing.B) {
	cases, answers := cameraCorpus(b, 5000)
	b.ReportAllocs()
	b.ResetTimer()
	n := 0
	for b.Loop() {
		r := check.CheckAnswers(cases, answers, nil, check.Profiles["strict"])
		if r.Failed() {
			b.Fatal("the reference fails its own corpus")
		}
		n += len(cases)
	}
	b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "cases/s")
}

// BenchmarkGenerate makes project and footprint cases.
func BenchmarkGenerate(b *testing.B) {
	var buf bytes.Buffer
	n := 0
	for b.Loop() {
		buf.Reset()
		k, err := corpus.Generate(&buf, 1, 5000, map[string]bool{"project": true, "footprint": true})
		if err != nil {
			b.Fatal(err)
		}
		n += k
	}
	b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "cases/s")
}

// BenchmarkRunEval runs project and footprint cases through `viewspec
// eval` in a child process, end to end (write, answer, read, check).
func BenchmarkRunEval(b *testing.B) {
	exe := filepath.Join(b.TempDir(), "viewspec")
	if out, err := exec.Command("go", "build", "-o", exe, "github.com/viewspec/viewspec/cmd/viewspec").CombinedOutput(); err != nil {
		b.Fatalf("go build: %v\n%s", err, out)
	}
	cases, _ := cameraCorpus(b, 20000)
	b.ResetTimer()
	n := 0
	for b.Loop() {
		ck := check.NewChecker(check.Profiles["strict"])
		if _, err := check.Run(cases, check.RunOptions{Command: exe + " eval"}, ck); err != nil {
			b.Fatal(err)
		}
		if ck.Report().Failed() {
			b.Fatal("failed")
		}
		n += len(cases)
	}
	b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "cases/s")
}
