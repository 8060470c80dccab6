package check

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strings"

	jsonv2 "github.com/go-json-experiment/json"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/internal/ordered"
	"github.com/viewspec/viewspec/reference"
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
// It returns the problems found and the number of cases read; an empty
// corpus is a problem (it proves nothing), and a line longer than
// corpus.MaxLineBytes is one too, and validation goes on after it.
func ValidateCorpus(r io.Reader) (problems []BadLine, n int, err error) {
	strict := Profiles["strict"]
	// Lines are checked on every core and their problems gathered in
	// order; the ids are matched in order too, kept as hashes (see idKey),
	// so that memory stays flat.
	type textLine struct {
		line int
		text []byte // nil for a line too long
	}
	seen := map[idKey]int{}
	err = ordered.Map(streamBatch, func(emit func(textLine) bool) error {
		return corpus.EachLine(r, func(line int, t []byte, tooLong bool) error {
			var text []byte
			if !tooLong {
				text = append([]byte(nil), t...)
			}
			emit(textLine{line, text})
			return nil
		})
	}, func(tl textLine) lineCheck {
		if tl.text == nil {
			return lineCheck{before: []BadLine{{Line: tl.line, Msg: fmt.Sprintf("longer than %d bytes", corpus.MaxLineBytes)}}}
		}
		return checkLine(tl.line, tl.text, &strict)
	}, func(tl textLine, lc lineCheck) error {
		n++
		problems = append(problems, lc.before...)
		if lc.checkDup {
			key := keyOf(lc.id)
			if j, dup := seen[key]; dup {
				problems = append(problems, BadLine{Line: tl.line, ID: lc.id, Msg: fmt.Sprintf("id repeats line %d", j)})
			}
			seen[key] = tl.line
		}
		problems = append(problems, lc.after...)
		return nil
	})
	if err == nil && n == 0 {
		problems = append(problems, BadLine{Msg: "no cases: the corpus is empty"})
	}
	return problems, n, err
}

// lineCheck is what checking one line found: the problems before and
// after the id's uniqueness, which is checked in order, across lines.
type lineCheck struct {
	before, after []BadLine
	id            string
	checkDup      bool
}

// checkLine checks one corpus line (see ValidateCorpus) but for the
// uniqueness of its id.
func checkLine(line int, b []byte, strict *Profile) (lc lineCheck) {
	if err := corpus.ValidateLine("case", b); err != nil {
		lc.before = []BadLine{{Line: line, Msg: "schema: " + err.Error()}}
		return lc
	}
	var c corpus.Case
	if err := jsonv2.Unmarshal(b, &c, jsonOpts); err != nil {
		lc.before = []BadLine{{Line: line, Msg: "case: " + err.Error()}}
		return lc
	}
	// The request is read as eval reads it (keys matched exactly), so that
	// validate refuses what eval refuses.
	var req wire.Request
	if err := wire.DecodeRequest(c.Request, &req); err != nil {
		// A request that breaks the wire's rules (a wire_errors case): its
		// expectation is the reference's error answer.
		ans := reference.AnswerLine(c.Request, 1)
		if st, diffs := Compare(&c, ans, strict); st != Pass {
			lc.before = []BadLine{{Line: line, ID: c.ID, Msg: "expect is not what the reference answers now: " + describeDiffs(diffs)}}
		}
		return lc
	}
	problems := &lc.before
	bad := func(format string, args ...any) {
		*problems = append(*problems, BadLine{Line: line, ID: c.ID, Msg: fmt.Sprintf(format, args...)})
	}
	if req.Op != c.Op && slices.Contains(reference.Ops(), req.Op) {
		// (A wire_errors case may name an unknown op, or none.)
		bad("request.op %q is not the case's op %q", req.Op, c.Op)
	}
	if id, _ := corpus.AnswerID(c.Request); id != c.ID {
		bad("request.id %q is not the case's id", id)
	}
	lc.id, lc.checkDup = c.ID, true
	problems = &lc.after
	if !slices.Contains(reference.Ops(), req.Op) {
		// An unknown or missing op: the reference's error answer.
		if st, diffs := Compare(&c, reference.AnswerLine(c.Request, 1), strict); st != Pass {
			bad("expect is not what the reference answers now: %s", describeDiffs(diffs))
		}
		return lc
	}
	fresh, err := corpus.NewCase(c.ID, c.Family, &req)
	if err != nil {
		bad("the reference cannot answer it: %v", err)
		return lc
	}
	if st, diffs := Compare(&c, fresh.Expect, strict); st != Pass {
		bad("expect is not what the reference answers now: %s", describeDiffs(diffs))
	}
	if !jsonEqual(c.Margins, fresh.Margins) {
		bad("margins are not the reference's")
	}
	return lc
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
