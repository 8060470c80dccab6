package check_test

import (
	"bufio"
	"bytes"
	"os"
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
