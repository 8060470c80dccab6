package props

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"slices"
	"strconv"
	"sync"
	"syscall"
	"testing"
	"time"

	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/fixtures"
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
func (Reference) Ops() ([]string, error) { return fixtures.Ops(), nil }

// Answer answers as `viewspec eval` would.
func (Reference) Answer(line []byte) ([]byte, error) { return fixtures.AnswerLine(line, 1), nil }

// Close does nothing.
func (Reference) Close() error { return nil }

// Process is a child process speaking the wire, one request and one answer
// at a time. When it crashes or hangs it is killed, and the next request
// starts a fresh one, so that a crash can be shrunk like any other
// disagreement. Answers are read straight from the pipe with a deadline,
// with no goroutine between: a round trip costs two context switches.
type Process struct {
	Command string
	Timeout time.Duration

	cmd    *exec.Cmd
	stdin  io.WriteCloser
	stdout *os.File
	out    *bufio.Reader
	stderr *tailBuffer
}

// NewProcess returns a Process for command (run with sh -c) with a
// per-answer timeout.
func NewProcess(command string, timeout time.Duration) *Process {
	if timeout <= 0 {
		timeout = 5 * time.Second
	}
	return &Process{Command: command, Timeout: timeout}
}

func (p *Process) start() error {
	cmd := exec.Command("sh", "-c", p.Command)
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	stdin, err := cmd.StdinPipe()
	if err != nil {
		return err
	}
	// An os.Pipe read end supports deadlines; os/exec's StdoutPipe hides it
	// behind an interface, so make the pipe here.
	r, w, err := os.Pipe()
	if err != nil {
		return err
	}
	cmd.Stdout = w
	p.stderr = &tailBuffer{}
	cmd.Stderr = p.stderr
	if err := cmd.Start(); err != nil {
		r.Close()
		w.Close()
		return err
	}
	w.Close() // the child holds its own copy
	p.cmd, p.stdin, p.stdout, p.out = cmd, stdin, r, bufio.NewReaderSize(r, 64<<10)
	return nil
}

// tailBuffer keeps the last few KiB written to it, safely across
// goroutines (os/exec copies the child's stderr on one of its own).
type tailBuffer struct {
	mu  sync.Mutex
	buf []byte
}

func (t *tailBuffer) Write(b []byte) (int, error) {
	t.mu.Lock()
	defer t.mu.Unlock()
	t.buf = append(t.buf, b...)
	if len(t.buf) > 4096 {
		t.buf = t.buf[len(t.buf)-4096:]
	}
	return len(b), nil
}

func (t *tailBuffer) String() string {
	t.mu.Lock()
	defer t.mu.Unlock()
	return string(t.buf)
}

// kill ends the process, if any, and reaps it.
func (p *Process) kill() {
	if p.cmd != nil && p.cmd.Process != nil {
		syscall.Kill(-p.cmd.Process.Pid, syscall.SIGKILL)
		p.stdin.Close()
		p.stdout.Close()
		p.cmd.Wait()
	}
	p.cmd = nil
}

// Answer sends one request line and waits for one answer line.
func (p *Process) Answer(line []byte) ([]byte, error) {
	if p.cmd == nil {
		if err := p.start(); err != nil {
			return nil, fmt.Errorf("starting %q: %v", p.Command, err)
		}
	}
	if _, err := p.stdin.Write(append(bytes.TrimSpace(line), '\n')); err != nil {
		p.kill()
		return nil, fmt.Errorf("the implementation does not take input (it exited?): %v", err)
	}
	p.stdout.SetReadDeadline(time.Now().Add(p.Timeout))
	for {
		l, err := p.out.ReadBytes('\n')
		switch {
		case errors.Is(err, os.ErrDeadlineExceeded):
			p.kill()
			return nil, fmt.Errorf("the implementation hung: no answer within %v", p.Timeout)
		case err != nil:
			p.kill()
			return nil, fmt.Errorf("the implementation crashed (exited before answering); stderr: %s", lastLines(p.stderr.String(), 3))
		}
		if l = bytes.TrimSpace(l); len(l) > 0 {
			return l, nil
		}
	}
}

func lastLines(s string, n int) string {
	lines := bytes.Split(bytes.TrimSpace([]byte(s)), []byte{'\n'})
	if len(lines) > n {
		lines = lines[len(lines)-n:]
	}
	out := string(bytes.Join(lines, []byte(" | ")))
	if out == "" {
		return "(nothing)"
	}
	return out
}

// Ops asks hello.
func (p *Process) Ops() ([]string, error) {
	ans, err := p.Answer([]byte(`{"op":"hello","id":"probe-hello"}`))
	if err != nil {
		return nil, err
	}
	var h struct {
		Ops []string `json:"ops"`
	}
	if json.Unmarshal(ans, &h) != nil || h.Ops == nil {
		return nil, fmt.Errorf("hello was answered with %s", clip(ans))
	}
	return h.Ops, nil
}

// Close stops the process.
func (p *Process) Close() error {
	p.kill()
	return nil
}

func clip(b []byte) string {
	if len(b) > 120 {
		return string(b[:120]) + "…"
	}
	return string(b)
}

