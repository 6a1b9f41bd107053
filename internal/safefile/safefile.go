// Package safefile writes files the way a contract annex needs: atomically
// (temporary file, then rename), never over an existing file unless the
// caller asked for it, never over anything but a regular file, and with no
// temporary file left behind, even when the program is interrupted.
package safefile

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"os/signal"
	"path/filepath"
	"sync"
	"syscall"
)

// ErrExists is wrapped by Write when the target exists and overwrite is false.
var ErrExists = errors.New("file exists")

// ErrNotRegular is wrapped by Write when the target exists and is not a
// regular file: a symbolic link, a device such as /dev/stdout, a pipe or
// a directory. Replacing one would replace the special file itself.
var ErrNotRegular = errors.New("not a regular file")

// ErrInterrupted is wrapped by Write when an interrupt or termination
// signal arrived during the write; the temporary file is removed and the
// target left as it was.
var ErrInterrupted = errors.New("interrupted")

// Write writes data to a temporary file in the target's directory and
// renames it into place, so a reader never sees half a file and a failure
// leaves any old file intact. Without overwrite, an existing file is an
// error wrapping ErrExists; with it, only a regular file is replaced (an
// error wrapping ErrNotRegular otherwise) and the new file keeps the old
// one's permission bits. A new file gets 0644. Every error names path,
// never the temporary file.
func Write(path string, data []byte, overwrite bool) error {
	return write(path, data, overwrite, nil)
}

// write is Write with a hook run after the data is written and before it
// is renamed into place, for the test of an interrupted write.
// CheckTarget fails with an error wrapping ErrNotRegular when path exists
// and is not a regular file, the one kind of file Write replaces.
func CheckTarget(path string) error {
	if st, err := os.Lstat(path); err == nil && !st.Mode().IsRegular() {
		return fmt.Errorf("%s: %w (%s); scorewright writes only regular files, so give another path", path, ErrNotRegular, kind(st.Mode()))
	}
	return nil
}

func write(path string, data []byte, overwrite bool, midway func()) error {
	perm := fs.FileMode(0o644)
	if err := CheckTarget(path); err != nil {
		return err
	}
	if st, err := os.Lstat(path); err == nil {
		if !overwrite {
			return fmt.Errorf("%s: %w (use --force to replace it)", path, ErrExists)
		}
		perm = st.Mode().Perm()
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".tmp*")
	if err != nil {
		return Named(path, err)
	}
	w := &pending{name: tmp.Name()}
	stop := w.removeOnSignal()
	defer stop()
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		w.remove()
		return Named(path, err)
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		w.remove()
		return Named(path, err)
	}
	if err := tmp.Close(); err != nil {
		w.remove()
		return Named(path, err)
	}
	if err := os.Chmod(w.name, perm); err != nil {
		w.remove()
		return Named(path, err)
	}
	if midway != nil {
		midway()
	}
	return w.place(path, overwrite)
}

// pending is a temporary file not yet in place. Its lock orders the
// signal handler's removal against the rename.
type pending struct {
	mu          sync.Mutex
	name        string
	interrupted bool
}

func (w *pending) remove() {
	w.mu.Lock()
	defer w.mu.Unlock()
	os.Remove(w.name)
}

// removeOnSignal removes the temporary file if SIGINT or SIGTERM arrives
// before it is in place, then passes the signal on: this handler stops
// listening and raises the signal again, so the program's own handler (the
// workbench's) or the default action (exit) takes it as it would have.
// The returned function ends the watch.
func (w *pending) removeOnSignal() func() {
	ch := make(chan os.Signal, 1)
	done := make(chan struct{})
	signal.Notify(ch, syscall.SIGINT, syscall.SIGTERM)
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		select {
		case s := <-ch:
			w.mu.Lock()
			os.Remove(w.name)
			w.interrupted = true
			w.mu.Unlock()
			signal.Stop(ch)
			if p, err := os.FindProcess(os.Getpid()); err == nil {
				p.Signal(s)
			}
		case <-done:
		}
	}()
	return func() {
		signal.Stop(ch)
		close(done)
		wg.Wait()
	}
}

// place renames (or, without overwrite, links) the temporary file to path.
func (w *pending) place(path string, overwrite bool) error {
	w.mu.Lock()
	defer w.mu.Unlock()
	if w.interrupted {
		return fmt.Errorf("%s: %w; nothing was written", path, ErrInterrupted)
	}
	if !overwrite {
		// Link fails if the target appeared meanwhile, closing the race
		// between the check above and the rename.
		err := os.Link(w.name, path)
		os.Remove(w.name)
		if os.IsExist(err) {
			return fmt.Errorf("%s: %w (use --force to replace it)", path, ErrExists)
		}
		return Named(path, err)
	}
	if st, err := os.Lstat(path); err == nil && !st.Mode().IsRegular() {
		// It changed into something special since the first look.
		os.Remove(w.name)
		return fmt.Errorf("%s: %w (%s); scorewright writes only regular files, so give another path", path, ErrNotRegular, kind(st.Mode()))
	}
	if err := os.Rename(w.name, path); err != nil {
		os.Remove(w.name)
		return Named(path, err)
	}
	return nil
}

// Named gives err in terms of the file asked for, path: the operating
// system's reason without the temporary file's name. Writers that stream
// to a temporary file of their own use it for their messages.
func Named(path string, err error) error {
	if err == nil {
		return nil
	}
	var pe *os.PathError
	var le *os.LinkError
	switch {
	case errors.As(err, &pe):
		err = pe.Err
	case errors.As(err, &le):
		err = le.Err
	}
	return fmt.Errorf("cannot write %s: %w", path, err)
}

func kind(m fs.FileMode) string {
	switch {
	case m&fs.ModeSymlink != 0:
		return "a symbolic link"
	case m.IsDir():
		return "a directory"
	case m&fs.ModeNamedPipe != 0:
		return "a pipe"
	case m&fs.ModeSocket != 0:
		return "a socket"
	case m&fs.ModeDevice != 0:
		return "a device"
	}
	return "a special file"
}
