package live

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"time"

	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// MaxLineBytes is the longest answer line read: the wire's own limit.
const MaxLineBytes = wire.MaxLineBytes

// helloTimeout is the least wait for hello, the first answer, which may
// include the implementation's start-up on a loaded machine.
const helloTimeout = 15 * time.Second

// sendFlushLines is how many lines Send writes between flushes.
const sendFlushLines = 256

// DefaultTimeout is the wait for one answer when none is given.
const DefaultTimeout = 5 * time.Second

// ErrHung is the error of an answer that did not come within the timeout.
var ErrHung = errors.New("no answer within the timeout")

// ErrLineTooLong is the error of an answer line longer than MaxLineBytes.
var ErrLineTooLong = fmt.Errorf("answer line longer than %d bytes", MaxLineBytes)

// Process is a running implementation. Its methods are for one goroutine,
// but for Send, which may run beside Next.
type Process struct {
	Command string
	Timeout time.Duration

	cmd    *exec.Cmd
	stdin  io.WriteCloser
	stdout *os.File // read end, with deadlines
	out    *bufio.Reader
	tail   *tail
	exited chan error
	gone   atomic.Bool // the process has exited (its helpers may live on)
}

// exitGrace is how long output is still read after the process exited: a
// helper it left behind may hold its stdout open, and nothing it writes
// counts.
const exitGrace = 200 * time.Millisecond

// Start runs command with sh -c in a process group of its own; timeout
// bounds every wait for an answer (DefaultTimeout when not positive).
func Start(command string, timeout time.Duration) (*Process, error) {
	if timeout <= 0 {
		timeout = DefaultTimeout
	}
	p := &Process{Command: command, Timeout: timeout, tail: &tail{done: make(chan struct{})}}
	cmd := exec.Command("sh", "-c", command)
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	stdin, err := cmd.StdinPipe()
	if err != nil {
		return nil, err
	}
	// Both output pipes are made here, as files: a read end of os.Pipe
	// takes deadlines, and os/exec then starts no copying goroutine of
	// its own, so Wait does not wait for helpers the child left holding
	// the pipes.
	outR, outW, err := os.Pipe()
	if err != nil {
		return nil, err
	}
	errR, errW, err := os.Pipe()
	if err != nil {
		outR.Close()
		outW.Close()
		return nil, err
	}
	cmd.Stdout, cmd.Stderr = outW, errW
	if err := cmd.Start(); err != nil {
		outR.Close()
		outW.Close()
		errR.Close()
		errW.Close()
		return nil, fmt.Errorf("starting %q: %v", command, err)
	}
	outW.Close() // the child holds its own copies
	errW.Close()
	go p.tail.fill(errR)
	p.cmd, p.stdin, p.stdout, p.out = cmd, stdin, outR, bufio.NewReaderSize(outR, 64<<10)
	p.exited = make(chan error, 1)
	go func() {
		err := cmd.Wait()
		p.gone.Store(true)
		p.stdout.SetReadDeadline(time.Now().Add(exitGrace))
		p.exited <- err
	}()
	return p, nil
}

// Hello is what an implementation says of itself.
type Hello struct {
	Spec string   `json:"spec"`
	Ops  []string `json:"ops"`
}

// Hello asks the implementation which ops it speaks.
func (p *Process) Hello() (Hello, error) {
	var h Hello
	// The first answer waits for the implementation to start (an
	// interpreter, a JIT): at least helloTimeout, whatever the timeout.
	timeout := p.Timeout
	p.Timeout = max(timeout, helloTimeout)
	ans, err := p.Answer([]byte(`{"op":"hello","id":"viewspec-hello"}`))
	p.Timeout = timeout
	switch {
	case errors.Is(err, ErrHung):
		return h, fmt.Errorf("implementation %q did not answer hello within %v", p.Command, max(timeout, helloTimeout))
	case err != nil:
		return h, fmt.Errorf("implementation %q exited before answering hello (%s)", p.Command, p.Wait())
	}
	if json.Unmarshal(ans, &h) != nil || h.Ops == nil {
		return h, fmt.Errorf("implementation %q answered hello with %s, not {\"spec\", \"ops\"}", p.Command, spec.Excerpt(ans, 120))
	}
	return h, nil
}

// Answer sends one request line and waits for one answer line (blank
// lines skipped).
func (p *Process) Answer(line []byte) ([]byte, error) {
	if _, err := p.stdin.Write(append(bytes.TrimSpace(line), '\n')); err != nil {
		return nil, fmt.Errorf("the implementation does not take input (it exited?): %v; stderr: %s", err, p.Stderr(3))
	}
	return p.Next()
}

