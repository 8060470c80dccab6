//go:build linux

package atomicfile_test

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/viewspec/viewspec/internal/atomicfile"
)

// tempName is the shape promised for temporary files: ".NAME.tmp-RANDOM".
var tempName = regexp.MustCompile(`^\.out\.txt\.tmp-[0-9a-z]+$`)

func TestWriteNewFile(t *testing.T) {
	defer syscall.Umask(syscall.Umask(0o027))
	dir := t.TempDir()
	name := filepath.Join(dir, "out.txt")
	err := atomicfile.Write(name, func(w io.Writer) error {
		// While writing, the only file in the folder is the temporary one.
		got := entries(t, dir)
		if len(got) != 1 || !tempName.MatchString(got[0]) {
			t.Errorf("folder while writing = %q, want one file named like .out.txt.tmp-RANDOM", got)
		}
		_, err := io.WriteString(w, "new")
		return err
	})
	if err != nil {
		t.Fatalf("Write(%s) = %v, want nil", name, err)
	}
	wantContent(t, name, "new")
	// 0644 less the umask 0027 = 0640; the old code set 0644 whatever the umask.
	wantMode(t, name, 0o640)
	wantEntries(t, dir, "out.txt")
}

func TestWriteKeepsMode(t *testing.T) {
	for _, mode := range []fs.FileMode{0o600, 0o640, 0o755, 0o666, 0o200} {
		dir := t.TempDir()
		name := filepath.Join(dir, "out.txt")
		writeFile(t, name, "old", mode)
		if err := atomicfile.WriteBytes(name, []byte("new")); err != nil {
			t.Fatalf("WriteBytes(%s, mode %04o) = %v, want nil", name, mode, err)
		}
		wantContent(t, name, "new")
		wantMode(t, name, mode)
		wantEntries(t, dir, "out.txt")
	}
}

func TestWriteKeepsOwner(t *testing.T) {
	if os.Geteuid() != 0 {
		t.Skip("changing a file's owner needs root")
	}
	const uid, gid = 12345, 23456 // any ids other than root's
	dir := t.TempDir()
	name := filepath.Join(dir, "out.txt")
	writeFile(t, name, "old", 0o640)
	if err := os.Chown(name, uid, gid); err != nil {
		t.Fatal(err)
	}
	if err := atomicfile.WriteBytes(name, []byte("new")); err != nil {
		t.Fatalf("WriteBytes(%s) = %v, want nil", name, err)
	}
	fi, err := os.Stat(name)
	if err != nil {
		t.Fatal(err)
	}
	st := fi.Sys().(*syscall.Stat_t)
	if st.Uid != uid || st.Gid != gid {
		t.Errorf("owner after WriteBytes(%s) = %d:%d, want %d:%d", name, st.Uid, st.Gid, uid, gid)
	}
	wantMode(t, name, 0o640)
}

func TestWriteRefusesReadOnly(t *testing.T) {
	for _, mode := range []fs.FileMode{0o444, 0o400, 0o555} {
		dir := t.TempDir()
		name := filepath.Join(dir, "out.txt")
		writeFile(t, name, "old", mode)
		err := refused(t, name, "is read-only")
		if !strings.Contains(err.Error(), name) {
			t.Errorf("Write(%s, mode %04o) = %q, want the message to name the file", name, mode, err)
		}
		wantContent(t, name, "old")
		wantMode(t, name, mode)
		wantEntries(t, dir, "out.txt")
	}
}

