package probe

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"slices"
	"strconv"
	"sync"
	"testing"
	"time"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/live"
	"github.com/viewspec/viewspec/props"
	"github.com/viewspec/viewspec/reference"
)

// Impl is an implementation under test: it answers one wire request line
// with one answer line. An error means it failed to answer at all (it
// crashed, hung or closed its output), which is a finding too.
type Impl interface {
	// Ops returns the ops the implementation speaks (from hello).
	Ops() ([]string, error)
	// Answer returns the answer line to one request line.
	Answer(line []byte) ([]byte, error)
	// Close stops the implementation.
	Close() error
}

// Reference is the reference evaluator as an Impl, in process.
type Reference struct{}

// Ops returns the reference's ops.
func (Reference) Ops() ([]string, error) { return reference.Ops(), nil }

// Answer answers as `viewspec eval` would.
func (Reference) Answer(line []byte) ([]byte, error) { return reference.AnswerLine(line, 1), nil }

// Close does nothing.
func (Reference) Close() error { return nil }

// Command is an implementation run as a child process, one request and
// one answer at a time. When it crashes or hangs it is killed, and the
// next request starts a fresh one, so that a crash can be shrunk like any
// other disagreement.
type Command struct {
	Command string
	Timeout time.Duration

	p *live.Process
}

// NewCommand returns a Process for command (run with sh -c) with a
// per-answer timeout (live.DefaultTimeout when not positive).
func NewCommand(command string, timeout time.Duration) *Command {
	if timeout <= 0 {
		timeout = live.DefaultTimeout
	}
	return &Command{Command: command, Timeout: timeout}
}

// Answer sends one request line and waits for one answer line; a failure
// to answer ends the process.
func (p *Command) Answer(line []byte) ([]byte, error) {
	if p.p == nil {
		lp, err := live.Start(p.Command, p.Timeout)
		if err != nil {
			return nil, err
		}
		p.p = lp
	}
	ans, err := p.p.Answer(line)
	switch {
	case errors.Is(err, live.ErrHung):
		err = fmt.Errorf("the implementation hung: no answer within %v", p.Timeout)
	case errors.Is(err, live.ErrLineTooLong):
		err = fmt.Errorf("the implementation answered with a line longer than %d bytes", live.MaxLineBytes)
	case err != nil:
		err = fmt.Errorf("the implementation crashed (exited before answering); stderr: %s", p.p.Stderr(3))
	}
	if err != nil {
		p.Close()
	}
	return ans, err
}

// Ops asks hello (which waits for the implementation to start).
func (p *Command) Ops() ([]string, error) {
	if p.p == nil {
		lp, err := live.Start(p.Command, p.Timeout)
		if err != nil {
			return nil, err
		}
		p.p = lp
	}
	h, err := p.p.Hello()
	if err != nil {
		p.Close()
		return nil, err
	}
	return h.Ops, nil
}

// Close stops the process.
func (p *Command) Close() error {
	if p.p != nil {
		p.p.Close()
		p.p = nil
	}
	return nil
}

// Options says how to probe.
type Options struct {
	Ops     []string // ops to probe; nil means every op both speak
	Checks  int      // cases per op; default 1000
	Seed    uint64   // rapid's seed; the same seed draws the same cases
	Profile check.Profile
	// ShrinkTime bounds the time spent shrinking a finding; default 30 s.
	ShrinkTime time.Duration
	// Log, when set, receives progress lines.
	Log func(format string, args ...any)
	// Progress, when set, is called now and then with the op being probed,
	// the cases it has drawn and the cases it will draw.
	Progress func(op string, done, total int)
}

// Disagreement is a disagreement (or a failure to answer) shrunk to a minimal
// case.
type Disagreement struct {
	Op     string
	Family string
	Case   corpus.Case     // the minimal case, as a corpus line replays it
	Got    json.RawMessage // the implementation's answer (nil when it failed to answer)
	Err    string          // why it failed to answer
	Diffs  []check.Diff    // what differs
	Checks int             // cases drawn before the first failure
	// Shrunk says whether the case was shrunk; it is not when rapid's own
	// draws did not meet the failure again, and the scan's case is
	// reported as found.
	Shrunk bool
}

// probeTB is a rapid.TB that collects instead of failing a test.
type probeTB struct {
	name   string
	failed bool
	logs   []string
}

