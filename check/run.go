package check

import (
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"time"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/live"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// RunOptions says how to drive an implementation under test.
type RunOptions struct {
	// Command is run with sh -c; it must speak the wire on stdin/stdout.
	Command string
	// Timeout bounds the wait for each answer (and for hello), counted
	// from the previous answer; 0 means 5 s.
	Timeout time.Duration
	// Ops, when not nil, narrows the cases to these ops.
	Ops map[string]bool
	// Progress, when set, is called now and then with the cases answered
	// and the cases sent.
	Progress func(done, total int)
}

// RunResult says how the run went, beside the report.
type RunResult struct {
	// Ops are the ops the implementation said (in hello) that it speaks.
	Ops []string
	// Trouble is what went wrong with the process, if anything: it hung,
	// crashed, exited early or printed what is not an answer.
	Trouble []string
	// Sent and Answered count the requests.
	Sent, Answered int
}

// Run starts the implementation, asks hello which ops it speaks, feeds it
// the corpus's cases of those ops (the rest are skipped, not failed), and
// checks each answer as it comes, in order. A hang (no answer within the
// timeout), a crash or early exit, garbage on stdout, a missing or
// out-of-order answer each end in a clear note against the case, never a
// hang or a deadlock: requests are written and answers read concurrently.
func Run(cases []corpus.Case, opt RunOptions, ck *Checker) (*RunResult, error) {
	p, err := live.Start(opt.Command, opt.Timeout)
	if err != nil {
		return nil, err
	}
	defer p.Close()
	h, err := p.Hello()
	if err != nil {
		return nil, fmt.Errorf("%v; stderr: %s", err, p.Stderr(5))
	}
	res := &RunResult{Ops: h.Ops}
	if h.Spec != wire.SpecVersion {
		res.Trouble = append(res.Trouble, fmt.Sprintf("hello names spec %q, this corpus is %s", h.Spec, wire.SpecVersion))
	}
	send := selectCases(cases, &opt, h.Ops, ck)
	res.Sent = len(send)
	writeErr := make(chan error, 1)
	go func() {
		writeErr <- p.Send(func(yield func([]byte) bool) {
			for _, c := range send {
				if !yield(c.Request) {
					return
				}
			}
		})
	}()
	r := runner{p: p, ck: ck, res: res, opt: &opt}
	r.collect(send)
	select {
	case err := <-writeErr:
		if err != nil && r.dead == "" {
			res.Trouble = append(res.Trouble, "writing requests: "+err.Error())
		}
	case <-time.After(p.Timeout):
	}
	return res, nil
}

// selectCases returns the cases to send: those of the ops selected that
// the implementation speaks; the rest are recorded as skipped.
func selectCases(cases []corpus.Case, opt *RunOptions, spoken []string, ck *Checker) []*corpus.Case {
	var send []*corpus.Case
	for i := range cases {
		c := &cases[i]
		switch {
		case opt.Ops != nil && !opt.Ops[c.Op]:
			ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Skipped, Note: "op not selected"})
		case !slices.Contains(spoken, c.Op):
			ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Skipped, Note: "op not spoken by the implementation (hello)"})
		default:
			send = append(send, c)
		}
	}
	return send
}

// runner collects a run's answers.
type runner struct {
	p    *live.Process
	ck   *Checker
	res  *RunResult
	opt  *RunOptions
	dead string // why the cases left are not answered, once the process is gone
}

// collect reads the answers in order and checks each; then anything more
// on stdout is stray, and the process should exit.
func (r *runner) collect(send []*corpus.Case) {
	for i, c := range send {
		if r.dead != "" {
			r.ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Missing, Note: r.dead})
			continue
		}
		l, err := r.p.Next()
		if err != nil && !errors.Is(err, live.ErrLineTooLong) {
			r.lost(c, i, len(send), err)
			continue
		}
		r.res.Answered++
		r.check(c, l, err)
		if r.opt.Progress != nil && (i+1)%2000 == 0 {
			r.opt.Progress(i+1, len(send))
		}
	}
	if r.opt.Progress != nil {
		r.opt.Progress(len(send), len(send))
	}
	if r.dead != "" {
		return
	}
	for {
		l, err := r.p.Next()
		switch {
		case errors.Is(err, live.ErrHung):
			r.p.Kill()
			r.res.Trouble = append(r.res.Trouble, "the implementation did not exit at the end of its input; killed")
			return
		case errors.Is(err, live.ErrLineTooLong):
			r.ck.Stray("after the last answer: a line longer than " + strconv.Itoa(live.MaxLineBytes) + " bytes")
			continue
		case err != nil:
			if st := r.p.Wait(); st != "exit status 0" {
				r.res.Trouble = append(r.res.Trouble, "the implementation ended with "+st+"; stderr: "+r.p.Stderr(5))
			}
			return
		}
		r.ck.Stray("after the last answer: " + spec.Excerpt(l, 80))
	}
}

// lost records case c (the i-th of n sent) as unanswered: the process hung
// on it or had exited.
func (r *runner) lost(c *corpus.Case, i, n int, err error) {
	if errors.Is(err, live.ErrHung) {
		r.p.Kill()
		r.res.Trouble = append(r.res.Trouble, fmt.Sprintf("hung on case %s (no answer within %v); killed", c.ID, r.p.Timeout))
		r.ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Fail,
			Note: fmt.Sprintf("no answer within %v: the implementation hung on this request", r.p.Timeout)})
		r.dead = "not answered: the implementation hung on case " + c.ID
		return
	}
	status := r.p.Wait()
	if !errors.Is(err, io.EOF) {
		status = err.Error() + "; " + status
	}
	r.res.Trouble = append(r.res.Trouble, fmt.Sprintf("the implementation stopped answering after %d of %d cases (%s); stderr: %s", i, n, status, r.p.Stderr(5)))
	r.dead = "not answered: the implementation exited (" + status + ") before this case"
	r.ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Missing, Note: r.dead})
}

// check checks the answer line l to case c (tooLong set when the line was
// cut off).
func (r *runner) check(c *corpus.Case, l []byte, tooLong error) {
	if tooLong != nil {
		r.res.Trouble = append(r.res.Trouble, fmt.Sprintf("case %s: %v", c.ID, tooLong))
		r.ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Fail, Note: tooLong.Error()})
		return
	}
	id, isObj := corpus.AnswerID(l)
	switch {
	case !isObj:
		r.res.Trouble = append(r.res.Trouble, fmt.Sprintf("garbage on stdout where case %s's answer was due: %s", c.ID, spec.Excerpt(l, 80)))
		r.ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Fail, Note: "garbage on stdout instead of an answer: " + spec.Excerpt(l, 80)})
	case id != c.ID:
		r.res.Trouble = append(r.res.Trouble, fmt.Sprintf("answer out of order: got id %q where %q was due", id, c.ID))
		r.ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Fail, Note: fmt.Sprintf("answer out of order or missing: the answer due here has id %q", id)})
	default:
		r.ck.Check(c, l)
	}
}
