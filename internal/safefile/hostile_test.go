package safefile

import (
	"errors"
	"os"
	"os/signal"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Even with overwrite, only a regular file is replaced: a symbolic link,
// a directory or a pipe stays as it was and the error names it.
func TestSpecialFilesNeverReplaced(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "kept.csv")
	if err := os.WriteFile(target, []byte("kept"), 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.csv")
	if err := os.Symlink(target, link); err != nil {
		t.Fatal(err)
	}
	sub := filepath.Join(dir, "adir")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	paths := map[string]string{link: "symbolic link", sub: "directory"}
	fifo := filepath.Join(dir, "pipe")
	if syscall.Mkfifo(fifo, 0o600) == nil {
		paths[fifo] = "pipe"
	}
	if _, err := os.Lstat("/dev/null"); err == nil {
		paths["/dev/null"] = "device"
	}
	for path, kind := range paths {
		for _, overwrite := range []bool{false, true} {
			err := Write(path, []byte("new"), overwrite)
			if !errors.Is(err, ErrNotRegular) || !strings.Contains(err.Error(), path) || !strings.Contains(err.Error(), kind) {
				t.Errorf("%s (overwrite %v): %v", path, overwrite, err)
			}
		}
	}
	if st, err := os.Lstat(link); err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Errorf("the link was replaced: %v %v", st, err)
	}
	if b, _ := os.ReadFile(target); string(b) != "kept" {
		t.Errorf("the link's target changed: %q", b)
	}
	assertNoTemp(t, dir)
}

// A replaced file keeps its permission bits; a new file gets 0644.
func TestReplaceKeepsPermissions(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "private.csv")
	if err := os.WriteFile(path, []byte("old"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := Write(path, []byte("new"), true); err != nil {
		t.Fatal(err)
	}
	if st, _ := os.Stat(path); st.Mode().Perm() != 0o600 {
		t.Errorf("replaced file has mode %v, want 0600", st.Mode().Perm())
	}
	fresh := filepath.Join(dir, "new.csv")
	if err := Write(fresh, []byte("x"), false); err != nil {
		t.Fatal(err)
	}
	if st, _ := os.Stat(fresh); st.Mode().Perm() != 0o644 {
		t.Errorf("new file has mode %v", st.Mode().Perm())
	}
}

// A failure names the file asked for, never the temporary one.
func TestErrorsNameTheTarget(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("root writes into read-only directories")
	}
	dir := filepath.Join(t.TempDir(), "ro")
	if err := os.Mkdir(dir, 0o500); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "annex.csv")
	err := Write(path, []byte("x"), true)
	if err == nil || !strings.Contains(err.Error(), path) || strings.Contains(err.Error(), ".tmp") {
		t.Errorf("error %v", err)
	}
}

// An interrupt during the write removes the temporary file, leaves the
// old file alone, and is passed on to the program's own handler (here the
// test's, which keeps the test alive).
func TestInterruptedWriteLeavesNoTemp(t *testing.T) {
	caught := make(chan os.Signal, 1)
	signal.Notify(caught, syscall.SIGINT)
	defer signal.Stop(caught)
	dir := t.TempDir()
	path := filepath.Join(dir, "annex.csv")
	if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	err := write(path, []byte("new"), true, func() {
		syscall.Kill(os.Getpid(), syscall.SIGINT)
		deadline := time.Now().Add(5 * time.Second)
		for hasTemp(dir) && time.Now().Before(deadline) {
			time.Sleep(time.Millisecond)
		}
	})
	if !errors.Is(err, ErrInterrupted) || !strings.Contains(err.Error(), path) {
		t.Errorf("error %v", err)
	}
	assertNoTemp(t, dir)
	if b, _ := os.ReadFile(path); string(b) != "old" {
		t.Errorf("the old file became %q", b)
	}
	select {
	case <-caught:
	case <-time.After(5 * time.Second):
		t.Error("the signal was not passed on")
	}
}

func hasTemp(dir string) bool {
	es, _ := os.ReadDir(dir)
	for _, e := range es {
		if strings.Contains(e.Name(), ".tmp") {
			return true
		}
	}
	return false
}

func assertNoTemp(t *testing.T, dir string) {
	t.Helper()
	if hasTemp(dir) {
		t.Errorf("a temporary file was left in %s", dir)
	}
}
