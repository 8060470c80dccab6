package check_test

import (
	"bufio"
	"fmt"
	"os"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/reference"
)

// helperEnv makes the test binary an implementation under test: the
// reference itself ("reference"), or one that answers every request after
// hello with a line that is not JSON ("garbage").
const helperEnv = "VIEWSPEC_CHECK_HELPER"

func TestMain(m *testing.M) {
	switch os.Getenv(helperEnv) {
	case "reference":
		if err := reference.Serve(os.Stdin, os.Stdout); err != nil {
			os.Exit(2)
		}
		os.Exit(0)
	case "exit":
		// Says hello, then exits without answering.
		in := bufio.NewScanner(os.Stdin)
		in.Buffer(nil, 1<<24)
		if in.Scan() {
			fmt.Println(`{"spec":"viewspec/1","ops":["footprint","hello","horizon","metrics","project","timeline","unproject","zoom"]}`)
		}
		os.Exit(0)
	case "garbage":
		in := bufio.NewScanner(os.Stdin)
		in.Buffer(nil, 1<<24)
		for in.Scan() {
			if strings.Contains(in.Text(), `"hello"`) {
				fmt.Println(`{"spec":"viewspec/1","ops":["footprint","hello","horizon","metrics","project","timeline","unproject","zoom"]}`)
				continue
			}
			fmt.Println("not an answer")
		}
		os.Exit(0)
	}
	os.Exit(m.Run())
}

// helperCommand is the shell command that runs this test binary as the
// implementation mode names.
func helperCommand(mode string) string {
	return helperEnv + "=" + mode + " " + os.Args[0]
}

// defaultCases returns the first n cases of the default corpus.
func defaultCases(t *testing.T, n int) []corpus.Case {
	t.Helper()
	f, err := os.Open("../fixtures/corpus/default.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cases, err := corpus.ReadCorpus("default.jsonl", f)
	if err != nil {
		t.Fatal(err)
	}
	return cases[:min(n, len(cases))]
}

// The reference, run as an implementation under test, passes its own
// corpus under the strict profile: every case sent, answered and passed,
// with the ops hello names, and progress told every 2,000 answers.
func TestRunReferencePasses(t *testing.T) {
	cases := defaultCases(t, 1<<30)
	ck := check.NewChecker(check.Profiles["strict"])
	var checked int
	var progress [][2]int
	res, err := check.Run(cases, check.RunOptions{Command: helperCommand("reference"),
		OnChecked: func(*corpus.Case, []byte, check.CaseResult) { checked++ },
		Progress:  func(done, total int) { progress = append(progress, [2]int{done, total}) }}, ck)
	if err != nil {
		t.Fatal(err)
	}
	rep := ck.Report()
	if len(res.Trouble) > 0 || rep.Failed() || rep.Counts.Pass != len(cases) || res.Sent != len(cases) || res.Answered != len(cases) || checked != len(cases) {
		t.Errorf("Run(reference, %d cases) = trouble %v, sent %d, answered %d, checked %d, counts %+v; want all %d passed",
			len(cases), res.Trouble, res.Sent, res.Answered, checked, rep.Counts, len(cases))
	}
	// Progress every 2,000 answers, with the cases sent so far (the corpus
	// is read as it is sent), and at the end.
	if n := len(cases); n < 2000 || len(progress) != 2 || progress[0][0] != 2000 || progress[0][1] < 2000 || progress[0][1] > n || progress[1] != [2]int{n, n} {
		t.Errorf("Progress calls %v, want [[2000 S] [%d %d]] with 2000 ≤ S ≤ %d", progress, n, n, n)
	}
	if !strings.Contains(strings.Join(res.Ops, ","), "timeline") {
		t.Errorf("Run: ops %v, want those hello names", res.Ops)
	}
	// Narrowed to one op, only its cases are sent.
	ck = check.NewChecker(check.Profiles["strict"])
	res, err = check.Run(cases, check.RunOptions{Command: helperCommand("reference"), Ops: map[string]bool{"project": true}}, ck)
	if err != nil {
		t.Fatal(err)
	}
	want := 0
	for _, c := range cases {
		if c.Op == "project" {
			want++
		}
	}
	if want == 0 || res.Sent != want {
		t.Errorf("Run(ops project) sent %d, want the %d project cases", res.Sent, want)
	}
}

// An implementation that prints what is not an answer is trouble, and
// its cases fail the run.
func TestRunGarbageIsTrouble(t *testing.T) {
	cases := defaultCases(t, 20)
	ck := check.NewChecker(check.Profiles["strict"])
	res, err := check.Run(cases, check.RunOptions{Command: helperCommand("garbage")}, ck)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Trouble) == 0 || !ck.Report().Failed() {
		t.Errorf("Run(garbage) = trouble %v, report failed %v; want trouble and a failed report", res.Trouble, ck.Report().Failed())
	}
}