func (t *probeTB) Helper()      {}
func (t *probeTB) Name() string { return t.name }
func (t *probeTB) Logf(format string, args ...any) {
	t.logs = append(t.logs, fmt.Sprintf(format, args...))
}
func (t *probeTB) Log(args ...any)                         { t.logs = append(t.logs, fmt.Sprint(args...)) }
func (t *probeTB) Skipf(format string, args ...any)        {}
func (t *probeTB) Skip(args ...any)                        {}
func (t *probeTB) SkipNow()                                {}
func (t *probeTB) Errorf(format string, args ...any)       { t.failed = true; t.Logf(format, args...) }
func (t *probeTB) Error(args ...any)                       { t.failed = true; t.Log(args...) }
func (t *probeTB) Fatalf(format string, args ...any)       { t.failed = true; t.Logf(format, args...) }
func (t *probeTB) Fatal(args ...any)                       { t.failed = true; t.Log(args...) }
func (t *probeTB) FailNow()                                { t.failed = true }
func (t *probeTB) Fail()                                   { t.failed = true }
func (t *probeTB) Failed() bool                            { return t.failed }
func (t *probeTB) Deadline() (deadline time.Time, ok bool) { return time.Time{}, false }

// rapidMu serialises probes: rapid's settings are process-wide flags.
var rapidMu sync.Mutex

// setRapidFlags sets rapid's flags for a probe outside `go test` (rapid
// reads testing.Short, which needs the testing flags registered and
// parsed).
func setRapidFlags(checks int, seed uint64, shrink time.Duration) error {
	if flag.Lookup("test.short") == nil {
		testing.Init()
	}
	if !flag.Parsed() {
		if err := flag.CommandLine.Parse(nil); err != nil {
			return err
		}
	}
	for name, value := range map[string]string{
		"rapid.checks":     strconv.Itoa(checks),
		"rapid.seed":       strconv.FormatUint(seed, 10),
		"rapid.nofailfile": "true",
		"rapid.shrinktime": shrink.String(),
	} {
		if err := flag.Set(name, value); err != nil {
			return fmt.Errorf("rapid flag %s: %v", name, err)
		}
	}
	return nil
}

// Find draws cases of each op, asks the implementation and the reference,
// and compares them under the options' profile. At the first failure (a
// disagreement, or a failure to answer) rapid shrinks the case to a
// minimal one, which Find returns; it returns nil when every op passed.
func Find(impl Impl, opt Options) (*Disagreement, error) {
	if opt.Checks <= 0 {
		opt.Checks = 1000
	}
	if opt.ShrinkTime <= 0 {
		opt.ShrinkTime = 30 * time.Second
	}
	if opt.Profile.Name == "" {
		opt.Profile = check.Profiles["strict"]
	}
	implOps, err := impl.Ops()
	if err != nil {
		return nil, fmt.Errorf("asking the implementation which ops it speaks: %v", err)
	}
	ops := opt.Ops
	if ops == nil {
		for _, op := range reference.Ops() {
			if op != "hello" && slices.Contains(implOps, op) {
				ops = append(ops, op)
			}
		}
	}
	rapidMu.Lock()
	defer rapidMu.Unlock()
	if err := setRapidFlags(opt.Checks, opt.Seed, opt.ShrinkTime); err != nil {
		return nil, err
	}
	for _, op := range ops {
		if !slices.Contains(implOps, op) {
			return nil, fmt.Errorf("the implementation does not speak op %q (hello lists %v)", op, implOps)
		}
		// A fast scan first: the cases drawn up front and streamed to the
		// implementation, answers read as they come (no round trip per
		// case). Only when it finds a failure does rapid search again, one
		// case at a time, to shrink one.
		bad, err := scanOp(impl, op, &opt)
		if err != nil {
			return nil, err
		}
		if bad == nil {
			if opt.Log != nil {
				opt.Log("%s: %d cases agree", op, opt.Checks)
			}
			continue
		}
		f := probeOp(impl, op, &opt)
		if f == nil {
			// rapid's own draws did not meet the failure again: report the
			// scan's case as found, unshrunk.
			f = bad
			if opt.Log != nil {
				opt.Log("%s: disagreement in the scan, not met again while shrinking; reported as found", op)
			}
			return f, nil
		}
		if opt.Log != nil {
			if f == nil {
				opt.Log("%s: %d cases agree", op, opt.Checks)
			} else {
				opt.Log("%s: disagreement after %d cases, shrunk", op, f.Checks)
			}
		}
		if f != nil {
			return f, nil
		}
	}
	return nil, nil
}

