// Package atomicfile writes files so that readers never see them half
// written: into a temporary file in the same folder, synced, then renamed.
package atomicfile

import (
	"bufio"
	"io"
	"os"
	"path/filepath"
)

// Write writes name with write, atomically. On any error the temporary
// file is removed and name is left as it was.
func Write(name string, write func(w io.Writer) error) (err error) {
	dir := filepath.Dir(name)
	f, err := os.CreateTemp(dir, "."+filepath.Base(name)+".*.tmp")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(f.Name())
		}
	}()
	bw := bufio.NewWriterSize(f, 256<<10)
	if err = write(bw); err != nil {
		return err
	}
	if err = bw.Flush(); err != nil {
		return err
	}
	if err = f.Chmod(0o644); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	return os.Rename(f.Name(), name)
}

// WriteBytes writes data to name atomically.
func WriteBytes(name string, data []byte) error {
	return Write(name, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}
