package fleet

import (
	"encoding/json"

	"github.com/viewspec/viewspec/audit"
)

// Verdict is one line of the verdicts output: an audited record, where it
// is in the logs, and each candidate's verdict in candidate order.
type Verdict struct {
	File       string             `json:"file"`
	Line       int                `json:"line"`
	RequestID  string             `json:"request_id"`
	Tags       map[string]string  `json:"tags"`
	Candidates []CandidateVerdict `json:"candidates"`
}

// CandidateVerdict is one candidate's verdict: agree, disagree or
// borderline, with the cause and the deciding edge of a disagreement
// (SPEC §9).
type CandidateVerdict struct {
	ID      string `json:"id"`
	Verdict string `json:"verdict"`
	Cause   string `json:"cause,omitempty"`
	Edge    string `json:"edge,omitempty"`
}

// VerdictOf returns the verdict line (JSON, no newline) of res, found at
// line of file.
func VerdictOf(file string, line int, res *audit.Result) []byte {
	v := Verdict{File: file, Line: line, RequestID: res.Record.RequestID, Tags: map[string]string{},
		Candidates: make([]CandidateVerdict, len(res.Outcomes))}
	for _, t := range res.Record.Tags {
		v.Tags[t.Key] = t.Value
	}
	for i := range res.Outcomes {
		o := &res.Outcomes[i]
		v.Candidates[i] = CandidateVerdict{ID: o.ID, Verdict: o.Verdict.String(), Cause: o.Cause, Edge: o.Edge}
	}
	b, _ := json.Marshal(v) // strings and ints: cannot fail
	return b
}
