// Package safefile writes files the way a contract annex needs: atomically
// (temporary file, then rename) and never over an existing file unless the
// caller asked for it.
package safefile

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
)

// ErrExists is wrapped by Write when the target exists and overwrite is false.
var ErrExists = errors.New("file exists")

// Write writes data to a temporary file in the target's directory
// and renames it into place, so a reader never sees half a file and a
// failure leaves any old file intact. Without overwrite, an existing file
// is an error wrapping ErrExists.
func Write(path string, data []byte, overwrite bool) error {
	if !overwrite {
		if _, err := os.Lstat(path); err == nil {
			return fmt.Errorf("%s: %w (use --force to replace it)", path, ErrExists)
		}
	}
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp*")
	if err != nil {
		// Name the file asked for, not the temporary one.
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return fmt.Errorf("cannot write %s: %w", path, err)
	}
	name := tmp.Name()
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		os.Remove(name)
		return err
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		os.Remove(name)
		return err
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return err
	}
	if err := os.Chmod(name, 0o644); err != nil {
		os.Remove(name)
		return err
	}
	if !overwrite {
		// Link fails if the target appeared meanwhile, closing the race
		// between the check above and the rename.
		if err := os.Link(name, path); err != nil {
			os.Remove(name)
			if os.IsExist(err) {
				return fmt.Errorf("%s: %w (use --force to replace it)", path, ErrExists)
			}
			return err
		}
		return os.Remove(name)
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return err
	}
	return nil
}
