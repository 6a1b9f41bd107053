// Package recovery keeps the workbench's unsaved edits on disk, so that a
// crash, a closed terminal or a killed process loses at most the last
// moments of work. While a design has unsaved changes the workbench writes
// it, atomically (internal/safefile), to a recovery file in a directory of
// its own; saving or discarding the changes removes the file, and the next
// start offers what it finds.
//
// One recovery file is kept per design file (named by a hash of the
// design's absolute path) and one for designs that were never saved. The
// file is the design's own TOML, after comment lines that say which design
// it belongs to, which process wrote it and when, so it can also be opened
// as a design like any other.
//
// Writes run in the background while the user keeps typing, so a later
// write could overtake an earlier one. Every operation therefore takes a
// ticket, handed out in the order the workbench asks, and an operation
// whose ticket is older than one already carried out for the same file is
// dropped: the file always ends as the last request left it.
package recovery

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"time"

	"scorewright/internal/inputfile"
	"scorewright/internal/safefile"
)

// MaxBytes bounds a recovery file that is read back: the design file's own
// bound and a few header lines.
const MaxBytes = 4<<20 + 4096

// Store is one recovery directory. Its methods are safe for concurrent use.
type Store struct {
	dir string
	pid int

	mu     sync.Mutex
	issued uint64
	done   map[string]uint64 // per file, the newest ticket carried out
	closed bool
}

// Close waits for an operation in progress and makes every later one do
// nothing, so that nothing is written once the workbench has ended.
func (s *Store) Close() {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.closed = true
}

// New returns the store in dir, which is created when first written to.
func New(dir string) *Store {
	return &Store{dir: dir, pid: os.Getpid(), done: map[string]uint64{}}
}

// Dir is the directory the store keeps its files in.
func (s *Store) Dir() string { return s.dir }

// Ticket hands out the next ticket. Take it at the moment the operation is
// decided (in Update), not when it runs.
func (s *Store) Ticket() uint64 {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.issued++
	return s.issued
}

// Entry is a recovery file found on disk.
type Entry struct {
	// File is the recovery file itself.
	File string
	// Of is the design file the edits belong to ("" for a design that was
	// never saved).
	Of string
	// Written is when the edits were written.
	Written time.Time
	// Design is the design's TOML.
	Design []byte
	pid    int
}

// FileFor is the recovery file of the design at path ("" for a design that
// was never saved).
func (s *Store) FileFor(path string) string {
	if path == "" {
		return filepath.Join(s.dir, "never-saved.recover.toml")
	}
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	sum := sha256.Sum256([]byte(path))
	base := slug(strings.TrimSuffix(filepath.Base(path), filepath.Ext(path)))
	return filepath.Join(s.dir, base+"-"+hex.EncodeToString(sum[:5])+".recover.toml")
}

var slugChars = regexp.MustCompile(`[^A-Za-z0-9._-]+`)

func slug(s string) string {
	s = strings.Trim(slugChars.ReplaceAllString(s, "-"), "-.")
	if s == "" || len(s) > 40 {
		s = strings.TrimRight(s[:min(len(s), 40)], "-.")
	}
	if s == "" {
		s = "design"
	}
	return s
}

// Write keeps design (its TOML) as the unsaved edits of the design at path,
// unless an operation with a newer ticket was already carried out for it.
func (s *Store) Write(ticket uint64, path string, design []byte, at time.Time) error {
	file := s.FileFor(path)
	s.mu.Lock()
	defer s.mu.Unlock()
	if !s.current(file, ticket) {
		return nil
	}
	if err := os.MkdirAll(s.dir, 0o700); err != nil {
		return fmt.Errorf("recovery directory %s: %w", s.dir, err)
	}
	var b bytes.Buffer
	of := "(a design not saved yet)"
	if path != "" {
		if abs, err := filepath.Abs(path); err == nil {
			path = abs
		}
		of = path
	}
	fmt.Fprintf(&b, "# scorewright recovery file: unsaved edits, kept until they are saved or discarded\n")
	fmt.Fprintf(&b, "# of: %s\n# pid: %d\n# written: %s\n", of, s.pid, at.UTC().Format(time.RFC3339))
	b.Write(design)
	return safefile.Write(file, b.Bytes(), true)
}

