package safefile

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestWriteRefusesAndReplaces(t *testing.T) {
	path := filepath.Join(t.TempDir(), "annex.csv")
	if err := Write(path, []byte("one"), false); err != nil {
		t.Fatal(err)
	}
	if err := Write(path, []byte("two"), false); !errors.Is(err, ErrExists) {
		t.Errorf("second write without overwrite: %v", err)
	}
	if b, _ := os.ReadFile(path); string(b) != "one" {
		t.Errorf("refused write changed the file: %q", b)
	}
	if err := Write(path, []byte("two"), true); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); string(b) != "two" {
		t.Errorf("overwrite gave %q", b)
	}
}

// TestMissingDirectoryNamesTheTarget: the error names the file the user
// asked for, not the temporary file beside it.
func TestMissingDirectoryNamesTheTarget(t *testing.T) {
	path := filepath.Join(t.TempDir(), "no-such-dir", "annex.csv")
	err := Write(path, []byte("x"), false)
	if err == nil || !strings.Contains(err.Error(), path) || strings.Contains(err.Error(), ".tmp") || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("error %v", err)
	}
}
