package atomicfile

import (
	"errors"
	"io/fs"
	"math/rand/v2"
	"os"
	"os/signal"
	"strconv"
	"sync"
	"syscall"
	"time"
)

// Temporary files and signals.
//
// A corpus or a report can take minutes to write and hundreds of megabytes of
// temporary file; a Ctrl-C used to leave that file behind. So the package
// keeps a registry of the temporary files in flight, and while it is not
// empty it watches SIGINT and SIGTERM (signal.Notify, set up on first use,
// stopped when the last write settles, so that between writes the process
// handles signals as it would without this package). On either signal the
// handler removes every registered file and ends the process by the same
// signal, with the Go runtime's default handling restored, so that the parent
// sees a death by SIGINT or SIGTERM (a shell's status 130 or 143); if the
// signal somehow does not end it, it exits with 128 plus the signal number.
//
// The consequence for the rest of the program: while a write is in flight,
// SIGINT and SIGTERM end the process, even if the program watches them too.
// A signal that is ignored when the package is first used (as SIGINT is for a
// background job of a non-interactive shell) stays ignored.

// inflight is the registry. Its lock also orders renames against the
// handler: the handler takes it and never gives it back, so once it starts
// no temporary file is created or renamed into place.
var inflight struct {
	sync.Mutex
	names   map[string]bool // temporary files created and not yet renamed or removed
	signals []os.Signal     // SIGINT and SIGTERM, less those ignored at first use
	ch      chan os.Signal
}

var setupOnce sync.Once

// setup prepares the registry and starts the handler, on first use.
func setup() {
	inflight.names = map[string]bool{}
	for _, s := range []os.Signal{syscall.SIGINT, syscall.SIGTERM} {
		if !signal.Ignored(s) {
			inflight.signals = append(inflight.signals, s)
		}
	}
	inflight.ch = make(chan os.Signal, 1)
	go cleanOnSignal(inflight.ch)
}

// createTemp creates ".BASE.tmp-RANDOM" in dir with perm (less the umask),
// registered, and watches the signals when it is the only file in flight.
func createTemp(dir, base string, perm fs.FileMode) (*os.File, error) {
	setupOnce.Do(setup)
	inflight.Lock()
	defer inflight.Unlock()
	for range 10000 {
		name := dir + "." + base + ".tmp-" + strconv.FormatUint(rand.Uint64(), 36)
		f, err := os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, perm)
		if errors.Is(err, fs.ErrExist) {
			continue
		}
		if err != nil {
			return nil, err
		}
		if len(inflight.names) == 0 && len(inflight.signals) > 0 {
			signal.Notify(inflight.ch, inflight.signals...)
		}
		inflight.names[f.Name()] = true
		return f, nil
	}
	return nil, &fs.PathError{Op: "createtemp", Path: dir + "." + base + ".tmp-*", Err: fs.ErrExist}
}

// settle renames the temporary file tmp to path, or removes it when path is
// empty or the rename fails, and takes it off the registry; the last file
// off stops the watch.
func settle(tmp, path string) error {
	inflight.Lock()
	defer inflight.Unlock()
	var err error
	if path != "" {
		err = os.Rename(tmp, path)
	}
	if path == "" || err != nil {
		os.Remove(tmp)
	}
	delete(inflight.names, tmp)
	if len(inflight.names) == 0 {
		signal.Stop(inflight.ch)
	}
	return err
}

// cleanOnSignal waits for a signal, removes the files in flight and ends the
// process by that signal.
func cleanOnSignal(ch <-chan os.Signal) {
	sig := <-ch
	inflight.Lock() // never unlocked: the process ends here
	for name := range inflight.names {
		os.Remove(name)
	}
	signal.Reset(sig)
	if p, err := os.FindProcess(os.Getpid()); err == nil {
		p.Signal(sig)
	}
	time.Sleep(time.Second)
	n := 0
	if s, ok := sig.(syscall.Signal); ok {
		n = int(s)
	}
	os.Exit(128 + n)
}