func TestWriteRefusesFolder(t *testing.T) {
	dir := t.TempDir()
	adir := filepath.Join(dir, "adir")
	if err := os.Mkdir(adir, 0o755); err != nil {
		t.Fatal(err)
	}
	err := refused(t, adir, "is a folder")
	if want := adir + " is a folder; give a file name"; err.Error() != want {
		t.Errorf("Write(%s) = %q, want %q", adir, err, want)
	}
	if fi, err := os.Lstat(adir); err != nil || !fi.IsDir() {
		t.Errorf("after Write(%s): Lstat = %v, %v, want the folder still there", adir, fi, err)
	}
	// A folder that does not exist is refused before the work, too.
	refused(t, filepath.Join(dir, "missing", "out.txt"), "which does not exist")
	refused(t, adir+"/", "is a folder")
	refused(t, filepath.Join(dir, "missing")+"/", "is a folder name")
	refused(t, "", "is no file name")
}

func TestWriteRefusesSpecialFiles(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	sock := filepath.Join(dir, "sock")
	l, err := net.Listen("unix", sock)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	type special struct {
		desc, name, why string
		typ             fs.FileMode
	}
	cases := []special{
		{"named pipe", fifo, "is a named pipe", fs.ModeNamedPipe},
		{"socket", sock, "is a socket", fs.ModeSocket},
	}
	if os.Geteuid() == 0 {
		blk := filepath.Join(dir, "blk")
		// Loop device 7:200, never opened: Write must refuse it untouched.
		if err := syscall.Mknod(blk, syscall.S_IFBLK|0o644, int(mkdev(7, 200))); err != nil {
			t.Logf("no block device case: mknod: %v", err)
		} else {
			cases = append(cases, special{"block device", blk, "is a block device", fs.ModeDevice})
		}
	}
	for _, c := range cases {
		err := refused(t, c.name, c.why)
		if !strings.Contains(err.Error(), c.name) {
			t.Errorf("%s: Write(%s) = %q, want the message to name the path", c.desc, c.name, err)
		}
		if fi, err := os.Lstat(c.name); err != nil || fi.Mode().Type() != c.typ {
			t.Errorf("%s: after Write(%s): Lstat = %v, %v, want type %v still", c.desc, c.name, fi, err, c.typ)
		}
	}
	wantEntries(t, dir, "blk", "fifo", "sock")
}

func TestWriteCharDeviceThrough(t *testing.T) {
	if os.Geteuid() != 0 {
		t.Skip("making a device node needs root")
	}
	dir := t.TempDir()
	null, full := filepath.Join(dir, "null"), filepath.Join(dir, "full")
	// Linux's memory devices: 1:3 is /dev/null, 1:7 is /dev/full (devices.txt).
	for _, d := range []struct {
		name  string
		minor uint32
	}{{null, 3}, {full, 7}} {
		if err := syscall.Mknod(d.name, syscall.S_IFCHR|0o666, int(mkdev(1, d.minor))); err != nil {
			t.Skipf("mknod %s: %v", d.name, err)
		}
	}
	link := filepath.Join(dir, "stdout")
	if err := os.Symlink("null", link); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{null, link} {
		if err := atomicfile.WriteBytes(name, []byte("gone")); err != nil {
			t.Errorf("WriteBytes(%s) = %v, want nil (written through to the null device)", name, err)
		}
	}
	// The report: "-o /dev/full" replaced the device; now it says the device is full.
	if err := atomicfile.WriteBytes(full, []byte("x")); !errors.Is(err, syscall.ENOSPC) {
		t.Errorf("WriteBytes(%s) = %v, want ENOSPC from the full device", full, err)
	}
	for _, name := range []string{null, full} {
		if fi, err := os.Lstat(name); err != nil || fi.Mode()&fs.ModeCharDevice == 0 {
			t.Errorf("after WriteBytes(%s): Lstat = %v, %v, want a character device still", name, fi, err)
		}
	}
	wantLink(t, link, "null")
	wantEntries(t, dir, "full", "null", "stdout")
}