// Remove deletes the recovery file of the design at path, unless an
// operation with a newer ticket was already carried out for it. A file
// that is not there is no error.
func (s *Store) Remove(ticket uint64, path string) error {
	file := s.FileFor(path)
	s.mu.Lock()
	defer s.mu.Unlock()
	if !s.current(file, ticket) {
		return nil
	}
	if err := os.Remove(file); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return err
	}
	return nil
}

// current reports whether the store is open and ticket is not older than
// the last one carried out for file, and makes it the last; s.mu is held.
func (s *Store) current(file string, ticket uint64) bool {
	if s.closed || ticket < s.done[file] {
		return false
	}
	s.done[file] = ticket
	return true
}

// Find returns the recovery file left for the design at path by a
// workbench that is no longer running, or nil. With path "", it returns
// the newest such file of any design. A file that cannot be read is an
// error naming it.
func (s *Store) Find(path string) (*Entry, error) {
	var files []string
	if path != "" {
		files = []string{s.FileFor(path)}
	} else {
		files, _ = filepath.Glob(filepath.Join(s.dir, "*.recover.toml"))
	}
	var found []*Entry
	for _, f := range files {
		e, err := read(f)
		switch {
		case errors.Is(err, fs.ErrNotExist):
			continue
		case err != nil:
			return nil, err
		case e.pid != s.pid && alive(e.pid):
			continue // another workbench is still working on it
		}
		found = append(found, e)
	}
	if len(found) == 0 {
		return nil, nil
	}
	sort.Slice(found, func(i, j int) bool { return found[i].Written.After(found[j].Written) })
	return found[0], nil
}

// SetAside renames e's file so that it is no longer offered, and returns
// its new name, which the user can open as a design later.
func (s *Store) SetAside(e *Entry) (string, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	to := strings.TrimSuffix(e.File, ".recover.toml") + "-kept-" + e.Written.UTC().Format("20060102T150405") + ".toml"
	if _, err := os.Lstat(to); err == nil {
		return "", fmt.Errorf("%s: %w", to, safefile.ErrExists)
	}
	if err := os.Rename(e.File, to); err != nil {
		return "", err
	}
	return to, nil
}

// Discard deletes e's file.
func (s *Store) Discard(e *Entry) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	if err := os.Remove(e.File); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return err
	}
	return nil
}

// read parses a recovery file's header and keeps its design text.
func read(file string) (*Entry, error) {
	b, err := inputfile.ReadFile(file, MaxBytes)
	if err != nil {
		return nil, err
	}
	e := &Entry{File: file, Design: b}
	sc := bufio.NewScanner(bytes.NewReader(b))
	for sc.Scan() {
		line := sc.Text()
		if !strings.HasPrefix(line, "#") {
			break
		}
		k, v, ok := strings.Cut(strings.TrimSpace(strings.TrimPrefix(line, "#")), ": ")
		if !ok {
			continue
		}
		switch k {
		case "of":
			if strings.HasPrefix(v, "/") || filepath.IsAbs(v) {
				e.Of = v
			}
		case "pid":
			e.pid, _ = strconv.Atoi(v)
		case "written":
			e.Written, _ = time.Parse(time.RFC3339, v)
		}
	}
	if e.Written.IsZero() {
		if st, err := os.Stat(file); err == nil {
			e.Written = st.ModTime()
		}
	}
	return e, nil
}

// alive reports whether a process with id pid runs (signal 0 probes it
// without touching it). A recycled id only delays the offer until that
// process ends.
func alive(pid int) bool {
	if pid <= 0 {
		return false
	}
	p, err := os.FindProcess(pid)
	if err != nil {
		return false
	}
	return p.Signal(syscall.Signal(0)) == nil
}

// DefaultDir is where the workbench keeps recovery files: the user's state
// directory ($XDG_STATE_HOME, else ~/.local/state) under
// scorewright/recovery, or the cache directory when there is no home.
func DefaultDir() (string, error) {
	if d := os.Getenv("XDG_STATE_HOME"); filepath.IsAbs(d) {
		return filepath.Join(d, "scorewright", "recovery"), nil
	}
	if h, err := os.UserHomeDir(); err == nil {
		return filepath.Join(h, ".local", "state", "scorewright", "recovery"), nil
	}
	c, err := os.UserCacheDir()
	if err != nil {
		return "", errors.New("no home or cache directory for recovery files")
	}
	return filepath.Join(c, "scorewright", "recovery"), nil
}
