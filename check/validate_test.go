package check_test

import (
	"bufio"
	"bytes"
	"fmt"
	"os"
	"runtime"
	"strings"
	"testing"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/reference"
)

// firstLine returns the first line of the default corpus whose op is op.
func firstLine(t *testing.T, op string) string {
	t.Helper()
	f, err := os.Open("../fixtures/corpus/default.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Buffer(nil, 1<<20)
	for sc.Scan() {
		if strings.Contains(sc.Text(), `"op":"`+op+`"`) && !strings.Contains(sc.Text(), `"error"`) {
			return sc.Text()
		}
	}
	t.Fatalf("no %s case in the default corpus", op)
	return ""
}

// validate refuses what eval refuses: a case whose request says "Camera"
// has no camera for eval (keys are matched exactly, SPEC §6), so its
// expectation is not what the reference answers (the breach: validate read
// requests case-insensitively and passed it, then run failed it).
func TestValidateRefusesWhatEvalRefuses(t *testing.T) {
	good := firstLine(t, "project")
	problems, n, err := check.ValidateCorpus(strings.NewReader(good + "\n"))
	if err != nil || n != 1 || len(problems) != 0 {
		t.Fatalf("the default corpus's line: %d cases, problems %v, error %v", n, problems, err)
	}
	bad := strings.Replace(good, `"camera":`, `"Camera":`, 1)
	problems, _, err = check.ValidateCorpus(strings.NewReader(bad + "\n"))
	if err != nil || len(problems) == 0 || !strings.Contains(problems[0].Msg, "now error missing_field: camera: missing") {
		t.Fatalf("a request saying Camera: problems %v, error %v; want one naming the expectation", problems, err)
	}
	// And eval answers that request with a missing camera.
	i := strings.Index(bad, `"request":`) + len(`"request":`)
	j := strings.Index(bad, `,"expect":`)
	ans := reference.AnswerLine([]byte(bad[i:j]), 1)
	if !bytes.Contains(ans, []byte(`"code":"missing_field","message":"line 1: camera: missing (required)"`)) {
		t.Fatalf("eval answers %s", ans)
	}
}

// TestValidateInOrderOnEveryCore: problems come in line order, a repeated
// id is named against its first line, and the result is the same on one
// core and on four, in batches larger than one (600 lines).
func TestValidateInOrderOnEveryCore(t *testing.T) {
	caseLines, _ := streamCorpus(t)
	var lines []string
	for len(lines) < 600 {
		lines = append(lines, caseLines...)
	}
	lines = lines[:600]
	// Ids repeat from line len(caseLines)+1 on; line 300 is no JSON.
	lines[299] = "not json"
	text := strings.Join(lines, "\n")
	var results []string
	for _, procs := range []int{1, 4} {
		prev := runtime.GOMAXPROCS(procs)
		problems, n, err := check.ValidateCorpus(strings.NewReader(text))
		runtime.GOMAXPROCS(prev)
		if err != nil || n != 600 {
			t.Fatalf("ValidateCorpus = %d cases, %v; want 600, nil", n, err)
		}
		last := 0
		for _, p := range problems {
			if p.Line < last {
				t.Fatalf("ValidateCorpus: problem at line %d after one at line %d", p.Line, last)
			}
			last = p.Line
		}
		first := problems[0]
		if wantLine := len(caseLines) + 1; first.Line != wantLine || first.Msg != "id repeats line 1" {
			t.Errorf("ValidateCorpus: first problem %+v, want line %d: id repeats line 1", first, wantLine)
		}
		results = append(results, fmt.Sprint(problems))
	}
	if results[0] != results[1] {
		t.Errorf("ValidateCorpus on 1 core and on 4 differ:\n%s\n%s", results[0], results[1])
	}
}
