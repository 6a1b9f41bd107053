package inputfile

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

func TestReadAllStopsAtTheBound(t *testing.T) {
	src := &Endless{}
	_, err := ReadAll(src, "menu.csv", 1<<20)
	if !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), "menu.csv") || !strings.Contains(err.Error(), "1 MiB") {
		t.Fatalf("error %v", err)
	}
	if src.N > 1<<20+64<<10 {
		t.Errorf("read %d bytes from an endless stream with a 1 MiB bound", src.N)
	}
}

func TestReadAllKeepsAFileAtTheBound(t *testing.T) {
	b, err := ReadAll(strings.NewReader("abcd"), "x", 4)
	if err != nil || string(b) != "abcd" {
		t.Fatalf("%q %v", b, err)
	}
	if _, err := ReadAll(strings.NewReader("abcde"), "x", 4); !errors.Is(err, ErrTooLarge) {
		t.Fatalf("five bytes over a four-byte bound: %v", err)
	}
}

func TestSpecialFilesRefused(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skip("no FIFOs here:", err)
	}
	for _, path := range []string{"/dev/zero", fifo, dir} {
		done := make(chan error, 1)
		go func() { _, err := ReadFile(path, 1<<20); done <- err }()
		select {
		case err := <-done:
			if !errors.Is(err, ErrNotRegular) && !errors.Is(err, os.ErrNotExist) {
				t.Errorf("%s: %v", path, err)
			}
			if err != nil && !strings.Contains(err.Error(), path) {
				t.Errorf("%s: error does not name the path: %v", path, err)
			}
		case <-time.After(5 * time.Second):
			t.Fatalf("%s: reading blocked", path)
		}
	}
}

// A cancelled read stops at the next piece, with the cause in the error.
func TestReadAllContextStops(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	r := &cancelAfter{n: 3, cancel: cancel}
	_, err := ReadAllContext(ctx, r, "slow.toml", 1<<20)
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "slow.toml") || r.reads != 3 {
		t.Errorf("error %v after %d reads; want the file named, context.Canceled, 3 reads", err, r.reads)
	}
}

// cancelAfter gives one byte a read and cancels after n reads.
type cancelAfter struct {
	n, reads int
	cancel   func()
}

func (c *cancelAfter) Read(p []byte) (int, error) {
	c.reads++
	if c.reads == c.n {
		c.cancel()
	}
	p[0] = 'x'
	return 1, nil
}
