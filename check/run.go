package check

import (
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"sync"
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
	return run(func(yield func(*corpus.Case, error) bool) {
		for i := range cases {
			if !yield(&cases[i], nil) {
				return
			}
		}
	}, opt, ck)
}

// RunStream is Run on a corpus read from r as the requests are sent, in
// one pass: memory stays constant whatever the corpus's size, apart from
// the set of ids (a repeated id is found), as long as the implementation
// answers as it reads, as the wire asks. Requests are flushed every
// streamBatch cases, so the implementation sees them while the rest are
// read. An unusable corpus line stops the run (the implementation's stdin
// is closed, its answers so far checked) with a *corpus.ReadError.
func RunStream(name string, r io.Reader, opt RunOptions, ck *Checker) (*RunResult, error) {
	var readErr error
	res, err := run(func(yield func(*corpus.Case, error) bool) {
		seen := map[idKey]int{}
		err := corpus.EachLine(r, func(line int, b []byte, tooLong bool) error {
			if tooLong {
				return &corpus.ReadError{File: name, Line: line, Msg: fmt.Sprintf("longer than %d bytes", corpus.MaxLineBytes)}
			}
			c, err := corpus.ParseCase(b)
			if err != nil {
				return &corpus.ReadError{File: name, Line: line, Msg: err.Error()}
			}
			key := keyOf(c.ID)
			if j, dup := seen[key]; dup {
				return &corpus.ReadError{File: name, Line: line, Msg: fmt.Sprintf("id %q repeats line %d", c.ID, j)}
			}
			seen[key] = line
			if !yield(&c, nil) {
				return io.EOF
			}
			return nil
		})
		if err != nil && err != io.EOF {
			var re *corpus.ReadError
			if !errors.As(err, &re) {
				err = &corpus.ReadError{File: name, Msg: err.Error()}
			}
			readErr = err
		}
	}, opt, ck)
	if err == nil {
		err = readErr
	}
	return res, err
}

// run is Run on the cases cases yields, in order.
func run(cases func(yield func(*corpus.Case, error) bool), opt RunOptions, ck *Checker) (*RunResult, error) {
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
	r := runner{p: p, ck: ck, res: res, opt: &opt, q: newRunQueue(), answered: map[idKey]bool{}}
	if h.Spec != wire.SpecVersion {
		r.trouble(fmt.Sprintf("hello names spec %q, this corpus is %s", h.Spec, wire.SpecVersion))
	}
	writeErr := make(chan error, 1)
	go func() { writeErr <- r.feed(cases, h.Ops) }()
	r.collect()
	res.Sent = r.q.sentCount()
	select {
	case err := <-writeErr:
		if err != nil && r.dead == "" {
			r.trouble("writing requests: " + err.Error())
		}
	case <-time.After(p.Timeout):
	}
	return res, nil
}

// runEntry is one case on its way: skipped (with why), or sent and
// waiting for its answer.
type runEntry struct {
	c    *corpus.Case
	skip string
	sent bool
	done bool
}

// runQueue holds the cases read and not yet recorded, in corpus order,
// between the feeder that reads and sends them and the collector that
// reads the answers; it grows only while the implementation withholds
// answers.
type runQueue struct {
	mu      sync.Mutex
	ready   *sync.Cond
	entries []*runEntry
	byID    map[string]*runEntry // sent and not yet recorded
	closed  bool                 // nothing more will be pushed
	sent    int
}

func newRunQueue() *runQueue {
	q := &runQueue{byID: map[string]*runEntry{}}
	q.ready = sync.NewCond(&q.mu)
	return q
}

func (q *runQueue) push(e *runEntry) {
	q.mu.Lock()
	q.entries = append(q.entries, e)
	if e.sent {
		q.byID[e.c.ID] = e
		q.sent++
	}
	q.mu.Unlock()
	q.ready.Signal()
}

func (q *runQueue) close() {
	q.mu.Lock()
	q.closed = true
	q.mu.Unlock()
	q.ready.Signal()
}

// head returns the first entry not recorded, waiting for one; nil when the
// feeder is done and every entry recorded.
func (q *runQueue) head() *runEntry {
	q.mu.Lock()
	defer q.mu.Unlock()
	for len(q.entries) == 0 && !q.closed {
		q.ready.Wait()
	}
	if len(q.entries) == 0 {
		return nil
	}
	return q.entries[0]
}

// pop drops the head, once recorded.
func (q *runQueue) pop() {
	q.mu.Lock()
	e := q.entries[0]
	q.entries[0] = nil
	q.entries = q.entries[1:]
	if e.sent {
		delete(q.byID, e.c.ID)
	}
	q.mu.Unlock()
}

// sentCount returns how many cases were sent so far.
func (q *runQueue) sentCount() int {
	q.mu.Lock()
	defer q.mu.Unlock()
	return q.sent
}

// sentWaiting returns the sent entry waiting for the answer with this id.
func (q *runQueue) sentWaiting(id string) *runEntry {
	q.mu.Lock()
	defer q.mu.Unlock()
	return q.byID[id]
}

