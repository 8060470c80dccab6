package check_test

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"
	"testing/iotest"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/wire"
)

// streamCorpus is a small corpus of every op and the reference's answers
// to it, one line each.
func streamCorpus(t testing.TB) (caseLines, answerLines []string) {
	var buf bytes.Buffer
	if _, err := corpus.Generate(&buf, 5, 120, nil); err != nil {
		t.Fatal(err)
	}
	for l := range strings.SplitSeq(strings.TrimSpace(buf.String()), "\n") {
		c, err := corpus.ParseCase([]byte(l))
		if err != nil {
			t.Fatal(err)
		}
		caseLines = append(caseLines, l)
		answerLines = append(answerLines, string(reference.AnswerLine(c.Request, 1)))
	}
	return caseLines, answerLines
}

// summary is what a report says, in an order of its own: the counts, and
// the ids and statuses of the cases not passed and the stray lines, sorted.
func summary(r *check.Report) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%+v\n", r.Counts)
	for _, k := range slices.Sorted(func(yield func(string) bool) {
		for k := range r.ByFamily {
			if !yield(k) {
				return
			}
		}
	}) {
		fmt.Fprintf(&b, "%s %+v\n", k, *r.ByFamily[k])
	}
	var np []string
	for _, c := range r.NotPassed {
		np = append(np, c.ID+" "+c.Status.String())
	}
	slices.Sort(np)
	stray := slices.Clone(r.Stray)
	slices.Sort(stray)
	fmt.Fprintf(&b, "not passed %v\nstray %v\n", np, stray)
	return b.String()
}

// drawAnswers returns an implementation's answer lines to cases whose right
// answers are right: each missing, repeated, with a number changed, or as
// it is.
func drawAnswers(t *rapid.T, right []string) []string {
	var answers []string
	for i, a := range right {
		switch rapid.IntRange(0, 9).Draw(t, fmt.Sprintf("answer %d", i)) {
		case 0: // missing
		case 1: // twice
			answers = append(answers, a, a)
		case 2: // a pixel off, or another number
			answers = append(answers, strings.Replace(a, "1", "2", 1))
		default:
			answers = append(answers, a)
		}
	}
	return answers
}

// TestCheckStreamsMatchesCheckAnswers: reading both files in one pass
// reports what matching them in memory reports, whatever the answers'
// order, gaps, repeats, strays, unreadable lines and wrong values, and
// whatever the number of cores.
func TestCheckStreamsMatchesCheckAnswers(t *testing.T) {
	caseLines, answerLines := streamCorpus(t)
	strict := check.Profiles["strict"]
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(0, len(caseLines)).Draw(t, "cases")
		cases := caseLines[:n]
		answers := drawAnswers(t, answerLines[:n])
		if rapid.Bool().Draw(t, "stray") {
			answers = append(answers, `{"id":"no such case"}`, `not json`, `{"id":7}`)
		}
		if rapid.Bool().Draw(t, "shuffle") {
			answers = rapid.Permutation(answers).Draw(t, "order")
		}
		corpusText := strings.Join(cases, "\n")
		answerText := strings.Join(answers, "\n")

		cs, err := corpus.ReadCorpus("c.jsonl", strings.NewReader(corpusText))
		if err != nil {
			t.Fatal(err)
		}
		as, bad, err := corpus.ReadAnswers("a.jsonl", strings.NewReader(answerText))
		if err != nil {
			t.Fatal(err)
		}
		want := summary(check.CheckAnswers(cs, as, bad, strict))

		procs := rapid.IntRange(1, 4).Draw(t, "GOMAXPROCS")
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		ck := check.NewChecker(strict)
		if err := check.CheckStreams("c.jsonl", strings.NewReader(corpusText), "a.jsonl", strings.NewReader(answerText), ck); err != nil {
			t.Fatalf("CheckStreams: %v", err)
		}
		if got := summary(ck.Report()); got != want {
			t.Fatalf("CheckStreams reports\n%s\nCheckAnswers reports\n%s", got, want)
		}
	})
}

// TestCheckStreamsUnusableCorpus: a repeated id or a line that is no case
// ends the check with the file and the line, as reading the corpus whole
// does.
func TestCheckStreamsUnusableCorpus(t *testing.T) {
	caseLines, answerLines := streamCorpus(t)
	for _, tc := range []struct {
		name, corpus string
		line         int
	}{
		{"repeated id", strings.Join([]string{caseLines[0], caseLines[1], caseLines[0]}, "\n"), 3},
		{"not a case", strings.Join([]string{caseLines[0], `{"id":"x"}`}, "\n"), 2},
	} {
		ck := check.NewChecker(check.Profiles["strict"])
		err := check.CheckStreams("c.jsonl", strings.NewReader(tc.corpus), "a.jsonl", strings.NewReader(strings.Join(answerLines, "\n")), ck)
		var re *corpus.ReadError
		if !errors.As(err, &re) || re.File != "c.jsonl" || re.Line != tc.line {
			t.Errorf("%s: CheckStreams = %v, want a read error at c.jsonl:%d", tc.name, err, tc.line)
		}
		_, werr := corpus.ReadCorpus("c.jsonl", strings.NewReader(tc.corpus))
		if werr == nil || err == nil || werr.Error() != err.Error() {
			t.Errorf("%s: CheckStreams = %v, ReadCorpus = %v; want the same error", tc.name, err, werr)
		}
	}
}

