package out

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// WriteFileAtomic creates or replaces the file at path with what write
// produces. The bytes go to a temporary file in the same folder, which is
// flushed, fsynced and then renamed over path, so readers see either the old
// file or the complete new one. If write or any step fails, the temporary file
// is removed, path is left exactly as it was, and the error is returned.
// The new file gets mode 0644.
func WriteFileAtomic(path string, write func(w io.Writer) error) (err error) {
	if path == "" {
		return errors.New("out: empty output path")
	}
	dir, base := filepath.Split(path)
	if base == "" {
		return fmt.Errorf("out: output path %q names a folder, not a file", path)
	}
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("out: writing %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriterSize(f, 64<<10)
	if err = write(bw); err != nil {
		return fmt.Errorf("out: writing %s: %w", path, err)
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("out: writing %s: %w", path, err)
	}
	if err = f.Chmod(0o644); err != nil {
		return fmt.Errorf("out: writing %s: %w", path, err)
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("out: writing %s: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("out: writing %s: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("out: writing %s: %w", path, err)
	}
	// Make the rename itself durable. Some file systems refuse to fsync a
	// folder; the file is already complete and in place, so that is not an
	// error worth failing the run for.
	if d, derr := os.Open(dir); derr == nil {
		d.Sync()
		d.Close()
	}
	return nil
}

// writeBytesAtomic writes b to path atomically.
func writeBytesAtomic(path string, b []byte) error {
	return WriteFileAtomic(path, func(w io.Writer) error {
		_, err := w.Write(b)
		return err
	})
}