// feed reads the cases, queues each, and sends those of the ops selected
// that the implementation speaks (once a write fails, the rest go nowhere
// and are recorded as not answered). It returns the first write error.
func (r *runner) feed(cases func(yield func(*corpus.Case, error) bool), spoken []string) error {
	defer r.q.close()
	lines := make(chan []byte)
	sendErr := make(chan error, 1)
	go func() {
		sendErr <- r.p.Send(func(yield func([]byte) bool) {
			for l := range lines {
				if !yield(l) {
					for range lines { // written no more: drained
					}
					return
				}
			}
		})
	}()
	for c := range cases {
		e := &runEntry{c: c}
		switch {
		case r.opt.Ops != nil && !r.opt.Ops[c.Op]:
			e.skip = "op not selected"
		case !slices.Contains(spoken, c.Op):
			e.skip = "op not spoken by the implementation (hello)"
		default:
			e.sent = true
		}
		r.q.push(e)
		if e.sent {
			lines <- c.Request
		}
	}
	close(lines)
	return <-sendErr
}

// runner collects a run's answers.
type runner struct {
	p        *live.Process
	ck       *Checker
	res      *RunResult
	opt      *RunOptions
	q        *runQueue
	answered map[idKey]bool // ids answered, to tell a second answer from a stray one
	dead     string         // why the cases left are not answered, once the process is gone
}

// collect records the cases in corpus order: a skipped one at once, a
// sent one when its answer comes, matched by id (SPEC §7): an answer for
// no case, or a second one for a case, is stray; a case left without an
// answer when the process ends or hangs is missing. Then anything more on
// stdout is stray, and the process should exit.
func (r *runner) collect() {
	for {
		e := r.q.head()
		switch {
		case e == nil:
			r.drainAfterLast()
			return
		case e.skip != "":
			r.ck.Record(CaseResult{ID: e.c.ID, Op: e.c.Op, Family: e.c.Family, Status: Skipped, Note: e.skip})
			r.q.pop()
			continue
		case e.done:
			r.q.pop()
			continue
		case !e.sent || r.dead != "":
			r.ck.Record(CaseResult{ID: e.c.ID, Op: e.c.Op, Family: e.c.Family, Status: Missing, Note: r.deadNote()})
			r.q.pop()
			continue
		}
		l, err := r.p.Next()
		switch {
		case errors.Is(err, live.ErrLineTooLong):
			r.trouble(fmt.Sprintf("an answer line longer than %d bytes while case %s's was due; not read", live.MaxLineBytes, e.c.ID))
			r.ck.Stray(fmt.Sprintf("a line longer than %d bytes", live.MaxLineBytes))
			continue
		case err != nil:
			r.lost(e, err)
			continue
		}
		r.res.Answered++
		id, isObj := corpus.AnswerID(l)
		if !isObj {
			r.trouble(fmt.Sprintf("garbage on stdout while case %s's answer was due: %s", e.c.ID, spec.Excerpt(l, 80)))
			r.ck.Stray("not a JSON object with a string id: " + spec.Excerpt(l, 80))
			continue
		}
		key := keyOf(id)
		w := r.q.sentWaiting(id)
		switch {
		case w == nil && r.answered[key]:
			r.ck.Stray(fmt.Sprintf("a second answer for %q (the first is used)", id))
			continue
		case w == nil:
			r.ck.Stray(fmt.Sprintf("answer for %q, which is no case sent: %s", id, spec.Excerpt(l, 80)))
			continue
		case w.done:
			r.ck.Stray(fmt.Sprintf("a second answer for %q (the first is used)", id))
			continue
		}
		// An answer ahead of its turn (w is not e) is checked and recorded
		// now; e waits for its own.
		r.answered[key] = true
		cr := r.ck.Check(w.c, l)
		if r.opt.OnChecked != nil {
			r.opt.OnChecked(w.c, l, cr)
		}
		w.done = true
		if r.opt.Progress != nil && r.res.Answered%2000 == 0 {
			r.opt.Progress(r.res.Answered, r.q.sentCount())
		}
	}
}

// deadNote is why a case was not answered.
func (r *runner) deadNote() string {
	if r.dead != "" {
		return r.dead
	}
	return "not sent: the implementation no longer took input"
}

// drainAfterLast reads what the implementation prints after the last
// answer (stray), and waits for it to exit.
func (r *runner) drainAfterLast() {
	if r.opt.Progress != nil {
		r.opt.Progress(r.res.Answered, r.q.sentCount())
	}
	if r.dead != "" {
		return
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

// lost notes why the cases left are not answered: the process hung on
// the case at the head (e), which fails, or stopped answering; the cases
// left are then recorded as missing in turn.
func (r *runner) lost(e *runEntry, err error) {
	if errors.Is(err, live.ErrHung) {
		r.p.Kill()
		r.trouble(fmt.Sprintf("hung on case %s (no answer within %v); killed", e.c.ID, r.p.Timeout))
		r.ck.Record(CaseResult{ID: e.c.ID, Op: e.c.Op, Family: e.c.Family, Status: Fail,
			Note: fmt.Sprintf("no answer within %v: the implementation hung on this request", r.p.Timeout)})
		e.done = true
		r.dead = "not answered: the implementation hung on case " + e.c.ID
		return
	}
	status := r.p.Wait()
	if !errors.Is(err, io.EOF) {
		status = err.Error() + "; " + status
	}
	r.trouble(fmt.Sprintf("the implementation stopped answering after %d of %d cases (%s); stderr: %s", r.res.Answered, r.q.sentCount(), status, r.p.Stderr(5)))
	r.dead = "not answered: the implementation exited (" + status + ") before this case"
}
