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
	// OnChecked, when set, is called with every case checked, the
	// implementation's answer line (valid during the call only) and the
	// outcome, for reports that need the answer itself (pictures of the
	// worst failures).
	OnChecked func(c *corpus.Case, got []byte, res CaseResult)
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
	r := runner{p: p, ck: ck, res: res, opt: &opt}
	if h.Spec != wire.SpecVersion {
		r.trouble(fmt.Sprintf("hello names spec %q, this corpus is %s", h.Spec, wire.SpecVersion))
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
	r.collect(send)
	select {
	case err := <-writeErr:
		if err != nil && r.dead == "" {
			r.trouble("writing requests: " + err.Error())
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

// collect reads the answers and checks each against its case, matched by
// id (SPEC §7): an answer for no case, or a second one for a case, is
// stray; a case left without an answer when the process ends or hangs is
// missing. Then anything more on stdout is stray, and the process should
// exit.
func (r *runner) collect(send []*corpus.Case) {
	at := make(map[string]int, len(send))
	for i, c := range send {
		at[c.ID] = i
	}
	done := make([]bool, len(send))
	first, left := 0, len(send) // the first case not answered yet; how many are not
	for left > 0 {
		l, err := r.p.Next()
		switch {
		case errors.Is(err, live.ErrLineTooLong):
			r.trouble(fmt.Sprintf("an answer line longer than %d bytes while case %s's was due; not read", live.MaxLineBytes, send[first].ID))
			r.ck.Stray(fmt.Sprintf("a line longer than %d bytes", live.MaxLineBytes))
			continue
		case err != nil:
			r.lost(send, done, first, err)
			return
		}
		r.res.Answered++
		id, isObj := corpus.AnswerID(l)
		i, known := at[id]
		switch {
		case !isObj:
			r.trouble(fmt.Sprintf("garbage on stdout while case %s's answer was due: %s", send[first].ID, spec.Excerpt(l, 80)))
			r.ck.Stray("not a JSON object with a string id: " + spec.Excerpt(l, 80))
			continue
		case !known:
			r.ck.Stray(fmt.Sprintf("answer for %q, which is no case sent: %s", id, spec.Excerpt(l, 80)))
			continue
		case done[i]:
			r.ck.Stray(fmt.Sprintf("a second answer for %q (the first is used)", id))
			continue
		}
		cr := r.ck.Check(send[i], l)
		if r.opt.OnChecked != nil {
			r.opt.OnChecked(send[i], l, cr)
		}
		done[i], left = true, left-1
		for first < len(send) && done[first] {
			first++
		}
		if n := len(send) - left; r.opt.Progress != nil && n%2000 == 0 {
			r.opt.Progress(n, len(send))
		}
	}
	if r.opt.Progress != nil {
		r.opt.Progress(len(send), len(send))
	}
	for {
		l, err := r.p.Next()
		switch {
		case errors.Is(err, live.ErrHung):
			r.p.Kill()
			r.trouble("the implementation did not exit at the end of its input; killed")
			return
		case errors.Is(err, live.ErrLineTooLong):
			r.ck.Stray("after the last answer: a line longer than " + strconv.Itoa(live.MaxLineBytes) + " bytes")
			continue
		case err != nil:
			if st := r.p.Wait(); st != "exit status 0" {
				r.trouble("the implementation ended with " + st + "; stderr: " + r.p.Stderr(5))
			}
			return
		}
		r.ck.Stray("after the last answer: " + spec.Excerpt(l, 80))
	}
}

// trouble records what went wrong with the process, in the result and the
// report.
func (r *runner) trouble(msg string) {
	r.res.Trouble = append(r.res.Trouble, msg)
	r.ck.Trouble(msg)
}

// lost records the cases not answered when the process hung (the first of
// them, send[first], is the one it hung on) or stopped answering.
func (r *runner) lost(send []*corpus.Case, done []bool, first int, err error) {
	answered := 0
	for _, d := range done {
		if d {
			answered++
		}
	}
	if errors.Is(err, live.ErrHung) {
		r.p.Kill()
		c := send[first]
		r.trouble(fmt.Sprintf("hung on case %s (no answer within %v); killed", c.ID, r.p.Timeout))
		r.ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Fail,
			Note: fmt.Sprintf("no answer within %v: the implementation hung on this request", r.p.Timeout)})
		done[first] = true
		r.dead = "not answered: the implementation hung on case " + c.ID
	} else {
		status := r.p.Wait()
		if !errors.Is(err, io.EOF) {
			status = err.Error() + "; " + status
		}
		r.trouble(fmt.Sprintf("the implementation stopped answering after %d of %d cases (%s); stderr: %s", answered, len(send), status, r.p.Stderr(5)))
		r.dead = "not answered: the implementation exited (" + status + ") before this case"
	}
	for i, c := range send {
		if !done[i] {
			r.ck.Record(CaseResult{ID: c.ID, Op: c.Op, Family: c.Family, Status: Missing, Note: r.dead})
		}
	}
}
