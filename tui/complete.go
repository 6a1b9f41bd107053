package tui

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"syscall"
	"unicode/utf8"

	tea "github.com/charmbracelet/bubbletea"
)

// maxListed bounds the directory entries a completion reads, so a folder
// of a million files cannot stall the answer or fill the screen.
const maxListed = 4096

// completion is the answer to tab in a file dialog.
type completion struct {
	// value is the path completed as far as every match agrees.
	value string
	// cands are the names that still match (empty when one did).
	cands []string
	// more counts matches left out of cands.
	more int
	// note says why nothing was completed ("" when something was).
	note string
}

// completedMsg answers a completion asked for by dialog seq on path from.
type completedMsg struct {
	seq  uint64
	from string
	c    completion
}

// completeCmd completes path (relative paths from base) in the background:
// listing a folder is file work, which stays out of Update.
func completeCmd(seq uint64, path, base string, exts []string) tea.Cmd {
	return func() tea.Msg {
		return completedMsg{seq: seq, from: path, c: completePath(path, base, exts)}
	}
}

// completePath completes the last element of path against the folder it
// names: to the longest prefix all matches share, with a slash after a
// single folder. exts, when given, keeps only files with one of those
// extensions (folders always match). Hidden names match only a typed dot.
func completePath(path, base string, exts []string) completion {
	dir, prefix := filepath.Split(path)
	look := expandHome(dir)
	if look == "" {
		look = "."
	}
	if !filepath.IsAbs(look) && base != "" {
		look = filepath.Join(base, look)
	}
	f, err := os.Open(look)
	if err != nil {
		return completion{value: path, note: "no folder " + shown(dir)}
	}
	defer f.Close()
	entries, _ := f.ReadDir(maxListed)
	var names []string
	for _, e := range entries {
		n := e.Name()
		if !strings.HasPrefix(n, prefix) || (strings.HasPrefix(n, ".") && !strings.HasPrefix(prefix, ".")) {
			continue
		}
		isDir := e.IsDir()
		if e.Type()&os.ModeSymlink != 0 {
			if st, err := os.Stat(filepath.Join(look, n)); err == nil {
				isDir = st.IsDir()
			}
		}
		if isDir {
			names = append(names, n+string(filepath.Separator))
		} else if len(exts) == 0 || hasExt(n, exts) {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	switch len(names) {
	case 0:
		return completion{value: path, note: "nothing in " + shown(dir) + " starts with " + shown(prefix)}
	case 1:
		return completion{value: dir + names[0]}
	}
	c := completion{value: dir + commonPrefix(names)}
	c.cands = names
	if len(c.cands) > 12 {
		c.cands, c.more = c.cands[:12], len(c.cands)-12
	}
	return c
}

func shown(s string) string {
	if s == "" {
		return "“.”"
	}
	return "“" + s + "”"
}

// expandHome turns a leading ~/ into the home folder.
func expandHome(p string) string {
	if p == "~" || strings.HasPrefix(p, "~"+string(filepath.Separator)) {
		if h, err := os.UserHomeDir(); err == nil {
			return h + p[1:]
		}
	}
	return p
}

func hasExt(name string, exts []string) bool {
	e := strings.ToLower(strings.TrimPrefix(filepath.Ext(name), "."))
	for _, x := range exts {
		if e == x {
			return true
		}
	}
	return false
}

func commonPrefix(ss []string) string {
	p := ss[0]
	for _, s := range ss[1:] {
		for !strings.HasPrefix(s, p) {
			p = p[:len(p)-1]
		}
	}
	for !utf8.ValidString(p) { // never half a character
		p = p[:len(p)-1]
	}
	return p
}

// fileError says in one line what went wrong with a file and which one:
// the operating system's "open X: no such file or directory" becomes "no
// file X", and a message of several lines is joined.
func fileError(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		switch {
		case errors.Is(err, fs.ErrNotExist):
			return "✗ no file " + pe.Path + "; check the name (tab completes it)"
		case errors.Is(err, fs.ErrPermission):
			return "✗ no permission to use " + pe.Path
		case errors.Is(err, syscall.EISDIR):
			return "✗ " + pe.Path + " is a folder; add a file name"
		case errors.Is(err, syscall.ENOTDIR):
			return "✗ a part of " + pe.Path + " is a file, not a folder"
		}
	}
	msg := strings.Join(strings.Fields(strings.ReplaceAll(err.Error(), "\n", "; ")), " ")
	return "✗ " + strings.ReplaceAll(msg, " (use --force to replace it)", "")
}