func TestWriteThroughSymlink(t *testing.T) {
	cases := []struct {
		desc   string
		links  [][2]string // link, what it holds, made in order, relative to the test folder
		name   string      // what Write is given
		target string      // the file that must get the content
		old    bool        // the target exists beforehand, mode 0600
	}{
		{"link beside its target", [][2]string{{"out.lnk", "out.txt"}}, "out.lnk", "out.txt", true},
		{"link to another folder", [][2]string{{"a/out.lnk", "../b/out.txt"}}, "a/out.lnk", "b/out.txt", true},
		{"chain of links", [][2]string{{"a/1", "2"}, {"a/2", "../b/out.txt"}}, "a/1", "b/out.txt", true},
		{"dangling link", [][2]string{{"a/out.lnk", "../b/out.txt"}}, "a/out.lnk", "b/out.txt", false},
	}
	for _, c := range cases {
		dir := t.TempDir()
		for _, sub := range []string{"a", "b"} {
			if err := os.Mkdir(filepath.Join(dir, sub), 0o755); err != nil {
				t.Fatal(err)
			}
		}
		target := filepath.Join(dir, c.target)
		if c.old {
			writeFile(t, target, "old", 0o600)
		}
		for _, l := range c.links {
			if err := os.Symlink(l[1], filepath.Join(dir, l[0])); err != nil {
				t.Fatal(err)
			}
		}
		name := filepath.Join(dir, c.name)
		err := atomicfile.Write(name, func(w io.Writer) error {
			// The temporary file sits beside the target, so the rename is atomic there.
			n := 0
			for _, e := range entries(t, filepath.Dir(target)) {
				if strings.HasPrefix(e, "."+filepath.Base(target)+".tmp-") {
					n++
				}
			}
			if n != 1 {
				t.Errorf("%s: temporary files beside %s while writing = %d, want 1", c.desc, c.target, n)
			}
			_, err := io.WriteString(w, "new")
			return err
		})
		if err != nil {
			t.Fatalf("%s: Write(%s) = %v, want nil", c.desc, c.name, err)
		}
		wantContent(t, target, "new")
		if c.old {
			wantMode(t, target, 0o600)
		}
		for _, l := range c.links {
			wantLink(t, filepath.Join(dir, l[0]), l[1])
		}
		for _, sub := range []string{".", "a", "b"} {
			for _, e := range entries(t, filepath.Join(dir, sub)) {
				if strings.Contains(e, ".tmp-") {
					t.Errorf("%s: after Write: temporary file %s left in %s", c.desc, e, sub)
				}
			}
		}
	}
}

func TestWriteSymlinkToReadOnly(t *testing.T) {
	dir := t.TempDir()
	target, link := filepath.Join(dir, "out.txt"), filepath.Join(dir, "out.lnk")
	writeFile(t, target, "old", 0o444)
	if err := os.Symlink("out.txt", link); err != nil {
		t.Fatal(err)
	}
	err := refused(t, link, "is read-only")
	if want := link + " (a link to " + target + ") is read-only"; !strings.HasPrefix(err.Error(), want) {
		t.Errorf("Write(%s) = %q, want it to start %q", link, err, want)
	}
	wantContent(t, target, "old")
	wantLink(t, link, "out.txt")
}

func TestWriteErrorLeavesTarget(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "out.txt")
	writeFile(t, name, "old", 0o644)
	boom := errors.New("boom")
	err := atomicfile.Write(name, func(w io.Writer) error {
		w.Write(make([]byte, 1<<20)) // past the buffer, so the temporary file has content
		return boom
	})
	if err != boom {
		t.Errorf("Write(%s) with a failing writer = %v, want %v", name, err, boom)
	}
	wantContent(t, name, "old")
	wantEntries(t, dir, "out.txt")
}

func TestWriteConcurrent(t *testing.T) {
	// Writes in flight together share the registry of temporary files and
	// its signal watch; run with -race.
	dir := t.TempDir()
	const n = 16
	errs := make(chan error, n)
	for i := range n {
		go func() {
			errs <- atomicfile.WriteBytes(filepath.Join(dir, fmt.Sprintf("out%02d.txt", i)), make([]byte, 300<<10))
		}()
	}
	for range n {
		if err := <-errs; err != nil {
			t.Errorf("WriteBytes in parallel = %v, want nil", err)
		}
	}
	if got := entries(t, dir); len(got) != n {
		t.Errorf("folder after %d parallel writes = %q, want %d files and no temporary one", n, got, n)
	}
}