// ProbeOptions says how to probe.
type ProbeOptions struct {
	Ops     []string // ops to probe; nil means every op both speak
	Checks  int      // cases per op; default 1000
	Seed    uint64   // rapid's seed; the same seed draws the same cases
	Profile fixtures.Profile
	// ShrinkTime bounds the time spent shrinking a finding; default 30 s.
	ShrinkTime time.Duration
	// Log, when set, receives progress lines.
	Log func(format string, args ...any)
}

// Finding is a disagreement (or a failure to answer) shrunk to a minimal
// case.
type Finding struct {
	Op     string
	Family string
	Case   fixtures.Case   // the minimal case, as a corpus line replays it
	Got    json.RawMessage // the implementation's answer (nil when it failed to answer)
	Err    string          // why it failed to answer
	Diffs  []fixtures.Diff // what differs
	Checks int             // cases drawn before the first failure
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

// Probe draws cases of each op, asks the implementation and the reference,
// and compares them under the options' profile. At the first failure (a
// disagreement, or a failure to answer) rapid shrinks the case to a
// minimal one, which Probe returns; it returns nil when every op passed.
func Probe(impl Impl, opt ProbeOptions) (*Finding, error) {
	if opt.Checks <= 0 {
		opt.Checks = 1000
	}
	if opt.ShrinkTime <= 0 {
		opt.ShrinkTime = 30 * time.Second
	}
	if opt.Profile.Name == "" {
		opt.Profile = fixtures.Profiles["strict"]
	}
	implOps, err := impl.Ops()
	if err != nil {
		return nil, fmt.Errorf("asking the implementation which ops it speaks: %v", err)
	}
	ops := opt.Ops
	if ops == nil {
		for _, op := range fixtures.Ops() {
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

func probeOp(impl Impl, op string, opt *ProbeOptions) *Finding {
	var last *Finding
	drawn := 0
	firstFail := 0
	gen := ProbeRequest(op)
	tb := &probeTB{name: "probe/" + op}
	rapid.Check(tb, func(t *rapid.T) {
		lr := gen.Draw(t, "request")
		drawn++
		c, err := fixtures.NewCase("probe/"+op+"/"+lr.Family, lr.Family, lr.Request)
		if err != nil {
			t.Skipf("the reference cannot encode the case: %v", err)
		}
		got, err := impl.Answer(c.Request)
		fail := func(f *Finding, format string, args ...any) {
			if firstFail == 0 {
				firstFail = drawn
			}
			last = f
			t.Fatalf(format, args...)
		}
		if err != nil {
			fail(&Finding{Op: op, Family: lr.Family, Case: c, Err: err.Error()}, "%v", err)
			return
		}
		st, diffs := fixtures.Compare(&c, got, &opt.Profile)
		if st == fixtures.Fail {
			fail(&Finding{Op: op, Family: lr.Family, Case: c, Got: got, Diffs: diffs}, "%s disagrees", op)
		}
	})
	if !tb.failed || last == nil {
		return nil
	}
	last.Checks = firstFail
	return last
}

// scanOp streams opt.Checks cases of op to the implementation, drawn from
// the seed (case i from Example(seed·checks + i)), and returns the first
// failing one, unshrunk, or nil.
func scanOp(impl Impl, op string, opt *ProbeOptions) (*Finding, error) {
	gen := ProbeRequest(op)
	const batch = 2000
	// Batches are drawn and answered by the reference one ahead, on another
	// goroutine, while the implementation answers the current one: the two
	// processes' work overlaps.
	type drawn struct {
		cases []fixtures.Case
		err   error
	}
	draw := func(start int) drawn {
		n := min(batch, opt.Checks-start)
		cases := make([]fixtures.Case, 0, n)
		for i := range n {
			lr := gen.Example(int(opt.Seed)*opt.Checks + start + i)
			id := fmt.Sprintf("probe/%s/%s/%d", op, lr.Family, start+i)
			c, err := fixtures.NewCase(id, lr.Family, lr.Request)
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
		cases := d.cases
		ck := fixtures.NewChecker(opt.Profile)
		if p, ok := impl.(*Process); ok {
			if _, err := fixtures.Run(cases, fixtures.RunOptions{Command: p.Command, Timeout: p.Timeout}, ck); err != nil {
				return nil, err
			}
		} else {
			for i := range cases {
				got, err := impl.Answer(cases[i].Request)
				if err != nil {
					ck.Record(fixtures.CaseResult{ID: cases[i].ID, Op: op, Family: cases[i].Family, Status: fixtures.Missing, Note: err.Error()})
					continue
				}
				ck.Check(&cases[i], got)
			}
		}
		for i, res := range ck.Report().Cases {
			if res.Status == fixtures.Fail || res.Status == fixtures.Missing {
				c := cases[i]
				return &Finding{Op: op, Family: c.Family, Case: c, Err: res.Note, Diffs: res.Diffs, Checks: start + i + 1}, nil
			}
		}
	}
	return nil, nil
}

// ErrNoFinding is returned by helpers that need a finding when there is
// none.
var ErrNoFinding = errors.New("no disagreement found")
