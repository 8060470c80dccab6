package atomicfile

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
)

// bufSize is the buffer between the caller's writes and the file, bytes.
const bufSize = 256 << 10

// A TargetError says why a name cannot be written. No file has been touched
// when it is returned.
type TargetError struct {
	Name   string // the name as given to Check or Write
	Target string // where Name's symbolic links lead, when that differs from Name
	Reason string // what is wrong and, where there is one, what to do
}

func (e *TargetError) Error() string {
	name := e.Name
	if name == "" {
		name = strconv.Quote(name)
	}
	if e.Target != "" && e.Target != e.Name {
		name += " (a link to " + e.Target + ")"
	}
	return name + " " + e.Reason
}

// Write writes name with write, atomically, as the package doc describes:
// through a temporary file beside the target, renamed over it when write
// and the sync succeed. The process's standard output or error, and a
// character device, are written in place instead. Write first makes
// [Check]'s refusals, before calling write.
func Write(name string, write func(w io.Writer) error) error {
	t, err := resolve(name)
	if err != nil {
		return err
	}
	switch {
	case t.std != nil:
		return writeTo(t.std, write)
	case t.direct:
		return writeThrough(t.path, write)
	}
	return replace(t, write)
}

// WriteBytes writes data to name as [Write] does.
func WriteBytes(name string, data []byte) error {
	return Write(name, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// Check returns the error [Write] would return for name before writing
// anything (a [*TargetError], or the file system's error when name cannot be
// looked at), or nil. Commands call it on their output names before long
// work, so that a bad name is refused at once.
func Check(name string) error {
	_, err := resolve(name)
	return err
}

// target is where Write puts the content.
type target struct {
	path   string      // the file to replace or create: name, or where its links lead
	info   fs.FileInfo // the existing file at path, nil when there is none
	direct bool        // path is a character device, written through, not replaced
	std    *os.File    // os.Stdout or os.Stderr when path is that file, written to in place
}

// resolve follows name's symbolic links and makes Check's refusals.
func resolve(name string) (target, error) {
	if name == "" {
		return target{}, &TargetError{Name: name, Reason: "is no file name; give one"}
	}
	lfi, err := os.Lstat(name)
	if errors.Is(err, fs.ErrNotExist) {
		return newFile(name, name)
	}
	if err != nil {
		return target{}, err
	}
	t := target{path: name, info: lfi}
	if lfi.Mode()&fs.ModeSymlink != 0 {
		fi, err := os.Stat(name)
		if errors.Is(err, fs.ErrNotExist) {
			end, err := danglingEnd(name)
			if err != nil {
				return target{}, err
			}
			return newFile(name, end)
		}
		if err != nil {
			return target{}, err
		}
		t.info = fi
		// A /proc/self/fd link to a pipe leads to no path; only a regular
		// file needs one, for its temporary file and the rename.
		if p, err := filepath.EvalSymlinks(name); err == nil {
			t.path = p
		} else if fi.Mode().IsRegular() {
			return target{}, err
		}
	}
	if t.std = standard(t.info); t.std != nil {
		return t, nil
	}
	return t, refuse(name, &t)
}

// standard returns os.Stdout or os.Stderr when fi is the same file, or nil.
// Writing such a name (/dev/stdout, /proc/self/fd/2, or the file the shell
// redirected the output to) goes to the descriptor itself, whatever the file
// is: replacing the file would lose what was written to the descriptor
// before and after, and a pipe is what "-o /dev/stdout | ..." means.
func standard(fi fs.FileInfo) *os.File {
	for _, f := range []*os.File{os.Stdout, os.Stderr} {
		if f == nil {
			continue
		}
		if sfi, err := f.Stat(); err == nil && os.SameFile(fi, sfi) {
			return f
		}
	}
	return nil
}

// refuse returns a *TargetError when the existing file t may not be written,
// and marks a character device as written through.
func refuse(name string, t *target) error {
	mode := t.info.Mode()
	why := func(format string, args ...any) error {
		return &TargetError{Name: name, Target: t.path, Reason: fmt.Sprintf(format, args...)}
	}
	switch {
	case mode.IsDir():
		return why("is a folder; give a file name")
	case mode.IsRegular():
		if mode.Perm()&0o222 == 0 {
			return why("is read-only (mode %04o); make it writable or give another name", mode.Perm())
		}
		if err := canWrite(t.path); err != nil {
			return why("is not writable by this user (%v)", err)
		}
		return checkFolder(name, t.path)
	case mode&fs.ModeCharDevice != 0:
		t.direct = true
		return nil
	case mode&fs.ModeDevice != 0:
		return why("is a block device, not a regular file; refusing to replace it")
	case mode&fs.ModeNamedPipe != 0:
		return why("is a named pipe (FIFO), not a regular file; refusing to replace it (write to standard output to feed a pipe)")
	case mode&fs.ModeSocket != 0:
		return why("is a socket, not a regular file; refusing to replace it")
	}
	return why("is not a regular file (%v); refusing to replace it", mode.Type())
}

// newFile is the target for a path that does not exist yet: name itself,
// or the end of name's dangling link.
func newFile(name, path string) (target, error) {
	if _, base := split(path); base == "" || base == "." || base == ".." {
		return target{}, &TargetError{Name: name, Target: path, Reason: "is a folder name; give a file name"}
	}
	return target{path: path}, checkFolder(name, path)
}

// checkFolder refuses path when its folder, where the temporary file goes,
// is missing, not a folder, or not writable.
func checkFolder(name, path string) error {
	dir, _ := split(path)
	why := func(format string, args ...any) error {
		return &TargetError{Name: name, Target: path, Reason: fmt.Sprintf(format, args...)}
	}
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return why("is in folder %s, which does not exist", dir)
	case err != nil:
		return err
	case !fi.IsDir():
		return why("is in %s, which is not a folder", dir)
	}
	if err := canWriteFolder(dir); err != nil {
		return why("is in folder %s, where this user may not write (%v)", dir, err)
	}
	return nil
}

// danglingEnd follows name's chain of symbolic links to the path that does
// not exist, which writing name creates.
func danglingEnd(name string) (string, error) {
	p := name
	for range 40 { // Linux's limit on links in one lookup (MAXSYMLINKS)
		link, err := os.Readlink(p)
		if err != nil {
			return "", err
		}
		if !filepath.IsAbs(link) {
			dir, _ := split(p)
			link = dir + link
		}
		p = link
		fi, err := os.Lstat(p)
		if errors.Is(err, fs.ErrNotExist) {
			return p, nil
		}
		if err != nil {
			return "", err
		}
		if fi.Mode()&fs.ModeSymlink == 0 {
			// It exists after all: the file system changed under us.
			return "", &fs.PathError{Op: "resolve", Path: name, Err: errors.New("link target appeared while resolving")}
		}
	}
	return "", &fs.PathError{Op: "resolve", Path: name, Err: errors.New("too many levels of symbolic links")}
}

// split cuts path after its last separator, without cleaning it: dir keeps
// its trailing separator ("" becomes "./"), so that dir+base names the same
// file as path even when a ".." follows a linked folder, which cleaning would
// resolve lexically, and wrongly.
func split(path string) (dir, base string) {
	i := len(path) - 1
	for i >= 0 && !os.IsPathSeparator(path[i]) {
		i--
	}
	dir, base = path[:i+1], path[i+1:]
	if dir == "" {
		dir = "." + string(filepath.Separator)
	}
	return dir, base
}

// replace writes t through a temporary file renamed over t.path. The
// temporary file is created 0600 when it will take an existing file's mode
// (so its content is never more readable than the old file's), and 0644 less
// the umask for a new file, which is the mode it keeps.
func replace(t target, write func(w io.Writer) error) (err error) {
	perm := fs.FileMode(0o644)
	if t.info != nil {
		perm = 0o600
	}
	dir, base := split(t.path)
	f, err := createTemp(dir, base, perm)
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			f.Close()
			settle(f.Name(), "")
		}
	}()
	bw := bufio.NewWriterSize(f, bufSize)
	if err = write(bw); err != nil {
		return err
	}
	if err = bw.Flush(); err != nil {
		return err
	}
	if t.info != nil {
		// Owner before mode: chown clears the set-user-ID and set-group-ID bits.
		if err = keepOwner(f, t.info); err != nil {
			return err
		}
		if err = f.Chmod(t.info.Mode() & (fs.ModePerm | fs.ModeSetuid | fs.ModeSetgid | fs.ModeSticky)); err != nil {
			return err
		}
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	// settle removes the temporary file itself if the rename fails.
	return settle(f.Name(), t.path)
}

// writeThrough writes a character device in place. It opens without
// creating, and checks that what it opened is still a character device, so
// that a file put at path since resolve is not overwritten in place.
func writeThrough(path string, write func(w io.Writer) error) error {
	f, err := os.OpenFile(path, os.O_WRONLY, 0)
	if err != nil {
		return err
	}
	defer f.Close()
	if fi, err := f.Stat(); err != nil {
		return err
	} else if fi.Mode()&fs.ModeCharDevice == 0 {
		return &TargetError{Name: path, Reason: "changed while being opened: it is no longer a character device"}
	}
	if err := writeTo(f, write); err != nil {
		return err
	}
	return f.Close()
}

// writeTo writes f in place through a buffer, and leaves it open.
func writeTo(f *os.File, write func(w io.Writer) error) error {
	bw := bufio.NewWriterSize(f, bufSize)
	if err := write(bw); err != nil {
		return err
	}
	return bw.Flush()
}
