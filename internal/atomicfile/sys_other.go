//go:build !unix

package atomicfile

import (
	"io/fs"
	"os"
)

// canWrite is nil where there is no access(2); the read-only check on the
// mode bits still applies.
func canWrite(path string) error { return nil }

// canWriteFolder is nil where there is no access(2); creating the temporary
// file reports a folder that cannot be written.
func canWriteFolder(dir string) error { return nil }

// keepOwner does nothing where files have no Unix owner.
func keepOwner(f *os.File, old fs.FileInfo) error { return nil }
