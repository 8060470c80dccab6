package check

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"strings"

	jsonv2 "github.com/go-json-experiment/json"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/wire"
)

// BadLine is one thing wrong with a corpus line.
type BadLine struct {
	Line int    `json:"line"`
	ID   string `json:"id,omitempty"`
	Msg  string `json:"message"`
}

// ValidateCorpus checks every line of a corpus: the case schema, the
// request's op and id agreeing with the case's, unique ids, and the
// expectation and margins being what the reference answers now (strict).
// It returns the problems found and the number of cases read.
func ValidateCorpus(r io.Reader) (problems []BadLine, n int, err error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64<<10), corpus.MaxLineBytes)
	seen := map[string]int{}
	strict := Profiles["strict"]
	for line := 1; sc.Scan(); line++ {
		b := bytes.TrimSpace(sc.Bytes())
		if len(b) == 0 {
			continue
		}
		n++
		if err := corpus.ValidateLine("case", b); err != nil {
			problems = append(problems, BadLine{Line: line, Msg: "schema: " + err.Error()})
			continue
		}
		var c corpus.Case
		if err := jsonv2.Unmarshal(b, &c, jsonOpts); err != nil {
			problems = append(problems, BadLine{Line: line, Msg: "case: " + err.Error()})
			continue
		}
		// The request is read as eval reads it (keys matched exactly), so
		// that validate refuses what eval refuses.
		var req wire.Request
		if err := wire.DecodeRequest(c.Request, &req); err != nil {
			_, msg := wire.DecodeError(err)
			problems = append(problems, BadLine{Line: line, ID: c.ID, Msg: "request: " + msg})
			continue
		}
		if req.Op != c.Op {
			problems = append(problems, BadLine{Line: line, ID: c.ID, Msg: fmt.Sprintf("request.op %q is not the case's op %q", req.Op, c.Op)})
		}
		if id, _ := corpus.AnswerID(c.Request); id != c.ID {
			problems = append(problems, BadLine{Line: line, ID: c.ID, Msg: fmt.Sprintf("request.id %q is not the case's id", id)})
		}
		if j, dup := seen[c.ID]; dup {
			problems = append(problems, BadLine{Line: line, ID: c.ID, Msg: fmt.Sprintf("id repeats line %d", j)})
		}
		seen[c.ID] = line
		fresh, err := corpus.NewCase(c.ID, c.Family, &req)
		if err != nil {
			problems = append(problems, BadLine{Line: line, ID: c.ID, Msg: "the reference cannot answer it: " + err.Error()})
			continue
		}
		if st, diffs := Compare(&c, fresh.Expect, &strict); st != Pass {
			problems = append(problems, BadLine{Line: line, ID: c.ID, Msg: "expect is not what the reference answers now: " + describeDiffs(diffs)})
		}
		if !jsonEqual(c.Margins, fresh.Margins) {
			problems = append(problems, BadLine{Line: line, ID: c.ID, Msg: "margins are not the reference's"})
		}
	}
	if err := sc.Err(); err != nil {
		return problems, n, err
	}
	return problems, n, nil
}

func describeDiffs(ds []Diff) string {
	var parts []string
	for i, d := range ds {
		if i == 3 {
			parts = append(parts, fmt.Sprintf("and %d more", len(ds)-3))
			break
		}
		parts = append(parts, fmt.Sprintf("%s: %s, now %s", d.Path, d.Want, d.Got))
	}
	return strings.Join(parts, "; ")
}

// jsonEqual compares two JSON texts by value; numbers must agree to the
// last digit.
func jsonEqual(a, b json.RawMessage) bool {
	var x, y any
	da, db := json.NewDecoder(bytes.NewReader(a)), json.NewDecoder(bytes.NewReader(b))
	da.UseNumber()
	db.UseNumber()
	if da.Decode(&x) != nil || db.Decode(&y) != nil {
		return false
	}
	xb, _ := json.Marshal(x)
	yb, _ := json.Marshal(y)
	return bytes.Equal(xb, yb)
}