// helperEnv, when set, makes TestHelperProcess a child doing one job:
// "slow DIR" (for TestWriteSignalCleansUp) or "stdout NAME" (for
// TestWriteStandardOutput).
const helperEnv = "ATOMICFILE_HELPER"

// helper returns the command running TestHelperProcess with job and arg.
func helper(job, arg string) *exec.Cmd {
	cmd := exec.Command(os.Args[0], "-test.run=^TestHelperProcess$", "-test.count=1")
	cmd.Env = append(os.Environ(), helperEnv+"="+job+" "+arg)
	cmd.Stderr = os.Stderr
	return cmd
}

func TestWriteSignalCleansUp(t *testing.T) {
	for _, c := range []struct {
		sig  syscall.Signal
		code int // what a shell reports for the death
	}{{syscall.SIGINT, 130}, {syscall.SIGTERM, 143}} {
		dir := t.TempDir()
		cmd := helper("slow", dir)
		out, err := cmd.StdoutPipe()
		if err != nil {
			t.Fatal(err)
		}
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		kill := time.AfterFunc(30*time.Second, func() { cmd.Process.Kill() })
		ready := false
		for sc := bufio.NewScanner(out); sc.Scan(); {
			if sc.Text() == "writing" {
				ready = true
				break
			}
		}
		if !ready {
			cmd.Wait()
			t.Fatalf("%v: the helper never started writing", c.sig)
		}
		// Precondition: the temporary file exists, so its absence below means removal.
		if got := entries(t, dir); len(got) != 1 {
			t.Errorf("%v: folder while writing = %q, want one temporary file", c.sig, got)
		}
		if err := cmd.Process.Signal(c.sig); err != nil {
			t.Fatal(err)
		}
		io.Copy(io.Discard, out)
		cmd.Wait()
		kill.Stop()
		ws := cmd.ProcessState.Sys().(syscall.WaitStatus)
		if !ws.Signaled() || ws.Signal() != c.sig {
			t.Errorf("%v: helper ended with %v, want killed by %v (status %d in a shell)", c.sig, cmd.ProcessState, c.sig, c.code)
		}
		if got := entries(t, dir); len(got) != 0 {
			t.Errorf("%v: folder after the signal = %q, want empty", c.sig, got)
		}
	}
}

func TestWriteStandardOutput(t *testing.T) {
	// The child prints "before", writes "one" to /proc/self/fd/1 (what
	// /dev/stdout leads to) and "two" to NAME, then prints "after".
	// Replacing the file would have lost "before" (and "after" would go to
	// the replaced file); refusing the pipe would have lost "one".
	dir := t.TempDir()
	name := filepath.Join(dir, "out.txt")
	f, err := os.Create(name)
	if err != nil {
		t.Fatal(err)
	}
	cmd := helper("stdout", name)
	cmd.Stdout = f
	if err := cmd.Run(); err != nil {
		t.Errorf("helper with its output redirected to %s: %v", name, err)
	}
	f.Close()
	wantContent(t, name, "before\none\ntwo\nafter\n")
	wantEntries(t, dir, "out.txt")

	out, err := helper("stdout", "").Output()
	if got, want := string(out), "before\none\nafter\n"; err != nil || got != want {
		t.Errorf("helper with its output a pipe printed %q, %v, want %q", got, err, want)
	}
}