// Send writes the lines, each with a newline, then closes the process's
// stdin; it returns the first write error. It may run beside Next. Lines
// are flushed every sendFlushLines, so that the process sees them while
// the caller still makes the rest.
func (p *Process) Send(lines func(yield func([]byte) bool)) error {
	bw := bufio.NewWriterSize(p.stdin, 64<<10)
	var err error
	n := 0
	for l := range lines {
		bw.Write(l)
		if err = bw.WriteByte('\n'); err != nil {
			break
		}
		if n++; n%sendFlushLines == 0 {
			if err = bw.Flush(); err != nil {
				break
			}
		}
	}
	if err == nil {
		err = bw.Flush()
	}
	p.stdin.Close()
	return err
}

// Next returns the next non-blank answer line, waiting at most the
// timeout: ErrHung when none came, io.EOF when the process closed its
// stdout or exited (whatever a helper it left behind still holds open),
// ErrLineTooLong (the line skipped) for a line over MaxLineBytes.
func (p *Process) Next() ([]byte, error) {
	p.stdout.SetReadDeadline(time.Now().Add(p.Timeout))
	if p.gone.Load() {
		p.stdout.SetReadDeadline(time.Now().Add(exitGrace))
	}
	for {
		l, err := p.readLine()
		switch {
		case errors.Is(err, os.ErrDeadlineExceeded) && p.gone.Load():
			return nil, io.EOF // exited; a helper holds stdout open
		case errors.Is(err, os.ErrDeadlineExceeded):
			return nil, ErrHung
		case err != nil:
			return nil, err
		}
		if l = bytes.TrimSpace(l); len(l) > 0 {
			return l, nil
		}
	}
}

// readLine reads one line, at most MaxLineBytes of it: a longer one is
// read to its end and dropped.
func (p *Process) readLine() ([]byte, error) {
	var line []byte
	tooLong := false
	for {
		chunk, err := p.out.ReadSlice('\n')
		if !tooLong {
			if len(line)+len(chunk) > MaxLineBytes {
				tooLong, line = true, nil
			} else {
				line = append(line, chunk...)
			}
		}
		if errors.Is(err, bufio.ErrBufferFull) {
			continue
		}
		switch {
		case tooLong && (err == nil || errors.Is(err, io.EOF)):
			return nil, ErrLineTooLong
		case err != nil && !(errors.Is(err, io.EOF) && len(line) > 0):
			return nil, err
		}
		return line, nil
	}
}

// Wait waits at most the timeout for the process to exit by itself and
// returns how it ended ("exit status 0", "exit status 1", …); a process
// still running then is killed.
func (p *Process) Wait() string {
	select {
	case err := <-p.exited:
		p.exited <- err // for Close
		if err != nil {
			return err.Error()
		}
		return "exit status 0"
	case <-time.After(p.Timeout):
		p.Kill()
		return "killed after it kept running past the end of its input"
	}
}

// Kill ends the process group at once.
func (p *Process) Kill() {
	if p.cmd.Process != nil {
		syscall.Kill(-p.cmd.Process.Pid, syscall.SIGKILL)
	}
}

// Close kills the process group and reaps the process; it never blocks
// for long, whatever the process's helpers do.
func (p *Process) Close() error {
	p.Kill()
	p.stdin.Close()
	select {
	case <-p.exited:
	case <-time.After(p.Timeout):
	}
	p.stdout.Close()
	return nil
}

// Stderr returns the last n lines the process wrote to stderr, joined
// with " | ", or "(nothing on stderr)".
func (p *Process) Stderr(n int) string { return p.tail.last(n) }

// tail keeps the last 4 KiB a process writes to stderr.
type tail struct {
	mu   sync.Mutex
	buf  []byte
	done chan struct{} // closed when stderr has ended
}

// fill copies r into the tail until r ends.
func (t *tail) fill(r io.ReadCloser) {
	defer close(t.done)
	defer r.Close()
	b := make([]byte, 4096)
	for {
		n, err := r.Read(b)
		t.mu.Lock()
		t.buf = append(t.buf, b[:n]...)
		if len(t.buf) > 4096 {
			t.buf = t.buf[len(t.buf)-4096:]
		}
		t.mu.Unlock()
		if err != nil {
			return
		}
	}
}

// last returns the last n lines, once stderr has ended or 100 ms have
// passed (a helper the process left behind may hold stderr open).
func (t *tail) last(n int) string {
	select {
	case <-t.done:
	case <-time.After(100 * time.Millisecond):
	}
	t.mu.Lock()
	defer t.mu.Unlock()
	lines := strings.Split(strings.TrimSpace(string(t.buf)), "\n")
	if len(lines) > n {
		lines = lines[len(lines)-n:]
	}
	out := strings.Join(lines, " | ")
	if out == "" {
		return "(nothing on stderr)"
	}
	return out
}
