//go:build unix

package atomicfile

import (
	"io/fs"
	"os"
	"syscall"
)

// Modes for access(2), from <unistd.h>; the syscall package does not name them.
const (
	accessW = 0x2 // W_OK
	accessX = 0x1 // X_OK
)

// canWrite says, with access(2) semantics (the real user, and root passes),
// why this user may not write the file path, or nil.
func canWrite(path string) error {
	return syscall.Access(path, accessW)
}

// canWriteFolder says why this user may not create and rename files in the
// folder dir, or nil.
func canWriteFolder(dir string) error {
	return syscall.Access(dir, accessW|accessX)
}

// keepOwner gives the temporary file f the owner and group of the file old
// it replaces. Root changes both, and an error is returned; another user can
// only move the file to another of their groups, which is tried, and its
// failure ignored (the file then has the user's group, as any new file).
func keepOwner(f *os.File, old fs.FileInfo) error {
	want, ok := old.Sys().(*syscall.Stat_t)
	if !ok {
		return nil
	}
	fi, err := f.Stat()
	if err != nil {
		return err
	}
	have, ok := fi.Sys().(*syscall.Stat_t)
	if !ok || (have.Uid == want.Uid && have.Gid == want.Gid) {
		return nil
	}
	if os.Geteuid() == 0 {
		return f.Chown(int(want.Uid), int(want.Gid))
	}
	if have.Gid != want.Gid {
		f.Chown(-1, int(want.Gid))
	}
	return nil
}
