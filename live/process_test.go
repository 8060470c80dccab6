package live_test

import (
	"errors"
	"io"
	"strings"
	"testing"
	"time"

	"github.com/viewspec/viewspec/internal/testtool"
	"github.com/viewspec/viewspec/live"
)

// A helper the implementation leaves behind in a session of its own holds
// its stdout and stderr open; the driver neither waits for it to read the
// end of the answers nor to reap the process (it held `run` for the
// helper's whole life before).
func TestDetachedHelperHoldsNothing(t *testing.T) {
	testtool.Need(t, "setsid", "util-linux")
	start := time.Now()
	p, err := live.Start(`setsid sleep 30 & read -r line; echo '{"id":"viewspec-hello","spec":"viewspec/1","ops":["hello"]}'`, 5*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := p.Hello(); err != nil {
		t.Fatal(err)
	}
	if _, err := p.Next(); !errors.Is(err, io.EOF) {
		t.Fatalf("after the last answer: %v, want io.EOF", err)
	}
	if st := p.Wait(); st != "exit status 0" {
		t.Errorf("Wait() = %q", st)
	}
	p.Close()
	if d := time.Since(start); d > 3*time.Second {
		t.Fatalf("took %v with a detached helper alive; want well under the 5 s timeout", d)
	}
}

// A line longer than MaxLineBytes is ErrLineTooLong and is skipped, and
// the next line is read as usual. The timeout is generous: writing 17 MB
// through a pipe on a loaded machine takes seconds.
func TestLineTooLong(t *testing.T) {
	p, err := live.Start(`read -r line; head -c 17000000 /dev/zero | tr '\0' 'x'; echo; echo '{"id":1}'; sleep 30`, 30*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	defer p.Close()
	if _, err := p.Answer([]byte(`{"op":"hello"}`)); !errors.Is(err, live.ErrLineTooLong) {
		t.Fatalf("a 17 MB line: %v, want ErrLineTooLong", err)
	}
	if l, err := p.Next(); err != nil || string(l) != `{"id":1}` {
		t.Fatalf("the line after: %q, %v", l, err)
	}
}

// An answer that does not come within the timeout is ErrHung, after the
// timeout and not long after.
func TestHung(t *testing.T) {
	p, err := live.Start(`read -r line; echo '{"id":1}'; sleep 30`, 2*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	defer p.Close()
	if l, err := p.Answer([]byte(`{"op":"hello"}`)); err != nil || string(l) != `{"id":1}` {
		t.Fatalf("the first line: %q, %v", l, err)
	}
	start := time.Now()
	if _, err := p.Next(); !errors.Is(err, live.ErrHung) {
		t.Fatalf("no answer: %v, want ErrHung", err)
	}
	if d := time.Since(start); d < 1500*time.Millisecond || d > 6*time.Second {
		t.Errorf("gave up after %v, want the 2 s timeout", d)
	}
}

// Hello names the way it failed: an implementation that exits, one that
// answers something else.
func TestHelloFailures(t *testing.T) {
	for _, c := range []struct{ cmd, want string }{
		{"exit 4", "exited before answering hello (exit status 4)"},
		{`read -r l; echo '{"error":{"code":"unknown_op"}}'`, "answered hello with"},
	} {
		p, err := live.Start(c.cmd, 2*time.Second)
		if err != nil {
			t.Fatal(err)
		}
		_, err = p.Hello()
		p.Close()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: Hello() error %v, want it to say %q", c.cmd, err, c.want)
		}
	}
}
