package recovery

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

var at = time.Date(2026, 3, 4, 5, 6, 7, 0, time.UTC)

// What is written is found again for the same design file, with the path
// and time it was written for, and is gone once removed.
func TestWriteFindRemove(t *testing.T) {
	s := New(filepath.Join(t.TempDir(), "rec"))
	path := filepath.Join(t.TempDir(), "frost.toml")
	if err := s.Write(s.Ticket(), path, []byte("title = \"x\"\n"), at); err != nil {
		t.Fatal(err)
	}
	e, err := s.Find(path)
	if err != nil || e == nil {
		t.Fatalf("Find: %v %v", e, err)
	}
	if e.Of != path || !e.Written.Equal(at) || !strings.HasSuffix(string(e.Design), "title = \"x\"\n") {
		t.Errorf("entry %+v", e)
	}
	if other, _ := s.Find(filepath.Join(filepath.Dir(path), "other.toml")); other != nil {
		t.Errorf("another design's file was offered: %+v", other)
	}
	if any, _ := s.Find(""); any == nil || any.File != e.File {
		t.Errorf("Find(\"\") = %+v, want the newest file", any)
	}
	if err := s.Remove(s.Ticket(), path); err != nil {
		t.Fatal(err)
	}
	if e, _ := s.Find(path); e != nil {
		t.Errorf("found after Remove: %+v", e)
	}
	if err := s.Remove(s.Ticket(), path); err != nil {
		t.Errorf("removing twice: %v", err)
	}
}

// A write that was asked for before a removal but runs after it is
// dropped: the file ends as the last request left it.
func TestOlderTicketsAreDropped(t *testing.T) {
	s := New(t.TempDir())
	early, late := s.Ticket(), s.Ticket()
	if err := s.Remove(late, ""); err != nil {
		t.Fatal(err)
	}
	if err := s.Write(early, "", []byte("a = 1\n"), at); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(s.FileFor("")); !os.IsNotExist(err) {
		t.Errorf("the overtaken write left a file: %v", err)
	}
	// Tickets are kept per file: an old ticket for another file still runs.
	if err := s.Write(early, "/x/other.toml", []byte("a = 1\n"), at); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(s.FileFor("/x/other.toml")); err != nil {
		t.Errorf("a write for another file was dropped: %v", err)
	}
}

// A file another running workbench keeps is not offered; one whose writer
// has ended is.
func TestLiveWritersFilesAreNotOffered(t *testing.T) {
	dir := t.TempDir()
	other := New(dir)
	other.pid = os.Getppid() // the test's parent: a process that runs
	if err := other.Write(other.Ticket(), "", []byte("a = 1\n"), at); err != nil {
		t.Fatal(err)
	}
	if e, _ := New(dir).Find(""); e != nil {
		t.Errorf("a live workbench's file was offered: %+v", e)
	}
	gone := New(dir)
	gone.pid = 1 << 30 // above any process id Linux hands out
	if err := gone.Write(gone.Ticket(), "", []byte("a = 1\n"), at); err != nil {
		t.Fatal(err)
	}
	if e, _ := New(dir).Find(""); e == nil {
		t.Error("an ended workbench's file was not offered")
	}
}

// Setting a file aside renames it to a design file that is no longer
// offered and does not replace an existing file.
func TestSetAside(t *testing.T) {
	s := New(t.TempDir())
	if err := s.Write(s.Ticket(), "", []byte("a = 1\n"), at); err != nil {
		t.Fatal(err)
	}
	e, _ := s.Find("")
	to, err := s.SetAside(e)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasSuffix(to, "-kept-20260304T050607.toml") {
		t.Errorf("set aside as %s", to)
	}
	if again, _ := s.Find(""); again != nil {
		t.Errorf("offered after setting aside: %+v", again)
	}
	if err := os.WriteFile(e.File, []byte("# written: 2026-03-04T05:06:07Z\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	if _, err := s.SetAside(e); err == nil {
		t.Error("setting aside replaced an existing kept file")
	}
}

// File names stay inside the directory whatever the design is called.
func TestFileForStaysInside(t *testing.T) {
	s := New("/r")
	for _, p := range []string{"../../etc/passwd", "/a/b/..toml", "/a/" + strings.Repeat("x", 300) + ".toml", "/a/ spaced name .toml"} {
		f := s.FileFor(p)
		if filepath.Dir(f) != "/r" || len(filepath.Base(f)) > 80 {
			t.Errorf("FileFor(%q) = %s", p, f)
		}
	}
}