// Every case of the default corpus passes against its own expectation
// under the strict profile (Compare reads each op's answer, footprints and
// horizons included); CheckAnswers says so in its text report, and counts
// a second answer for a case and an answer for no case as stray.
func TestEveryCaseAgainstItself(t *testing.T) {
	cases := defaultCases(t, 1<<30)
	var answers []corpus.Answer
	for i, c := range cases {
		if st, diffs := check.Compare(&cases[i], c.Expect, &check.Profile{}); st != check.Pass {
			t.Fatalf("Compare(%s, its own expectation, zero tolerances) = %v %+v, want pass", c.ID, st, diffs)
		}
		answers = append(answers, corpus.Answer{ID: c.ID, Raw: c.Expect, Line: i + 1})
	}
	answers = append(answers, corpus.Answer{ID: cases[0].ID, Raw: cases[0].Expect, Line: len(cases) + 1},
		corpus.Answer{ID: "no-such-case", Raw: cases[0].Expect, Line: len(cases) + 2})
	rep := check.CheckAnswers(cases, answers, nil, check.Profiles["strict"])
	if rep.Counts.Pass != len(cases) || rep.Counts.Fail != 0 {
		t.Errorf("CheckAnswers(the corpus's own answers) counts %+v, want %d passed", rep.Counts, len(cases))
	}
	var b strings.Builder
	if err := rep.WriteText(&b); err != nil {
		t.Fatal(err)
	}
	if want := fmt.Sprintf("%d cases under the strict profile: %d pass, 0 borderline, 0 fail, 0 missing, 0 skipped", len(cases), len(cases)); !strings.Contains(b.String(), want) {
		t.Errorf("WriteText: %q, want it to say %q", b.String(), want)
	}
	if !strings.Contains(b.String(), `a second answer for "`+cases[0].ID+`"`) || !strings.Contains(b.String(), `answer for "no-such-case", which is no case of the corpus`) {
		t.Errorf("WriteText: %q, want the two stray answers named", b.String())
	}
}

// An implementation that exits after hello leaves every case missing, each
// saying why, and the run in trouble.
func TestRunExitIsMissing(t *testing.T) {
	cases := defaultCases(t, 5)
	ck := check.NewChecker(check.Profiles["strict"])
	res, err := check.Run(cases, check.RunOptions{Command: helperCommand("exit")}, ck)
	if err != nil {
		t.Fatal(err)
	}
	rep := ck.Report()
	if rep.Counts.Missing != len(cases) || len(res.Trouble) == 0 || !strings.Contains(res.Trouble[0], "stopped answering after 0 of 5 cases") {
		t.Errorf("Run(exit after hello) = counts %+v, trouble %v; want 5 missing and the stop named", rep.Counts, res.Trouble)
	}
	for _, cr := range rep.NotPassed {
		if !strings.HasPrefix(cr.Note, "not answered: the implementation exited") {
			t.Errorf("case %s: note %q, want it to say the implementation exited", cr.ID, cr.Note)
		}
	}
}

// An empty corpus is a problem of its own.
func TestValidateEmptyCorpus(t *testing.T) {
	problems, n, err := check.ValidateCorpus(strings.NewReader(""))
	if err != nil || n != 0 || len(problems) != 1 || problems[0].Msg != "no cases: the corpus is empty" {
		t.Errorf("ValidateCorpus(empty) = %+v, %d, %v; want the one problem that it is empty", problems, n, err)
	}
}