func probeOp(impl Impl, op string, opt *Options) *Disagreement {
	var last *Disagreement
	drawn := 0
	firstFail := 0
	var deadline time.Time // set at the first failure: shrinking ends then
	gen := props.ProbeRequest(op)
	tb := &probeTB{name: "probe/" + op}
	rapid.Check(tb, func(t *rapid.T) {
		if firstFail != 0 && time.Now().After(deadline) {
			// Shrink time is over: every further attempt passes, so rapid
			// keeps the smallest case found and stops at once, whatever
			// each attempt would cost (an implementation that hangs costs
			// a whole timeout an attempt).
			return
		}
		lr := gen.Draw(t, "request")
		drawn++
		c, err := caseOf("probe/"+op+"/"+lr.Family, op, lr)
		if err != nil {
			t.Skipf("the reference cannot encode the case: %v", err)
		}
		got, err := impl.Answer(c.Request)
		fail := func(f *Disagreement, format string, args ...any) {
			if firstFail == 0 {
				firstFail = drawn
				deadline = time.Now().Add(opt.ShrinkTime)
			}
			last = f
			t.Fatalf(format, args...)
		}
		if err != nil {
			fail(&Disagreement{Op: op, Family: lr.Family, Case: c, Err: err.Error()}, "%v", err)
			return
		}
		st, diffs := check.Compare(&c, got, &opt.Profile)
		if st == check.Fail {
			fail(&Disagreement{Op: op, Family: lr.Family, Case: c, Got: got, Diffs: diffs}, "%s disagrees", op)
		}
	})
	if !tb.failed || last == nil {
		return nil
	}
	last.Checks, last.Shrunk = firstFail, true
	return reduce(impl, last, opt, deadline.Add(opt.ShrinkTime/4))
}

// scanOp streams opt.Checks cases of op to the implementation, drawn from
// the seed (case i from Example(seed·checks + i)), and returns the first
// failing one, unshrunk, or nil.
func scanOp(impl Impl, op string, opt *Options) (*Disagreement, error) {
	gen := props.ProbeRequest(op)
	const batch = 2000
	// Batches are drawn and answered by the reference one ahead, on another
	// goroutine, while the implementation answers the current one: the two
	// processes' work overlaps.
	type drawn struct {
		cases []corpus.Case
		err   error
	}
	draw := func(start int) drawn {
		n := min(batch, opt.Checks-start)
		cases := make([]corpus.Case, 0, n)
		for i := range n {
			lr := gen.Example(int(opt.Seed)*opt.Checks + start + i)
			id := fmt.Sprintf("probe/%s/%s/%d", op, lr.Family, start+i)
			c, err := caseOf(id, op, lr)
			if err != nil {
				return drawn{err: err}
			}
			cases = append(cases, c)
		}
		return drawn{cases: cases}
	}
	ahead := make(chan drawn, 1)
	go func() { ahead <- draw(0) }()
	for start := 0; start < opt.Checks; start += batch {
		d := <-ahead
		if d.err != nil {
			return nil, d.err
		}
		if next := start + batch; next < opt.Checks {
			go func() { ahead <- draw(next) }()
		}
		if opt.Progress != nil {
			opt.Progress(op, start, opt.Checks)
		}
		cases := d.cases
		ck := check.NewChecker(opt.Profile)
		if p, ok := impl.(*Command); ok {
			if _, err := check.Run(cases, check.RunOptions{Command: p.Command, Timeout: p.Timeout}, ck); err != nil {
				return nil, err
			}
		} else {
			for i := range cases {
				got, err := impl.Answer(cases[i].Request)
				if err != nil {
					ck.Record(check.CaseResult{ID: cases[i].ID, Op: op, Family: cases[i].Family, Status: check.Missing, Note: err.Error()})
					continue
				}
				ck.Check(&cases[i], got)
			}
		}
		at := make(map[string]int, len(cases))
		for i := range cases {
			at[cases[i].ID] = i
		}
		// The first case in draw order that failed (results are recorded
		// in the order they were decided).
		first := -1
		var firstRes check.CaseResult
		for _, res := range ck.Report().NotPassed {
			if i, ok := at[res.ID]; ok && (res.Status == check.Fail || res.Status == check.Missing) && (first < 0 || i < first) {
				first, firstRes = i, res
			}
		}
		if first >= 0 {
			c := cases[first]
			return &Disagreement{Op: op, Family: c.Family, Case: c, Err: firstRes.Note, Diffs: firstRes.Diffs, Checks: start + first + 1}, nil
		}
	}
	return nil, nil
}

// ErrNoFinding is returned by helpers that need a finding when there is
// none.
var ErrNoFinding = errors.New("no disagreement found")

// caseOf makes the corpus case of a drawn request: a wire request, or the
// raw line of a wire_errors family.
func caseOf(id, op string, lr props.LabelledRequest) (corpus.Case, error) {
	if lr.Raw != nil {
		return corpus.NewRawCase(id, lr.Family, op, lr.Raw)
	}
	return corpus.NewCase(id, lr.Family, lr.Request)
}
