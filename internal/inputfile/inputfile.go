// Package inputfile reads the small files a user hands scorewright (design
// files, menu files) with a size bound, and refuses anything that is not a
// regular file: a device such as /dev/zero never ends, and a pipe with no
// writer would block the program (or the workbench) forever.
package inputfile

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"syscall"
)

// ErrTooLarge is wrapped by every error about an input over its bound.
var ErrTooLarge = errors.New("file too large")

// ErrNotRegular is wrapped when the path names a device, pipe, socket or
// directory.
var ErrNotRegular = errors.New("not a regular file")

// Open opens path for reading if it names a regular file. The file is
// opened without blocking, so naming a pipe fails at once instead of
// waiting for a writer.
func Open(path string) (*os.File, error) {
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, err
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, err
	}
	if !st.Mode().IsRegular() {
		f.Close()
		return nil, fmt.Errorf("%s: %w (%s); give the path of an ordinary file", path, ErrNotRegular, kind(st.Mode()))
	}
	return f, nil
}

func kind(m os.FileMode) string {
	switch {
	case m.IsDir():
		return "a directory"
	case m&os.ModeNamedPipe != 0:
		return "a pipe"
	case m&os.ModeSocket != 0:
		return "a socket"
	case m&os.ModeDevice != 0:
		return "a device"
	}
	return "a special file"
}

// ReadFile reads the regular file at path, refusing it when it holds more
// than limit bytes. Errors name path.
func ReadFile(path string, limit int64) ([]byte, error) {
	f, err := Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadAll(f, path, limit)
}

// ReadAll reads r to its end, or fails with an error wrapping ErrTooLarge
// once more than limit bytes arrive; at most limit+1 bytes are ever held.
func ReadAll(r io.Reader, name string, limit int64) ([]byte, error) {
	b, err := io.ReadAll(Limit(r, name, limit))
	if err != nil {
		return nil, err
	}
	return b, nil
}

// ReadAllContext is ReadAll that stops with ctx's error, naming name,
// when ctx is cancelled: the file is read in pieces of at most 64 KiB and
// ctx is looked at before each, so a slow disk or network share stops at
// the next piece. (A single read the system holds up cannot be cut
// short; the caller stops waiting for it.)
func ReadAllContext(ctx context.Context, r io.Reader, name string, limit int64) ([]byte, error) {
	return ReadAll(&ctxReader{ctx: ctx, r: r, name: name}, name, limit)
}

type ctxReader struct {
	ctx  context.Context
	r    io.Reader
	name string
}

func (c *ctxReader) Read(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, fmt.Errorf("%s: reading stopped: %w", c.name, err)
	}
	return c.r.Read(p[:min(len(p), 64<<10)])
}

// Limit returns a reader that passes r through until more than limit bytes
// have been read, and from then on fails with an error naming name and the
// bound, so a streaming reader above it stops instead of growing without end.
func Limit(r io.Reader, name string, limit int64) io.Reader {
	return &limited{r: r, name: name, limit: limit, left: limit}
}

type limited struct {
	r           io.Reader
	name        string
	limit, left int64
}

func (l *limited) Read(p []byte) (int, error) {
	if l.left < 0 {
		return 0, l.err()
	}
	if int64(len(p)) > l.left+1 {
		p = p[:l.left+1]
	}
	n, err := l.r.Read(p)
	l.left -= int64(n)
	if l.left < 0 {
		// The byte past the bound is never handed on.
		return n - 1, l.err()
	}
	return n, err
}

func (l *limited) err() error {
	return fmt.Errorf("%s: %w: more than %s", l.name, ErrTooLarge, Size(l.limit))
}

// Size writes a byte count the way limits are stated ("4 MiB").
func Size(n int64) string {
	switch {
	case n >= 1<<20 && n%(1<<20) == 0:
		return fmt.Sprintf("%d MiB", n>>20)
	case n >= 1<<10 && n%(1<<10) == 0:
		return fmt.Sprintf("%d KiB", n>>10)
	}
	return fmt.Sprintf("%d bytes", n)
}

// Endless is a reader that never ends, as /dev/zero or a hostile pipe: the
// stream the bound of every reader is tested against. N counts the bytes
// read from it.
type Endless struct {
	// Fill is the byte every read returns.
	Fill byte
	N    int64
}

// Read fills p with Fill.
func (e *Endless) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = e.Fill
	}
	e.N += int64(len(p))
	return len(p), nil
}