// TestHelperProcess is the child of the tests that need a process of their
// own; helperEnv says what it does.
func TestHelperProcess(t *testing.T) {
	job, arg, _ := strings.Cut(os.Getenv(helperEnv), " ")
	switch job {
	case "":
		t.Skip("a helper process for other tests")
	case "slow":
		// Write a megabyte, say "writing", and wait to be signalled.
		atomicfile.Write(filepath.Join(arg, "corpus.jsonl"), func(w io.Writer) error {
			w.Write(make([]byte, 1<<20))
			os.Stdout.WriteString("writing\n")
			time.Sleep(20 * time.Second)
			return nil
		})
		t.Fatal("the helper was not ended by the signal")
	case "stdout":
		os.Stdout.WriteString("before\n")
		if err := atomicfile.WriteBytes("/proc/self/fd/1", []byte("one\n")); err != nil {
			t.Fatalf("WriteBytes(/proc/self/fd/1) = %v, want nil", err)
		}
		if arg != "" {
			if err := atomicfile.WriteBytes(arg, []byte("two\n")); err != nil {
				t.Fatalf("WriteBytes(%s) = %v, want nil", arg, err)
			}
		}
		os.Stdout.WriteString("after\n")
		os.Exit(0) // before the test binary prints PASS on the output
	}
}

// refused writes name, which must be refused with a *TargetError whose
// message contains why, before the writer is called; Check must agree.
func refused(t *testing.T, name, why string) error {
	t.Helper()
	called := false
	err := atomicfile.Write(name, func(w io.Writer) error {
		called = true
		_, err := io.WriteString(w, "new")
		return err
	})
	var te *atomicfile.TargetError
	if !errors.As(err, &te) || !strings.Contains(err.Error(), why) {
		t.Errorf("Write(%q) = %v, want a *TargetError saying %q", name, err, why)
	}
	if called {
		t.Errorf("Write(%q) called the writer, want a refusal before any work", name)
	}
	if cerr := atomicfile.Check(name); cerr == nil || err == nil || cerr.Error() != err.Error() {
		t.Errorf("Check(%q) = %v, want Write's error %v", name, cerr, err)
	}
	if err == nil {
		return errors.New("(no error)")
	}
	return err
}

// entries lists the names in dir, sorted.
func entries(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	return names
}

// wantEntries checks that dir holds exactly the names present among want
// (sorted), and no temporary file.
func wantEntries(t *testing.T, dir string, want ...string) {
	t.Helper()
	got := entries(t, dir)
	var present []string
	for _, w := range want {
		if _, err := os.Lstat(filepath.Join(dir, w)); err == nil {
			present = append(present, w)
		}
	}
	if strings.Join(got, " ") != strings.Join(present, " ") {
		t.Errorf("folder %s = %q, want %q", dir, got, present)
	}
}

func writeFile(t *testing.T, name, content string, mode fs.FileMode) {
	t.Helper()
	if err := os.WriteFile(name, []byte(content), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(name, mode); err != nil {
		t.Fatal(err)
	}
}

func wantContent(t *testing.T, name, want string) {
	t.Helper()
	b, err := os.ReadFile(name)
	if err != nil || string(b) != want {
		t.Errorf("content of %s = %q, %v, want %q", name, b, err, want)
	}
}

func wantMode(t *testing.T, name string, want fs.FileMode) {
	t.Helper()
	fi, err := os.Stat(name)
	if err != nil {
		t.Fatal(err)
	}
	if got := fi.Mode().Perm(); got != want {
		t.Errorf("mode of %s = %04o, want %04o", name, got, want)
	}
}

func wantLink(t *testing.T, link, want string) {
	t.Helper()
	got, err := os.Readlink(link)
	if err != nil || got != want {
		t.Errorf("Readlink(%s) = %q, %v, want %q (the link kept)", link, got, err, want)
	}
}

// mkdev packs a Linux device number as glibc's makedev does.
func mkdev(major, minor uint32) uint64 {
	return uint64(major&0xfff)<<8 | uint64(minor&0xff) | uint64(minor&^0xff)<<12 | uint64(major&^0xfff)<<32
}