// TestRunStreamMatchesCheckAnswers: running a live implementation over a
// corpus read as it is sent reports the counts and the cases not passed
// that checking the same answers in memory reports, with gaps, repeats,
// wrong values and strays in the implementation's output. The
// implementation is a shell script that answers hello, reads all its
// input, then prints its canned answers (it withholds every answer to the
// end, which the run must wait for).
func TestRunStreamMatchesCheckAnswers(t *testing.T) {
	caseLines, answerLines := streamCorpus(t)
	dir := t.TempDir()
	strict := check.Profiles["strict"]
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, len(caseLines)).Draw(t, "cases")
		cases := caseLines[:n]
		answers := drawAnswers(t, answerLines[:n])
		if rapid.Bool().Draw(t, "stray") {
			answers = append(answers, `{"id":"no such case"}`)
		}
		ansFile := filepath.Join(dir, "answers.jsonl")
		if err := os.WriteFile(ansFile, []byte(strings.Join(answers, "\n")+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		script := filepath.Join(dir, "impl.sh")
		hello := `{"id":"viewspec-hello","spec":"` + wire.SpecVersion + `","ops":["hello","project","unproject","footprint","horizon","metrics","zoom","timeline"]}`
		if err := os.WriteFile(script, []byte("read l\necho '"+hello+"'\ncat >/dev/null\ncat "+ansFile+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		corpusText := strings.Join(cases, "\n")
		cs, err := corpus.ReadCorpus("c.jsonl", strings.NewReader(corpusText))
		if err != nil {
			t.Fatal(err)
		}
		as, bad, err := corpus.ReadAnswers("a.jsonl", strings.NewReader(strings.Join(answers, "\n")))
		if err != nil {
			t.Fatal(err)
		}
		want := check.CheckAnswers(cs, as, bad, strict)

		ck := check.NewChecker(strict)
		res, err := check.RunStream("c.jsonl", strings.NewReader(corpusText), check.RunOptions{Command: "sh " + script}, ck)
		if err != nil {
			t.Fatalf("RunStream: %v", err)
		}
		got := ck.Report()
		if res.Sent != n || got.Counts != want.Counts || notPassed(got) != notPassed(want) {
			t.Fatalf("RunStream sent %d, reports %+v, not passed %s;\nCheckAnswers reports %+v, not passed %s",
				res.Sent, got.Counts, notPassed(got), want.Counts, notPassed(want))
		}
	})
}

// notPassed lists the ids and statuses of the cases not passed, sorted.
func notPassed(r *check.Report) string {
	var np []string
	for _, c := range r.NotPassed {
		np = append(np, c.ID+" "+c.Status.String())
	}
	slices.Sort(np)
	return strings.Join(np, ", ")
}

// TestCheckStreamsMissingInCorpusOrder: cases left without an answer are
// reported in the corpus's order once both streams end.
func TestCheckStreamsMissingInCorpusOrder(t *testing.T) {
	caseLines, answerLines := streamCorpus(t)
	ck := check.NewChecker(check.Profiles["strict"])
	err := check.CheckStreams("c.jsonl", strings.NewReader(strings.Join(caseLines[:5], "\n")), "a.jsonl", strings.NewReader(answerLines[2]), ck)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, c := range ck.Report().NotPassed {
		got = append(got, c.ID+" "+c.Status.String())
	}
	var want []string
	for i, l := range caseLines[:5] {
		if i != 2 {
			c, _ := corpus.ParseCase([]byte(l))
			want = append(want, c.ID+" missing")
		}
	}
	if !slices.Equal(got, want) {
		t.Errorf("CheckStreams, one answer of five: not passed %v, want %v in corpus order", got, want)
	}
}

// TestCheckStreamsReadFailures: a corpus that cannot be read to its end
// ends the check with an error naming the file; an answer file that
// cannot be read to its end leaves a stray line saying so, and the cases
// after it missing.
func TestCheckStreamsReadFailures(t *testing.T) {
	caseLines, answerLines := streamCorpus(t)
	broken := errors.New("disk on fire")
	cases := strings.Join(caseLines[:3], "\n") + "\n"
	answers := strings.Join(answerLines[:3], "\n") + "\n"

	ck := check.NewChecker(check.Profiles["strict"])
	err := check.CheckStreams("c.jsonl", io.MultiReader(strings.NewReader(cases), iotest.ErrReader(broken)), "a.jsonl", strings.NewReader(answers), ck)
	var re *corpus.ReadError
	if !errors.As(err, &re) || re.File != "c.jsonl" || !strings.Contains(re.Msg, "disk on fire") {
		t.Errorf("CheckStreams(unreadable corpus) = %v, want a read error of c.jsonl saying why", err)
	}

	ck = check.NewChecker(check.Profiles["strict"])
	half := strings.Join(answerLines[:1], "\n") + "\n"
	if err := check.CheckStreams("c.jsonl", strings.NewReader(cases), "a.jsonl", io.MultiReader(strings.NewReader(half), iotest.ErrReader(broken)), ck); err != nil {
		t.Fatal(err)
	}
	r := ck.Report()
	if r.Counts.Pass != 1 || r.Counts.Missing != 2 || len(r.Stray) != 1 || !strings.Contains(r.Stray[0], "a.jsonl: reading stopped: disk on fire") {
		t.Errorf("CheckStreams(unreadable answers) = counts %+v, stray %q; want 1 pass, 2 missing, a stray saying reading stopped", r.Counts, r.Stray)
	}
}
